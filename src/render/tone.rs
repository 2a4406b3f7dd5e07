//! From linear display RGB to encoded sRGB bytes: exposure, a highlight
//! shoulder that keeps hue, clipping, and the transfer curve.

use glam::Vec3;

use crate::colorimetry::srgb_encode;

/// Linear value up to which the tone curve is the identity.
const KNEE: f32 = 0.6;

/// The tone curve: identity up to the knee, then an exponential shoulder
/// k + (1 − k)(1 − e^{−(x − k)/(1 − k)}) that meets it with equal slope and
/// approaches 1 (common practice). Applied to the largest channel and the
/// colour scaled by the same factor, so highlights keep their hue.
pub fn shoulder(rgb: Vec3) -> Vec3 {
    let peak = rgb.max_element();
    if peak <= KNEE {
        return rgb;
    }
    let span = 1.0 - KNEE;
    let mapped = KNEE + span * (1.0 - (-(peak - KNEE) / span).exp());
    rgb * (mapped / peak)
}

/// Exposure, then (if `tone`) the shoulder; negative channels (outside the
/// gamut) clipped to 0 first and values above 1 clipped last, as
/// `Colour::new` clips.
pub fn map(rgb: Vec3, exposure: f32, tone: bool) -> Vec3 {
    let x = (rgb * exposure).max(Vec3::ZERO);
    let x = if tone { shoulder(x) } else { x };
    x.min(Vec3::ONE)
}

/// Encodes linear 0–1 RGB as sRGB bytes (IEC 61966-2-1).
pub fn encode(rgb: Vec3) -> [u8; 3] {
    rgb.to_array()
        .map(|c| (srgb_encode(c as f64) * 255.0).round() as u8)
}

/// The backdrop: a neutral grey (R = G = B, so it adds no tint) darkening
/// slightly from top to bottom; `y` is 0 at the top, 1 at the bottom.
pub fn background(y: f32) -> Vec3 {
    Vec3::splat(0.16 - 0.08 * y)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn shoulder_is_continuous_monotone_and_bounded() {
        let f = |x: f32| shoulder(Vec3::splat(x)).x;
        assert_eq!(f(0.3), 0.3);
        assert!((f(KNEE + 1e-4) - (KNEE + 1e-4)).abs() < 1e-6);
        let mut last = 0.0;
        for i in 0..1000 {
            let y = f(i as f32 * 0.02);
            assert!(y >= last - 1e-6 && y <= 1.0, "{y} after {last}");
            last = y;
        }
        // Hue kept: ratios between channels are unchanged.
        let c = shoulder(Vec3::new(2.0, 1.0, 0.5));
        assert!((c.x / c.y - 2.0).abs() < 1e-5 && (c.y / c.z - 2.0).abs() < 1e-5);
    }

    #[test]
    fn map_clips_like_colour_new() {
        assert_eq!(
            map(Vec3::new(-0.2, 0.5, 1.7), 1.0, false),
            Vec3::new(0.0, 0.5, 1.0)
        );
        assert_eq!(encode(Vec3::ONE), [255; 3]);
        assert_eq!(encode(Vec3::ZERO), [0; 3]);
    }
}
