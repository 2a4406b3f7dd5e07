//! Raster images shared by charts and renders: sizes written as `WxH`, and
//! PNG encoding in memory.

use crate::error::{Error, Result};

/// `WxH` (or `WXH`) in whole pixels, each side within `limits` (inclusive).
pub fn parse_size(text: &str, (lo, hi): (u32, u32)) -> Result<(u32, u32)> {
    let bad = || {
        Error::invalid(
            "size",
            text,
            format!("expected WxH with each side from {lo} to {hi} pixels, e.g. 800x600"),
        )
    };
    let (w, h) = text.split_once(['x', 'X']).ok_or_else(bad)?;
    let side = |t: &str| match t.trim().parse::<u32>() {
        Ok(v) if (lo..=hi).contains(&v) => Ok(v),
        _ => Err(bad()),
    };
    Ok((side(w)?, side(h)?))
}

/// PNG bytes of packed 8-bit RGB pixels (`None` if the sizes disagree),
/// with zlib's default compression and adaptive row filters.
pub fn png((w, h): (u32, u32), rgb: &[u8]) -> Option<Vec<u8>> {
    use image::ImageEncoder;
    use image::codecs::png::{CompressionType, FilterType, PngEncoder};
    if rgb.len() != 3 * w as usize * h as usize {
        return None;
    }
    let mut out = Vec::new();
    PngEncoder::new_with_quality(&mut out, CompressionType::Default, FilterType::Adaptive)
        .write_image(rgb, w, h, image::ExtendedColorType::Rgb8)
        .ok()?;
    Some(out)
}

/// An animated PNG (APNG) of packed 8-bit RGB frames of one size, shown
/// `fps` frames per second and looping forever (`None` if a frame's size
/// disagrees or there are no frames).
pub fn apng((w, h): (u32, u32), frames: &[Vec<u8>], fps: u16) -> Option<Vec<u8>> {
    if frames.is_empty()
        || frames
            .iter()
            .any(|f| f.len() != 3 * w as usize * h as usize)
    {
        return None;
    }
    let mut out = Vec::new();
    {
        let mut encoder = png::Encoder::new(&mut out, w, h);
        encoder.set_color(png::ColorType::Rgb);
        encoder.set_depth(png::BitDepth::Eight);
        encoder.set_animated(frames.len() as u32, 0).ok()?;
        encoder.set_frame_delay(1, fps.max(1)).ok()?;
        let mut writer = encoder.write_header().ok()?;
        for frame in frames {
            writer.write_image_data(frame).ok()?;
        }
        writer.finish().ok()?;
    }
    Some(out)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn sizes_parse_within_their_limits() {
        assert_eq!(parse_size("1024x768", (1, 16384)).unwrap(), (1024, 768));
        assert_eq!(parse_size(" 20X30 ", (16, 100)).unwrap(), (20, 30));
        for bad in ["0x5", "5", "x5", "10x", "1.5x3", "-4x4", "20000x20"] {
            assert!(parse_size(bad, (1, 16384)).is_err(), "{bad}");
        }
        assert!(parse_size("10x10", (16, 100)).is_err());
    }

    #[test]
    fn png_has_its_signature_and_refuses_wrong_sizes() {
        let bytes = png((2, 1), &[255, 0, 0, 0, 0, 255]).unwrap();
        assert_eq!(&bytes[..8], b"\x89PNG\r\n\x1a\n");
        assert!(png((2, 2), &[0; 6]).is_none());
    }

    #[test]
    fn apng_has_an_animation_control_chunk_and_every_frame() {
        let frames = vec![vec![0u8; 12], vec![255u8; 12], vec![9u8; 12]];
        let bytes = apng((2, 2), &frames, 12).unwrap();
        assert_eq!(&bytes[..8], b"\x89PNG\r\n\x1a\n");
        let find = |tag: &[u8]| bytes.windows(4).filter(|w| *w == tag).count();
        assert_eq!(find(b"acTL"), 1);
        assert_eq!(find(b"fcTL"), 3);
        assert_eq!(find(b"fdAT"), 2);
        assert!(apng((2, 2), &[vec![0u8; 5]], 12).is_none());
    }
}
