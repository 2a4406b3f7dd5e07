//! `lamella multiangle`: the colour of an effect-pigment coating at the
//! multi-angle geometries, with the flop index and the hue travel.

use std::io::IsTerminal;
use std::path::{Path, PathBuf};

use lamella::angle_colour::Viewing;
use lamella::pigment::{Coating, Measurement, Model, TABLE_STEP_DEG, measure, parse_name};
use lamella::scene::{GRID_BYTES_PER_POINT, Scene};
use serde_json::{Value, json};

use super::choices::{GamutChoice, PolarizationChoice, SideChoice};
use super::color::ViewArgs;
use lamella::design::coating::At;

use super::{CliResult, Failure, RecordFormat, load_scene, write_out};

/// Flags of `lamella multiangle` (the command is described in `cli::args`).
#[derive(Debug, Clone, clap::Args)]
pub struct Args {
    /// Include the reflectance factor spectrum of each geometry (JSON key
    /// `reflectance_factor`; CSV columns `rf_<wavelength>`).
    #[arg(long)]
    pub spectra: bool,
    /// Geometries to use instead of the scene's `coating.geometries`:
    /// comma-separated names ILLUMINATIONasASPECULAR, e.g. `45as15,45as110`
    /// or `25as40` (aspecular angle positive toward the normal), and the
    /// set `45` (45as-15,15,25,45,75,110: ASTM E2194 / DIN 6175-2).
    #[arg(long, allow_hyphen_values = true)]
    pub geometries: Option<String>,
    /// Illuminant name (D65, D50, A, E, F2, F7, F11, LED-B1…LED-V2) or a
    /// `wavelength_nm,power` CSV file; overrides the scene.
    #[arg(long)]
    pub illuminant: Option<String>,
    /// Observer (CIE1931_2 or CIE1964_10); overrides the scene.
    #[arg(long)]
    pub observer: Option<String>,
    /// Out-of-gamut colours: clip each channel, or reduce chroma at constant
    /// CIELAB lightness and hue.
    #[arg(long, value_enum, default_value_t = GamutChoice::Clip)]
    pub gamut: GamutChoice,
}

/// Runs the command.
pub fn run(
    scene_path: &Path,
    format: RecordFormat,
    args: &Args,
    out: Option<&PathBuf>,
) -> CliResult {
    let scene = load_scene(scene_path)?;
    let (viewing, m) = measurement(&scene, scene_path, args)?;
    let text = match format {
        RecordFormat::Json => {
            let doc = document(&scene, &viewing, &m, args.spectra);
            serde_json::to_string_pretty(&doc).expect("records serialise") + "\n"
        }
        RecordFormat::Csv => csv(&m, &scene.wavelengths_nm, args.spectra),
        RecordFormat::Cgats => {
            let points: Vec<_> = (m.geometries.iter())
                .map(|g| (At::Geometry(g.geometry.clone()), &g.colour))
                .collect();
            super::cgats_colours(&scene.title, &viewing, &points)
        }
        RecordFormat::Table => table(
            &scene.title,
            &m,
            viewing.illuminant.name(),
            viewing.observer.name(),
            out.is_none() && std::io::stdout().is_terminal(),
        ),
    };
    write_out(out.map(PathBuf::as_path), &[text.into_bytes()])
}

/// The coating of `scene` measured at its geometries (or those of
/// `--geometries`) under the flags' light and observer.
pub fn measurement(
    scene: &Scene,
    scene_path: &Path,
    args: &Args,
) -> Result<(Viewing, Measurement), Failure> {
    let view = ViewArgs {
        side: SideChoice::Reflect,
        illuminant: args.illuminant.clone(),
        observer: args.observer.clone(),
        polarization: PolarizationChoice::Unpolarized,
        gamut: args.gamut,
    };
    let viewing = view.viewing(scene, scene_path)?;
    let m = measure_coating(scene_path, scene, args.geometries.as_deref(), &viewing)?;
    Ok((viewing, m))
}

/// `lamella multiangle --format json` of a measurement.
pub fn document(scene: &Scene, viewing: &Viewing, m: &Measurement, spectra: bool) -> Value {
    let mut doc = json!({
        "title": scene.title,
        "illuminant": viewing.illuminant.name(),
        "observer": viewing.observer.name(),
        "geometries": records(m, spectra),
    });
    // A summary that is undefined is left out (its note says why),
    // never written as null.
    match (m.flop_index, &m.flop_note) {
        (Some(f), _) => doc["flop_index"] = json!(f),
        (None, Some(note)) => doc["flop_note"] = json!(note),
        (None, None) => {}
    }
    if let Some(h) = m.hue_travel_deg {
        doc["hue_travel_deg"] = json!(h);
    }
    doc["surface_gloss_Y"] = m
        .surface_gloss_y
        .iter()
        .map(|(a, y)| json!({"illumination_deg": a, "Y": y}))
        .collect();
    if spectra {
        doc["wavelength_nm"] = json!(scene.wavelengths_nm);
    }
    doc
}

/// The colour of the scene's coating at `geometries` (a comma-separated
/// list of names; default the scene's `coating.geometries`) under
/// `viewing`, with the flop index, hue travel and surface gloss.
pub fn measure_coating(
    scene_path: &Path,
    scene: &Scene,
    geometries: Option<&str>,
    viewing: &Viewing,
) -> Result<Measurement, Failure> {
    let bad = |e| Failure::scene(scene_path, e);
    let mut coating = Coating::from_scene(scene).map_err(bad)?;
    // The platelet model tabulates every wavelength at each internal angle.
    scene
        .check_grid_size(
            (90.0 / TABLE_STEP_DEG) as usize + 1,
            GRID_BYTES_PER_POINT,
            "multiangle",
        )
        .map_err(bad)?;
    if let Some(list) = geometries {
        coating.geometries = list
            .split(',')
            .map(|t| parse_name(t, "--geometries"))
            .collect::<Result<Vec<_>, _>>()
            .map_err(|e| Failure::input(e.to_string()))?
            .concat();
    }
    let weights = viewing.weights(&scene.wavelengths_nm).map_err(bad)?;
    let model = Model::new(scene, &coating).map_err(bad)?;
    measure(&model, &coating.geometries, &weights, &viewing.options).map_err(bad)
}

/// Record keys in output order (`srgb` is three columns in CSV).
const KEYS: [&str; 16] = [
    "name",
    "illumination_deg",
    "aspecular_deg",
    "in_plane",
    "X",
    "Y",
    "Z",
    "L",
    "a",
    "b",
    "C",
    "h",
    "srgb",
    "hex",
    "in_gamut",
    "reflectance_factor",
];

fn records(m: &Measurement, spectra: bool) -> Vec<Value> {
    m.geometries
        .iter()
        .map(|g| {
            let c = &g.colour;
            let mut r = json!({
                "name": g.geometry.name,
                "illumination_deg": g.geometry.illumination_deg,
                "aspecular_deg": g.geometry.aspecular_deg,
                "in_plane": g.geometry.in_plane,
                "X": c.xyz[0], "Y": c.xyz[1], "Z": c.xyz[2],
                "L": c.lab[0], "a": c.lab[1], "b": c.lab[2],
                "C": c.lch[1], "h": c.lch[2],
                "srgb": c.rgb, "hex": c.hex, "in_gamut": c.in_gamut,
            });
            if spectra {
                r["reflectance_factor"] = json!(g.reflectance_factor);
            }
            r
        })
        .collect()
}

fn csv(m: &Measurement, wavelengths: &[f64], spectra: bool) -> String {
    let mut header: Vec<String> = Vec::new();
    for k in &KEYS[..KEYS.len() - 1] {
        if *k == "srgb" {
            header.extend(["srgb_r", "srgb_g", "srgb_b"].map(String::from));
        } else {
            header.push(k.to_string());
        }
    }
    if spectra {
        header.extend(wavelengths.iter().map(|w| format!("rf_{w}")));
    }
    let mut out = header.join(",") + "\n";
    for (r, g) in records(m, false).iter().zip(&m.geometries) {
        let mut cells: Vec<String> = KEYS[..KEYS.len() - 1]
            .iter()
            .flat_map(|k| match &r[*k] {
                Value::Array(xs) => xs.iter().map(Value::to_string).collect(),
                Value::String(s) => vec![s.clone()],
                other => vec![other.to_string()],
            })
            .collect();
        if spectra {
            cells.extend(g.reflectance_factor.iter().map(f64::to_string));
        }
        out.push_str(&cells.join(","));
        out.push('\n');
    }
    out
}

fn table(title: &str, m: &Measurement, illuminant: &str, observer: &str, swatches: bool) -> String {
    let mut out = format!(
        "{}\n{illuminant}, {observer}; reflectance factor relative to the perfect diffuser (Y = 100), surface gloss excluded\n\n",
        if title.is_empty() {
            "(untitled scene)"
        } else {
            title
        },
    );
    out.push_str(&format!(
        "{:<12} {:>8} {:>7} {:>7} {:>7} {:>7} {:>7} {:>7}  {:<7} {:>5}  {}\n",
        "geometry",
        "Y",
        "L*",
        "a*",
        "b*",
        "C*",
        "h°",
        "as°",
        "hex",
        "gamut",
        if swatches { "swatch" } else { "" }
    ));
    for g in &m.geometries {
        let c = &g.colour;
        let swatch = if swatches {
            super::swatch(c.rgb)
        } else {
            String::new()
        };
        out.push_str(&format!(
            "{:<12} {:>8.2} {:>7.2} {:>7.2} {:>7.2} {:>7.2} {:>7.1} {:>7.1}  {:<7} {:>5}  {swatch}\n",
            g.geometry.name,
            c.xyz[1],
            c.lab[0],
            c.lab[1],
            c.lab[2],
            c.lch[1],
            c.lch[2],
            g.geometry.aspecular_deg,
            c.hex,
            if c.in_gamut { "in" } else { "OUT" },
        ));
    }
    out.push('\n');
    match (m.flop_index, &m.flop_note) {
        (Some(f), _) => out.push_str(&format!("flop index: {f:.2}\n")),
        (None, Some(note)) => out.push_str(&format!("flop index: {note}\n")),
        (None, None) => {}
    }
    if let Some(h) = m.hue_travel_deg {
        out.push_str(&format!("hue travel across the geometries: {h:+.1}°\n"));
    }
    for (a, y) in &m.surface_gloss_y {
        out.push_str(&format!(
            "surface gloss at {a}° illumination (excluded above): Y = {y:.2}\n"
        ));
    }
    if m.geometries.iter().any(|g| !g.colour.in_gamut) {
        out.push_str("OUT: outside the sRGB gamut; the swatch and hex are an approximation.\n");
    }
    out
}
