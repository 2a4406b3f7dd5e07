#!/usr/bin/env python3
"""High-precision reflectance and transmittance of long periodic stacks.

Reference: mpmath 1.3.0 (PyPI) at 50 significant digits. Nothing here shares
code with lamella: each case is computed from the characteristic matrices of
Born & Wolf, *Principles of Optics* (7th ed., 1999), section 1.6.2, with the
tilted admittances of Macleod, *Thin-Film Optical Filters* (4th ed., 2010),
section 2.6, and the power of the period's matrix is taken in closed form by
Abeles' theorem (Born & Wolf, section 1.6.5): for a unimodular 2x2 matrix M,

    M^N = U_{N-1}(x) M - U_{N-2}(x) I,   x = tr(M)/2,
    U_{k}(cos t) = sin((k+1) t) / sin t,

evaluated with the complex arccosine, so stop bands (|x| > 1, growing and
decaying Bloch waves), pass bands and absorbing periods take the same path
and no repeated squaring is involved. For N <= 64 the closed form is
checked against the plain product of N period matrices before anything is
written.

Inputs are the IEEE doubles that a scene file gives lamella (n, k,
thickness and wavelength converted exactly from the double); the angle of
incidence enters through the exact sin of the decimal angle.

Run from the repository root:

    python3 reference_data/long_stacks/make_long_stack_reference.py

Writes ``long_stack_reference.json`` beside this script; the output is
deterministic.
"""

import json
import os

import mpmath
from mpmath import mp, mpc, mpf

if mpmath.__version__ != "1.3.0":
    raise SystemExit(f"needs mpmath 1.3.0, found {mpmath.__version__}")
mp.dps = 50

OUT = os.path.join(os.path.dirname(os.path.abspath(__file__)), "long_stack_reference.json")

# Period counts, from one period to the largest a repeat group accepts.
COUNTS = [1, 2, 3, 7, 50, 1000, 12345, 1_000_000, 99_999_999, 100_000_000]
ANGLES_DEG = [0, 30, 60]
# Distances from each band edge (nm), on both sides.
EDGE_OFFSETS_NM = [2.0, 0.2, 0.02]

# The stacks: a cap layer on the incident side, then N periods, then the
# substrate, from air. Invented demo values (a two-material mirror).
STACKS = {
    "lossless": {
        "cap": {"n": 2.35, "k": 0.0, "thickness_nm": 58.0},
        "period": [
            {"n": 1.46, "k": 0.0, "thickness_nm": 94.2},
            {"n": 2.35, "k": 0.0, "thickness_nm": 58.5},
        ],
        "substrate_n": 1.52,
    },
    "weakly_absorbing": {
        "cap": {"n": 2.35, "k": 2e-4, "thickness_nm": 58.0},
        "period": [
            {"n": 1.46, "k": 0.0, "thickness_nm": 94.2},
            {"n": 2.35, "k": 2e-4, "thickness_nm": 58.5},
        ],
        "substrate_n": 1.52,
    },
}


def index(layer):
    return mpc(mpf(layer["n"]), mpf(layer["k"]))


def terms(n, beta):
    """q = n cos(theta) on the decaying branch, and the s and p admittances."""
    q = mp.sqrt(n * n - beta * beta)
    if q.imag < 0 or (q.imag == 0 and q.real < 0):
        q = -q
    return q, (q, n * n / q)


def layer_matrix(layer, k0, beta, pol):
    q, eta = terms(index(layer), beta)
    d = k0 * mpf(layer["thickness_nm"]) * q
    c, s = mp.cos(d), mp.sin(d)
    e = eta[pol]
    return [[c, -1j * s / e], [-1j * e * s, c]]


def mul(a, b):
    return [
        [a[0][0] * b[0][0] + a[0][1] * b[1][0], a[0][0] * b[0][1] + a[0][1] * b[1][1]],
        [a[1][0] * b[0][0] + a[1][1] * b[1][0], a[1][0] * b[0][1] + a[1][1] * b[1][1]],
    ]


def chebyshev_power(m, count):
    """M^count for unimodular M by Abeles' closed form."""
    x = (m[0][0] + m[1][1]) / 2
    t = mp.acos(x)
    st = mp.sin(t)
    u1 = mp.sin(count * t) / st  # U_{count-1}
    u2 = mp.sin((count - 1) * t) / st  # U_{count-2}
    return [[u1 * m[0][0] - u2, u1 * m[0][1]], [u1 * m[1][0], u1 * m[1][1] - u2]]


def rt(stack, count, wavelength_nm, angle_deg, pol):
    k0 = 2 * mp.pi / mpf(wavelength_nm)
    beta = mp.sin(mp.radians(angle_deg))  # incident medium: air, n = 1
    period = layer_matrix(stack["period"][0], k0, beta, pol)
    for layer in stack["period"][1:]:
        period = mul(period, layer_matrix(layer, k0, beta, pol))
    powered = chebyshev_power(period, count)
    if count <= 64:
        plain = [[1, 0], [0, 1]]
        for _ in range(count):
            plain = mul(plain, period)
        scale = max(abs(v) for row in plain for v in row)
        err = max(abs(powered[i][j] - plain[i][j]) for i in range(2) for j in range(2))
        assert err <= mpf(10) ** -40 * scale, (count, wavelength_nm, angle_deg, err)
    total = mul(layer_matrix(stack["cap"], k0, beta, pol), powered)
    _, eta_sub = terms(mpc(mpf(stack["substrate_n"]), 0), beta)
    _, eta_inc = terms(mpc(1, 0), beta)
    e0, em = eta_inc[pol], eta_sub[pol]
    b = total[0][0] + total[0][1] * em
    c = total[1][0] + total[1][1] * em
    r = abs((e0 * b - c) / (e0 * b + c)) ** 2
    t = 4 * e0.real * em.real / abs(e0 * b + c) ** 2
    return r, t


def band_edges(stack, angle_deg, pol):
    """Wavelengths (nm) where |tr M / 2| = 1 around the first-order stop band."""

    def excess(w):
        k0 = 2 * mp.pi / w
        beta = mp.sin(mp.radians(angle_deg))
        m = layer_matrix(stack["period"][0], k0, beta, pol)
        for layer in stack["period"][1:]:
            m = mul(m, layer_matrix(layer, k0, beta, pol))
        return abs(((m[0][0] + m[1][1]) / 2).real) - 1

    # Scan 380-780 nm for sign changes, then refine each by bisection.
    grid = [mpf(380) + mpf(i) / 2 for i in range(801)]
    values = [excess(w) for w in grid]
    edges = []
    for (w0, v0), (w1, v1) in zip(zip(grid, values), zip(grid[1:], values[1:])):
        if (v0 > 0) != (v1 > 0):
            lo, hi = w0, w1
            for _ in range(200):
                mid = (lo + hi) / 2
                if (excess(mid) > 0) == (v0 > 0):
                    lo = mid
                else:
                    hi = mid
            edges.append(float((lo + hi) / 2))
    return edges


def wavelengths(stack, angle_deg):
    """Points inside, outside and at the edges of the stop band (both polarizations)."""
    points = {400.0, 450.0, 700.0, 779.0}
    for pol in (0, 1):
        edges = band_edges(stack, angle_deg, pol)
        assert len(edges) >= 2, (angle_deg, pol, edges)
        points.add(round((edges[0] + edges[1]) / 2, 6))  # band centre
        for e in edges:
            for off in EDGE_OFFSETS_NM:
                points.add(round(e - off, 6))
                points.add(round(e + off, 6))
    return sorted(points)


def main():
    cases = []
    for name, stack in STACKS.items():
        for angle in ANGLES_DEG:
            for w in wavelengths(stack, angle):
                for count in COUNTS:
                    rs, ts = rt(stack, count, w, angle, 0)
                    rp, tp = rt(stack, count, w, angle, 1)
                    # 50 digits leave at least 35 after the closed form's cancellation.
                    tol = mpf(10) ** -35
                    for v in (rs, ts, rp, tp):
                        assert -tol <= v <= 1 + tol
                    if name == "lossless":
                        assert abs(rs + ts - 1) < tol and abs(rp + tp - 1) < tol
                    else:
                        assert rs + ts < 1 and rp + tp < 1
                    rs, ts, rp, tp = (float(v) for v in (rs, ts, rp, tp))
                    cases.append(
                        {
                            "stack": name,
                            "count": count,
                            "wavelength_nm": w,
                            "angle_deg": angle,
                            "R_s": rs,
                            "R_p": rp,
                            "T_s": ts,
                            "T_p": tp,
                        }
                    )
    doc = {
        "source": "mpmath 1.3.0 at 50 digits, Abeles closed-form power; "
        "generated by make_long_stack_reference.py",
        "stacks": STACKS,
        "cases": cases,
    }
    with open(OUT, "w") as f:
        json.dump(doc, f, indent=1)
        f.write("\n")
    print(f"{len(cases)} cases written to {OUT}")


if __name__ == "__main__":
    main()
