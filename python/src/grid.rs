//! R, T and Jones matrices of a scene on a grid, computed by the engine's
//! grid driver piece by piece (the pieces `lamella spectrum` computes), so
//! the numbers are the command line's bit for bit; large grids in parallel,
//! stopping when asked.

use lamella::angle_colour::Viewing;
use lamella::optics::aniso::Jones;
use lamella::optics::{LANES, Node, Rows, Rt, Spectra, Stack};
use lamella::scene::Scene as Engine;
use rayon::prelude::*;

use crate::errors::{Failure, Outcome};
use crate::interrupt::Stop;

/// Wavelengths per piece of work (as in `lamella spectrum`): one angle and
/// a run of up to this many wavelengths, on one thread.
const PIECE: usize = 512;

/// Below this many points × layers a grid is computed on the calling thread
/// without the thread pool: a small call costs microseconds, not a thread.
pub const SMALL_WORK: usize = 20_000;

/// Layer evaluations per piece at most (a few milliseconds), so that a
/// stop request is seen promptly however costly each point is.
const PIECE_WORK: usize = 2_000_000;

/// How many times a 4×4 point costs a 2×2 one, roughly (for the work
/// estimate only: it sizes pieces and chooses threads).
const FOUR_BY_FOUR_COST: usize = 16;

/// Every point of `rows`, angle-major, filled by `fill(a, first_w, out)`
/// (starting as `blank`) in the pieces `lamella spectrum` uses. `work` is
/// the cost of a point in matrix products ([`work_per_point`]).
fn pieces<T: Clone + Send>(
    rows: &Rows,
    work: usize,
    stop: &Stop,
    blank: T,
    fill: impl Fn(usize, usize, &mut [T]) + Sync,
) -> Outcome<Vec<T>> {
    let (nw, na) = (rows.wavelengths_nm().len(), rows.angles_deg().len());
    // Pieces start at multiples of the engine's four-wavelength blocks, so
    // every block (and so every number) is the one the command line computes.
    let piece = (PIECE_WORK / work.max(1) / LANES * LANES).clamp(LANES, PIECE);
    let mut out = vec![blank; nw * na];
    if nw == 0 {
        return Ok(out);
    }
    if nw * na * work.max(1) <= SMALL_WORK {
        for (a, row) in out.chunks_mut(nw).enumerate() {
            for (p, piece) in row.chunks_mut(PIECE).enumerate() {
                fill(a, p * PIECE, piece);
            }
        }
    } else {
        out.par_chunks_mut(nw)
            .enumerate()
            .try_for_each(|(a, row)| {
                row.par_chunks_mut(piece)
                    .enumerate()
                    .try_for_each(|(p, chunk)| {
                        stop.check()?;
                        fill(a, p * piece, chunk);
                        Ok(())
                    })
            })?;
    }
    Ok(out)
}

/// R and T at every point of `rows`, angle-major (see [`pieces`]).
pub fn grid(rows: &Rows, work: usize, stop: &Stop) -> Outcome<Vec<Rt>> {
    pieces(rows, work, stop, Rt::default(), |a, w, out| {
        rows.fill(a, w, out)
    })
}

/// R and T of a scene on a grid, with what nothing absorbs.
pub struct Grid {
    /// R and T (and the Jones matrices when asked for), angle-major.
    pub spectra: Spectra,
    /// Whether nothing absorbs, per wavelength.
    pub lossless: Vec<bool>,
}

/// R and T of `scene` at `wavelengths_nm` × `angles_deg` as the command
/// line computes them, with the Jones matrices when `jones` (the caller
/// has checked that the scene is coherent), refusing a value that is not
/// finite. An anisotropic scene's R and T come from its Jones matrices,
/// computed once.
pub fn computed(
    scene: &Engine,
    label: &str,
    wavelengths_nm: &[f64],
    angles_deg: &[f64],
    jones: bool,
    stop: &Stop,
) -> Outcome<Grid> {
    let fail = |e| Failure::engine(label, e);
    let index = scene.indices(wavelengths_nm).map_err(fail)?;
    let work = work_per_point(scene);
    let aniso = scene.anisotropic();
    let items = &scene.stack;
    scene.rows_on(items, &index, wavelengths_nm, angles_deg, jones, |rows| {
        let matrices = if rows.has_jones() && (jones || aniso) {
            let blank = Jones::not_computable();
            Some(pieces(rows, work, stop, blank, |a, w, out| {
                rows.fill_jones(a, w, out)
            })?)
        } else {
            None
        };
        let rt = match &matrices {
            Some(j) if aniso => j.iter().map(Rt::of_jones).collect(),
            _ => grid(rows, work, stop)?,
        };
        let spectra = Spectra {
            wavelengths_nm: wavelengths_nm.to_vec(),
            angles_deg: angles_deg.to_vec(),
            rt,
            jones: matrices.filter(|_| jones),
        };
        lamella::scene::check_spectra(&spectra).map_err(fail)?;
        let lossless = (0..wavelengths_nm.len())
            .map(|w| rows.lossless(w))
            .collect();
        Ok(Grid { spectra, lossless })
    })
}

/// The spectra of `scene` on its own grid as `viewing` needs them (with the
/// Jones matrices for an analyser or an anisotropic scene): the command
/// line's [`Viewing::spectra_of`], in pieces that stop when asked.
pub fn spectra(scene: &Engine, label: &str, viewing: &Viewing, stop: &Stop) -> Outcome<Spectra> {
    if viewing.analyzer.is_some() {
        scene
            .require_coherent()
            .map_err(|e| Failure::engine(label, e))?;
    }
    let jones = viewing.analyzer.is_some() || scene.anisotropic();
    let (w, a) = (&scene.wavelengths_nm, &scene.angles_deg);
    Ok(computed(scene, label, w, a, jones, stop)?.spectra)
}

/// Matrix products per point of a stack (a repeat group costs its period
/// and about log₂ N squarings), a rough measure of the work.
fn products(nodes: &[Node]) -> usize {
    nodes
        .iter()
        .map(|n| match n {
            Node::Repeat { count, nodes } => {
                products(nodes) + 2 * (64 - count.leading_zeros() as usize)
            }
            _ => 1,
        })
        .sum()
}

/// Matrix products per grid point of a scene, over its disorder ensemble
/// (a 4×4 point counted as [`FOUR_BY_FOUR_COST`] of them).
pub fn work_per_point(scene: &Engine) -> usize {
    let products = layers_of(&scene.realisations(&scene.stack));
    if scene.anisotropic() {
        products * FOUR_BY_FOUR_COST
    } else {
        products
    }
}

/// Matrix products per point of `stacks` together.
pub fn layers_of(stacks: &[Stack]) -> usize {
    stacks
        .iter()
        .map(|s| products(&s.nodes) + 1)
        .sum::<usize>()
        .max(1)
}
