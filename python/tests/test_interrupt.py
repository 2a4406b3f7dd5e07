"""Ctrl-C (SIGINT) stops long calls with KeyboardInterrupt, promptly.

Each long call runs in a child Python process that is sent SIGINT half a second
after it starts; the child reports how long the call took to give up. The work
chosen would take far longer than that uninterrupted.
"""

import json
import os
import signal
import subprocess
import sys
import textwrap
import time

import pytest

from conftest import BENCH, SCENES

# A periodic film averaged over 2000 disordered realisations: every grid point costs
# 200,000 layers, so the default grid takes minutes.
SLOW_FILM = {
    "title": "slow: 50 disordered periods, 2000 realisations (invented)",
    "stack": [{"repeat": 50, "stack": [{"material": "hi", "thickness_nm": 58.5, "vary_nm": [40, 80]},
                                       {"material": "lo", "thickness_nm": 94.2, "vary_nm": [70, 120]}]}],
    "substrate": "glass",
    "materials": {"hi": {"n": 2.35}, "lo": {"n": 1.46}, "glass": {"n": 1.52}},
    "angles_deg": {"from": 0, "to": 80, "step": 2},
    "disorder": {"sigma_nm": 1.0, "realizations": 2000},
}

PRELUDE = f"""
import sys, time, warnings
import numpy as np
import lamella
warnings.simplefilter("ignore")
slow = lamella.Scene.from_dict({json.dumps(SLOW_FILM)})
teal = lamella.Scene.load({str(SCENES / "teal_label_foil.json")!r})
pearl = lamella.Scene.load({str(SCENES / "pearl_compact_lid.json")!r})
medium = lamella.Scene.from_dict({{**{json.dumps(SLOW_FILM)}, "disorder": {{"sigma_nm": 1.0, "realizations": 20}}}})
five = lamella.Scene.load({str(BENCH / "design_5layer.json")!r})
"""

CALLS = {
    "spectrum": "slow.spectrum()",
    "color": "slow.color()",
    "reflectance_batch": "lamella.reflectance_batch(np.tile(np.r_[1.0, np.tile([2.3, 1.46], 500), 1.52], (81, 1)),"
                         " np.full((50_000, 1000), 100.0), np.linspace(380, 780, 81))",
    "match": "lamella.match(medium, target_lab=(50, 60, -70), max_evals=10**7)",
    "tolerance": "lamella.tolerance(teal, sigma_pct=2, samples=2_000_000)",
    "fit": "lamella.fit(medium, (np.linspace(400, 700, 61), np.linspace(0.1, 0.9, 61)), max_evals=10**7)",
    "sweep": "lamella.sweep(five, samples=20_000_000, as_frame=False)",
    "render": "lamella.render(teal, size=(3000, 3000), ssaa=4)",
    "chart": "lamella.chart(medium, kind='thickness-angle', steps=200)",
}


@pytest.mark.parametrize("name", list(CALLS))
def test_ctrl_c_stops_a_long_call(name):
    code = PRELUDE + textwrap.dedent(f"""
        print("ready", flush=True)
        start = time.perf_counter()
        try:
            {CALLS[name]}
        except KeyboardInterrupt:
            print("interrupted", time.perf_counter() - start, flush=True)
            sys.exit(0)
        print("finished", time.perf_counter() - start, flush=True)
        sys.exit(1)
    """)
    child = subprocess.Popen([sys.executable, "-c", code], stdout=subprocess.PIPE, stderr=subprocess.PIPE,
                             text=True)
    try:
        assert child.stdout.readline().strip() == "ready", child.stderr.read()
        time.sleep(0.5)
        sent = time.perf_counter()
        child.send_signal(signal.SIGINT)
        out, err = child.communicate(timeout=60)
        waited = time.perf_counter() - sent
    finally:
        if child.poll() is None:
            child.kill()
    assert out.startswith("interrupted"), (out, err)
    assert child.returncode == 0 and "Traceback" not in err and "panicked" not in err, err
    # "Within a second" on an idle machine; the margin covers a loaded shared CI machine.
    print(f"{name}: stopped {waited:.3f} s after SIGINT")
    assert waited < 3.0
