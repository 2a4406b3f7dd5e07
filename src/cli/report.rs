//! `lamella report`: every chart of a scene (PNG and SVG) and one
//! self-contained HTML page with the design, the colours, the cautions and
//! where the page came from (version, date, command).

use std::fmt::Write;
use std::path::{Path, PathBuf};

use lamella::angle_colour::Viewing;
use lamella::chart::canvas::escape;
use lamella::chart::{
    self, AbTravel, AngleStrip, BandsChart, Chromaticity, Format, ReflectanceMap, Series,
    SpectraChart, ThicknessAngle, Variation,
};
use lamella::colorimetry::travel;
use lamella::design::variables::every_layer;
use lamella::report::{CAUTIONS, VERSION, utc_timestamp};
use lamella::scene::{Item, LayerAbsorption, Scene};

use super::color::ViewArgs;
use super::design_args::Progress;
use super::{CliResult, Failure, load_scene, write_out};

/// Flags of `lamella report` (the command is described in `cli::args`).
#[derive(Debug, Clone, clap::Args)]
pub struct Args {
    /// Scene file (JSON).
    pub scene: PathBuf,
    /// Folder to write into (created if missing); existing report files are replaced.
    #[arg(short = 'o', long = "output")]
    pub output: PathBuf,
    /// Size of each chart in pixels, WIDTHxHEIGHT.
    #[arg(long, default_value = "1200x800", value_parser = super::chart::parse_size)]
    pub size: (u32, u32),
    #[command(flatten)]
    pub view: ViewArgs,
    /// Unpolarized light seen through an ideal circular analyser passing
    /// this handedness. Without it and without --polarization, a scene
    /// whose left and right differ is shown unpolarized and through a left
    /// and a right analyser side by side.
    #[arg(long, value_enum)]
    pub analyzer: Option<super::choices::HandednessChoice>,
}

/// Where a report came from.
pub struct Provenance {
    /// UTC time of writing, ISO 8601.
    pub date: String,
    /// The command line, shell-quoted.
    pub command: String,
}

impl Provenance {
    /// Now, and this process's command line (the program by its file name).
    pub fn of_this_run() -> Provenance {
        let secs = match std::time::SystemTime::now().duration_since(std::time::UNIX_EPOCH) {
            Ok(d) => d.as_secs() as i64,
            Err(e) => -(e.duration().as_secs() as i64),
        };
        let args: Vec<String> = std::env::args_os()
            .enumerate()
            .map(|(i, a)| {
                let p = std::path::PathBuf::from(&a);
                match (i, p.file_name()) {
                    (0, Some(name)) => name.to_string_lossy().into_owned(),
                    _ => a.to_string_lossy().into_owned(),
                }
            })
            .collect();
        let command =
            shlex::try_join(args.iter().map(String::as_str)).unwrap_or_else(|_| args.join(" "));
        Provenance {
            date: utc_timestamp(secs),
            command,
        }
    }
}

/// The table cells of a colour: swatch, hex, (Y when given), L*, a*, b*,
/// C*, h and whether it lies inside sRGB.
pub(super) fn colour_cells(c: &lamella::colorimetry::Colour, y: Option<f64>) -> String {
    let y = y.map_or(String::new(), |y| format!("<td class=n>{y:.2}</td>"));
    format!(
        "<td><span class=sw style=\"background:{hex}\"></span></td><td>{hex}</td>{y}<td class=n>{:.1}</td><td class=n>{:.1}</td><td class=n>{:.1}</td><td class=n>{:.1}</td><td class=n>{:.0}</td><td>{}</td>",
        c.lab[0],
        c.lab[1],
        c.lab[2],
        c.lch[1],
        c.lch[2],
        if c.in_gamut {
            "inside"
        } else {
            "<b class=warn>outside</b>"
        },
        hex = c.hex,
    )
}

/// A drawn chart: file stem, heading and SVG text.
pub(super) struct Drawn {
    stem: String,
    heading: String,
    svg: String,
}

/// Draws a chart (`render` gives it in either format; its errors are about
/// the scene at `scene_path`), and writes it as `STEM.png` and `STEM.svg`
/// in `dir` when given.
pub(super) fn write_chart(
    dir: Option<&Path>,
    scene_path: &Path,
    stem: String,
    heading: String,
    render: &dyn Fn(Format) -> lamella::Result<Vec<u8>>,
) -> Result<Drawn, Failure> {
    let at = |e| Failure::scene(scene_path, e);
    let svg = render(Format::Svg).map_err(at)?;
    if let Some(dir) = dir {
        let png = render(Format::Png).map_err(at)?;
        write_out(Some(&dir.join(format!("{stem}.png"))), &[png])?;
        write_out(
            Some(&dir.join(format!("{stem}.svg"))),
            std::slice::from_ref(&svg),
        )?;
    }
    Ok(Drawn {
        stem,
        heading,
        svg: String::from_utf8(svg).expect("SVG is UTF-8"),
    })
}

/// Runs the command.
pub fn run(args: &Args) -> CliResult {
    let scene = load_scene(&args.scene)?;
    if scene.coating.is_some() {
        return super::coating_report::run(args, &scene);
    }
    std::fs::create_dir_all(&args.output).map_err(|e| Failure::io(&args.output, e))?;
    let html = build(
        &scene,
        &args.scene,
        (&args.view, args.analyzer.map(Into::into)),
        args.size,
        Some(&args.output),
    )?;
    write_out(Some(&args.output.join("index.html")), &[html.into_bytes()])
}

/// The chart size of a report unless told otherwise.
pub const SIZE: (u32, u32) = (1200, 800);

/// The report page of `scene` (`index.html`, charts inline; a coating's
/// own page for a scene with a `coating`) without writing anything.
pub fn html(
    scene: &Scene,
    scene_path: &std::path::Path,
    view: &ViewArgs,
    size: (u32, u32),
) -> Result<String, Failure> {
    match scene.coating {
        Some(_) => super::coating_report::build(scene, scene_path, view, size, None),
        None => build(scene, scene_path, (view, None), size, None),
    }
}

/// Draws every chart (into `folder` as PNG and SVG, when given) and
/// returns the report page; `view` holds the viewing flags and the
/// analyser.
fn build(
    scene: &Scene,
    scene_path: &std::path::Path,
    (view, analyzer): (&ViewArgs, Option<lamella::optics::aniso::Handedness>),
    size: (u32, u32),
    folder: Option<&std::path::Path>,
) -> Result<String, Failure> {
    super::film_scene(scene_path, scene, "report")?;
    let viewing = view.viewing_through(scene, scene_path, analyzer)?;
    let at = |e| Failure::scene(scene_path, e);
    let pair = [(scene, &viewing)];
    let periodic = scene.stack.iter().any(|i| matches!(i, Item::Repeat(_)));
    let bar = folder.map(|_| Progress::new(6 + periodic as u64, "charts"));
    let mut drawn = Vec::new();
    let mut emit = |stem: &'static str,
                    heading: &'static str,
                    c: &dyn Fn(Format) -> lamella::Result<Vec<u8>>|
     -> CliResult {
        drawn.push(write_chart(
            folder,
            scene_path,
            stem.into(),
            heading.into(),
            c,
        )?);
        if let Some(b) = &bar {
            b.set(drawn.len() as u64, stem.to_string());
        }
        Ok(())
    };
    // A strip needs a range of angles; a single-angle scene gets the rest.
    if scene.angles_deg.len() >= 2 {
        let strip = AngleStrip::compute(scene, &viewing, None).map_err(at)?;
        emit("angle-strip", "Colour against angle", &|f| {
            chart::render(&strip, size, f)
        })?;
    }
    let grid = ThicknessAngle::compute(
        scene,
        &viewing,
        &Variation::Scale { from: 0.9, to: 1.1 },
        ThicknessAngle::default_steps(scene),
        &|| {},
    )
    .map_err(at)?;
    emit(
        "thickness-angle",
        "Sensitivity to thickness (all layers scaled together)",
        &|f| chart::render(&grid, size, f),
    )?;
    let spectra =
        SpectraChart::compute(&pair, &spectra_angles(&scene.angles_deg), None, true).map_err(at)?;
    emit("spectra", "Spectra", &|f| chart::render(&spectra, size, f))?;
    let map = ReflectanceMap::compute(scene, &viewing).map_err(at)?;
    emit("map", "Map over wavelength and angle", &|f| {
        chart::render(&map, size, f)
    })?;
    let xy = Chromaticity::compute(&pair).map_err(at)?;
    emit("chromaticity", "Chromaticity diagram", &|f| {
        chart::render(&xy, size, f)
    })?;
    let ab = AbTravel::compute(&pair).map_err(at)?;
    emit("ab-travel", "CIELAB travel", &|f| {
        chart::render(&ab, size, f)
    })?;
    if periodic {
        let bands = BandsChart::compute(scene, Some(&viewing)).map_err(at)?;
        emit("bands", "Photonic stop bands of the repeat group", &|f| {
            chart::render(&bands, size, f)
        })?;
    }
    if let Some(b) = &bar {
        b.finish();
    }
    let views = Series::side_by_side(scene, &viewing, false).map_err(at)?;
    let series = &views[0].0;
    // A stack too long to resolve layer by layer goes without the table.
    let absorption = match scene.layer_absorption() {
        Ok(a) => Some(a),
        Err(lamella::Error::Invalid { .. }) => None,
        Err(e) => return Err(at(e)),
    };
    Ok(page(
        scene,
        &viewing,
        series,
        &views,
        absorption.as_ref().filter(|a| a.absorbs()),
        &drawn,
        &Provenance::of_this_run(),
    ))
}

/// First, middle and last angle of the grid.
fn spectra_angles(grid: &[f64]) -> Vec<f64> {
    let mut a = vec![grid[0], grid[grid.len() / 2], grid[grid.len() - 1]];
    a.dedup();
    a
}

pub(super) fn stack_rows(
    scene: &Scene,
    items: &[Item],
    depth: usize,
    next: &mut usize,
    out: &mut String,
) {
    for item in items {
        match item {
            Item::Layer(l) => {
                *next += 1;
                // An anisotropic layer by its material's own name, a helix
                // with its handedness and pitch.
                let material = match &l.anisotropy {
                    Some(a) => match &a.helix {
                        Some(h) => format!(
                            "{} · {}-handed helix, pitch {} nm",
                            scene.crystals[a.crystal].name,
                            h.handedness.name(),
                            h.pitch_nm
                        ),
                        None => scene.crystals[a.crystal].name.clone(),
                    },
                    None => scene.media[l.medium].name.clone(),
                };
                let _ = writeln!(
                    out,
                    "<tr><td>{}</td><td style=\"padding-left:{}em\">{}</td><td class=n>{}</td></tr>",
                    next,
                    depth * 2,
                    escape(&material),
                    l.thickness_nm
                );
            }
            Item::Repeat(r) => {
                let _ = writeln!(
                    out,
                    "<tr class=group><td></td><td style=\"padding-left:{}em\" colspan=2>repeat × {}{}</td></tr>",
                    depth * 2,
                    r.count,
                    if r.chirp_scale != 1.0 {
                        format!(", last period scaled × {}", r.chirp_scale)
                    } else {
                        String::new()
                    }
                );
                stack_rows(scene, &r.items, depth + 1, next, out);
            }
        }
    }
}

fn page(
    scene: &Scene,
    viewing: &Viewing,
    series: &Series,
    views: &[(Series, Viewing)],
    absorption: Option<&LayerAbsorption>,
    drawn: &[Drawn],
    made: &Provenance,
) -> String {
    let title = if scene.title.trim().is_empty() {
        "Untitled scene"
    } else {
        scene.title.as_str()
    };
    let mut h = String::new();
    open_page(
        &mut h,
        title,
        &lamella::chart::describe(viewing),
        &made.date,
    );
    // Design.
    h.push_str("<section><h2>Design</h2><table><thead><tr><th>Layer</th><th>Material</th><th>Thickness (nm)</th></tr></thead><tbody>\n");
    let _ = writeln!(
        h,
        "<tr class=group><td></td><td colspan=2>incident: {}</td></tr>",
        escape(&scene.media[scene.incident].name)
    );
    stack_rows(scene, &scene.stack, 0, &mut 0, &mut h);
    let substrate = match &scene.substrate {
        lamella::scene::Substrate::Medium(m) => escape(&scene.media[*m].name),
        lamella::scene::Substrate::Sheet {
            medium,
            thickness_um,
            ..
        } => {
            format!(
                "{} sheet, {thickness_um} µm",
                escape(&scene.media[*medium].name)
            )
        }
    };
    let _ = writeln!(
        h,
        "<tr class=group><td></td><td colspan=2>substrate: {substrate}</td></tr></tbody></table></section>"
    );
    // Colours.
    h.push_str("<section><h2>Colour at each angle</h2><table><thead><tr><th>Angle</th><th>Swatch</th><th>Hex</th><th>L*</th><th>a*</th><th>b*</th><th>C*</th><th>h (°)</th><th>sRGB gamut</th></tr></thead><tbody>\n");
    for (a, c) in series.angles.iter().zip(&series.colours) {
        let _ = writeln!(h, "<tr><td class=n>{a}°</td>{}</tr>", colour_cells(c, None));
    }
    h.push_str("</tbody></table>\n");
    let samples: Vec<(f64, [f64; 3])> = series
        .angles
        .iter()
        .copied()
        .zip(series.colours.iter().map(|c| c.lab))
        .collect();
    if let Ok(t) = travel(&samples) {
        let _ = writeln!(
            h,
            "<h3>Colour travel</h3><p>From {}° to {}°: hue changes by {:+.1}°, ΔE00 between the ends is {:.1}; the colour changes fastest near {:.1}° ({:.2} ΔE00 per degree).</p>",
            series.angles[0],
            series.angles[series.angles.len() - 1],
            t.hue_change_deg,
            t.delta_e2000,
            t.steepest_angle_deg,
            t.steepest_rate_per_deg
        );
    }
    let outside: Vec<String> = series
        .angles
        .iter()
        .zip(&series.colours)
        .filter(|(_, c)| !c.in_gamut)
        .map(|(a, _)| format!("{a}°"))
        .collect();
    if outside.is_empty() {
        h.push_str("<p>Every colour lies inside the sRGB gamut.</p>");
    } else {
        let _ = writeln!(
            h,
            "<p class=warn><b>Gamut warning:</b> at {} the colour is {}; the real colour differs from its swatch and hex, and the charts hatch these colours.</p>",
            outside.join(", "),
            escape(&lamella::chart::gamut::legend(viewing)),
        );
    }
    h.push_str("</section>\n");
    if views.len() > 1 {
        handedness_table(views, &mut h);
    }
    if let Some(a) = absorption {
        absorption_table(scene, a, &mut h);
    }
    close_page(&mut h, drawn, made);
    h
}

/// The page's head, title block (`meta`: the viewing line; then version
/// and `date`) and the cautions.
pub(super) fn open_page(h: &mut String, title: &str, meta: &str, date: &str) {
    let _ = write!(
        h,
        "<!DOCTYPE html>\n<html lang=\"en\"><head><meta charset=\"utf-8\">\
<title>{t} — colour report</title>\n<style>{CSS}</style></head><body>\n\
<header><h1>{t}</h1><p class=meta>{v}</p>\
<p class=meta>lamella {VERSION} · {date}</p></header>\n",
        t = escape(title),
        v = escape(meta),
    );
    h.push_str("<section class=caution><h2>Cautions</h2><ul>\n");
    for c in CAUTIONS {
        let _ = writeln!(h, "<li>{}</li>", escape(c));
    }
    h.push_str("</ul></section>\n");
}

/// The charts inline with links to their files, the footer with where the
/// page came from, and the end of the page.
pub(super) fn close_page(h: &mut String, drawn: &[Drawn], made: &Provenance) {
    for d in drawn {
        let svg = d
            .svg
            .split_once("?>")
            .map_or(d.svg.as_str(), |(_, rest)| rest);
        let _ = writeln!(
            h,
            "<section class=chart><h2>{}</h2>{svg}<p class=files>Files: <a href=\"{s}.png\">{s}.png</a> · <a href=\"{s}.svg\">{s}.svg</a></p></section>",
            escape(&d.heading),
            s = d.stem
        );
    }
    let _ = writeln!(
        h,
        "<footer><p>Made by lamella {VERSION} on {} (UTC) with:</p><pre><code>{}</code></pre></footer></body></html>",
        made.date,
        escape(&made.command)
    );
}

/// For a scene whose left and right differ: the colour at each angle
/// unpolarized and through a left and a right analyser side by side, with
/// the handedness convention.
fn handedness_table(views: &[(Series, Viewing)], h: &mut String) {
    h.push_str("<section><h2>Left and right circular polarization</h2><p>This design treats left- and right-handed circularly polarized light differently. Each angle is shown in unpolarized light, and in unpolarized light with the reflection seen through an ideal circular analyser (as through circular-polarizer glasses) passing left- or right-handed light. Handedness is named by the helix the electric-field vector traces in space at one instant, so it does not depend on where one looks from: a left-handed helix reflects left-handed light at normal incidence, and a metal mirror turns left-handed light into right-handed.</p><table><thead><tr><th>Angle</th>");
    for (s, _) in views {
        let _ = write!(h, "<th colspan=2>{}</th>", escape(&s.label));
    }
    h.push_str("</tr></thead><tbody>\n");
    for (i, a) in views[0].0.angles.iter().enumerate() {
        let _ = write!(h, "<tr><td class=n>{a}°</td>");
        for (s, _) in views {
            let c = &s.colours[i];
            let _ = write!(
                h,
                "<td><span class=sw style=\"background:{hex}\"></span></td><td>{}{hex} · L* {:.1} a* {:.1} b* {:.1}</td>",
                if c.in_gamut { "" } else { "≈ " },
                c.lab[0],
                c.lab[1],
                c.lab[2],
                hex = c.hex,
            );
        }
        h.push_str("</tr>\n");
    }
    h.push_str("</tbody></table><p>≈: outside the sRGB gamut; the swatch is an approximation.</p></section>\n");
}

/// The mean absorptance of each layer as written (and the sheet and
/// backing) at each angle, in %.
fn absorption_table(scene: &Scene, a: &LayerAbsorption, h: &mut String) {
    let mean = a.mean_over_wavelengths();
    h.push_str("<section><h2>Absorption per layer</h2><p>Unpolarized absorptance of each layer as written (a layer in a repeat group summed over its periods), averaged over the scene's wavelengths, in % of the incident light (<code>lamella spectrum --layer-absorption</code> gives every wavelength).</p><table><thead><tr><th>Column</th><th>Material</th>");
    for angle in &scene.angles_deg {
        let _ = write!(h, "<th>{angle}°</th>");
    }
    h.push_str("</tr></thead><tbody>\n");
    let layers = every_layer(scene, &scene.stack);
    for (c, name) in a.columns.iter().enumerate() {
        let material = layers.get(c).map_or_else(
            || name.trim_start_matches("A_").to_string(),
            |l| l.material.clone(),
        );
        let _ = write!(h, "<tr><td>{name}</td><td>{}</td>", escape(&material));
        for row in &mean {
            let _ = write!(h, "<td class=n>{:.2}</td>", 100.0 * row[c]);
        }
        h.push_str("</tr>\n");
    }
    h.push_str("</tbody></table></section>\n");
}

const CSS: &str = "body{font-family:'DejaVu Sans',Verdana,sans-serif;color:#1b2330;max-width:1240px;margin:2em auto;padding:0 1em;line-height:1.45}\
header{border-left:6px solid #0b6e69;padding-left:1em}h1{margin:0}.meta{color:#5a6473;margin:.2em 0 0}\
h2{border-bottom:1px solid #e4e7ec;padding-bottom:.2em;margin-top:2em}table{border-collapse:collapse}\
td,th{padding:.25em .8em;border-bottom:1px solid #e4e7ec;text-align:left}td.n{text-align:right;font-variant-numeric:tabular-nums}\
tr.group td{color:#5a6473;font-style:italic}.sw{display:inline-block;width:3em;height:1.2em;border:1px solid #9aa3ae;vertical-align:middle}\
.warn{color:#b34700}.caution{background:#fff6e5;border:1px solid #e6c07a;padding:.2em 1em;margin-top:1.5em}\
.chart svg{width:100%;height:auto;border:1px solid #e4e7ec}.files{color:#5a6473;font-size:.9em}footer{margin:3em 0 1em;color:#5a6473;font-size:.85em;border-top:1px solid #e4e7ec}\
footer pre{white-space:pre-wrap;word-break:break-all;background:#f5f6f8;padding:.5em .8em}";
