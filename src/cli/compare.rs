//! `lamella compare`: colour sign-off of a sample against a reference, each a
//! scene or a measured file, at every angle or geometry in both.

use std::fmt::Write as _;
use std::io::IsTerminal;
use std::path::{Path, PathBuf};

use lamella::angle_colour::{Side, Viewing};
use lamella::chart::canvas::escape;
use lamella::chart::{self, Format, SpectraChart};
use lamella::colorimetry::Illuminant;
use lamella::compare::{
    Comparison, Factors, Formula, Tolerances, compare, point_name, report, scene_spectra,
};
use lamella::measured::{Measured, Quantity, ReadOptions};
use lamella::report::{CAUTIONS, VERSION};
use lamella::scene::Scene;
use serde_json::{Value, json};

use super::color::ViewArgs;
use super::measured::read_file;
use super::report::Provenance;
use super::{CliResult, Failure, load_scene, write_out};

/// Output format of `compare`.
#[derive(Debug, Clone, Copy, clap::ValueEnum)]
pub enum CompareFormat {
    /// The report as one JSON object.
    Json,
    /// One row per angle or geometry.
    Csv,
    /// A readable table with swatch pairs on a true-colour terminal.
    Table,
}

/// The formula a tolerance is judged by.
#[derive(Debug, Clone, Copy, clap::ValueEnum)]
pub enum FormulaChoice {
    /// CIEDE2000 (with --kl --kc --kh).
    De00,
    /// ΔE*ab, CIE 1976.
    De76,
    /// ΔE*94, CIE 116-1995, graphic arts.
    De94,
    /// CMC(l:c) (with --cmc-l --cmc-c).
    Cmc,
}

impl From<FormulaChoice> for Formula {
    fn from(f: FormulaChoice) -> Formula {
        match f {
            FormulaChoice::De00 => Formula::De00,
            FormulaChoice::De76 => Formula::De76,
            FormulaChoice::De94 => Formula::De94,
            FormulaChoice::Cmc => Formula::Cmc,
        }
    }
}

/// Flags of `lamella compare` (the command is described in `cli::args`).
#[derive(Debug, Clone, clap::Args)]
pub struct Args {
    /// The reference (the approved standard): a scene (.json) or a measured
    /// file (a table or CGATS).
    pub reference: PathBuf,
    /// The sample to judge: a scene or a measured file.
    pub sample: PathBuf,
    #[command(flatten)]
    pub view: ViewArgs,
    /// One tolerance for every point, by --formula.
    #[arg(
        long,
        value_name = "DE",
        allow_hyphen_values = true,
        conflicts_with = "tolerances"
    )]
    pub tolerance: Option<f64>,
    /// The formula tolerances are judged by (default de00; overrides the
    /// tolerance file's `formula`).
    #[arg(long, value_enum)]
    pub formula: Option<FormulaChoice>,
    /// Tolerances per angle or geometry: {"formula": "de00", "limits":
    /// {"0": 1.0, "45": 1.5}, "default": 2.0}.
    #[arg(long, value_name = "FILE.json")]
    pub tolerances: Option<PathBuf>,
    /// CIEDE2000 lightness factor kL.
    #[arg(long, default_value_t = 1.0, allow_hyphen_values = true)]
    pub kl: f64,
    /// CIEDE2000 chroma factor kC.
    #[arg(long, default_value_t = 1.0, allow_hyphen_values = true)]
    pub kc: f64,
    /// CIEDE2000 hue factor kH.
    #[arg(long, default_value_t = 1.0, allow_hyphen_values = true)]
    pub kh: f64,
    /// CMC lightness weight l.
    #[arg(long = "cmc-l", default_value_t = 2.0, allow_hyphen_values = true)]
    pub cmc_l: f64,
    /// CMC chroma weight c.
    #[arg(long = "cmc-c", default_value_t = 1.0, allow_hyphen_values = true)]
    pub cmc_c: f64,
    /// A second light (name or CSV file) the differences are also reported
    /// under, for metamerism (reported only: the tolerance applies under
    /// the main light).
    #[arg(long, value_name = "ILLUMINANT")]
    pub check_illuminant: Option<String>,
    /// Measured values are in percent whatever their header says.
    #[arg(long)]
    pub percent: bool,
    /// Angle of incidence of measured readings that name no angle, degrees.
    #[arg(long, default_value_t = 0.0, allow_hyphen_values = true)]
    pub angle: f64,
    /// Output format.
    #[arg(long, value_enum, default_value = "table")]
    pub format: CompareFormat,
    /// Also write a self-contained HTML sign-off page (index.html) into this
    /// folder (created if missing).
    #[arg(long, value_name = "DIR")]
    pub report: Option<PathBuf>,
    /// Write to this file (atomically) instead of stdout.
    #[arg(short = 'o', long = "output")]
    pub output: Option<PathBuf>,
}

/// One side of the comparison, read.
struct Source {
    path: PathBuf,
    scene: Option<Scene>,
    /// The measured reading, for a measured file.
    reading: Option<(Quantity, Vec<Measured>)>,
}

impl Source {
    fn title(&self) -> String {
        match &self.scene {
            Some(s) if !s.title.is_empty() => s.title.clone(),
            _ => self.path.display().to_string(),
        }
    }
}

/// A scene by its extension or its first character; anything else is read
/// as a measured file.
fn is_scene(path: &Path) -> Result<bool, Failure> {
    if path
        .extension()
        .is_some_and(|e| e.eq_ignore_ascii_case("json"))
    {
        return Ok(true);
    }
    let bytes = std::fs::read(path)
        .map_err(|e| Failure::input(format!("{}: cannot read: {e}", path.display())))?;
    let text = String::from_utf8_lossy(&bytes);
    Ok(text
        .trim_start_matches('\u{feff}')
        .trim_start()
        .starts_with('{'))
}

fn load(path: &Path, options: &ReadOptions) -> Result<Source, Failure> {
    Ok(if is_scene(path)? {
        Source {
            path: path.to_path_buf(),
            scene: Some(load_scene(path)?),
            reading: None,
        }
    } else {
        let r = read_file(path, options)?;
        Source {
            path: path.to_path_buf(),
            scene: None,
            reading: Some((r.quantity, r.groups)),
        }
    })
}

/// A scene that names no light: its viewing holds the scene defaults.
const NO_SCENE: &str = r#"{"materials": {"void": {"n": 1}}, "stack": [], "substrate": "void",
    "wavelengths_nm": [550], "angles_deg": [0]}"#;

/// The spectra of a side under `viewing`; a measured file must hold what
/// the viewing's side looks at.
fn spectra(s: &Source, viewing: &Viewing) -> Result<Vec<Measured>, Failure> {
    match (&s.scene, &s.reading) {
        (Some(scene), _) => scene_spectra(scene, viewing).map_err(|e| Failure::scene(&s.path, e)),
        (None, Some((q, groups))) => {
            let want = match viewing.side {
                Side::Reflect => Quantity::Reflectance,
                Side::Transmit => Quantity::Transmittance,
            };
            if *q != want {
                return Err(Failure::input(format!(
                    "{}: {} = {}: the comparison is on the {} side (--side {})",
                    s.path.display(),
                    q.symbol(),
                    q.name(),
                    viewing.side.name(),
                    if want == Quantity::Reflectance {
                        "transmit to compare transmittance"
                    } else {
                        "reflect to compare reflectance"
                    }
                )));
            }
            Ok(groups.clone())
        }
        (None, None) => unreachable!("a source is a scene or a reading"),
    }
}

/// Runs the command.
pub fn run(args: &Args) -> CliResult {
    let options = ReadOptions {
        default_angle_deg: args.angle,
        percent: args.percent,
    };
    let reference = load(&args.reference, &options)?;
    let sample = load(&args.sample, &options)?;
    let (base, base_path) = match (&reference.scene, &sample.scene) {
        (Some(s), _) => (s.clone(), reference.path.as_path()),
        (_, Some(s)) => (s.clone(), sample.path.as_path()),
        _ => (
            Scene::from_json(NO_SCENE, &|_| Err("no files".into()))
                .expect("the empty scene is valid"),
            reference.path.as_path(),
        ),
    };
    let viewing = args.view.viewing(&base, base_path)?;
    let check = args
        .check_illuminant
        .as_ref()
        .map(|name| {
            if name.to_ascii_lowercase().ends_with(".csv") {
                let text = std::fs::read_to_string(name)
                    .map_err(|e| Failure::input(format!("--check-illuminant {name}: {e}")))?;
                Illuminant::from_csv(name, &text)
            } else {
                Illuminant::builtin(name)
            }
            .map_err(|e| Failure::input(format!("--check-illuminant: {e}")))
        })
        .transpose()?;
    let formula = args.formula.map(Formula::from);
    let tolerances = match (&args.tolerances, args.tolerance) {
        (Some(path), _) => {
            let text = std::fs::read_to_string(path)
                .map_err(|e| Failure::input(format!("{}: cannot read: {e}", path.display())))?;
            let mut t = Tolerances::from_json(&text)
                .map_err(|e| Failure::input(format!("{}: {e}", path.display())))?;
            if let Some(f) = formula {
                t.formula = f;
            }
            t
        }
        (None, Some(limit)) => Tolerances::single(formula.unwrap_or_default(), limit)
            .map_err(|e| Failure::input(format!("--{e}")))?,
        (None, None) => Tolerances {
            formula: formula.unwrap_or_default(),
            ..Tolerances::default()
        },
    };
    let factors = Factors {
        k: [args.kl, args.kc, args.kh],
        cmc_l: args.cmc_l,
        cmc_c: args.cmc_c,
    };
    let (r, s) = (spectra(&reference, &viewing)?, spectra(&sample, &viewing)?);
    let both = format!("{} and {}", reference.path.display(), sample.path.display());
    let c = compare(&r, &s, &viewing, check.as_ref(), &factors, &tolerances).map_err(|e| {
        let origin = match &args.tolerances {
            Some(path) if e.to_string().starts_with("limits") => path.display().to_string(),
            _ => both.clone(),
        };
        match e {
            lamella::Error::NotComputable { .. } => Failure::scene(Path::new(&origin), e),
            _ => Failure::input(format!("{origin}: {e}")),
        }
    })?;
    let mut doc = report(&c);
    doc.insert(
        "reference".into(),
        json!(reference.path.display().to_string()),
    );
    doc.insert("sample".into(), json!(sample.path.display().to_string()));
    doc.insert("illuminant".into(), json!(viewing.illuminant.name()));
    doc.insert("observer".into(), json!(viewing.observer.name()));
    doc.insert("side".into(), json!(viewing.side.name()));
    doc.insert("polarization".into(), json!(viewing.polarization.name()));
    let text = match args.format {
        CompareFormat::Json => {
            serde_json::to_string_pretty(&Value::Object(doc)).expect("finite numbers") + "\n"
        }
        CompareFormat::Csv => csv(&c),
        CompareFormat::Table => table(
            &c,
            &reference,
            &sample,
            &viewing,
            args.output.is_none() && std::io::stdout().is_terminal(),
        ),
    };
    if let Some(dir) = &args.report {
        std::fs::create_dir_all(dir).map_err(|e| Failure::io(dir, e))?;
        let html = page(&c, (&reference, &r), (&sample, &s), &viewing)
            .map_err(|e| Failure::scene(&reference.path, e))?;
        write_out(Some(&dir.join("index.html")), &[html.into_bytes()])?;
    }
    write_out(args.output.as_deref(), &[text.into_bytes()])?;
    verdict(&c)
}

/// Exit code 3 naming the first point outside its tolerance.
fn verdict(c: &Comparison) -> CliResult {
    match c.points.iter().find(|p| !p.pass) {
        None => Ok(()),
        Some(p) => {
            let failing = c.points.iter().filter(|p| !p.pass).count();
            Err(Failure {
                message: format!(
                    "sample outside tolerance at {failing} of {} points; first at {}: {} {:.3} > {} (results written)",
                    c.points.len(),
                    p.at.describe(),
                    formula_label(c),
                    p.differences.by(c.tolerances.formula),
                    p.limit.expect("a failing point has a limit"),
                ),
                code: 3,
            })
        }
    }
}

fn formula_label(c: &Comparison) -> String {
    match c.tolerances.formula {
        Formula::De00 => {
            let k = c.factors.k;
            if k == [1.0; 3] {
                "ΔE00".into()
            } else {
                format!("ΔE00({}:{}:{})", k[0], k[1], k[2])
            }
        }
        Formula::De76 => "ΔE*ab".into(),
        Formula::De94 => "ΔE94".into(),
        Formula::Cmc => format!("ΔE CMC({}:{})", c.factors.cmc_l, c.factors.cmc_c),
    }
}

fn point_key(c: &Comparison) -> &'static str {
    match c.points[0].at.angle_deg() {
        Some(_) => "angle_deg",
        None => "geometry",
    }
}

/// One row per point; every column is present in every row.
fn csv(c: &Comparison) -> String {
    let limits = c.points.iter().any(|p| p.limit.is_some());
    let check = c.check_illuminant.is_some();
    let mut header = vec![point_key(c).to_string()];
    for k in [
        "delta_e00",
        "delta_e76",
        "delta_e94",
        "delta_e_cmc",
        "dL",
        "dC",
        "dH",
        "da",
        "db",
    ] {
        header.push(k.into());
    }
    if limits {
        header.push("limit".into());
    }
    header.push("pass".into());
    header.push("description".into());
    for side in ["reference", "sample"] {
        for k in ["L", "a", "b", "hex"] {
            header.push(format!("{side}_{k}"));
        }
    }
    if check {
        header.push("check_delta_e00".into());
        header.push("check_delta_e76".into());
    }
    let mut out = header.join(",") + "\n";
    for p in &c.points {
        let d = &p.differences;
        let k = &d.components;
        let mut row = vec![point_name(&p.at)];
        for v in [d.de00, d.de76, d.de94, d.cmc, k.dl, k.dc, k.dh, k.da, k.db] {
            row.push(v.to_string());
        }
        if let Some(l) = p.limit {
            row.push(l.to_string());
        }
        row.push(p.pass.to_string());
        row.push(format!("\"{}\"", p.words.join(", ")));
        for colour in [&p.reference, &p.sample] {
            for v in colour.lab {
                row.push(v.to_string());
            }
            row.push(colour.hex.clone());
        }
        if let Some(x) = &p.check {
            row.push(x.de00.to_string());
            row.push(x.de76.to_string());
        }
        out.push_str(&row.join(","));
        out.push('\n');
    }
    out
}

fn table(c: &Comparison, r: &Source, s: &Source, v: &Viewing, swatches: bool) -> String {
    let mut out = format!(
        "reference: {}\nsample:    {}\n{} light, {} {}, {}; ",
        r.title(),
        s.title(),
        v.polarization.name(),
        v.side.name(),
        v.illuminant.name(),
        v.observer.name(),
    );
    if c.points.iter().any(|p| p.limit.is_some()) {
        let _ = writeln!(out, "tolerance by {}", formula_label(c));
    } else {
        out.push_str("no tolerance given\n");
    }
    let _ = writeln!(
        out,
        "\n{:>8} {:>9} {:>9} {:>7} {:>7} {:>7} {:>7} {:>7} {:>7} {:>7} {:>6}  {:<5} the sample is",
        "point",
        "reference",
        "sample",
        "ΔE00",
        "ΔE*ab",
        "ΔE94",
        "CMC",
        "ΔL*",
        "ΔC*",
        "ΔH*",
        "limit",
        "",
    );
    for p in &c.points {
        let d = &p.differences;
        let k = &d.components;
        let (rs, ss) = if swatches {
            (super::swatch(p.reference.rgb), super::swatch(p.sample.rgb))
        } else {
            (
                format!("{:>8}", p.reference.hex),
                format!("{:>8}", p.sample.hex),
            )
        };
        let _ = writeln!(
            out,
            "{:>8} {rs:>9} {ss:>9} {:>7.3} {:>7.3} {:>7.3} {:>7.3} {:>+7.2} {:>+7.2} {:>+7.2} {:>6}  {:<5} {}",
            point_name(&p.at),
            d.de00,
            d.de76,
            d.de94,
            d.cmc,
            k.dl,
            k.dc,
            k.dh,
            p.limit.map_or("-".into(), |l| l.to_string()),
            match (p.limit, p.pass) {
                (None, _) => "",
                (Some(_), true) => "pass",
                (Some(_), false) => "FAIL",
            },
            p.words.join(", ")
        );
        if let (Some(x), Some(name)) = (&p.check, &c.check_illuminant) {
            let _ = writeln!(
                out,
                "{:>8} under {name}: ΔE00 {:.3}, ΔE*ab {:.3}",
                "", x.de00, x.de76
            );
        }
    }
    let _ = writeln!(
        out,
        "\nCMC is {}:{}. {}",
        c.factors.cmc_l,
        c.factors.cmc_c,
        if c.pass {
            "All points pass."
        } else {
            "Some points FAIL."
        }
    );
    out.push_str("A colour on a screen is not sign-off: approve measured samples under the agreed light and geometry.\n");
    out
}

/// The HTML sign-off page.
fn page(
    c: &Comparison,
    (reference, r): (&Source, &[Measured]),
    (sample, s): (&Source, &[Measured]),
    viewing: &Viewing,
) -> lamella::Result<String> {
    let from = Provenance::of_this_run();
    let (rt, st) = (reference.title(), sample.title());
    let mut h = String::new();
    let _ = write!(
        h,
        "<!doctype html><html lang=en><head><meta charset=utf-8><title>Colour sign-off: {}</title><style>{STYLE}</style></head><body><h1>Colour sign-off</h1><p>Reference: <b>{}</b> ({})<br>Sample: <b>{}</b> ({})<br>{} · {} · {} side · {} light</p>",
        escape(&st),
        escape(&rt),
        escape(&reference.path.display().to_string()),
        escape(&st),
        escape(&sample.path.display().to_string()),
        escape(viewing.illuminant.name()),
        escape(viewing.observer.name()),
        viewing.side.name(),
        viewing.polarization.name(),
    );
    let verdict = if c.points.iter().all(|p| p.limit.is_none()) {
        "No tolerance was given: the differences are reported, nothing is judged.".to_string()
    } else if c.pass {
        format!(
            "Every point is within its tolerance ({}).",
            formula_label(c)
        )
    } else {
        format!(
            "{} of {} points are outside their tolerance ({}).",
            c.points.iter().filter(|p| !p.pass).count(),
            c.points.len(),
            formula_label(c)
        )
    };
    let _ = write!(
        h,
        "<p class=\"verdict {}\">{}</p><h2>Differences</h2><table><tr><th>point</th><th>reference</th><th>sample</th><th>ΔE00</th><th>ΔE*ab</th><th>ΔE94</th><th>CMC({}:{})</th><th>ΔL*</th><th>ΔC*</th><th>ΔH*</th><th>limit</th><th>result</th><th>the sample is</th>",
        if c.pass { "pass" } else { "fail" },
        escape(&verdict),
        c.factors.cmc_l,
        c.factors.cmc_c
    );
    if let Some(name) = &c.check_illuminant {
        let _ = write!(h, "<th>ΔE00 under {}</th>", escape(name));
    }
    h.push_str("</tr>");
    for p in &c.points {
        let d = &p.differences;
        let k = &d.components;
        let sw = |hex: &str| format!("<span class=sw style=\"background:{hex}\"></span>{hex}");
        let _ = write!(
            h,
            "<tr><td>{}</td><td>{}</td><td>{}</td><td>{:.3}</td><td>{:.3}</td><td>{:.3}</td><td>{:.3}</td><td>{:+.2}</td><td>{:+.2}</td><td>{:+.2}</td><td>{}</td><td class={}>{}</td><td>{}</td>",
            escape(&p.at.describe()),
            sw(&p.reference.hex),
            sw(&p.sample.hex),
            d.de00,
            d.de76,
            d.de94,
            d.cmc,
            k.dl,
            k.dc,
            k.dh,
            p.limit.map_or("–".into(), |l| l.to_string()),
            if p.pass { "pass" } else { "fail" },
            match (p.limit, p.pass) {
                (None, _) => "–",
                (Some(_), true) => "pass",
                (Some(_), false) => "FAIL",
            },
            escape(&p.words.join(", "))
        );
        if let Some(x) = &p.check {
            let _ = write!(h, "<td>{:.3}</td>", x.de00);
        }
        h.push_str("</tr>");
    }
    h.push_str("</table><h2>Swatch pairs</h2><div class=pairs>");
    for p in &c.points {
        let _ = write!(
            h,
            "<figure><div class=pair><div style=\"background:{}\"></div><div style=\"background:{}\"></div></div><figcaption>{}: reference (left), sample (right)</figcaption></figure>",
            p.reference.hex,
            p.sample.hex,
            escape(&p.at.describe())
        );
    }
    h.push_str("</div><h2>Spectra</h2>");
    for p in &c.points {
        let (Some(a), Some(b)) = (
            r.iter().find(|m| m.at == p.at),
            s.iter().find(|m| m.at == p.at),
        ) else {
            continue;
        };
        let series = [("reference".to_string(), a), ("sample".to_string(), b)];
        let heading = format!("Spectra at {}", p.at.describe());
        let chart = SpectraChart::of_series(&["Reference and sample"], &heading, &series, viewing)?;
        let svg = String::from_utf8(chart::render(&chart, (900, 520), Format::Svg)?)
            .expect("SVG is UTF-8");
        let svg = svg.split_once("?>").map_or(svg.as_str(), |(_, rest)| rest);
        let _ = write!(h, "<section class=chart>{svg}</section>");
    }
    h.push_str("<h2>Tolerances used</h2><p>");
    let _ = write!(h, "Formula: {}. ", escape(&formula_label(c)));
    match c.points.iter().all(|p| p.limit.is_none()) {
        true => h.push_str("No limits were given."),
        false => {
            let list: Vec<String> = c
                .points
                .iter()
                .filter_map(|p| p.limit.map(|l| format!("{}: {l}", p.at.describe())))
                .collect();
            let _ = write!(h, "Limits: {}.", escape(&list.join("; ")));
        }
    }
    let _ = write!(
        h,
        " CIEDE2000 factors kL:kC:kH = {}:{}:{}.</p><h2>Cautions</h2><ul>",
        c.factors.k[0], c.factors.k[1], c.factors.k[2]
    );
    h.push_str("<li>Colour approval from a screen is not sign-off: the swatches here are approximations limited by the display. Defer to measured samples viewed under the agreed light and geometry.</li>");
    for caution in CAUTIONS {
        let _ = write!(h, "<li>{}</li>", escape(caution));
    }
    let _ = writeln!(
        h,
        "</ul><footer>Made by lamella {VERSION} on {} with <code>{}</code></footer></body></html>",
        escape(&from.date),
        escape(&from.command)
    );
    Ok(h)
}

const STYLE: &str = "body{font-family:system-ui,sans-serif;max-width:70em;margin:2em auto;padding:0 1em;color:#1d2430}\
table{border-collapse:collapse}td,th{border-bottom:1px solid #e4e7ec;padding:.3em .6em;text-align:right}\
.sw{display:inline-block;width:1.2em;height:1.2em;vertical-align:middle;margin-right:.3em;border:1px solid #999}\
.pass{color:#17663a}.fail{color:#b42318;font-weight:bold}.verdict{font-size:1.2em}\
.pairs{display:flex;flex-wrap:wrap;gap:1em}.pair{display:flex;gap:3px;width:12em;height:6em;border:1px solid #999;background:#fff}.pair div{flex:1}\
.chart svg{width:100%;height:auto;border:1px solid #e4e7ec}footer{margin:3em 0 1em;color:#5a6473;font-size:.85em;border-top:1px solid #e4e7ec}";
