#!/usr/bin/env python3
"""Time lamella against colour-science on two large stacks, and check its output.

For each bench scene (bench/periodic.json, bench/irregular.json):

(a) colour-science 0.4.7 `colour.phenomena.interference.multilayer_tmm` on the full grid
    (380-780 nm step 1 x 0-89 deg step 1; s and p come out of every call together).
    Two ways are timed and a ratio is printed against each:
      - "one call": a single call vectorised over all wavelengths and all angles
        (the reference named by the performance targets);
      - "per angle": one call per angle, vectorised over wavelength (smaller
        temporaries, usually faster; printed as the stricter comparison).
(b) the whole process `lamella spectrum SCENE --format csv -o /dev/null`.

Both sides: best wall time. colour-science: of --repeats runs of each way. lamella: of
bursts of at least 10 runs, one before colour-science and one after each colour-science
run, so that its runs are spread over the whole measurement; a run of a few
milliseconds on two cores is far more exposed to scheduling noise on a shared machine
than one of seconds on one core, and costs little to repeat (its median is printed too).
The lamella peak memory is the max RSS of the lamella process alone, as reported by GNU
time (/usr/bin/time -f %M) around a separate run (not the RUSAGE_CHILDREN maximum over
all children; see run_lamella); lamella starts with posix_spawn, so the size of this
Python process does not weigh on its start.

Then lamella is run once more writing a real CSV, and R_s, R_p, T_s, T_p are compared with
colour-science over the whole grid. All media are lossless and every wave propagates in
these scenes, so multilayer_tmm is a valid reference here (see reference_data/README.md).

Usage (from anywhere):
    python3 bench/compare_colour_science.py [--lamella PATH] [--repeats N] [--write-scenes]
"""

import argparse
import csv
import json
import os
import resource
import sys
import tempfile
import time
import warnings

import numpy as np

warnings.filterwarnings("ignore")  # colour-science warns about optional deps

import colour  # noqa: E402
from colour.phenomena.interference import multilayer_tmm  # noqa: E402

REPO = os.path.dirname(os.path.dirname(os.path.abspath(__file__)))
BENCH = os.path.join(REPO, "bench")
CSV_HEADER = ["wavelength_nm", "angle_deg", "R_s", "R_p", "R", "T_s", "T_p", "T", "A"]
GRIDS = {
    "wavelengths_nm": {"from": 380, "to": 780, "step": 1},
    "angles_deg": {"from": 0, "to": 89, "step": 1},
    "illuminant": "D65",
    "observer": "CIE1931_2",
}
MATERIALS = {"hi": {"n": 2.35, "k": 0.0}, "lo": {"n": 1.46, "k": 0.0}, "glass": {"n": 1.52, "k": 0.0}}


def periodic_scene():
    return {
        "title": "Bench: 50 periods of high/low index on glass",
        "incident": "air",
        "stack": [
            {
                "repeat": 50,
                "stack": [
                    {"material": "hi", "thickness_nm": 58.5},
                    {"material": "lo", "thickness_nm": 94.2},
                ],
            }
        ],
        "substrate": "glass",
        "materials": MATERIALS,
        **GRIDS,
    }


def irregular_scene():
    rng = np.random.default_rng(2026)
    thicknesses = np.round(rng.uniform(40.0, 160.0, 100), 2)
    return {
        "title": "Bench: 100 alternating high/low layers, seeded random thicknesses 40-160 nm",
        "incident": "air",
        "stack": [
            {"material": "hi" if i % 2 == 0 else "lo", "thickness_nm": float(d)}
            for i, d in enumerate(thicknesses)
        ],
        "substrate": "glass",
        "materials": MATERIALS,
        **GRIDS,
    }


SCENES = {"periodic": periodic_scene, "irregular": irregular_scene}


def grid(spec):
    count = int(round((spec["to"] - spec["from"]) / spec["step"])) + 1
    return spec["from"] + spec["step"] * np.arange(count, dtype=float)


def index_of(scene, name):
    if name == "air":
        return 1.0
    material = scene["materials"][name]
    assert set(material) <= {"n", "k"}, "bench flattener handles constant n, k only"
    return complex(material["n"], material.get("k", 0.0))


def flatten(scene, stack):
    layers = []
    for item in stack:
        if "repeat" in item:
            layers += flatten(scene, item["stack"]) * item["repeat"]
        else:
            layers.append((index_of(scene, item["material"]), item["thickness_nm"]))
    return layers


def colour_science_inputs(scene):
    layers = flatten(scene, scene["stack"])
    n = [index_of(scene, scene["incident"])] + [m for m, _ in layers]
    n.append(index_of(scene, scene["substrate"]))
    t = [d for _, d in layers]
    return n, t, grid(scene["wavelengths_nm"]), grid(scene["angles_deg"])


def cs_one_call(n, t, wl, ang):
    R, T = multilayer_tmm(n, t, wl, ang)  # shape (W, A, 1, 2)
    return R[:, :, 0, :].transpose(1, 0, 2), T[:, :, 0, :].transpose(1, 0, 2)


def cs_per_angle(n, t, wl, ang):
    R = np.empty((len(ang), len(wl), 2))
    T = np.empty((len(ang), len(wl), 2))
    for i, a in enumerate(ang):
        r, tt = multilayer_tmm(n, t, wl, a)  # shape (W, 1, 1, 2)
        R[i], T[i] = r[:, 0, 0, :], tt[:, 0, 0, :]
    return R, T


def best_of(repeats, fn, between=lambda: None):
    """Best wall time of `repeats` calls of fn (and its last result); `between` runs
    after each call, untimed."""
    best, result = float("inf"), None
    for _ in range(repeats):
        start = time.perf_counter()
        result = fn()
        best = min(best, time.perf_counter() - start)
        between()
    return best, result


GNU_TIME = "/usr/bin/time"


def run_lamella(binary, scene_path, out_path, memory=True):
    """Run lamella once; return (wall seconds, max RSS in MiB, exit status, stderr text).

    The max RSS is taken from GNU time's report on its own child (%M), because on Linux
    a child's ru_maxrss also counts the memory of the process it was spawned from,
    before exec. Without GNU time, os.wait4 on a direct child is used; that value can
    include this Python process's size at spawn time (a warning is printed).
    """
    argv = [binary, "spectrum", scene_path, "--format", "csv", "-o", out_path]
    with tempfile.TemporaryDirectory() as tmp:
        stats = os.path.join(tmp, "rss")
        with_time = memory and USE_GNU_TIME
        if with_time:
            argv = [GNU_TIME, "-f", "%M", "-o", stats] + argv
        with open(os.path.join(tmp, "stderr"), "w+b") as err:
            actions = [
                (os.POSIX_SPAWN_OPEN, 0, os.devnull, os.O_RDONLY, 0),
                (os.POSIX_SPAWN_OPEN, 1, os.devnull, os.O_WRONLY, 0),
                (os.POSIX_SPAWN_DUP2, err.fileno(), 2),
            ]
            start = time.perf_counter()
            pid = os.posix_spawn(argv[0], argv, os.environ, file_actions=actions)
            _, status, usage = os.wait4(pid, 0)
            wall = time.perf_counter() - start
            err.seek(0)
            message = err.read().decode(errors="replace").strip()
        code = os.waitstatus_to_exitcode(status)
        if with_time:
            with open(stats) as f:
                lines = f.read().split()
            rss_kib = float(lines[-1]) if code == 0 and lines else float("nan")
        else:
            rss_kib = usage.ru_maxrss
    return wall, rss_kib / 1024.0, code, message


USE_GNU_TIME = os.access(GNU_TIME, os.X_OK)
LAMELLA_BURST = 10


def read_lamella_csv(path, wl, ang):
    """Return R_s, R_p, T_s, T_p as (angles, wavelengths) arrays, matched by value."""
    wl_index = {round(w, 6): i for i, w in enumerate(wl)}
    ang_index = {round(a, 6): i for i, a in enumerate(ang)}
    columns = ["R_s", "R_p", "T_s", "T_p"]
    out = {c: np.full((len(ang), len(wl)), np.nan) for c in columns}
    with open(path, newline="") as f:
        reader = csv.reader(f)
        header = next(reader)
        if header != CSV_HEADER:
            raise ValueError(f"unexpected CSV header {header}")
        for row in reader:
            w = wl_index[round(float(row[0]), 6)]
            a = ang_index[round(float(row[1]), 6)]
            for c in columns:
                out[c][a, w] = float(row[CSV_HEADER.index(c)])
    missing = int(np.isnan(out["R_s"]).sum())
    if missing:
        raise ValueError(f"{missing} grid points missing from lamella CSV")
    return out


def load_scene(name):
    path = os.path.join(BENCH, f"{name}.json")
    with open(path) as f:
        return path, json.load(f)


def lamella_side(name, binary, repeats, csv_dir):
    """Time lamella on one scene and keep one real CSV; return a result dict or an error.

    The dict's "burst" runs LAMELLA_BURST more timed runs; colour_science_side calls it
    between its own repetitions, so that lamella's runs are spread over the whole
    measurement rather than bunched before it.
    """
    path, scene = load_scene(name)
    # Timed runs start lamella directly; the memory run goes through GNU time,
    # whose own start-up would otherwise count as lamella's.
    runs = []

    def burst():
        runs.extend(run_lamella(binary, path, os.devnull, memory=False)
                    for _ in range(max(repeats, LAMELLA_BURST)))

    burst()
    failed = [r for r in runs if r[2] != 0]
    _, rss, code, message = run_lamella(binary, path, os.devnull)
    failed += [(0.0, rss, code, message)] if code != 0 else []
    if failed:
        return {"error": f"exit status {failed[0][2]}: {failed[0][3]}"}
    out = os.path.join(csv_dir, f"{name}.csv")
    _, _, code, message = run_lamella(binary, path, out)
    if code != 0:
        return {"error": f"csv check run, exit status {code}: {message}"}
    return {"runs": runs, "burst": burst, "rss": rss, "csv": out}


def colour_science_side(name, repeats, lamella):
    _, scene = load_scene(name)
    n, t, wl, ang = colour_science_inputs(scene)
    print(f"\n== {name}: {len(t)} layers, {len(wl)} wavelengths x {len(ang)} angles ==")
    between = lamella["burst"] if lamella and "burst" in lamella else (lambda: None)
    t_one, _ = best_of(repeats, lambda: cs_one_call(n, t, wl, ang), between)
    t_per, (R_cs, T_cs) = best_of(repeats, lambda: cs_per_angle(n, t, wl, ang), between)
    t_cs = min(t_one, t_per)
    print(f"colour-science {colour.__version__} multilayer_tmm (best of {repeats}):")
    print(f"  one call, vectorised over wavelength and angle : {t_one:8.3f} s")
    print(f"  one call per angle, vectorised over wavelength : {t_per:8.3f} s")
    print(f"  best                                           : {t_cs:8.3f} s")

    if lamella is None:
        return
    if "error" in lamella:
        print(f"lamella failed: {lamella['error']}")
        return
    failed = [r for r in lamella["runs"] if r[2] != 0]
    if failed:
        print(f"lamella failed: exit status {failed[0][2]}: {failed[0][3]}")
        return
    times = sorted(r[0] for r in lamella["runs"])
    best = times[0]
    print(f"lamella whole process, csv to /dev/null (best of {len(times)}): "
          f"{best * 1e3:.2f} ms (median {times[len(times) // 2] * 1e3:.2f} ms)")
    print(f"lamella peak memory (max RSS of the process): {lamella['rss']:.1f} MiB")
    print(f"ratio colour-science one call / lamella: {t_one / best:.1f}x")
    print(f"ratio colour-science per-angle calls / lamella: {t_per / best:.1f}x")
    try:
        lam = read_lamella_csv(lamella["csv"], wl, ang)
    except (ValueError, KeyError, IndexError) as e:
        print(f"lamella CSV check failed: {e!r}")
        return
    print("max |lamella - colour-science| over the whole grid:")
    for c, ref in (("R_s", R_cs[..., 0]), ("R_p", R_cs[..., 1]),
                   ("T_s", T_cs[..., 0]), ("T_p", T_cs[..., 1])):
        diff = np.abs(lam[c] - ref)
        a, w = np.unravel_index(np.argmax(diff), diff.shape)
        print(f"  {c}: {diff.max():.3e}  (at {wl[w]:g} nm, {ang[a]:g} deg)")


def write_scenes():
    for name, build in SCENES.items():
        path = os.path.join(BENCH, f"{name}.json")
        with open(path, "w") as f:
            json.dump(build(), f, indent=1)
            f.write("\n")
        print(f"wrote {path}")


def main():
    parser = argparse.ArgumentParser(description=__doc__.split("\n")[0])
    parser.add_argument("--lamella", default="target/release/lamella",
                        help="lamella binary (relative paths are from the repo root)")
    parser.add_argument("--repeats", type=int, default=3, help="runs per timing (best kept)")
    parser.add_argument("--scenes", nargs="+", choices=sorted(SCENES), default=list(SCENES))
    parser.add_argument("--write-scenes", action="store_true",
                        help="(re)write bench/periodic.json and bench/irregular.json, then exit")
    args = parser.parse_args()
    if args.write_scenes:
        write_scenes()
        return
    binary = args.lamella if os.path.isabs(args.lamella) else os.path.join(REPO, args.lamella)
    with tempfile.TemporaryDirectory() as csv_dir:
        # lamella first, while this process is still small (see run_lamella).
        results = dict.fromkeys(args.scenes)
        if os.path.isfile(binary) and os.access(binary, os.X_OK):
            if not USE_GNU_TIME:
                print(f"warning: {GNU_TIME} not found; lamella max RSS from os.wait4 may "
                      "include this Python process's size at spawn")
            for name in args.scenes:
                results[name] = lamella_side(name, binary, args.repeats, csv_dir)
        else:
            print(f"lamella: binary not found at {binary} -- build it (cargo build --release) "
                  "or pass --lamella PATH; only the colour-science times are reported.")
        for name in args.scenes:
            colour_science_side(name, args.repeats, results[name])
    peak = resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 1024.0
    print(f"\n(this Python process peak RSS, colour-science side: {peak:.0f} MiB)")


if __name__ == "__main__":
    sys.exit(main())
