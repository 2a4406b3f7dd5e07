//! `lamella report` on a scene with a `coating` section: the coating's own
//! page. Its make-up, the colour at each multi-angle geometry (as
//! `lamella multiangle` computes it), the flop index and hue travel, the
//! a*b* travel across the geometries and the reflectance factor spectra,
//! with the cautions and where the page came from.

use std::fmt::Write;
use std::path::Path;

use lamella::angle_colour::Viewing;
use lamella::chart::canvas::escape;
use lamella::chart::{self, AbTravel, MOST_SERIES, SpectraChart};
use lamella::pigment::{Background, Coating, Measurement, Orientation};
use lamella::scene::{Scene, Sigma};

use super::choices::{PolarizationChoice, SideChoice};
use super::color::ViewArgs;
use super::report::{
    Args, Drawn, Provenance, close_page, colour_cells, open_page, stack_rows, write_chart,
};
use super::{CliResult, Failure, write_out};

/// Writes the coating report of `scene` (read from `args.scene`).
pub fn run(args: &Args, scene: &Scene) -> CliResult {
    std::fs::create_dir_all(&args.output).map_err(|e| Failure::io(&args.output, e))?;
    let html = build(
        scene,
        &args.scene,
        &args.view,
        args.size,
        Some(&args.output),
    )?;
    write_out(Some(&args.output.join("index.html")), &[html.into_bytes()])
}

/// Draws the coating's charts (into `folder` as PNG and SVG, when given)
/// and returns its report page.
pub fn build(
    scene: &Scene,
    scene_path: &Path,
    view: &ViewArgs,
    size: (u32, u32),
    folder: Option<&Path>,
) -> Result<String, Failure> {
    if view.side != SideChoice::Reflect || view.polarization != PolarizationChoice::Unpolarized {
        return Err(Failure::input(format!(
            "{}: coating = (present): a coating is reported in unpolarized reflected light \
             at its geometries; leave out --side and --polarization",
            scene_path.display()
        )));
    }
    let at = |e| Failure::scene(scene_path, e);
    let coating = Coating::from_scene(scene).map_err(at)?;
    let viewing = view.viewing(scene, scene_path)?;
    let m = super::multiangle::measure_coating(scene_path, scene, None, &viewing)?;
    let title = if scene.title.trim().is_empty() {
        "Untitled scene"
    } else {
        scene.title.as_str()
    };
    let mut drawn = Vec::new();
    let ab = AbTravel::of_coating(title, &m, &viewing);
    drawn.push(write_chart(
        folder,
        scene_path,
        "ab-travel".into(),
        "CIELAB travel across the geometries".into(),
        &|f| chart::render(&ab, size, f),
    )?);
    // Charts of at most MOST_SERIES curves each, as even as can be.
    let n = m.geometries.len();
    let parts = m
        .geometries
        .chunks(n.div_ceil(n.div_ceil(MOST_SERIES)).max(1));
    let several = parts.len() > 1;
    for (k, part) in parts.enumerate() {
        let spectra =
            SpectraChart::of_coating(title, &scene.wavelengths_nm, part, &viewing).map_err(at)?;
        let (stem, heading) = if several {
            (
                format!("spectra-{}", k + 1),
                format!(
                    "Reflectance factor spectra ({} to {})",
                    part[0].geometry.name,
                    part[part.len() - 1].geometry.name
                ),
            )
        } else {
            ("spectra".into(), "Reflectance factor spectra".into())
        };
        drawn.push(write_chart(folder, scene_path, stem, heading, &|f| {
            chart::render(&spectra, size, f)
        })?);
    }
    Ok(page(
        scene,
        &coating,
        &viewing,
        &m,
        &drawn,
        &Provenance::of_this_run(),
    ))
}

fn page(
    scene: &Scene,
    coating: &Coating,
    viewing: &Viewing,
    m: &Measurement,
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
        &format!(
            "{} · effect-pigment coating at {} multi-angle geometries · reflectance factor (perfect white diffuser: Y = 100)",
            lamella::chart::light(viewing),
            m.geometries.len()
        ),
        &made.date,
    );
    make_up(scene, coating, &mut h);
    geometry_table(m, viewing, &mut h);
    close_page(&mut h, drawn, made);
    h
}

/// The coating's make-up: binder, platelet layers, disorder, orientation,
/// coverage and background.
fn make_up(scene: &Scene, c: &Coating, h: &mut String) {
    h.push_str("<section><h2>Coating</h2><table><thead><tr><th>Layer</th><th>Platelet material</th><th>Thickness (nm)</th></tr></thead><tbody>\n");
    stack_rows(scene, &c.platelet, 0, &mut 0, h);
    h.push_str("</tbody></table>\n<table><tbody>\n");
    let mut fact = |k: &str, v: String| {
        let _ = writeln!(h, "<tr><th>{k}</th><td>{v}</td></tr>");
    };
    fact("Binder", escape(&scene.media[c.binder].name));
    if let Some(d) = &c.disorder {
        let spread = match d.sigma {
            Some(Sigma::Nm(s)) => format!(", thickness σ {s} nm where a layer sets none"),
            Some(Sigma::Pct(p)) => format!(", thickness σ {p} % where a layer sets none"),
            None => String::new(),
        };
        fact(
            "Thickness disorder",
            format!(
                "averaged over {} platelets drawn at random (seed {}){spread}",
                d.realizations, d.seed
            ),
        );
    }
    fact(
        "Platelet orientation",
        match &c.orientation {
            Orientation::Gaussian { sigma_deg } => {
                format!("tilts about the coating normal with σ = {sigma_deg}° (Gaussian)")
            }
            Orientation::Density(points) => format!(
                "tabulated density of tilts, {} points up to {}°",
                points.len(),
                points.last().map_or(0.0, |p| p.0)
            ),
        },
    );
    fact(
        "Coverage",
        format!(
            "{} (platelets a line along the normal crosses, on average)",
            c.coverage
        ),
    );
    fact(
        "Background",
        match &c.background {
            Background::Black => "black (reflects nothing)".into(),
            Background::Grey(r) => format!("diffuse, reflectance {r}"),
            Background::Spectrum(points) => format!(
                "diffuse reflectance spectrum, {} points from {} to {} nm",
                points.len(),
                points[0].0,
                points[points.len() - 1].0
            ),
        },
    );
    h.push_str("</tbody></table></section>\n");
}

/// The colour at each geometry with the flop index, hue travel, surface
/// gloss and gamut notes.
fn geometry_table(m: &Measurement, viewing: &Viewing, h: &mut String) {
    h.push_str("<section><h2>Colour at each geometry</h2><table><thead><tr><th>Geometry</th><th>Illumination</th><th>Aspecular</th><th>Swatch</th><th>Hex</th><th>Y</th><th>L*</th><th>a*</th><th>b*</th><th>C*</th><th>h (°)</th><th>sRGB gamut</th></tr></thead><tbody>\n");
    for g in &m.geometries {
        let c = &g.colour;
        let _ = writeln!(
            h,
            "<tr><td>{}</td><td class=n>{}°</td><td class=n>{}°{}</td>{}</tr>",
            escape(&g.geometry.name),
            g.geometry.illumination_deg,
            g.geometry.aspecular_deg,
            if g.geometry.in_plane {
                ""
            } else {
                " (out of plane)"
            },
            colour_cells(c, Some(c.xyz[1])),
        );
    }
    h.push_str("</tbody></table>\n");
    match (m.flop_index, &m.flop_note) {
        (Some(f), _) => {
            let _ = writeln!(
                h,
                "<p><b>Flop index: {f:.2}</b> — 2.69 (L*15 − L*110)<sup>1.11</sup> / (L*45)<sup>0.86</sup> from the lightness at 45as15, 45as45 and 45as110 (common practice); larger values mean a stronger change of lightness from face to flop.</p>"
            );
        }
        (None, Some(note)) => {
            let _ = writeln!(h, "<p><b>Flop index:</b> {}.</p>", escape(note));
        }
        (None, None) => {}
    }
    if let Some(t) = m.hue_travel_deg {
        let _ = writeln!(
            h,
            "<p><b>Hue travel: {t:+.1}°</b> — the net change of hue angle h<sub>ab</sub> following the geometries in the order listed, from {} to {}.</p>",
            escape(&m.geometries[0].geometry.name),
            escape(&m.geometries[m.geometries.len() - 1].geometry.name)
        );
    }
    for (a, y) in &m.surface_gloss_y {
        let _ = writeln!(
            h,
            "<p>Surface gloss at {a}° illumination: Y = {y:.2}. The binder surface's mirror reflection (surface gloss) is excluded from every geometry above.</p>"
        );
    }
    let outside: Vec<String> = (m.geometries.iter())
        .filter(|g| !g.colour.in_gamut)
        .map(|g| escape(&g.geometry.name))
        .collect();
    if outside.is_empty() {
        h.push_str("<p>Every colour lies inside the sRGB gamut.</p>");
    } else {
        let _ = writeln!(
            h,
            "<p class=warn><b>Gamut warning:</b> at {} the colour is {}; the real colour differs from its swatch and hex.</p>",
            outside.join(", "),
            escape(&lamella::chart::gamut::legend(viewing)),
        );
    }
    h.push_str("</section>\n");
}
