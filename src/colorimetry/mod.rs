//! Colorimetry of computed spectra: CIE tristimulus values by summation over the
//! scene's wavelength grid, CIELAB and LCh(ab) against the illuminant's own
//! computed white, display RGB (sRGB, Display P3) with gamut handling, colour
//! differences (ΔE*ab, ΔE*94, ΔE00) and the colour travel over angles.
//!
//! Typical use: build [`Weights`] once per (grid, illuminant, observer), then
//! for each spectrum `Colour::new(weights.xyz(&r), weights.white(), &options)`.
//! The CIE tables are embedded from `reference_data/cie/` (see its README).

mod colour;
mod difference;
mod spectra;
mod weights;

pub use colour::{
    Colour, ColourOptions, GamutMapping, RgbSpace, chromaticity, lab_to_lch, lab_to_xyz, xyz_to_lab,
};
pub use difference::{Travel, delta_e76, delta_e94, delta_e2000, travel};
pub use spectra::{BUILT_IN_ILLUMINANTS, Illuminant, Observer};
pub use weights::Weights;
