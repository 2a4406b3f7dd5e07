"""Fitting a measurement: recover the layer thicknesses of a five-layer film from
its reflectance spectrum. The "measurement" here is invented: the spectrum of a
known design with a little seeded noise, so the fit can be checked.

Run: python examples/fit_measurement.py
"""

from pathlib import Path

import numpy as np

import lamella

HERE = Path(__file__).resolve().parent
scene = lamella.Scene.load(HERE.parent / "bench" / "design_5layer.json")

# The invented sample: 37 % of the way through each layer's range, 0.2 % noise.
truth = {v["pointer"]: v["low"] + 0.37 * (v["high"] - v["low"]) for v in scene.variables}
wavelengths = np.arange(400.0, 761.0, 5.0)
R = scene.with_thicknesses(truth).spectrum(wavelengths_nm=wavelengths, angles_deg=[0.0]).R[0]
R = R + np.random.default_rng(1).normal(0.0, 0.002, R.shape)

report = lamella.fit(scene, (wavelengths, R), max_evals=4000)
print(f"rms residual {report['rms']:.4f} over {report['points']} points")
for layer in report["thicknesses_nm"]:
    u = layer.get("uncertainty")  # left out where the fit cannot determine it
    spread = f" ± {u:.2f}" if u is not None else ""
    print(f"  {layer['pointer']:<12} fitted {layer['value']:7.2f}{spread} nm (true {truth[layer['pointer']]:.2f})")
