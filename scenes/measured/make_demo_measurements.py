#!/usr/bin/env python3
"""Invented demo measurements for the README's `fit` examples.

Each file is what an instrument might report for a sample made slightly
off its design: the demo scene with changed thicknesses is computed by
lamella itself, then seeded Gaussian noise (invented, for demos only) is
added. Nothing here is a real measurement.

Run from the repository root after `cargo build --release`:

    python3 scenes/measured/make_demo_measurements.py
"""

import json
import os
import random
import subprocess
import tempfile

HERE = os.path.dirname(os.path.abspath(__file__))
ROOT = os.path.dirname(os.path.dirname(HERE))
LAMELLA = os.path.join(ROOT, "target", "release", "lamella")


def run(*args):
    return subprocess.run([LAMELLA, *args], check=True, capture_output=True, text=True).stdout


def with_scene(doc, edit):
    doc = json.loads(json.dumps(doc))
    edit(doc)
    fd, path = tempfile.mkstemp(suffix=".json", dir=os.path.join(ROOT, "scenes"))
    with os.fdopen(fd, "w") as f:
        json.dump(doc, f)
    return path


def film(rng):
    """The teal label foil with ZnS 161 nm and MgF2 266 nm, seen at 8° and 45°."""
    with open(os.path.join(ROOT, "scenes", "teal_label_foil.json")) as f:
        doc = json.load(f)

    def edit(d):
        d["stack"][0]["stack"][0]["thickness_nm"] = 161.0
        d["stack"][0]["stack"][1]["thickness_nm"] = 266.0
        d["wavelengths_nm"] = {"from": 400, "to": 760, "step": 2}
        d["angles_deg"] = [8, 45]

    path = with_scene(doc, edit)
    try:
        rows = [line.split(",") for line in run("spectrum", path).splitlines()[1:]]
    finally:
        os.remove(path)
    out = ["wavelength_nm,R,angle_deg"]
    for row in rows:
        r = max(0.0, float(row[4]) + rng.gauss(0.0, 0.003))
        out.append(f"{float(row[0]):g},{r:.5f},{float(row[1]):g}")
    return "\n".join(out) + "\n"


def coating(rng):
    """The gold-pearl lid with TiO2 layers of 76 and 66 nm, at three geometries."""
    with open(os.path.join(ROOT, "scenes", "pearl_compact_lid.json")) as f:
        doc = json.load(f)

    def edit(d):
        d["coating"]["platelet"][0]["thickness_nm"] = 76.0
        d["coating"]["platelet"][2]["thickness_nm"] = 66.0
        d["wavelengths_nm"] = {"from": 400, "to": 700, "step": 10}

    path = with_scene(doc, edit)
    try:
        report = json.loads(
            run("multiangle", path, "--spectra", "--format", "json", "--geometries", "45as15,45as45,45as110")
        )
    finally:
        os.remove(path)
    out = ["wavelength_nm,R,geometry"]
    for g in report["geometries"]:
        for w, r in zip(report["wavelength_nm"], g["reflectance_factor"]):
            out.append(f"{w:g},{max(0.0, r + rng.gauss(0.0, 0.004)):.5f},{g['name']}")
    return "\n".join(out) + "\n"


def batch(rng):
    """A production batch of the teal label foil for `compare`: ZnS 157.6 nm and
    MgF2 270.2 nm, read at 0°, 15° and 45° by a spectrophotometer that writes
    a free-text preamble and a wide table in percent."""
    with open(os.path.join(ROOT, "scenes", "teal_label_foil.json")) as f:
        doc = json.load(f)

    def edit(d):
        d["stack"][0]["stack"][0]["thickness_nm"] = 157.6
        d["stack"][0]["stack"][1]["thickness_nm"] = 270.2
        d["wavelengths_nm"] = {"from": 380, "to": 780, "step": 5}
        d["angles_deg"] = [0, 15, 45]

    path = with_scene(doc, edit)
    try:
        rows = [line.split(",") for line in run("spectrum", path).splitlines()[1:]]
    finally:
        os.remove(path)
    by_wl = {}
    for row in rows:
        by_wl.setdefault(float(row[0]), []).append(float(row[4]))
    out = [
        "Harbourline Labels QC bench, batch 7 of the Quillon Tea foil (invented demo)",
        "# specular included, D65/10 not applied: spectral data only",
        "Wavelength (nm),%R@0,%R@15,%R@45",
    ]
    for w, rs in by_wl.items():
        cells = [f"{100 * max(0.0, r + rng.gauss(0.0, 0.001)):.3f}" for r in rs]
        out.append(f"{w:g}," + ",".join(cells))
    return "\n".join(out) + "\n"


def main():
    rng = random.Random(20261202)
    for name, make in (("teal_label_foil_sample.csv", film), ("pearl_readings.csv", coating)):
        with open(os.path.join(HERE, name), "w") as f:
            f.write(make(rng))
        print("wrote", name)
    # its own stream, so the files above stay as they were
    rng = random.Random(20310402)
    with open(os.path.join(HERE, "teal_label_foil_batch.csv"), "w") as f:
        f.write(batch(rng))
    print("wrote teal_label_foil_batch.csv")


if __name__ == "__main__":
    main()
