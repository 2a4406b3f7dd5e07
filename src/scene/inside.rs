//! What happens inside a scene's stack: the absorption in each layer as
//! written, the field profile at one point, and the photonic bands of a
//! repeat group.

use num_complex::Complex64;
use rayon::prelude::*;

use super::stack::{self, Item};
use super::{Scene, Substrate};
use crate::error::{Error, Result};
use crate::optics::{self, FieldPoint, MediumTerms, Node, Probe};

/// Most layers a stack may hold once written out for layer-by-layer
/// results (absorption per layer, field profiles).
pub const MAX_RESOLVED_LAYERS: u64 = 1_000_000;

/// Depths a field profile takes when the caller does not say.
pub const FIELD_POINTS: usize = 1000;

/// Absorptance of each layer over the scene's grid, unpolarized (the mean
/// of s and p), averaged over the disorder ensemble.
#[derive(Debug, Clone, PartialEq)]
pub struct LayerAbsorption {
    /// Column names: `A_1` … `A_K` for the layers as written in `stack`
    /// (depth first; a layer inside a repeat group summed over its
    /// periods), then `A_substrate` for a substrate sheet and `A_backing`
    /// for a black backing behind it.
    pub columns: Vec<String>,
    /// `values[a][w][c]`: angle a, wavelength w, column c. The columns of a
    /// point add up to its A = 1 − R − T; a lossless layer's is exactly 0.
    pub values: Vec<Vec<Vec<f64>>>,
}

impl LayerAbsorption {
    /// Each column's mean over the wavelengths at each angle, `[a][c]`.
    pub fn mean_over_wavelengths(&self) -> Vec<Vec<f64>> {
        self.values
            .iter()
            .map(|row| {
                (0..self.columns.len())
                    .map(|c| row.iter().map(|cols| cols[c]).sum::<f64>() / row.len() as f64)
                    .collect()
            })
            .collect()
    }

    /// Whether any layer absorbs anywhere on the grid.
    pub fn absorbs(&self) -> bool {
        self.values.iter().flatten().flatten().any(|&v| v != 0.0)
    }
}

/// The photonic bands of one repeat group's period over the scene's grid.
#[derive(Debug, Clone, PartialEq)]
pub struct Bands {
    /// The group, as `stack[2]`.
    pub group: String,
    /// Wavelengths in nm.
    pub wavelengths_nm: Vec<f64>,
    /// Angles of incidence in degrees.
    pub angles_deg: Vec<f64>,
    /// Re ½ tr M = cos KΛ for s and p, `[pol][a][w]`.
    pub half_trace: [Vec<Vec<f64>>; 2],
    /// The stop bands found on the grid, edges refined by bisection.
    pub stop_bands: Vec<StopBand>,
}

/// One stop band (|½ tr M| > 1) at one angle and polarization.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct StopBand {
    /// Angle of incidence in degrees.
    pub angle_deg: f64,
    /// 0 for s, 1 for p.
    pub polarization: usize,
    /// Short-wavelength edge in nm (the grid's first point if the band
    /// starts before it).
    pub from_nm: f64,
    /// Long-wavelength edge in nm (the grid's last point if the band ends
    /// after it).
    pub to_nm: f64,
}

impl Scene {
    /// Media terms and the probe at one wavelength and angle.
    fn point(&self, wavelength_nm: f64, angle_deg: f64) -> Result<(Vec<MediumTerms>, Probe)> {
        let index = self.indices(&[wavelength_nm])?;
        let at = Probe::new(wavelength_nm, index[self.incident][0].re, angle_deg);
        let terms = index
            .iter()
            .map(|n| MediumTerms::new(n[0], at.beta()))
            .collect();
        Ok((terms, at))
    }

    /// The medium of each layer as written in `stack` (depth first, a
    /// repeat's once).
    fn written_media(&self) -> Vec<usize> {
        fn walk(items: &[Item], out: &mut Vec<usize>) {
            for i in items {
                match i {
                    Item::Layer(l) => out.push(l.medium),
                    Item::Repeat(r) => walk(&r.items, out),
                }
            }
        }
        let mut out = Vec::new();
        walk(&self.stack, &mut out);
        out
    }

    /// The realisations, refused when one is too long to write out.
    fn resolved_stacks(&self, what: &str) -> Result<Vec<optics::Stack>> {
        self.require_film()?;
        self.require_isotropic(what)?;
        let stacks = self.realisations(&self.stack);
        let layers = stacks
            .iter()
            .map(|s| s.expanded_layers())
            .max()
            .unwrap_or(0);
        if layers > MAX_RESOLVED_LAYERS {
            return Err(Error::invalid(
                "stack",
                format!("{layers} layers once repeat groups are written out"),
                format!(
                    "{what} resolves the stack layer by layer; keep it under {MAX_RESOLVED_LAYERS} layers"
                ),
            ));
        }
        Ok(stacks)
    }

    /// Absorptance in each layer over the grid (see [`LayerAbsorption`]),
    /// from the normal flux at every interface. Every value is checked.
    pub fn layer_absorption(&self) -> Result<LayerAbsorption> {
        let stacks = self.resolved_stacks("absorption per layer")?;
        let mut media = self.written_media();
        let k = media.len();
        let mut map = Vec::new();
        stack::written_layers_of_nodes(&self.stack, self.disorder.is_some(), &mut 0, &mut map);
        let black = matches!(self.substrate, Substrate::Sheet { behind: None, .. });
        let mut columns: Vec<String> = (1..=k).map(|j| format!("A_{j}")).collect();
        if let Substrate::Sheet { medium, .. } = self.substrate {
            columns.push("A_substrate".into());
            media.push(medium);
        }
        if black {
            columns.push("A_backing".into());
        }
        let index = self.indices(&self.wavelengths_nm)?;
        let weight = 0.5 / stacks.len() as f64;
        let values = self
            .angles_deg
            .par_iter()
            .map(|&angle| {
                let sine = Probe::sine(angle);
                (0..self.wavelengths_nm.len())
                    .map(|w| {
                        let wl = self.wavelengths_nm[w];
                        let at = Probe::of(Probe::wavenumber(wl), index[self.incident][w].re, sine);
                        let terms: Vec<MediumTerms> = index
                            .iter()
                            .map(|n| MediumTerms::new(n[w], at.beta()))
                            .collect();
                        let mut row = vec![0.0; columns.len()];
                        for s in &stacks {
                            let a = s.absorption(&terms, &at);
                            for (leaf, v) in a.layers.iter().enumerate() {
                                let column = map.get(leaf).copied().unwrap_or(k);
                                row[column] += weight * (v[0] + v[1]);
                            }
                            if black {
                                row[k + 1] += weight * (a.backing[0] + a.backing[1]);
                            }
                        }
                        // A lossless medium absorbs nothing: what the flux
                        // balance leaves there is rounding.
                        for (v, &m) in row.iter_mut().zip(&media) {
                            if index[m][w].im == 0.0 {
                                *v = 0.0;
                            }
                        }
                        for (c, v) in row.iter().enumerate() {
                            if !v.is_finite() {
                                return Err(Error::not_computable(
                                    columns[c].clone(),
                                    format!("{wl} nm, {angle}°"),
                                    *v,
                                ));
                            }
                        }
                        Ok(row)
                    })
                    .collect::<Result<Vec<_>>>()
            })
            .collect::<Result<Vec<_>>>()?;
        Ok(LayerAbsorption { columns, values })
    }

    /// |E|² relative to the incident wave at `points` depths evenly spread
    /// over the stack and a margin of the incident and exit media, for
    /// polarization `pol` (0 = s, 1 = p), with every interface included
    /// from both sides. Layer numbers are those of the layers as written
    /// (0: the incident medium; one past the last: the substrate). The
    /// nominal design is shown (thickness disorder is not applied). A
    /// stack with incoherent layers or a substrate sheet is refused, and so
    /// is a wavelength outside the range a material's source vouches for
    /// (a table outside its data is refused by the table itself).
    pub fn field_profile(
        &self,
        wavelength_nm: f64,
        angle_deg: f64,
        pol: usize,
        points: usize,
    ) -> Result<Vec<FieldPoint>> {
        self.resolved_stacks("a field profile")?;
        if !(wavelength_nm > 0.0 && wavelength_nm.is_finite()) {
            return Err(Error::invalid(
                "--wavelength",
                wavelength_nm,
                "must be a positive number of nm",
            ));
        }
        if let Some(m) = self.media.iter().find(|m| {
            m.valid_nm
                .is_some_and(|(from, to)| !(from..=to).contains(&wavelength_nm))
        }) {
            let (from, to) = m.valid_nm.expect("found with a range");
            return Err(Error::invalid(
                "--wavelength",
                wavelength_nm,
                format!(
                    "\"{}\" ({}) is vouched for by its source over {from}–{to} nm only; \
                     a field profile is given where every material is vouched for",
                    m.name, m.used_at
                ),
            ));
        }
        if !(angle_deg.abs() < 90.0) {
            return Err(Error::invalid(
                "--angle",
                angle_deg,
                "angles of incidence must lie below 90°",
            ));
        }
        if !(2..=1_000_000).contains(&points) {
            return Err(Error::invalid(
                "--points",
                points,
                "must be from 2 to 1000000",
            ));
        }
        let nominal = optics::Stack {
            nodes: stack::realise(&self.stack, None).swap_remove(0),
            ..self.realisations(&[]).swap_remove(0)
        };
        let (terms, at) = self.point(wavelength_nm, angle_deg)?;
        let mut faces = vec![0.0];
        let mut layers = Vec::new();
        fn thicknesses(nodes: &[Node], out: &mut Vec<f64>) {
            for n in nodes {
                match n {
                    Node::Layer { thickness_nm, .. } | Node::Incoherent { thickness_nm, .. } => {
                        out.push(*thickness_nm)
                    }
                    Node::Repeat { count, nodes } => {
                        for _ in 0..*count {
                            thicknesses(nodes, out);
                        }
                    }
                }
            }
        }
        thicknesses(&nominal.nodes, &mut layers);
        for d in &layers {
            faces.push(faces[faces.len() - 1] + d);
        }
        let total = faces[faces.len() - 1];
        let margin = (0.15 * total).max(0.25 * wavelength_nm);
        let step = (total + 2.0 * margin) / (points - 1) as f64;
        let mut z: Vec<f64> = (0..points).map(|i| -margin + step * i as f64).collect();
        // Both sides of every interface (the field's normal part jumps there for p).
        let side = 1e-9 * (1.0 + total);
        for f in &faces {
            z.extend([f - side, *f]);
        }
        z.sort_by(f64::total_cmp);
        z.dedup();
        let field = nominal.field(&terms, &at, pol, &z).ok_or_else(|| {
            Error::invalid(
                "stack",
                "incoherent layers",
                "field profiles are computed for coherent stacks on a semi-infinite substrate; \
                 give the substrate as a material name (and leave out `incoherent` layers) to see the film's field",
            )
        })?;
        let mut map = Vec::new();
        stack::written_layers_of_nodes(&self.stack, false, &mut 0, &mut map);
        let k = self.written_media().len();
        field
            .into_iter()
            .map(|mut p| {
                p.layer = match p.layer {
                    0 => 0,
                    l if l <= map.len() => map[l - 1] + 1,
                    _ => k + 1,
                };
                if p.e2.is_finite() {
                    Ok(p)
                } else {
                    Err(Error::not_computable(
                        "|E|²",
                        format!("{} nm depth, {wavelength_nm} nm, {angle_deg}°", p.z_nm),
                        p.e2,
                    ))
                }
            })
            .collect()
    }

    /// The photonic bands of the period of the first repeat group in
    /// `stack` (depth first), nominal thicknesses, first period of a graded
    /// group (see [`Bands`]).
    pub fn bands(&self) -> Result<Bands> {
        self.require_isotropic("band analysis")?;
        self.require_film()?;
        fn first(items: &[Item], path: &str) -> Option<(String, Vec<Item>)> {
            items.iter().enumerate().find_map(|(i, item)| match item {
                Item::Repeat(r) => Some((format!("{path}[{i}]"), r.items.clone())),
                Item::Layer(_) => None,
            })
        }
        let (group, period) = first(&self.stack, "stack").ok_or_else(|| {
            Error::invalid(
                "stack",
                "(no repeat group)",
                "photonic bands need a periodic structure: a repeat group {\"repeat\": N, \"stack\": [...]}",
            )
        })?;
        let nodes = stack::realise(&period, None).swap_remove(0);
        let half_trace_at = |w: f64, angle: f64| -> Result<[Complex64; 2]> {
            let (terms, at) = self.point(w, angle)?;
            Ok(optics::half_trace(&nodes, &terms, &at))
        };
        let nw = self.wavelengths_nm.len();
        let mut half_trace = [
            vec![vec![0.0; nw]; self.angles_deg.len()],
            vec![vec![0.0; nw]; self.angles_deg.len()],
        ];
        let mut stop_bands = Vec::new();
        for (a, &angle) in self.angles_deg.iter().enumerate() {
            for (w, &wl) in self.wavelengths_nm.iter().enumerate() {
                let h = half_trace_at(wl, angle)?;
                for pol in 0..2 {
                    if !h[pol].re.is_finite() {
                        return Err(Error::not_computable(
                            "½ tr M",
                            format!("{wl} nm, {angle}°"),
                            h[pol].re,
                        ));
                    }
                    half_trace[pol][a][w] = h[pol].re;
                }
            }
            for (pol, rows) in half_trace.iter().enumerate() {
                let inside = |x: f64| x.abs() > 1.0;
                let row = &rows[a];
                // The edge between grid points w and w + 1, by bisection.
                let edge = |w: usize| -> Result<f64> {
                    let (mut lo, mut hi) = (self.wavelengths_nm[w], self.wavelengths_nm[w + 1]);
                    let start = inside(row[w]);
                    for _ in 0..60 {
                        let mid = 0.5 * (lo + hi);
                        if inside(half_trace_at(mid, angle)?[pol].re) == start {
                            lo = mid;
                        } else {
                            hi = mid;
                        }
                    }
                    Ok(0.5 * (lo + hi))
                };
                let mut from = inside(row[0]).then_some(self.wavelengths_nm[0]);
                for w in 0..nw.saturating_sub(1) {
                    match (inside(row[w]), inside(row[w + 1]), from) {
                        (false, true, _) => from = Some(edge(w)?),
                        (true, false, Some(start)) => {
                            stop_bands.push(StopBand {
                                angle_deg: angle,
                                polarization: pol,
                                from_nm: start,
                                to_nm: edge(w)?,
                            });
                            from = None;
                        }
                        _ => {}
                    }
                }
                if let Some(start) = from {
                    stop_bands.push(StopBand {
                        angle_deg: angle,
                        polarization: pol,
                        from_nm: start,
                        to_nm: self.wavelengths_nm[nw - 1],
                    });
                }
            }
        }
        Ok(Bands {
            group,
            wavelengths_nm: self.wavelengths_nm.clone(),
            angles_deg: self.angles_deg.clone(),
            half_trace,
            stop_bands,
        })
    }
}
