//! Photonic bands of a periodic stack: the Bloch parameter of one period.
//!
//! For an infinite repetition of a period with characteristic matrix M
//! (unimodular), the Bloch waves satisfy cos(KΛ) = ½ tr M, with K the Bloch
//! wavenumber and Λ the period's thickness (Yeh, Yariv & Hong, "Electromagnetic
//! propagation in periodic stratified media. I. General theory", J. Opt. Soc.
//! Am. 67, 423, 1977, eq. 19–21). Where |½ tr M| > 1 the wave decays from
//! period to period: a stop band.

use num_complex::Complex64;

use super::medium::{MediumTerms, Probe};
use super::stack::{Node, product};

/// ½ tr M of the period `nodes` for s and p at one point: cos(KΛ), real
/// when every layer is lossless.
pub fn half_trace(nodes: &[Node], terms: &[MediumTerms], at: &Probe) -> [Complex64; 2] {
    let (s, p) = product(nodes, terms, at);
    [s, p].map(|m| 0.5 * (m.m[0][0] + m.m[1][1]) * m.log.exp())
}
