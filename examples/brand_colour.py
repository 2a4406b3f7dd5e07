"""Matching a brand colour: thicknesses of a five-layer film that give an invented
brand's blue (#3366CC) face-on, within a total thickness, then how much 2 %
thickness scatter moves the colour.

Run: python examples/brand_colour.py
A computed match is a starting point: confirm on a coated, measured sample.
"""

from pathlib import Path

import lamella

HERE = Path(__file__).resolve().parent
scene = lamella.Scene.load(HERE.parent / "bench" / "design_5layer.json")

report = lamella.match(scene, target_hex="#3366CC", max_total_nm=900, seed=3)
print(f"ΔE00 {report['delta_e00']:.2f} ({report['stopped']}, {report['evaluations']} evaluations)")
for layer in report["thicknesses_nm"]:
    print(f"  {layer['pointer']:<12} {layer['material']:<8} {layer['value']:7.1f} nm")
matched = report["scene"]
print("achieved:", matched.color().hex[0])

spread = lamella.tolerance(matched, sigma_pct=2, samples=300, seed=1)
print(f"2 % thickness scatter: median ΔE00 {spread['delta_e00_p50']:.2f}, "
      f"95th percentile {spread['delta_e00_p95']:.2f}, yield {spread['yield']:.0%} within ΔE00 1")
print("most sensitive layer:", spread["sensitivity"][0]["pointer"])
