//! Colorimetry of computed spectra: CIE tristimulus values by summation over the
//! scene's wavelength grid, CIELAB and LCh(ab) against the illuminant's own
//! computed white, display RGB (sRGB, Display P3) with gamut handling, colour
//! differences (ΔE*ab, ΔE*94, ΔE00, CMC(l:c)) with their components and the colour travel over angles.
//!
//! Typical use: build [`Weights`] once per (grid, illuminant, observer), then
//! for each spectrum `Colour::new(weights.xyz(&r), weights.white(), &options)`.
//! The CIE tables are embedded from `reference_data/cie/` (see its README).

mod colour;
mod difference;
mod spectra;
mod weights;

pub use colour::{
    Colour, ColourOptions, GamutMapping, RgbDisplay, RgbSpace, chromaticity, lab_to_lch,
    lab_to_xyz, rgb_of_hex, rgb_to_xyz_under, srgb_decode, srgb_encode, xyz_to_lab,
};
pub use difference::{
    LabComponents, NEUTRAL_CHROMA, SAME_WITHIN, Travel, TravelPoint, delta_e_cmc, delta_e76,
    delta_e94, delta_e2000, delta_e2000_weighted, describe, hue_difference_deg, lab_components,
    travel, travel_points,
};
pub use spectra::{BUILT_IN_ILLUMINANTS, Illuminant, Observer};
pub use weights::Weights;

#[cfg(test)]
mod tests {
    use super::*;
    use crate::grid::Range;
    use serde_json::Value;

    fn reference() -> Value {
        serde_json::from_str(include_str!(
            "../../reference_data/cie/colorimetry_reference.json"
        ))
        .unwrap()
    }

    fn vec3(v: &Value) -> [f64; 3] {
        let a: Vec<f64> = serde_json::from_value(v.clone()).unwrap();
        [a[0], a[1], a[2]]
    }

    fn max_abs_diff(a: [f64; 3], b: [f64; 3]) -> f64 {
        a.iter()
            .zip(b)
            .map(|(x, y)| (x - y).abs())
            .fold(0.0, f64::max)
    }

    /// XYZ, CIELAB and sRGB of random reflectances on 1 nm and 5 nm grids for
    /// D65, D50 and A and both observers, against colour-science 0.4.7
    /// (`reference_data/cie/make_colorimetry_reference.py`, which aligns the
    /// interpolation and normalisation with ours).
    #[test]
    fn spectra_agree_with_colour_science() {
        let data = reference();
        let grids = data["grids"].as_array().unwrap();
        let mut worst = [0.0f64; 3]; // XYZ, ΔE00, sRGB
        for case in data["cases"].as_array().unwrap() {
            let grid = &grids[case["grid"].as_u64().unwrap() as usize];
            let wl = Range {
                from: grid["from"].as_f64().unwrap(),
                to: grid["to"].as_f64().unwrap(),
                step: grid["step"].as_f64().unwrap(),
            }
            .points("w")
            .unwrap();
            let ill = Illuminant::builtin(case["illuminant"].as_str().unwrap()).unwrap();
            let obs: Observer = case["observer"].as_str().unwrap().parse().unwrap();
            let w = Weights::new(&wl, &ill, obs).unwrap();
            let white = vec3(&case["white"]);
            worst[0] = worst[0].max(max_abs_diff(w.white(), white));
            let spectra = grid["spectra"].as_array().unwrap();
            for (s, e) in spectra.iter().zip(case["expected"].as_array().unwrap()) {
                let r: Vec<f64> = serde_json::from_value(s.clone()).unwrap();
                let c = Colour::new(w.xyz(&r), w.white(), &ColourOptions::default());
                let (xyz, lab) = (vec3(&e["xyz"]), vec3(&e["lab"]));
                worst[0] = worst[0].max(max_abs_diff(c.xyz, xyz));
                worst[1] = worst[1].max(delta_e2000(c.lab, lab));
                let linear = vec3(&e["linear_srgb"]);
                let srgb = vec3(&e["srgb"]);
                let inside = linear.iter().all(|&v| (-1e-9..=1.0 + 1e-9).contains(&v));
                assert_eq!(c.in_gamut, inside, "{c:?} vs {linear:?}");
                worst[2] = worst[2].max(max_abs_diff(c.rgb, srgb.map(|v| v.clamp(0.0, 1.0))));
            }
        }
        assert!(worst[0] < 1e-9, "XYZ differs by {}", worst[0]);
        assert!(worst[1] < 1e-9, "ΔE00 up to {}", worst[1]);
        assert!(worst[2] < 1e-9, "sRGB differs by {}", worst[2]);
    }

    /// ΔE*ab, ΔE*94 (graphic arts) and ΔE00 against colour-science 0.4.7
    /// `colour.delta_E` (`reference_data/cie/colorimetry_reference.json`).
    #[test]
    fn differences_agree_with_colour_science() {
        for d in reference()["differences"].as_array().unwrap() {
            let (a, b) = (vec3(&d["lab1"]), vec3(&d["lab2"]));
            for (got, key) in [
                (delta_e76(a, b), "de76"),
                (delta_e94(a, b), "de94"),
                (delta_e2000(a, b), "de2000"),
            ] {
                let want = d[key].as_f64().unwrap();
                assert!(
                    (got - want).abs() < 1e-9,
                    "{key} {a:?} {b:?}: {got} vs {want}"
                );
            }
        }
    }
}
