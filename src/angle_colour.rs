//! The colour of a scene at each angle: spectra from the engine weighed by an
//! illuminant and observer, on the reflected or transmitted side.

use std::str::FromStr;

use crate::colorimetry::{Colour, ColourOptions, Illuminant, Observer, Weights};
use crate::error::{Error, Result};
use crate::optics::aniso::{Handedness, Jones};
use crate::optics::{Rt, Spectra};
use crate::scene::{Scene, check_spectra};

/// Which light reaches the observer.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
pub enum Side {
    /// Light reflected by the coating.
    #[default]
    Reflect,
    /// Light transmitted through the coating and substrate.
    Transmit,
}

/// Polarization of the illumination.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
pub enum Polarization {
    /// Unpolarized: the mean of s and p.
    #[default]
    Unpolarized,
    /// s (TE) only.
    S,
    /// p (TM) only.
    P,
    /// Left-handed circularly polarized (handedness named by the helix the
    /// electric field traces in space at one instant).
    Left,
    /// Right-handed circularly polarized.
    Right,
}

impl FromStr for Side {
    type Err = Error;
    fn from_str(s: &str) -> Result<Self> {
        match s {
            "reflect" => Ok(Side::Reflect),
            "transmit" => Ok(Side::Transmit),
            _ => Err(Error::invalid("side", s, "expected reflect or transmit")),
        }
    }
}

impl Side {
    /// `reflect` or `transmit`.
    pub fn name(self) -> &'static str {
        match self {
            Side::Reflect => "reflect",
            Side::Transmit => "transmit",
        }
    }
}

impl Polarization {
    /// The fraction of light on `side` for this polarization, from the s
    /// and p values of a stack that never mixes s and p (isotropic layers):
    /// left- and right-handed light then see the mean of s and p.
    pub fn of(self, x: &Rt, side: Side) -> f64 {
        match (side, self) {
            (
                Side::Reflect,
                Polarization::Unpolarized | Polarization::Left | Polarization::Right,
            ) => x.r(),
            (Side::Reflect, Polarization::S) => x.rs,
            (Side::Reflect, Polarization::P) => x.rp,
            (
                Side::Transmit,
                Polarization::Unpolarized | Polarization::Left | Polarization::Right,
            ) => x.t(),
            (Side::Transmit, Polarization::S) => x.ts,
            (Side::Transmit, Polarization::P) => x.tp,
        }
    }

    /// The fraction of light on `side` for this polarization at one point:
    /// from its Jones matrices when given (they are needed for left- and
    /// right-handed light on an anisotropic stack), else from R and T.
    pub fn of_point(self, x: &Rt, jones: Option<&Jones>, side: Side) -> f64 {
        match jones {
            Some(j) => self.of_jones(j, side),
            None => self.of(x, side),
        }
    }

    /// The fraction of light on `side` for this polarization from a point's
    /// Jones matrices (any stack): totals per incident polarization, the
    /// mean of the two for unpolarized light.
    pub fn of_jones(self, j: &Jones, side: Side) -> f64 {
        let pick = |[r0, r1, t0, t1]: [f64; 4], i: usize| match side {
            Side::Reflect => [r0, r1][i],
            Side::Transmit => [t0, t1][i],
        };
        match self {
            Polarization::Unpolarized => 0.5 * (pick(j.powers(), 0) + pick(j.powers(), 1)),
            Polarization::P => pick(j.powers(), 0),
            Polarization::S => pick(j.powers(), 1),
            Polarization::Left => pick(j.circular().powers(), 0),
            Polarization::Right => pick(j.circular().powers(), 1),
        }
    }

    /// The light's polarization in words: "unpolarized", "s-polarized",
    /// "left-circular" …
    pub fn label(self) -> &'static str {
        match self {
            Polarization::Unpolarized => "unpolarized",
            Polarization::S => "s-polarized",
            Polarization::P => "p-polarized",
            Polarization::Left => "left-circular",
            Polarization::Right => "right-circular",
        }
    }

    /// `unpolarized`, `s`, `p`, `left` or `right`.
    pub fn name(self) -> &'static str {
        match self {
            Polarization::Unpolarized => "unpolarized",
            Polarization::S => "s",
            Polarization::P => "p",
            Polarization::Left => "left",
            Polarization::Right => "right",
        }
    }
}

impl FromStr for Polarization {
    type Err = Error;
    fn from_str(s: &str) -> Result<Self> {
        match s {
            "unpolarized" | "both" => Ok(Polarization::Unpolarized),
            "s" => Ok(Polarization::S),
            "p" => Ok(Polarization::P),
            "left" => Ok(Polarization::Left),
            "right" => Ok(Polarization::Right),
            _ => Err(Error::invalid(
                "polarization",
                s,
                "expected unpolarized, s, p, left or right",
            )),
        }
    }
}

/// How a scene is looked at: light, observer, side, polarization and RGB rendering.
#[derive(Debug, Clone)]
pub struct Viewing {
    /// The light source.
    pub illuminant: Illuminant,
    /// The standard observer.
    pub observer: Observer,
    /// Reflected or transmitted light.
    pub side: Side,
    /// Polarization of the light.
    pub polarization: Polarization,
    /// An ideal circular analyser in front of the observer (with
    /// unpolarized light): the outgoing light's power in that handedness.
    pub analyzer: Option<Handedness>,
    /// RGB space and gamut mapping.
    pub options: ColourOptions,
}

impl Viewing {
    /// The scene's own illuminant and observer, reflected unpolarized light,
    /// sRGB. (Kept fallible for callers; a validated scene always has both.)
    pub fn of_scene(scene: &Scene) -> Result<Viewing> {
        Ok(Viewing {
            illuminant: scene.illuminant.clone(),
            observer: scene.observer,
            side: Side::Reflect,
            polarization: Polarization::Unpolarized,
            analyzer: None,
            options: ColourOptions::default(),
        })
    }

    /// Colour weights on a wavelength grid.
    pub fn weights(&self, wavelengths_nm: &[f64]) -> Result<Weights> {
        Weights::new(wavelengths_nm, &self.illuminant, self.observer)
    }

    /// The colour of one angle's spectrum, from its Jones matrices when
    /// given (they are needed for an anisotropic stack and for an
    /// analyser: [`angle_colours`] checks).
    pub fn colour(
        &self,
        weights: &Weights,
        rt: &[Rt],
        jones: Option<&[Jones]>,
        scratch: &mut Vec<f64>,
    ) -> Colour {
        scratch.clear();
        match jones {
            Some(js) => scratch.extend(rt.iter().zip(js).map(|(x, j)| self.fraction(x, Some(j)))),
            None => scratch.extend(rt.iter().map(|x| self.fraction(x, None))),
        }
        Colour::new(weights.xyz(scratch), weights.white(), &self.options)
    }

    /// The fraction of light seen at one point, from its Jones matrices when
    /// given ([`seen_in_jones`] for this viewing; an analyser needs them:
    /// without them the light's own polarization is used, so callers go
    /// through [`Viewing::spectra_of`]).
    pub fn fraction(&self, x: &Rt, jones: Option<&Jones>) -> f64 {
        match jones {
            Some(j) => self.of_jones(j),
            None => self.polarization.of(x, self.side),
        }
    }

    /// The fraction of light seen at one point from its Jones matrices.
    pub fn of_jones(&self, j: &Jones) -> f64 {
        seen_in_jones(j, self.side, self.polarization, self.analyzer)
    }
}

/// The fraction of light seen at one point from its Jones matrices, on
/// `side`, for incident light of `polarization` or, with an analyser,
/// for unpolarized light seen through it: ½ Σ_in |J_{h,in}|² in the
/// circular basis.
pub fn seen_in_jones(
    j: &Jones,
    side: Side,
    polarization: Polarization,
    analyzer: Option<Handedness>,
) -> f64 {
    match analyzer {
        None => polarization.of_jones(j, side),
        Some(h) => {
            let [r0, r1, t0, t1] = j.circular().analysed();
            match side {
                Side::Reflect => [r0, r1][h.index()],
                Side::Transmit => [t0, t1][h.index()],
            }
        }
    }
}

impl Viewing {
    /// The scene's spectra at `angles_deg` as this viewing needs them: with
    /// the Jones matrices for an analyser (and always for an anisotropic
    /// scene, whose R and T come from them).
    pub fn spectra_of(&self, scene: &Scene, angles_deg: &[f64]) -> Result<Spectra> {
        if self.analyzer.is_some() {
            scene.spectra_with_jones_at(angles_deg)
        } else {
            scene.spectra_at(angles_deg)
        }
    }

    /// True for unpolarized light seen without an analyser: the viewing
    /// that charts and reports widen to both handednesses ([`side_by_side`]).
    pub fn plain(&self) -> bool {
        self.polarization == Polarization::Unpolarized && self.analyzer.is_none()
    }

    /// This viewing through an ideal circular analyser passing `h`.
    pub fn through(&self, h: Handedness) -> Viewing {
        Viewing {
            analyzer: Some(h),
            ..self.clone()
        }
    }

    /// This viewing with light of polarization `p` (no analyser).
    pub fn lit(&self, p: Polarization) -> Viewing {
        Viewing {
            polarization: p,
            analyzer: None,
            ..self.clone()
        }
    }

    /// What reaches the eye in words: "unpolarized", "left-circular",
    /// "through a left analyser" (unpolarized light).
    pub fn seen(&self) -> String {
        match self.analyzer {
            Some(h) => format!("through a {} analyser", h.name()),
            None => self.polarization.label().into(),
        }
    }
}

/// Reflectance or transmittance differences below this are taken as equal
/// when deciding whether left and right differ ([`handed`]).
pub const HANDED_TOLERANCE: f64 = 1e-6;

/// True when left- and right-handed light differ somewhere on the grid of
/// `spectra`: incident left against right, or unpolarized light seen through
/// a left against a right analyser, reflected or transmitted, by more than
/// [`HANDED_TOLERANCE`]. Spectra without Jones matrices (isotropic stacks,
/// which never tell the handednesses apart) are not handed.
pub fn handed(spectra: &Spectra) -> bool {
    spectra.jones.iter().flatten().any(|j| {
        let c = j.circular();
        let [r0, r1, t0, t1] = c.powers();
        let [a0, a1, b0, b1] = c.analysed();
        [(r0, r1), (t0, t1), (a0, a1), (b0, b1)]
            .iter()
            .any(|(l, r)| (l - r).abs() > HANDED_TOLERANCE)
    })
}

/// Left- and right-circular incident light: what a chart of incident light
/// shows for a [`Viewing::plain`] view once its spectra prove [`handed`]
/// (`None` for any other view, which is shown as it is).
pub fn handed_lights(viewing: &Viewing) -> Option<[Viewing; 2]> {
    viewing
        .plain()
        .then(|| [Polarization::Left, Polarization::Right].map(|p| viewing.lit(p)))
}

/// The viewings a chart of incident light shows for `viewing`:
/// [`handed_lights`] when its spectra are `handed_spectra` ([`handed`]),
/// else `viewing` itself.
pub fn incident_views(viewing: &Viewing, handed_spectra: bool) -> Vec<Viewing> {
    match handed_lights(viewing) {
        Some(both) if handed_spectra => both.to_vec(),
        _ => vec![viewing.clone()],
    }
}

/// The viewings a chart or report shows for `viewing`: itself, and for a
/// [`Viewing::plain`] view of [`handed`] spectra also unpolarized light
/// through a left and through a right analyser, as one sees a chiral film
/// through circular-polarizer glasses.
pub fn side_by_side(viewing: &Viewing, spectra: &Spectra) -> Vec<Viewing> {
    let mut out = vec![viewing.clone()];
    if viewing.plain() && handed(spectra) {
        out.extend([Handedness::Left, Handedness::Right].map(|h| viewing.through(h)));
    }
    out
}

/// The colour at every angle of `spectra`; a spectrum value that is not a
/// finite number is an error naming its wavelength and angle.
/// An analyser needs the spectra's Jones matrices ([`Scene::spectra_with_jones`]).
pub fn angle_colours(spectra: &Spectra, viewing: &Viewing) -> Result<Vec<Colour>> {
    let weights = viewing.weights(&spectra.wavelengths_nm)?;
    check_spectra(spectra)?;
    if let (Some(h), None) = (viewing.analyzer, &spectra.jones) {
        return Err(Error::invalid(
            "analyzer",
            h.name(),
            "an analyser needs the spectra's Jones matrices (Scene::spectra_with_jones)",
        ));
    }
    let mut scratch = Vec::with_capacity(spectra.wavelengths_nm.len());
    (0..spectra.angles_deg.len())
        .map(|a| {
            let colour = viewing.colour(
                &weights,
                spectra.at_angle(a),
                spectra.jones_at_angle(a),
                &mut scratch,
            );
            check_colour(&colour, &format!("{}°", spectra.angles_deg[a]))?;
            Ok(colour)
        })
        .collect()
}

/// Refuses a colour with any value that is not a finite number (`at` names
/// the angle or geometry).
pub fn check_colour(c: &Colour, at: &str) -> Result<()> {
    let values = c
        .xyz
        .iter()
        .chain(&c.xy)
        .chain(&c.lab)
        .chain(&c.lch)
        .chain(&c.rgb);
    match values.copied().find(|v| !v.is_finite()) {
        Some(v) => Err(Error::not_computable("colour", at, v)),
        None => Ok(()),
    }
}
