#!/usr/bin/env python3
"""Reference R and T of stacks with thick incoherent layers.

Reference: mpmath 1.3.0 (PyPI) at 40 significant digits, by the
intensity-matrix method of Katsidis & Siapkas, "General transfer-matrix
method for optical multilayer systems with coherent, partially coherent,
and incoherent interference", Appl. Opt. 41, 3978 (2002), eq. 13-22: each
coherent run between two media becomes the 2x2 intensity matrix

    (1/|t_f|^2) [[1, -|r_b|^2], [|r_f|^2, |t_f t_b|^2 - |r_f r_b|^2]]

(written with power transmittances for tilted admittances), each thick
layer the matrix diag(1/alpha, alpha) of its single-pass power attenuation
alpha = exp(-2 Im delta), and the stack's matrix is their product:
R = M[1][0]/M[0][0], T = 1/M[0][0]. lamella combines the same parts by a
different (pairwise, bounded) rule, so agreement checks its bookkeeping.
Coherent runs use characteristic matrices (Born & Wolf, Principles of
Optics, 7th ed. 1999, section 1.6.2) with tilted admittances (Macleod,
Thin-Film Optical Filters, 4th ed. 2010, section 2.6); from inside an
absorbing thick layer, power transmittance follows Byrnes, "Multilayer
optical calculations", arXiv:1603.02720 (2016), eq. 14-15.

Each case is also written as a lamella scene. Stacks are seeded random
(seed 20261202), invented for the test.

Run from the repository root:

    python3 reference_data/incoherent/make_incoherent_reference.py
"""

import json
import os
import random

import mpmath
from mpmath import mp, mpc, mpf

if mpmath.__version__ != "1.3.0":
    raise SystemExit(f"needs mpmath 1.3.0, found {mpmath.__version__}")
mp.dps = 40
SEED = 20261202
OUT = os.path.join(os.path.dirname(os.path.abspath(__file__)), "incoherent_reference.json")


def q_of(n, beta):
    q = mp.sqrt(n * n - beta * beta)
    if q.imag < 0 or (q.imag == 0 and q.real < 0):
        q = -q
    return q


def eta(n, beta, pol):
    q = q_of(n, beta)
    return q if pol == 0 else n * n / q


def run_matrix(layers, k0, beta, pol):
    m = [[mpc(1), mpc(0)], [mpc(0), mpc(1)]]
    for n, d in layers:
        delta = k0 * d * q_of(n, beta)
        e = eta(n, beta, pol)
        c, s = mp.cos(delta), mp.sin(delta)
        layer = [[c, -1j * s / e], [-1j * e * s, c]]
        m = [
            [m[0][0] * layer[0][0] + m[0][1] * layer[1][0], m[0][0] * layer[0][1] + m[0][1] * layer[1][1]],
            [m[1][0] * layer[0][0] + m[1][1] * layer[1][0], m[1][0] * layer[0][1] + m[1][1] * layer[1][1]],
        ]
    return m


def power(m, ea, eb):
    """Power R and T of a run with matrix m from medium a (admittance ea) into b."""
    b = m[0][0] + m[0][1] * eb
    c = m[1][0] + m[1][1] * eb
    den = ea * b + c
    r = abs((ea * b - c) / den) ** 2
    t = 4 * abs(ea) ** 2 * eb.real / ea.real / abs(den) ** 2
    return r, t


def intensity_matrix(layers, na, nb, k0, beta, pol):
    ea, eb = eta(na, beta, pol), eta(nb, beta, pol)
    rf, tf = power(run_matrix(layers, k0, beta, pol), ea, eb)
    rb, tb = power(run_matrix(list(reversed(layers)), k0, beta, pol), eb, ea)
    return [[1 / tf, -rb / tf], [rf / tf, (tf * tb - rf * rb) / tf]]


def mul(a, b):
    return [
        [a[0][0] * b[0][0] + a[0][1] * b[1][0], a[0][0] * b[0][1] + a[0][1] * b[1][1]],
        [a[1][0] * b[0][0] + a[1][1] * b[1][0], a[1][0] * b[0][1] + a[1][1] * b[1][1]],
    ]


def rt(case, wavelength, angle, pol):
    k0 = 2 * mp.pi / mpf(wavelength)
    n0 = mpc(case["incident_n"], 0)
    beta = n0.real * mp.sin(mp.radians(angle))
    index = lambda l: mpc(mpf(l["n"]), mpf(l["k"]))
    total = [[mpc(1), mpc(0)], [mpc(0), mpc(1)]]
    run, left = [], n0
    for item in case["stack"]:
        n = index(item)
        if item.get("incoherent"):
            total = mul(total, intensity_matrix(run, left, n, k0, beta, pol))
            alpha = mp.exp(-2 * k0 * mpf(item["thickness_um"]) * 1000 * q_of(n, beta).imag)
            total = mul(total, [[1 / alpha, 0], [0, alpha]])
            run, left = [], n
        else:
            run.append((n, mpf(item["thickness_nm"])))
    total = mul(total, intensity_matrix(run, left, mpc(case["substrate_n"], 0), k0, beta, pol))
    r = total[1][0] / total[0][0]
    t = 1 / total[0][0]
    return float(r.real), float(t.real)


def random_case(rng):
    def film():
        return {
            "n": round(rng.uniform(1.3, 2.5), 4),
            "k": round(rng.choice([0.0, rng.uniform(0.0, 0.3)]), 4),
            "thickness_nm": round(rng.uniform(10.0, 250.0), 2),
        }

    stack = [film() for _ in range(rng.randint(0, 3))]
    for _ in range(rng.randint(1, 2)):
        stack.append(
            {
                "n": round(rng.uniform(1.4, 1.7), 4),
                "k": round(rng.choice([0.0, rng.uniform(0.0, 2e-5)]), 7),
                "thickness_um": round(rng.uniform(5.0, 2000.0), 2),
                "incoherent": True,
            }
        )
        stack.extend(film() for _ in range(rng.randint(0, 3)))
    return {
        "incident_n": 1.0,
        "stack": stack,
        "substrate_n": round(rng.uniform(1.0, 1.8), 4),
        "wavelengths_nm": sorted(round(rng.uniform(380.0, 780.0), 2) for _ in range(5)),
        "angles_deg": [0.0, round(rng.uniform(10.0, 60.0), 2)],
    }


def main():
    rng = random.Random(SEED)
    cases = []
    for _ in range(30):
        case = random_case(rng)
        for key in ("R_s", "R_p", "T_s", "T_p"):
            case[key] = []
        for angle in case["angles_deg"]:
            rows = {"R_s": [], "R_p": [], "T_s": [], "T_p": []}
            for w in case["wavelengths_nm"]:
                (rs, ts), (rp, tp) = rt(case, w, angle, 0), rt(case, w, angle, 1)
                for key, v in (("R_s", rs), ("T_s", ts), ("R_p", rp), ("T_p", tp)):
                    assert 0.0 <= v <= 1.0
                    rows[key].append(v)
            for key in rows:
                case[key].append(rows[key])
        cases.append(case)
    doc = {
        "source": "mpmath 1.3.0 at 40 digits, intensity matrices of Katsidis & Siapkas 2002; "
        "generated by make_incoherent_reference.py",
        "cases": cases,
    }
    with open(OUT, "w") as f:
        json.dump(doc, f, indent=1)
        f.write("\n")
    print(f"{len(cases)} cases written to {OUT}")


if __name__ == "__main__":
    main()
