//! Pieces shared by the design commands: target colours, seeds, progress.

use std::io::IsTerminal;

use lamella::angle_colour::Viewing;
use lamella::colorimetry::{rgb_to_xyz_under, xyz_to_lab};

use super::Failure;

/// A target colour as given on the command line.
#[derive(Debug, Clone, clap::Args)]
#[group(required = false, multiple = false)]
pub struct TargetArgs {
    /// Target CIELAB colour `L,a,b` (under the scene's illuminant and observer).
    #[arg(long, value_name = "L,a,b", allow_hyphen_values = true)]
    pub target_lab: Option<String>,
    /// Target sRGB colour `#RRGGBB`, converted to CIELAB as `color` renders sRGB
    /// under the scene's illuminant.
    #[arg(long, value_name = "#RRGGBB")]
    pub target_hex: Option<String>,
}

impl TargetArgs {
    /// The target's Lab, if one was given.
    pub fn lab(
        &self,
        viewing: &Viewing,
        wavelengths_nm: &[f64],
    ) -> Result<Option<[f64; 3]>, Failure> {
        if let Some(t) = &self.target_lab {
            return parse_lab(t)
                .map(Some)
                .map_err(|e| Failure::input(format!("--target-lab {t}: {e}")));
        }
        let Some(hex) = &self.target_hex else {
            return Ok(None);
        };
        let digits = hex.trim_start_matches('#');
        let bad = || Failure::input(format!("--target-hex {hex}: expected #RRGGBB"));
        let rgb = lamella::colorimetry::rgb_of_hex(digits).ok_or_else(bad)?;
        let weights = viewing
            .weights(wavelengths_nm)
            .map_err(|e| Failure::input(format!("--target-hex: {e}")))?;
        let white = weights.white();
        let xyz = rgb_to_xyz_under(rgb, white, viewing.options.space);
        Ok(Some(xyz_to_lab(xyz, white)))
    }
}

/// `L,a,b` → three numbers within [`LAB_LIMIT`] (L* not negative).
pub fn parse_lab(text: &str) -> Result<[f64; 3], String> {
    let v: Vec<f64> = text
        .split(',')
        .map(|s| {
            s.trim()
                .parse::<f64>()
                .map_err(|_| format!("`{}` is not a number", s.trim()))
        })
        .collect::<Result<_, _>>()?;
    match v[..] {
        [l, a, b] if l >= 0.0 && v.iter().all(|x| x.abs() <= LAB_LIMIT) => Ok([l, a, b]),
        [_, _, _] => Err(format!(
            "L* must lie from 0 to {LAB_LIMIT} and a*, b* within ±{LAB_LIMIT}"
        )),
        _ => Err("expected three numbers L,a,b".into()),
    }
}

/// Bound on target CIELAB values: far beyond any surface colour (L* above
/// 100 occurs near the specular direction of effect coatings), and small
/// enough that ΔE00 stays finite.
pub const LAB_LIMIT: f64 = 1000.0;

/// A progress bar on stderr when it is a terminal; a no-op otherwise.
pub struct Progress(Option<indicatif::ProgressBar>);

impl Progress {
    /// A bar counting to `len` (evaluations or samples).
    pub fn new(len: u64, what: &str) -> Self {
        if !std::io::stderr().is_terminal() {
            return Progress(None);
        }
        let bar = indicatif::ProgressBar::new(len);
        if let Ok(style) = indicatif::ProgressStyle::with_template(&format!(
            "{what} {{bar:30}} {{pos}}/{{len}} {{msg}}"
        )) {
            bar.set_style(style);
        }
        Progress(Some(bar))
    }

    /// Moves the bar to `pos` with a message.
    pub fn set(&self, pos: u64, msg: String) {
        if let Some(b) = &self.0 {
            b.set_position(pos);
            b.set_message(msg);
        }
    }

    /// Removes the bar.
    pub fn finish(&self) {
        if let Some(b) = &self.0 {
            b.finish_and_clear();
        }
    }
}

/// Pretty JSON with a trailing newline.
pub fn json_bytes(v: &serde_json::Value) -> Vec<u8> {
    let mut s = serde_json::to_string_pretty(v).expect("JSON values serialise");
    s.push('\n');
    s.into_bytes()
}

/// Output format of the design reports.
#[derive(Debug, Clone, Copy, clap::ValueEnum)]
pub enum Format {
    /// One JSON object.
    Json,
}
