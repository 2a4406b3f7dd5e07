"""Every script in examples/ runs (the Dask one on fewer designs)."""

import os
import subprocess
import sys

import pytest

from conftest import REPO

EXAMPLES = sorted((REPO / "examples").glob("*.py"))


@pytest.mark.parametrize("script", EXAMPLES, ids=[p.name for p in EXAMPLES])
def test_example_runs(script, tmp_path):
    env = {**os.environ, "LAMELLA_EXAMPLE_SAMPLES": "4000", "PYTHONWARNINGS": "ignore"}
    run = subprocess.run([sys.executable, str(script)], cwd=tmp_path, env=env, capture_output=True,
                         text=True, timeout=300)
    assert run.returncode == 0, run.stderr
    assert run.stdout.strip()


def test_there_is_an_example_per_user_story():
    assert {p.stem for p in EXAMPLES} >= {"angle_colour", "brand_colour", "fit_measurement", "dask_sweep"}
