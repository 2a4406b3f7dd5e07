//! Helpers shared by the integration tests.
#![allow(dead_code)]

use std::f64::consts::PI;

use lamella::optics::{Exit, MediumTerms, Node, Probe, Rt, Stack};
use num_complex::Complex64;

/// Complex index shorthand.
pub fn c(n: f64, k: f64) -> Complex64 {
    Complex64::new(n, k)
}

/// A layer node.
pub fn layer(medium: usize, thickness_nm: f64) -> Node {
    Node::Layer {
        medium,
        thickness_nm,
    }
}

/// Stack on a semi-infinite exit medium.
pub fn stack(incident: usize, nodes: Vec<Node>, exit: usize) -> Stack {
    Stack {
        incident,
        nodes,
        exit: Exit::Medium(exit),
    }
}

/// R and T of `stack` with media indices `n` at one wavelength and angle.
pub fn rt_at(stack: &Stack, n: &[Complex64], wl_nm: f64, angle_deg: f64) -> Rt {
    let at = Probe::new(wl_nm, n[stack.incident].re, angle_deg);
    let terms: Vec<MediumTerms> = n.iter().map(|&x| MediumTerms::new(x, at.beta())).collect();
    stack.rt(&terms, &at)
}

/// The naive oracle for the engine's fast paths: R and T from the plain
/// product of complex 2×2 characteristic matrices, [[cos δ, −i sin δ/η],
/// [−i η sin δ, cos δ]] (Born & Wolf, *Principles of Optics*, 7th ed. 1999,
/// §1.6.2, in the n + ik convention), with every repeat written out, δ =
/// (2π/λ)·d·√(n² − β²) on the decaying branch, complex sin and cos from std
/// (through num-complex), tilted admittances η_s = q, η_p = n²/q, and
/// r = (η₀B − C)/(η₀B + C), T = 4η₀ Re η_m/|η₀B + C|² (Macleod, *Thin-Film
/// Optical Filters*, 4th ed. 2010, eq. 2.99–2.100). No powering, no
/// renormalisation, no real-arithmetic shortcut, no lanes: keep stacks
/// where the product stays within double range. A semi-infinite exit only.
pub fn naive_rt(stack: &Stack, n: &[Complex64], wl_nm: f64, angle_deg: f64) -> Rt {
    fn flatten(nodes: &[Node], out: &mut Vec<(usize, f64)>) {
        for node in nodes {
            match node {
                Node::Layer {
                    medium,
                    thickness_nm,
                } => out.push((*medium, *thickness_nm)),
                Node::Repeat { count, nodes } => {
                    for _ in 0..*count {
                        flatten(nodes, out);
                    }
                }
                Node::Incoherent { .. } => panic!("the naive oracle is coherent only"),
            }
        }
    }
    let Exit::Medium(exit) = stack.exit else {
        panic!("the naive oracle takes a semi-infinite exit medium only");
    };
    let mut layers = Vec::new();
    flatten(&stack.nodes, &mut layers);
    let beta = n[stack.incident].re * angle_deg.to_radians().sin();
    let q = |m: Complex64| {
        let z = (m * m - beta * beta).sqrt();
        if z.im < 0.0 || (z.im == 0.0 && z.re < 0.0) {
            -z
        } else {
            z
        }
    };
    let i = Complex64::i();
    let pol = |eta: &dyn Fn(Complex64) -> Complex64| {
        let one = c(1.0, 0.0);
        let mut m = [[one, c(0.0, 0.0)], [c(0.0, 0.0), one]];
        for &(medium, d) in &layers {
            let delta = 2.0 * PI / wl_nm * d * q(n[medium]);
            let e = eta(n[medium]);
            let layer = [
                [delta.cos(), -i * delta.sin() / e],
                [-i * e * delta.sin(), delta.cos()],
            ];
            m = [
                [
                    m[0][0] * layer[0][0] + m[0][1] * layer[1][0],
                    m[0][0] * layer[0][1] + m[0][1] * layer[1][1],
                ],
                [
                    m[1][0] * layer[0][0] + m[1][1] * layer[1][0],
                    m[1][0] * layer[0][1] + m[1][1] * layer[1][1],
                ],
            ];
        }
        let (e0, em) = (eta(n[stack.incident]), eta(n[exit]));
        let (b, cc) = (m[0][0] + m[0][1] * em, m[1][0] + m[1][1] * em);
        let r = (e0 * b - cc) / (e0 * b + cc);
        let t = 4.0 * e0.re * em.re / (e0 * b + cc).norm_sqr();
        (r.norm_sqr(), t)
    };
    let (rs, ts) = pol(&|m| q(m));
    let (rp, tp) = pol(&|m| m * m / q(m));
    Rt { rs, rp, ts, tp }
}

/// Single film (index n1, thickness d) between media n0 and n2 by the Airy
/// sum with complex Fresnel coefficients (Born & Wolf, *Principles of Optics*,
/// 7th ed. 1999, §1.6.4 eq. 57–58 and §13.4 for absorbing films). p is
/// handled with magnetic-field amplitudes so that T_p = Re(q₂/ε₂)/(q₀/ε₀)·|t|².
pub fn airy(n0: f64, n1: Complex64, n2: Complex64, d: f64, wl: f64, angle_deg: f64) -> Rt {
    let beta = n0 * angle_deg.to_radians().sin();
    let q = |n: Complex64| {
        let z = (n * n - beta * beta).sqrt();
        if z.im < 0.0 { -z } else { z }
    };
    let n0c = c(n0, 0.0);
    let (q0, q1, q2) = (q(n0c), q(n1), q(n2));
    let delta = 2.0 * PI / wl * d * q1;
    let e1 = (Complex64::i() * delta).exp();
    let e2 = e1 * e1;
    let pol = |y0: Complex64, y1: Complex64, y2: Complex64| {
        let r01 = (y0 - y1) / (y0 + y1);
        let r12 = (y1 - y2) / (y1 + y2);
        let t01 = 2.0 * y0 / (y0 + y1);
        let t12 = 2.0 * y1 / (y1 + y2);
        let den = 1.0 + r01 * r12 * e2;
        let r = (r01 + r12 * e2) / den;
        let t = t01 * t12 * e1 / den;
        (r.norm_sqr(), y2.re / y0.re * t.norm_sqr())
    };
    let (rs, ts) = pol(q0, q1, q2);
    let (rp, tp) = pol(q0 / (n0c * n0c), q1 / (n1 * n1), q2 / (n2 * n2));
    Rt { rs, rp, ts, tp }
}

/// Where the ray from `eye` along the unit vector `dir` first meets the
/// unit sphere at the origin, if it does.
pub fn hit_sphere(eye: glam::Vec3, dir: glam::Vec3) -> Option<glam::Vec3> {
    let b = eye.dot(dir);
    let disc = b * b - (eye.length_squared() - 1.0);
    (disc > 0.0).then(|| eye + (-b - disc.sqrt()) * dir)
}

/// CIELAB (D65) of encoded sRGB, IEC 61966-2-1 by `palette`.
pub fn lab_of(rgb: [f64; 3]) -> [f64; 3] {
    use palette::{FromColor, Lab, Srgb, white_point::D65};
    let lab: Lab<D65, f64> = Lab::from_color(Srgb::new(rgb[0], rgb[1], rgb[2]).into_linear());
    [lab.l, lab.a, lab.b]
}

/// Runs the `lamella` binary with `args`.
pub fn lamella(args: &[&str]) -> std::process::Output {
    std::process::Command::new(env!("CARGO_BIN_EXE_lamella"))
        .args(args)
        .output()
        .expect("the lamella binary runs")
}

/// A fresh folder for one test's files, unique to this test process.
pub fn temp_dir(name: &str) -> std::path::PathBuf {
    let dir = std::env::temp_dir().join(format!("lamella-test-{name}-{}", std::process::id()));
    std::fs::create_dir_all(&dir).unwrap();
    dir
}
