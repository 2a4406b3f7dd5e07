#!/usr/bin/env python3
"""Generate multilayer reflectance/transmittance reference cases.

Reference library: colour-science 0.4.7 (PyPI),
``colour.phenomena.interference.multilayer_tmm``.

Run from the repository root:

    python3 reference_data/tmm/make_tmm_reference.py

Writes ``reference_data/tmm/multilayer_tmm_cases.json`` next to this script.

multilayer_tmm derives every refraction angle from Snell's law on the *real*
parts of the indices and uses ``arcsin`` (NaN beyond the critical angle), so its
output is only used where it is valid:

* oblique cases: every medium lossless (k = 0) and every wave propagating,
  i.e. n_incident * sin(theta) < n_j for every layer and the substrate;
* normal-incidence cases (theta = 0): layers may absorb (k > 0); incident
  medium and substrate stay lossless.

Self-checks (assertions) before anything is written:

* lossless cases: R + T = 1 for each polarisation to 1e-12;
* absorbing cases: 0 <= A = 1 - R - T <= 1 and A > 0 when some layer has k > 0;
* every single-layer case: R and T against the Airy summation of a single film
  with complex Fresnel coefficients (Born & Wolf, Principles of Optics,
  7th ed. 1999, section 1.6 (section from memory)), for both polarisations;
* every case: R and T against an independent product of characteristic
  matrices (Born & Wolf, Principles of Optics, 7th ed. 1999, section 1.6 (section from memory)),
  for both polarisations, to 1e-12.
"""

import json
import os
import warnings

import numpy as np

warnings.filterwarnings("ignore")  # colour-science warns about optional deps

import colour  # noqa: E402
from colour.phenomena.interference import multilayer_tmm  # noqa: E402

SEED = 20260117
N_OBLIQUE = 30
N_NORMAL_ABSORBING = 10
N_WAVELENGTHS = 8
N_ANGLES = 4
# Keep every internal wave clear of grazing: sin(theta_j) <= MAX_SIN_INTERNAL.
MAX_SIN_INTERNAL = 0.98
LOSSLESS_TOL = 1e-12
AIRY_TOL = 1e-12
MATRIX_TOL = 1e-12

OUT = os.path.join(os.path.dirname(os.path.abspath(__file__)), "multilayer_tmm_cases.json")


def random_stack(rng, absorbing):
    count = int(rng.integers(1, 13))
    layers = []
    for _ in range(count):
        k = 0.0
        if absorbing and rng.random() < 0.5:
            k = round(float(rng.uniform(0.0, 0.5)), 4)
        layers.append(
            {
                "n": round(float(rng.uniform(1.2, 2.6)), 4),
                "k": k,
                "thickness_nm": round(float(rng.uniform(10.0, 400.0)), 2),
            }
        )
    if absorbing and all(layer["k"] == 0.0 for layer in layers):
        layers[int(rng.integers(0, count))]["k"] = round(float(rng.uniform(0.01, 0.5)), 4)
    return layers


def max_propagating_angle(incident_n, layers, substrate_n):
    """Largest incidence angle (deg) keeping sin(theta_j) <= MAX_SIN_INTERNAL everywhere."""
    n_min = min([layer["n"] for layer in layers] + [substrate_n])
    s = min(1.0, MAX_SIN_INTERNAL * n_min / incident_n)
    return min(85.0, float(np.degrees(np.arcsin(s))))


def all_propagating(incident_n, layers, substrate_n, angle_deg):
    invariant = incident_n * np.sin(np.radians(angle_deg))
    return all(invariant < n for n in [layer["n"] for layer in layers] + [substrate_n])


def run_tmm(case):
    indices = (
        [case["incident_n"]]
        + [complex(layer["n"], layer["k"]) for layer in case["layers"]]
        + [case["substrate_n"]]
    )
    thicknesses = [layer["thickness_nm"] for layer in case["layers"]]
    R, T = multilayer_tmm(indices, thicknesses, case["wavelengths_nm"], case["angles_deg"])
    # multilayer_tmm returns shape (wavelengths, angles, 1, 2) with [s, p] last;
    # store [angle][wavelength].
    R = np.asarray(R)[:, :, 0, :].transpose(1, 0, 2)
    T = np.asarray(T)[:, :, 0, :].transpose(1, 0, 2)
    return R, T


def airy_single_film(n0, n1, n2, d, wavelength, angle_deg):
    """R, T of one film (Born & Wolf, Principles of Optics, 7th ed. 1999, sec. 1.6).

    n1 may be complex (n + ik, absorbing for k > 0); n0 and n2 are real.
    Returns arrays [R_s, R_p], [T_s, T_p].
    """
    sin0 = n0 * np.sin(np.radians(angle_deg))
    cos0 = np.sqrt(1.0 - (sin0 / n0) ** 2 + 0j)
    cos1 = np.sqrt(1.0 - (sin0 / n1) ** 2 + 0j)
    cos2 = np.sqrt(1.0 - (sin0 / n2) ** 2 + 0j)
    beta = 2.0 * np.pi / wavelength * n1 * d * cos1

    def fresnel(na, ca, nb, cb):
        rs = (na * ca - nb * cb) / (na * ca + nb * cb)
        ts = 2.0 * na * ca / (na * ca + nb * cb)
        rp = (nb * ca - na * cb) / (nb * ca + na * cb)
        tp = 2.0 * na * ca / (nb * ca + na * cb)
        return rs, ts, rp, tp

    r01s, t01s, r01p, t01p = fresnel(n0, cos0, n1, cos1)
    r12s, t12s, r12p, t12p = fresnel(n1, cos1, n2, cos2)
    e2 = np.exp(2j * beta)
    e1 = np.exp(1j * beta)
    rs = (r01s + r12s * e2) / (1.0 + r01s * r12s * e2)
    rp = (r01p + r12p * e2) / (1.0 + r01p * r12p * e2)
    ts = t01s * t12s * e1 / (1.0 + r01s * r12s * e2)
    tp = t01p * t12p * e1 / (1.0 + r01p * r12p * e2)
    # Power transmittance: ratio of normal Poynting components.
    # s: Re(n2 cos2) / Re(n0 cos0); p (E-field amplitudes): Re(n2 conj(cos2)) / Re(n0 conj(cos0)).
    factor_s = np.real(n2 * cos2) / np.real(n0 * cos0)
    factor_p = np.real(n2 * np.conj(cos2)) / np.real(n0 * np.conj(cos0))
    R = np.array([abs(rs) ** 2, abs(rp) ** 2])
    T = np.array([abs(ts) ** 2 * factor_s, abs(tp) ** 2 * factor_p])
    return R, T


def characteristic_matrix_stack(case, wavelength, angle_deg):
    """R, T of a stack from the product of characteristic matrices.

    Born & Wolf, Principles of Optics, 7th ed. 1999, section 1.6 (time factor
    exp(-i w t), N = n + ik). Returns arrays [R_s, R_p], [T_s, T_p].
    """
    n0, ns = case["incident_n"], case["substrate_n"]
    invariant = n0 * np.sin(np.radians(angle_deg))

    def cos_in(N):
        return np.sqrt(1.0 - (invariant / N) ** 2 + 0j)

    R, T = [], []
    for pol in ("s", "p"):
        def admittance(N):
            c = cos_in(N)
            return N * c if pol == "s" else N / c

        m = np.eye(2, dtype=complex)
        for layer in case["layers"]:
            N = complex(layer["n"], layer["k"])
            delta = 2.0 * np.pi / wavelength * N * layer["thickness_nm"] * cos_in(N)
            eta = admittance(N)
            layer_m = np.array(
                [[np.cos(delta), -1j * np.sin(delta) / eta], [-1j * eta * np.sin(delta), np.cos(delta)]]
            )
            m = m @ layer_m
        eta0, etas = admittance(n0), admittance(ns)
        b, c = m @ np.array([1.0, etas])
        r = (eta0 * b - c) / (eta0 * b + c)
        R.append(abs(r) ** 2)
        T.append(4.0 * np.real(eta0) * np.real(etas) / abs(eta0 * b + c) ** 2)
    return np.array(R), np.array(T)


def make_case(rng, absorbing):
    while True:
        case = {
            "incident_n": round(float(rng.uniform(1.0, 1.6)), 4),
            "substrate_n": round(float(rng.uniform(1.0, 2.0)), 4),
            "layers": random_stack(rng, absorbing),
        }
        wavelengths = np.sort(np.round(rng.uniform(380.0, 780.0, N_WAVELENGTHS), 2))
        case["wavelengths_nm"] = [float(w) for w in wavelengths]
        if absorbing:
            case["angles_deg"] = [0.0]
            return case
        theta_max = max_propagating_angle(case["incident_n"], case["layers"], case["substrate_n"])
        if theta_max < 20.0:
            continue  # too little oblique range; draw another stack
        angles = np.sort(np.round(rng.uniform(0.0, theta_max, N_ANGLES - 1), 2))
        case["angles_deg"] = [0.0] + [float(a) for a in angles]
        assert all(
            all_propagating(case["incident_n"], case["layers"], case["substrate_n"], a)
            for a in case["angles_deg"]
        )
        return case


def check_case(case, R, T):
    assert np.all(np.isfinite(R)) and np.all(np.isfinite(T))
    absorbing = any(layer["k"] > 0.0 for layer in case["layers"])
    if absorbing:
        assert case["angles_deg"] == [0.0]
        A = 1.0 - R - T
        assert np.all(A > 0.0) and np.all(A <= 1.0), "absorbing case must absorb"
        # At normal incidence s and p coincide.
        assert np.allclose(R[..., 0], R[..., 1], rtol=0, atol=1e-14)
        assert np.allclose(T[..., 0], T[..., 1], rtol=0, atol=1e-14)
    else:
        err = np.max(np.abs(R + T - 1.0))
        assert err < LOSSLESS_TOL, f"R + T - 1 = {err}"
    for ai, angle in enumerate(case["angles_deg"]):
        for wi, wavelength in enumerate(case["wavelengths_nm"]):
            R_ref, T_ref = characteristic_matrix_stack(case, wavelength, angle)
            assert np.max(np.abs(R[ai, wi] - R_ref)) < MATRIX_TOL, "matrix R mismatch"
            assert np.max(np.abs(T[ai, wi] - T_ref)) < MATRIX_TOL, "matrix T mismatch"
    if len(case["layers"]) == 1:
        layer = case["layers"][0]
        n1 = complex(layer["n"], layer["k"])
        for ai, angle in enumerate(case["angles_deg"]):
            for wi, wavelength in enumerate(case["wavelengths_nm"]):
                R_ref, T_ref = airy_single_film(
                    case["incident_n"], n1, case["substrate_n"],
                    layer["thickness_nm"], wavelength, angle,
                )
                assert np.max(np.abs(R[ai, wi] - R_ref)) < AIRY_TOL, "Airy R mismatch"
                assert np.max(np.abs(T[ai, wi] - T_ref)) < AIRY_TOL, "Airy T mismatch"
        return True
    return False


def main():
    assert colour.__version__ == "0.4.7", colour.__version__
    rng = np.random.default_rng(SEED)
    cases = []
    airy_checked = 0
    # One forced single-layer case of each kind so the Airy check always runs.
    for absorbing, count in ((False, N_OBLIQUE), (True, N_NORMAL_ABSORBING)):
        for i in range(count):
            case = make_case(rng, absorbing)
            if i == 0:
                case["layers"] = case["layers"][:1]
                if absorbing and case["layers"][0]["k"] == 0.0:
                    case["layers"][0]["k"] = 0.25
            R, T = run_tmm(case)
            airy_checked += check_case(case, R, T)
            case["R_s"] = R[..., 0].tolist()
            case["R_p"] = R[..., 1].tolist()
            case["T_s"] = T[..., 0].tolist()
            case["T_p"] = T[..., 1].tolist()
            cases.append(case)
    assert airy_checked >= 2
    document = {
        "source": "colour-science 0.4.7, colour.phenomena.interference.multilayer_tmm; "
        "generated by make_tmm_reference.py",
        "cases": cases,
    }
    with open(OUT, "w") as f:
        json.dump(document, f, indent=1)
        f.write("\n")
    print(f"wrote {len(cases)} cases ({airy_checked} checked against Airy) to {OUT}")


if __name__ == "__main__":
    main()
