"""Colour differences of seeded random CIELAB pairs from colour-science 0.4.7
(`colour.delta_E`), saved as `colour_difference_reference.json` for the Rust
test `colour_differences_agree_with_colour_science` (tests/colour_difference.rs).

Run: python3 reference_data/colour_difference/make_colour_difference_reference.py
"""

import json
import pathlib

import colour
import numpy as np

assert colour.__version__ == "0.4.7", colour.__version__

rng = np.random.default_rng(20310402)
pairs = []
for i in range(300):
    lab1 = [rng.uniform(0, 100), rng.uniform(-100, 100), rng.uniform(-100, 100)]
    if i % 3 == 0:
        # near pairs, where tolerances are judged
        lab2 = [v + rng.normal(0, 2.0) for v in lab1]
    elif i % 3 == 1:
        # near-neutral references
        lab1[1:] = [rng.uniform(-3, 3), rng.uniform(-3, 3)]
        lab2 = [v + rng.normal(0, 3.0) for v in lab1]
    else:
        lab2 = [rng.uniform(0, 100), rng.uniform(-100, 100), rng.uniform(-100, 100)]
    lab1 = [float(v) for v in lab1]
    lab2 = [float(v) for v in lab2]
    a, b = np.array(lab1), np.array(lab2)
    pairs.append(
        {
            "reference": lab1,
            "sample": lab2,
            "de76": float(colour.delta_E(a, b, method="CIE 1976")),
            "de94": float(colour.delta_E(a, b, method="CIE 1994", textiles=False)),
            "cmc_2_1": float(colour.delta_E(a, b, method="CMC", l=2, c=1)),
            "cmc_1_1": float(colour.delta_E(a, b, method="CMC", l=1, c=1)),
            "de00": float(colour.delta_E(a, b, method="CIE 2000")),
            "de00_textiles": float(colour.delta_E(a, b, method="CIE 2000", textiles=True)),
        }
    )
out = {
    "source": "colour-science 0.4.7, colour.delta_E; seed 20310402",
    "methods": {
        "de76": "CIE 1976",
        "de94": "CIE 1994, textiles=False (kL=1, K1=0.045, K2=0.015)",
        "cmc_2_1": "CMC, l=2, c=1",
        "cmc_1_1": "CMC, l=1, c=1",
        "de00": "CIE 2000 (kL=kC=kH=1)",
        "de00_textiles": "CIE 2000, textiles=True (kL=2, kC=kH=1)",
    },
    "pairs": pairs,
}
path = pathlib.Path(__file__).with_name("colour_difference_reference.json")
path.write_text(json.dumps(out, indent=1) + "\n")
print(f"wrote {len(pairs)} pairs to {path}")
