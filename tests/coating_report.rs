//! `lamella report` on a coating scene: the coating's own page with the
//! numbers `lamella multiangle` gives (geometry table, flop index, hue
//! travel), the a*b* travel and spectra charts, the cautions, version, date
//! and command; and `compare`'s refusals for coatings.

mod common;

use common::{lamella, temp_dir};

use lamella::chart::canvas::escape;

const PEARL: &str = concat!(env!("CARGO_MANIFEST_DIR"), "/scenes/pearl_compact_lid.json");
const READINGS: &str = concat!(
    env!("CARGO_MANIFEST_DIR"),
    "/scenes/measured/pearl_readings.csv"
);

fn multiangle(scene: &str) -> serde_json::Value {
    let out = lamella(&["multiangle", scene, "--format", "json"]);
    assert!(
        out.status.success(),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    serde_json::from_slice(&out.stdout).unwrap()
}

#[test]
fn coating_report_holds_the_multiangle_numbers_and_its_charts() {
    let d = temp_dir("coating-report");
    let out_dir = d.join("report");
    let out = lamella(&[
        "report",
        PEARL,
        "--size",
        "600x400",
        "-o",
        out_dir.to_str().unwrap(),
    ]);
    assert!(
        out.status.success(),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    for stem in ["ab-travel", "spectra"] {
        for ext in ["png", "svg"] {
            assert!(
                out_dir.join(format!("{stem}.{ext}")).is_file(),
                "{stem}.{ext}"
            );
        }
    }
    // No film charts for a coating.
    assert!(!out_dir.join("thickness-angle.png").exists());
    let html = std::fs::read_to_string(out_dir.join("index.html")).unwrap();
    let m = multiangle(PEARL);
    for g in m["geometries"].as_array().unwrap() {
        let row = format!(
            "<tr><td>{}</td><td class=n>45°</td><td class=n>{}°</td><td><span class=sw style=\"background:{hex}\"></span></td><td>{hex}</td><td class=n>{:.2}</td><td class=n>{:.1}</td><td class=n>{:.1}</td><td class=n>{:.1}</td><td class=n>{:.1}</td><td class=n>{:.0}</td>",
            g["name"].as_str().unwrap(),
            g["aspecular_deg"].as_f64().unwrap(),
            g["Y"].as_f64().unwrap(),
            g["L"].as_f64().unwrap(),
            g["a"].as_f64().unwrap(),
            g["b"].as_f64().unwrap(),
            g["C"].as_f64().unwrap(),
            g["h"].as_f64().unwrap(),
            hex = g["hex"].as_str().unwrap(),
        );
        assert!(html.contains(&row), "report lacks the row {row}");
    }
    let flop = format!("Flop index: {:.2}", m["flop_index"].as_f64().unwrap());
    let hue = format!("Hue travel: {:+.1}°", m["hue_travel_deg"].as_f64().unwrap());
    for needle in [
        flop.as_str(),
        hue.as_str(),
        "Maison Orvelle compact lid",
        "<h2>Coating</h2>",
        "mica",
        "lacquer",
        "σ = 8°",
        "CIELAB travel across the geometries",
        "Reflectance factor spectra",
        "Surface gloss at 45° illumination",
        "<svg",
    ] {
        assert!(html.contains(needle), "report lacks {needle}");
    }
    for c in lamella::report::CAUTIONS {
        assert!(html.contains(&escape(c)), "report lacks the caution {c:?}");
    }
    assert!(html.contains(&format!("lamella {}", env!("CARGO_PKG_VERSION"))));
    let command = format!(
        "lamella report {PEARL} --size 600x400 -o {}",
        out_dir.display()
    );
    assert!(html.contains(&escape(&command)), "report lacks {command}");
    let after = format!("lamella {} · ", env!("CARGO_PKG_VERSION"));
    let date = &html.split(&after).nth(1).expect("version and date")[..20];
    let form = date
        .bytes()
        .map(|c| if c.is_ascii_digit() { b'd' } else { c });
    assert_eq!(form.collect::<Vec<u8>>(), b"dddd-dd-ddTdd:dd:ddZ", "{date}");
}

/// More geometries than a chart tells apart by colour are drawn as several
/// spectra charts of even size (eight: two of four).
#[test]
fn many_geometries_split_the_spectra_charts() {
    let d = temp_dir("coating-report-many");
    let text = std::fs::read_to_string(PEARL).unwrap();
    let mut doc: serde_json::Value = serde_json::from_str(&text).unwrap();
    doc["coating"]["geometries"] = serde_json::json!([
        "45as-15", "45as15", "45as25", "45as45", "45as75", "45as110", "25as40", "75as20"
    ]);
    let scene = d.join("eight.json");
    std::fs::write(&scene, doc.to_string()).unwrap();
    let out_dir = d.join("report");
    let out = lamella(&[
        "report",
        scene.to_str().unwrap(),
        "-o",
        out_dir.to_str().unwrap(),
    ]);
    assert!(
        out.status.success(),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    assert!(out_dir.join("spectra-1.png").is_file() && out_dir.join("spectra-2.svg").is_file());
    let html = std::fs::read_to_string(out_dir.join("index.html")).unwrap();
    assert!(
        html.contains("Reflectance factor spectra (45as-15 to 45as45)"),
        "{html}"
    );
    assert!(html.contains("Reflectance factor spectra (45as75 to 75as20)"));
}

#[test]
fn coating_reports_refuse_other_light_paths() {
    let d = temp_dir("coating-report-bad");
    for flags in [["--side", "transmit"], ["--polarization", "s"]] {
        let out = lamella(&[
            "report",
            PEARL,
            "-o",
            d.to_str().unwrap(),
            flags[0],
            flags[1],
        ]);
        let err = String::from_utf8_lossy(&out.stderr);
        assert_eq!(out.status.code(), Some(2), "{err}");
        assert!(err.contains("pearl_compact_lid.json: coating = (present): a coating is reported in unpolarized reflected light"), "{err}");
        assert_eq!(err.trim_end().lines().count(), 1, "{err}");
    }
}

/// `compare` on coatings: a tolerance for a geometry not in both and a
/// sample at angles instead of geometries exit 2 with one line.
#[test]
fn compare_refuses_unknown_geometries_and_points_not_in_common() {
    let d = temp_dir("coating-compare");
    let tolerances = d.join("limits.json");
    std::fs::write(&tolerances, r#"{"limits": {"45as15": 1, "45as99": 1}}"#).unwrap();
    let negative = d.join("negative.json");
    std::fs::write(&negative, r#"{"limits": {"45as15": -0.5}}"#).unwrap();
    let angles = d.join("angles.csv");
    std::fs::write(
        &angles,
        "wavelength_nm,R,angle_deg\n500,0.1,45\n510,0.1,45\n",
    )
    .unwrap();
    let (t, n, a) = (
        tolerances.to_str().unwrap(),
        negative.to_str().unwrap(),
        angles.to_str().unwrap(),
    );
    for (args, want) in [
        (
            vec![PEARL, READINGS, "--tolerances", t],
            format!(
                "{t}: limits.45as99 = 1: no such angle or geometry in both REFERENCE and SAMPLE (in both: 45as15, 45as45, 45as110)"
            ),
        ),
        (
            vec![PEARL, READINGS, "--tolerances", n],
            format!("{n}: limits.45as15 = -0.5: a tolerance is a colour difference ≥ 0"),
        ),
        (
            vec![PEARL, a],
            "SAMPLE: angle 45°: REFERENCE and SAMPLE have no angle or geometry in common".into(),
        ),
    ] {
        let mut all = vec!["compare"];
        all.extend(args.iter().copied());
        let out = lamella(&all);
        let err = String::from_utf8_lossy(&out.stderr);
        assert_eq!(out.status.code(), Some(2), "{all:?}: {err}");
        assert!(err.contains(&want), "{all:?}: {err}");
        assert_eq!(err.trim_end().lines().count(), 1, "{err}");
    }
}
