"""Shared fixtures: the repository, the `lamella` binary and a way to run it."""

import json
import os
import subprocess
import warnings
from pathlib import Path

import pytest

REPO = Path(__file__).resolve().parents[2]
SCENES = REPO / "scenes"
BENCH = REPO / "bench"
BINARY = Path(os.environ.get("LAMELLA_BIN", REPO / "target" / "release" / "lamella"))

# Every demo scene, the ones that describe a film (the others are coatings),
# and among the films those with uniaxial, biaxial or helicoidal layers.
ALL_SCENES = sorted(p.name for p in SCENES.glob("*.json"))


def _anisotropic(name):
    materials = json.loads((SCENES / name).read_text()).get("materials", {})
    return any(isinstance(m, dict) and ("uniaxial" in m or "biaxial" in m) for m in materials.values())


ANISOTROPIC_SCENES = [n for n in ALL_SCENES if _anisotropic(n)]
FILM_SCENES = [n for n in ALL_SCENES if "stack" in json.loads((SCENES / n).read_text())]
COATING_SCENES = [n for n in ALL_SCENES if n not in FILM_SCENES]


class Run:
    """The outcome of one `lamella` run."""

    def __init__(self, proc):
        self.code = proc.returncode
        self.stdout = proc.stdout
        self.stderr = proc.stderr

    @property
    def message(self):
        """The error line without the `lamella: ` prefix."""
        lines = [l for l in self.stderr.splitlines() if not l.startswith("lamella: warning:")]
        assert lines, self.stderr
        return lines[-1].removeprefix("lamella: ")

    def json(self):
        return json.loads(self.stdout)


@pytest.fixture(scope="session")
def cli():
    """Runs the command-line binary (built by `cargo build --release`)."""
    if not BINARY.exists():
        pytest.fail(f"{BINARY} is missing: run `cargo build --release` first")

    def run(*args, cwd=None):
        proc = subprocess.run(
            [str(BINARY), *map(str, args)], capture_output=True, text=True, cwd=cwd, timeout=600
        )
        return Run(proc)

    return run


@pytest.fixture(autouse=True)
def quiet_scene_warnings():
    """Scene warnings (a material outside its source's range) are expected on demo scenes."""
    import lamella

    with warnings.catch_warnings():
        warnings.simplefilter("ignore", lamella.SceneWarning)
        yield
