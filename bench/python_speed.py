#!/usr/bin/env python3
"""Times the Python package against its targets and prints the ratios, both sides in one run.

1. `Scene.spectrum()` on bench/periodic.json (50 periods; 401 wavelengths x 90 angles,
   s and p) against one call of colour-science 0.4.7's `multilayer_tmm` on the same grid
   in this process (target: at least 1000x faster).
2. `reflectance_batch` on 100,000 random five-layer designs, 81 wavelengths, one angle
   (target: at least 300,000 designs per second on two cores).
3. The Python layer's overhead on a one-point spectrum: the time of
   `scene.spectrum(wavelengths_nm=[550], angles_deg=[0])` less the engine's own cost of
   one point (measured on the whole grid) (target: under 20 us per call).

Best times of several runs are kept (the machines are shared and noisy).
Usage: python bench/python_speed.py [--repeats N]
Needs the package (pip install ./python), numpy and colour-science==0.4.7.
"""

import argparse
import os
import time
import warnings

import numpy as np

warnings.filterwarnings("ignore")

import colour  # noqa: E402
from colour.phenomena.interference import multilayer_tmm  # noqa: E402

import lamella  # noqa: E402

BENCH = os.path.dirname(os.path.abspath(__file__))


def best(fn, repeats):
    times = []
    for _ in range(repeats):
        start = time.perf_counter()
        fn()
        times.append(time.perf_counter() - start)
    return min(times), float(np.median(times))


def main():
    ap = argparse.ArgumentParser()
    ap.add_argument("--repeats", type=int, default=5)
    args = ap.parse_args()
    print(f"lamella {lamella.__version__}, colour-science {colour.__version__}, {os.cpu_count()} cores")

    # 1. The periodic bench scene, in process.
    scene = lamella.Scene.load(os.path.join(BENCH, "periodic.json"))
    w, a = scene.wavelengths_nm, scene.angles_deg
    n = [1.0] + [2.35, 1.46] * 50 + [1.52]
    t = [58.5, 94.2] * 50
    t_cs, _ = best(lambda: multilayer_tmm(n, t, w, a), max(1, args.repeats // 2))
    t_la, t_la_median = best(scene.spectrum, 20 * args.repeats)
    s = scene.spectrum()
    R, _ = multilayer_tmm(n, t, w, a)
    diff = np.abs(s.R_s - R[:, :, 0, 0].T).max()
    print(f"\n1. periodic scene, {len(w)} x {len(a)} points, s and p")
    print(f"   colour-science multilayer_tmm, one call : {t_cs:9.4f} s")
    print(f"   lamella Scene.spectrum()                : {t_la:9.4f} s (median {t_la_median:.4f} s)")
    print(f"   ratio                                   : {t_cs / t_la:9.0f}x   (target 1000x); "
          f"{t_cs / t_la_median:.0f}x at lamella's median")
    print(f"   largest |R_s| difference                : {diff:.1e}")

    # 2. The batch API.
    rng = np.random.default_rng(1)
    wl = np.linspace(380.0, 780.0, 81)
    media = np.tile(np.array([1.0, 2.35, 1.46, 2.35, 1.46, 2.35, 1.52], dtype=complex), (81, 1))
    thick = rng.uniform(20.0, 300.0, (100_000, 5))
    lamella.reflectance_batch(media, thick[:1000], wl)  # warm the thread pool
    t_batch, t_batch_median = best(lambda: lamella.reflectance_batch(media, thick, wl, [0.0]), args.repeats)
    rate = len(thick) / t_batch
    print("\n2. reflectance_batch, 100,000 five-layer designs x 81 wavelengths x 1 angle")
    print(f"   best {t_batch:.4f} s (median {t_batch_median:.4f} s): {rate:,.0f} designs/s "
          f"= {rate / 300_000:.2f}x the target of 300,000/s")

    # 3. Overhead on a one-point spectrum.
    one = ([550.0], [0.0])
    calls = 20_000
    for _ in range(1000):
        scene.spectrum(*one)
    t_calls = min(best(lambda: [scene.spectrum(*one) for _ in range(calls)], 3)[0], 1e9) / calls
    engine_point = t_la / (len(w) * len(a))
    overhead = t_calls - engine_point
    print("\n3. one-point spectrum (periodic scene, 550 nm, 0 deg)")
    print(f"   per call {t_calls * 1e6:.2f} us; the engine's cost of one point {engine_point * 1e6:.2f} us")
    print(f"   Python layer overhead {overhead * 1e6:.2f} us = {20e-6 / overhead:.1f}x under the 20 us target")


if __name__ == "__main__":
    main()
