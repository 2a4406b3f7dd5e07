"""Angle colour of a design: how the teal label foil of a fictional tea brand
(an invented demo) travels in colour as it tilts, as numbers and as a chart.

Run: python examples/angle_colour.py  (writes angle_colour_strip.png in the current folder)
Screen colours are approximations; colour sign-off needs a measured sample.
"""

from pathlib import Path

import lamella

HERE = Path(__file__).resolve().parent
scene = lamella.Scene.load(HERE.parent / "scenes" / "teal_label_foil.json")

# Colour at every angle of the scene, under its light (D65) and observer.
colours = scene.color()
for angle, hex_code, L, h in zip(colours.angle_deg, colours.hex, colours.L, colours.h):
    print(f"{angle:5.1f}°  {hex_code}  L* {L:5.1f}  h {h:5.1f}°")
print(f"ΔE00 from 0° to {colours.angle_deg[-1]:.0f}°: {colours.delta_e00_from_first[-1]:.1f}")

# The reflectance behind it, at normal incidence and at 45°.
spectrum = scene.spectrum(angles_deg=[0.0, 45.0])
peak = spectrum.wavelength_nm[spectrum.R.argmax(axis=1)]
print(f"reflectance peak: {peak[0]:.0f} nm at 0°, {peak[1]:.0f} nm at 45°")

# The same as a chart (Jupyter shows the Chart object inline).
lamella.chart(scene, kind="angle-strip", size=(900, 500)).save("angle_colour_strip.png")
