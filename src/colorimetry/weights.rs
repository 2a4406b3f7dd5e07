//! Tristimulus integration by weighted summation over the scene's wavelength grid.

use crate::error::{Error, Result};

use super::spectra::{Illuminant, Observer};

/// Per-wavelength tristimulus weights for one (grid, illuminant, observer):
/// W_x(λ_i) = k S(λ_i) x̄(λ_i) Δλ_i (likewise y, z) with
/// k = 100 / Σ S(λ_i) ȳ(λ_i) Δλ_i, so that X = Σ W_x R and the perfect
/// reflecting diffuser has Y = 100 (CIE 015:2018, by summation over the grid).
/// On an evenly spaced grid every Δλ_i is the step and cancels in k, which is
/// the plain summation of CIE practice; on a grid written as an uneven list
/// Δλ_i is half the distance between a point's neighbours (the full spacing
/// at the ends). S, x̄, ȳ, z̄ are put onto the grid by linear interpolation of
/// the tabulated values (CIE 015:2018).
#[derive(Debug, Clone, PartialEq)]
pub struct Weights {
    wx: Vec<f64>,
    wy: Vec<f64>,
    wz: Vec<f64>,
    white: [f64; 3],
}

impl Weights {
    /// Weights for the grid `wavelengths_nm`. Points outside the observer's
    /// table (360–830 nm) get zero weight: the observer does not see there, so
    /// spectra computed over a wider range (UV to near infrared) still have a
    /// colour. A point the observer sees but the illuminant's table does not
    /// cover is an error naming it (no silent zero weight where it matters).
    pub fn new(
        wavelengths_nm: &[f64],
        illuminant: &Illuminant,
        observer: Observer,
    ) -> Result<Self> {
        if wavelengths_nm.is_empty() {
            return Err(Error::invalid("wavelengths", "(none)", "the grid is empty"));
        }
        Weights::check_light(wavelengths_nm, illuminant, observer)?;
        let cmfs = observer.cmfs();
        let light = illuminant.table();
        let n = wavelengths_nm.len();
        let (mut wx, mut wy, mut wz) = (
            Vec::with_capacity(n),
            Vec::with_capacity(n),
            Vec::with_capacity(n),
        );
        for (i, &wl) in wavelengths_nm.iter().enumerate() {
            let cmf = |c| cmfs.at(c, wl);
            let (Some(x), Some(y), Some(z)) = (cmf(0), cmf(1), cmf(2)) else {
                wx.push(0.0);
                wy.push(0.0);
                wz.push(0.0);
                continue;
            };
            let s = light.at(0, wl).expect("checked: the light covers the grid");
            let d = interval(wavelengths_nm, i);
            wx.push(s * x * d);
            wy.push(s * y * d);
            wz.push(s * z * d);
        }
        let sum_y: f64 = wy.iter().sum();
        if !(sum_y > 0.0) {
            return Err(Error::invalid(
                "illuminant",
                illuminant.name(),
                "has no power where the observer sees on this grid (Σ S ȳ = 0)",
            ));
        }
        let k = 100.0 / sum_y;
        for w in [&mut wx, &mut wy, &mut wz] {
            w.iter_mut().for_each(|v| *v *= k);
        }
        let white: [f64; 3] = [wx.iter().sum(), wy.iter().sum(), wz.iter().sum()];
        if white.iter().any(|&v| !(v > 0.0)) {
            return Err(Error::invalid(
                "illuminant",
                illuminant.name(),
                format!(
                    "its white X, Y, Z = {white:?} on this grid has a zero component, so CIELAB is undefined"
                ),
            ));
        }
        Ok(Weights { wx, wy, wz, white })
    }

    /// Refuses a grid point the observer sees but the illuminant's table
    /// does not cover, naming it (no silent zero weight where it matters).
    pub fn check_light(
        wavelengths_nm: &[f64],
        illuminant: &Illuminant,
        observer: Observer,
    ) -> Result<()> {
        let (cmfs, light) = (observer.cmfs(), illuminant.table());
        match wavelengths_nm
            .iter()
            .enumerate()
            .find(|&(_, &wl)| cmfs.at(1, wl).is_some() && light.at(0, wl).is_none())
        {
            None => Ok(()),
            Some((i, &wl)) => {
                let (lo, hi) = light.span();
                Err(Error::invalid(
                    format!("wavelengths[{i}]"),
                    wl,
                    format!(
                        "outside the table of illuminant {} ({lo}–{hi} nm) where the observer still sees; limit the grid to that range",
                        illuminant.name()
                    ),
                ))
            }
        }
    }

    /// Tristimulus values X, Y, Z (0–100 scale) of a reflectance or
    /// transmittance spectrum (fractions 0–1) on the grid: three dot products.
    ///
    /// # Panics
    /// If `spectrum` does not have one value per grid point (a programming
    /// error: spectra are computed on the grid the weights were made for).
    pub fn xyz(&self, spectrum: &[f64]) -> [f64; 3] {
        assert_eq!(
            spectrum.len(),
            self.wx.len(),
            "spectrum length differs from the grid"
        );
        let dot = |w: &[f64]| w.iter().zip(spectrum).map(|(a, b)| a * b).sum();
        [dot(&self.wx), dot(&self.wy), dot(&self.wz)]
    }

    /// X, Y, Z of the perfect reflecting diffuser summed over the same grid,
    /// illuminant and observer (Y = 100): the CIELAB reference white.
    pub fn white(&self) -> [f64; 3] {
        self.white
    }
}

/// The wavelength interval a grid point stands for: half the distance between
/// its neighbours, the full spacing at the ends, 1 for a single point.
fn interval(grid: &[f64], i: usize) -> f64 {
    let n = grid.len();
    match (i.checked_sub(1), (i + 1 < n).then_some(i + 1)) {
        (Some(a), Some(b)) => 0.5 * (grid[b] - grid[a]),
        (None, Some(b)) => grid[b] - grid[i],
        (Some(a), None) => grid[i] - grid[a],
        (None, None) => 1.0,
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::grid::Range;

    fn grid(from: f64, to: f64, step: f64) -> Vec<f64> {
        Range { from, to, step }.points("w").unwrap()
    }

    fn chromaticity(w: &Weights) -> (f64, f64) {
        let [x, y, z] = w.white();
        (x / (x + y + z), y / (x + y + z))
    }

    /// CIE 015:2018 (2° observer): D65 x, y = 0.3127, 0.3290;
    /// A x, y = 0.44757, 0.40745.
    #[test]
    fn white_chromaticities_match_cie_015() {
        for step in [1.0, 5.0] {
            for (name, x0, y0) in [("D65", 0.3127, 0.3290), ("A", 0.44757, 0.40745)] {
                let ill = Illuminant::builtin(name).unwrap();
                let w = Weights::new(&grid(360.0, 830.0, step), &ill, Observer::Cie1931_2).unwrap();
                let (x, y) = chromaticity(&w);
                assert!(
                    (x - x0).abs() < 1e-4 && (y - y0).abs() < 1e-4,
                    "{name} {step}: {x} {y}"
                );
            }
        }
    }

    #[test]
    fn perfect_reflector_has_y_100_on_any_grid() {
        let g = grid(400.0, 700.0, 7.0);
        let w = Weights::new(
            &g,
            &Illuminant::builtin("F11").unwrap(),
            Observer::Cie1964_10,
        )
        .unwrap();
        let xyz = w.xyz(&vec![1.0; g.len()]);
        assert!((xyz[1] - 100.0).abs() < 1e-12);
        assert_eq!(xyz, w.white());
        assert_eq!(w.xyz(&vec![0.0; g.len()]), [0.0; 3]);
    }

    #[test]
    fn the_observers_range_limits_the_sum_and_uneven_grids_are_weighted() {
        let d65 = Illuminant::builtin("D65").unwrap();
        let wide: Vec<f64> = (0..=120).map(|i| 300.0 + 5.0 * i as f64).collect();
        let visible = grid(360.0, 830.0, 5.0);
        let a = Weights::new(&wide, &d65, Observer::Cie1931_2).unwrap();
        let b = Weights::new(&visible, &d65, Observer::Cie1931_2).unwrap();
        // Points outside 360–830 nm carry no weight.
        assert!(
            a.white()
                .iter()
                .zip(b.white())
                .all(|(x, y)| (x - y).abs() < 1e-9)
        );
        // A uniform grid written as a list, with every other point removed in
        // one half, keeps the white point close to the uniform result.
        let mut uneven: Vec<f64> = grid(380.0, 580.0, 5.0);
        uneven.extend(grid(590.0, 780.0, 10.0));
        let u = Weights::new(&uneven, &d65, Observer::Cie1931_2).unwrap();
        let full = Weights::new(&grid(380.0, 780.0, 5.0), &d65, Observer::Cie1931_2).unwrap();
        let (x0, y0) = chromaticity(&full);
        let (x1, y1) = chromaticity(&u);
        assert!(
            (x0 - x1).abs() < 2e-3 && (y0 - y1).abs() < 2e-3,
            "{x0} {y0} vs {x1} {y1}"
        );
    }

    #[test]
    fn grid_points_outside_the_tables_are_refused() {
        let d65 = Illuminant::builtin("D65").unwrap();
        let f2 = Illuminant::builtin("F2").unwrap();
        let err = Weights::new(&grid(360.0, 830.0, 10.0), &f2, Observer::Cie1931_2).unwrap_err();
        assert!(err.to_string().contains("illuminant F2"), "{err}");
        assert!(Weights::new(&[], &d65, Observer::Cie1931_2).is_err());
        let dark = Illuminant::from_csv("dark", "wavelength_nm,power\n300,0\n900,0\n").unwrap();
        assert!(Weights::new(&grid(380.0, 780.0, 5.0), &dark, Observer::Cie1931_2).is_err());
        // Deep red light only: z̄ is zero there, so the white has Z = 0.
        let red = Illuminant::from_csv("red", "wavelength_nm,power\n380,0\n690,0\n700,1\n780,1\n")
            .unwrap();
        let err = Weights::new(&grid(380.0, 780.0, 5.0), &red, Observer::Cie1931_2).unwrap_err();
        assert!(err.to_string().contains("zero component"), "{err}");
    }
}
