//! `lamella color`: CIE XYZ, CIELAB, sRGB and the colour travel at every angle.

use std::io::IsTerminal;
use std::path::{Path, PathBuf};

use lamella::angle_colour::{Viewing, angle_colours};
use lamella::colorimetry::{Colour, ColourOptions, Illuminant, RgbSpace, travel, travel_points};
use lamella::optics::aniso::Handedness;
use serde_json::{Value, json};

use super::choices::{GamutChoice, HandednessChoice, PolarizationChoice, SideChoice};
use super::{CliResult, Failure, RecordFormat, film_scene, load_scene, write_out};

/// Flags shared by every command that turns spectra into colour (flattened
/// into each; the commands are described in `cli::args`).
#[derive(Debug, Clone, clap::Args)]
pub struct ViewArgs {
    /// Reflected or transmitted light.
    #[arg(long, value_enum, default_value_t = SideChoice::Reflect)]
    pub side: SideChoice,
    /// Illuminant name (D65, D50, A, E, F2, F7, F11, LED-B1…LED-V2) or a
    /// `wavelength_nm,power` CSV file; overrides the scene.
    #[arg(long)]
    pub illuminant: Option<String>,
    /// Observer (CIE1931_2 or CIE1964_10); overrides the scene.
    #[arg(long)]
    pub observer: Option<String>,
    /// Polarization of the light.
    #[arg(long, value_enum, default_value_t = PolarizationChoice::Unpolarized)]
    pub polarization: PolarizationChoice,
    /// Out-of-gamut colours: clip each channel, or reduce chroma at constant
    /// CIELAB lightness and hue.
    #[arg(long, value_enum, default_value_t = GamutChoice::Clip)]
    pub gamut: GamutChoice,
}

/// `--analyzer`: unpolarized light seen through an ideal circular analyser
/// (flattened into the commands that take it).
#[derive(Debug, Clone, Copy, clap::Args)]
pub struct AnalyzerArgs {
    /// Unpolarized light, and the reflected (or with --side transmit,
    /// transmitted) light seen through an ideal circular analyser passing
    /// this handedness.
    #[arg(long, value_enum)]
    pub analyzer: Option<HandednessChoice>,
}

impl AnalyzerArgs {
    /// Puts the analyser into `viewing`; refused beside a polarized source
    /// (`view`), which the analyser replaces.
    pub fn apply(&self, view: &ViewArgs, viewing: &mut Viewing) -> Result<(), Failure> {
        with_analyzer(view, viewing, self.analyzer.map(Handedness::from))
    }
}

/// Puts `analyzer` into `viewing`; refused beside a polarized source
/// (`view`), which the analyser replaces.
fn with_analyzer(
    view: &ViewArgs,
    viewing: &mut Viewing,
    analyzer: Option<Handedness>,
) -> Result<(), Failure> {
    let Some(h) = analyzer else {
        return Ok(());
    };
    if view.polarization != PolarizationChoice::Unpolarized {
        return Err(Failure::input(format!(
            "--analyzer {}: the analyser is for unpolarized light; leave out --polarization",
            h.name()
        )));
    }
    viewing.analyzer = Some(h);
    Ok(())
}

impl ViewArgs {
    /// The scene's viewing with these overrides.
    pub fn viewing(
        &self,
        scene: &lamella::scene::Scene,
        scene_path: &Path,
    ) -> Result<Viewing, Failure> {
        let bad = |e: lamella::Error| Failure::input(format!("{}: {e}", scene_path.display()));
        let mut v = Viewing::of_scene(scene).map_err(bad)?;
        if let Some(name) = &self.illuminant {
            v.illuminant = if name.to_ascii_lowercase().ends_with(".csv") {
                let text = std::fs::read_to_string(name)
                    .map_err(|e| Failure::input(format!("--illuminant {name}: {e}")))?;
                Illuminant::from_csv(name, &text)
                    .map_err(|e| Failure::input(format!("--illuminant: {e}")))?
            } else {
                Illuminant::builtin(name)
                    .map_err(|e| Failure::input(format!("--illuminant: {e}")))?
            };
        }
        if let Some(o) = &self.observer {
            v.observer = o
                .parse()
                .map_err(|e| Failure::input(format!("--observer: {e}")))?;
        }
        v.side = self.side.into();
        v.polarization = self.polarization.into();
        v.options = ColourOptions {
            space: RgbSpace::Srgb,
            gamut: self.gamut.into(),
        };
        Ok(v)
    }
}

impl ViewArgs {
    /// [`ViewArgs::viewing`] through an ideal circular analyser when one is
    /// given (`--analyzer`, for unpolarized light only).
    pub fn viewing_through(
        &self,
        scene: &lamella::scene::Scene,
        scene_path: &Path,
        analyzer: Option<Handedness>,
    ) -> Result<Viewing, Failure> {
        let mut viewing = self.viewing(scene, scene_path)?;
        with_analyzer(self, &mut viewing, analyzer)?;
        Ok(viewing)
    }
}

/// Runs the command.
pub fn run(
    scene_path: &Path,
    format: RecordFormat,
    view: &ViewArgs,
    analyzer: &AnalyzerArgs,
    display_p3: bool,
    out: Option<&PathBuf>,
) -> CliResult {
    let scene = load_scene(scene_path)?;
    film_scene(scene_path, &scene, "color")?;
    let (viewing, spectra, colours) =
        colours_of(&scene, scene_path, view, analyzer.analyzer.map(Into::into))?;
    let bad = |e| Failure::scene(scene_path, e);
    let mut records = records(&spectra.angles_deg, &colours);
    if display_p3 {
        let white = viewing
            .weights(&spectra.wavelengths_nm)
            .map_err(bad)?
            .white();
        let options = ColourOptions {
            space: RgbSpace::DisplayP3,
            ..viewing.options
        };
        for (r, c) in records.iter_mut().zip(&colours) {
            let p3 = Colour::new(c.xyz, white, &options);
            r["display_p3"] = json!(p3.rgb);
            r["display_p3_hex"] = json!(p3.hex);
            r["display_p3_in_gamut"] = json!(p3.in_gamut);
        }
    }
    let text = match format {
        RecordFormat::Json => {
            serde_json::to_string_pretty(&records).expect("records serialise") + "\n"
        }
        RecordFormat::Csv => csv(&records),
        RecordFormat::Cgats => {
            let points: Vec<_> = (spectra.angles_deg.iter())
                .map(|&a| lamella::design::coating::At::Angle(a))
                .zip(&colours)
                .collect();
            super::cgats_colours(&scene.title, &viewing, &points)
        }
        RecordFormat::Table => table(
            &scene.title,
            &viewing,
            &spectra.angles_deg,
            &colours,
            out.is_none() && std::io::stdout().is_terminal(),
        ),
    };
    write_out(out.map(PathBuf::as_path), &[text.into_bytes()])
}

/// The viewing the flags ask for, the scene's spectra and the colour at
/// every angle, as `lamella color` reports them.
pub fn colours_of(
    scene: &lamella::scene::Scene,
    scene_path: &Path,
    view: &ViewArgs,
    analyzer: Option<Handedness>,
) -> Result<(Viewing, lamella::optics::Spectra, Vec<Colour>), Failure> {
    let viewing = view.viewing_through(scene, scene_path, analyzer)?;
    let bad = |e| Failure::scene(scene_path, e);
    let spectra = viewing.spectra_of(scene, &scene.angles_deg).map_err(bad)?;
    let colours = angle_colours(&spectra, &viewing).map_err(bad)?;
    Ok((viewing, spectra, colours))
}

/// One JSON object per angle (`lamella color --format json`).
pub fn records(angles: &[f64], colours: &[Colour]) -> Vec<Value> {
    let samples: Vec<(f64, [f64; 3])> = angles
        .iter()
        .copied()
        .zip(colours.iter().map(|c| c.lab))
        .collect();
    angles
        .iter()
        .zip(colours)
        .zip(travel_points(&samples))
        .map(|((a, c), t)| {
            json!({
                "angle_deg": a,
                "X": c.xyz[0], "Y": c.xyz[1], "Z": c.xyz[2],
                "x": c.xy[0], "y": c.xy[1],
                "L": c.lab[0], "a": c.lab[1], "b": c.lab[2],
                "C": c.lch[1], "h": c.lch[2],
                "srgb": c.rgb, "hex": c.hex, "in_gamut": c.in_gamut,
                "hue_shift_deg": t.hue_shift_deg,
                "delta_e00_from_first": t.delta_e00_from_first,
                "delta_e00_per_deg": t.delta_e00_per_deg,
            })
        })
        .collect()
}

/// The records as CSV, columns in record order; a list `k` of three values
/// becomes columns `k_r,k_g,k_b`.
fn csv(records: &[Value]) -> String {
    let keys: Vec<&String> = records[0]
        .as_object()
        .map(|o| o.keys().collect())
        .unwrap_or_default();
    let mut header = Vec::new();
    for k in &keys {
        match &records[0][k.as_str()] {
            Value::Array(_) => header.extend(["r", "g", "b"].map(|c| format!("{k}_{c}"))),
            _ => header.push(k.to_string()),
        }
    }
    let mut out = header.join(",") + "\n";
    for r in records {
        let cells: Vec<String> = keys
            .iter()
            .flat_map(|k| match &r[k.as_str()] {
                Value::Array(xs) => xs.iter().map(Value::to_string).collect(),
                Value::String(s) => vec![s.clone()],
                other => vec![other.to_string()],
            })
            .collect();
        out.push_str(&cells.join(","));
        out.push('\n');
    }
    out
}

fn table(title: &str, v: &Viewing, angles: &[f64], colours: &[Colour], swatches: bool) -> String {
    let mut out = format!(
        "{}\n{} light{}, {} {}, {}\n\n",
        if title.is_empty() {
            "(untitled scene)"
        } else {
            title
        },
        v.polarization.name(),
        v.analyzer
            .map(|h| format!(" through a {} circular analyser", h.name()))
            .unwrap_or_default(),
        v.side.name(),
        v.illuminant.name(),
        v.observer.name(),
    );
    out.push_str(&format!(
        "{:>7} {:>7} {:>7} {:>7} {:>7} {:>7} {:>7}  {:<7} {:>5}  {}\n",
        "angle°",
        "Y",
        "L*",
        "a*",
        "b*",
        "C*",
        "h°",
        "hex",
        "gamut",
        if swatches { "swatch" } else { "" }
    ));
    for (a, c) in angles.iter().zip(colours) {
        let swatch = if swatches {
            super::swatch(c.rgb)
        } else {
            String::new()
        };
        out.push_str(&format!(
            "{a:>7.1} {:>7.2} {:>7.2} {:>7.2} {:>7.2} {:>7.2} {:>7.1}  {:<7} {:>5}  {swatch}\n",
            c.xyz[1],
            c.lab[0],
            c.lab[1],
            c.lab[2],
            c.lch[1],
            c.lch[2],
            c.hex,
            if c.in_gamut { "in" } else { "OUT" },
        ));
    }
    if colours.len() >= 2 {
        let samples: Vec<(f64, [f64; 3])> = angles
            .iter()
            .copied()
            .zip(colours.iter().map(|c| c.lab))
            .collect();
        if let Ok(t) = travel(&samples) {
            out.push_str(&format!(
                "\ncolour travel {}°→{}°: hue {:+.1}°, ΔE00 {:.2}; fastest change {:.2} ΔE00/° near {:.1}°\n",
                angles[0],
                angles[angles.len() - 1],
                t.hue_change_deg,
                t.delta_e2000,
                t.steepest_rate_per_deg,
                t.steepest_angle_deg
            ));
        }
    }
    if colours.iter().any(|c| !c.in_gamut) {
        out.push_str("OUT: outside the sRGB gamut; the swatch and hex are an approximation.\n");
    }
    out
}
