//! One validated scene: every command accepts or refuses a file alike
//! (exit code 2 naming the key), duplicate keys are refused, a byte-order
//! mark is accepted, a coating-only scene is refused by the film commands,
//! warnings name what and where, oversized work is refused before it starts
//! and a stopped run leaves no temporary file.

mod common;

use common::{lamella, temp_dir};

use std::path::Path;
use std::process::{Command, Output, Stdio};
use std::time::Duration;

use lamella::colorimetry::Observer;
use lamella::scene::{Scene, WarningKind};

fn stderr(out: &Output) -> String {
    String::from_utf8_lossy(&out.stderr).into_owned()
}

const FILM: &str = r#"{
  "title": "validation film",
  "stack": [{"material": "hi", "thickness_nm": 58}, {"material": "lo", "thickness_nm": 94}],
  "substrate": "glass",
  "materials": {"hi": {"n": 2.35}, "lo": {"n": 1.46}},
  "wavelengths_nm": {"from": 400, "to": 700, "step": 10},
  "angles_deg": {"from": 0, "to": 60, "step": 30}
}"#;

/// FILM with `extra` keys added at the top level.
fn film_with(extra: &str) -> String {
    FILM.replacen('{', &format!("{{{extra},"), 1)
}

/// Every command that reads a scene, with what it needs besides the scene.
fn commands(scene: &str, dir: &Path) -> Vec<Vec<String>> {
    let out = |f: &str| dir.join(f).to_str().unwrap().to_string();
    let list: Vec<Vec<&str>> = vec![
        vec!["spectrum", scene],
        vec!["color", scene],
        vec!["chart", scene, "--kind", "angle-strip", "-o"],
        vec!["render", scene, "--size", "32x32", "--ssaa", "1", "-o"],
        vec!["report", scene, "--size", "480x320", "-o"],
        vec!["multiangle", scene],
    ];
    list.into_iter()
        .map(|args| {
            let mut v: Vec<String> = args.iter().map(|s| s.to_string()).collect();
            match args[0] {
                "chart" => v.push(out("c.svg")),
                "render" => v.push(out("r.png")),
                "report" => v.push(out("report")),
                _ => {}
            }
            v
        })
        .collect()
}

/// Every command refuses `text` with exit code 2 and the same one line
/// naming `key`.
fn refused_alike(name: &str, text: &str, key: &str) {
    let dir = temp_dir(name);
    let path = dir.join("scene.json");
    std::fs::write(&path, text).unwrap();
    let mut lines = Vec::new();
    for args in commands(path.to_str().unwrap(), &dir) {
        let args: Vec<&str> = args.iter().map(String::as_str).collect();
        let out = lamella(&args);
        let err = stderr(&out);
        assert_eq!(out.status.code(), Some(2), "{name}: {args:?}: {err}");
        assert!(out.stdout.is_empty(), "{name}: {args:?} wrote output");
        let line = err.lines().last().unwrap_or_default().to_string();
        assert!(
            line.contains(key),
            "{name}: {args:?}: {line} should name {key}"
        );
        lines.push(line);
    }
    lines.dedup();
    assert_eq!(lines.len(), 1, "{name}: the commands disagree: {lines:?}");
}

#[test]
fn every_command_refuses_a_bad_section_alike() {
    for (name, extra, key) in [
        ("illuminant", r#""illuminant": "D66""#, "illuminant = D66"),
        (
            "observer",
            r#""observer": "CIE2015_2""#,
            "observer = CIE2015_2",
        ),
        (
            "preview-key",
            r#""preview": {"shap": "sphere"}"#,
            "preview.shap",
        ),
        (
            "preview-light",
            r#""preview": {"lights": [{"type": "sky", "illuminant": "D66"}]}"#,
            "preview.lights[0].illuminant",
        ),
        ("preview-range", r#""preview": {"ssaa": 9}"#, "preview.ssaa"),
        (
            "preview-mesh",
            r#""preview": {"shape": "mesh:missing.obj"}"#,
            "preview.shape = mesh:missing.obj",
        ),
        (
            "disorder",
            r#""disorder": {"realizations": 0}"#,
            "disorder.realizations",
        ),
        (
            "coating-key",
            r#""coating": {"binder": "lo", "platelet": [{"material": "hi", "thickness_nm": 50}], "tilt": 3}"#,
            "coating.tilt",
        ),
        (
            "coating-binder",
            r#""coating": {"binder": "dark", "platelet": [{"material": "hi", "thickness_nm": 50}]}, "materials": {"dark": {"n": 1.5, "k": 0.1}, "hi": {"n": 2.35}, "lo": {"n": 1.46}}"#,
            "coating.binder",
        ),
    ] {
        let text = if name == "coating-binder" {
            // replaces the scene's own materials (a later duplicate would be refused)
            film_with(extra).replace(
                r#",
  "materials": {"hi": {"n": 2.35}, "lo": {"n": 1.46}}"#,
                "",
            )
        } else {
            film_with(extra)
        };
        refused_alike(name, &text, key);
    }
}

#[test]
fn duplicate_keys_are_refused_naming_the_key() {
    let text = FILM.replace(
        r#""thickness_nm": 58"#,
        r#""thickness_nm": 58, "thickness_nm": 60"#,
    );
    refused_alike("duplicate", &text, "stack[0].thickness_nm");
    let err = Scene::from_json(&text, &|_| Err("no files".into()))
        .unwrap_err()
        .to_string();
    assert!(err.contains("duplicate key"), "{err}");
    let top = film_with(r#""title": "again""#);
    refused_alike("duplicate-top", &top, "title = (given again at line 2");
}

#[test]
fn a_byte_order_mark_is_accepted() {
    let dir = temp_dir("bom");
    let path = dir.join("scene.json");
    std::fs::write(&path, format!("\u{feff}{FILM}")).unwrap();
    let p = path.to_str().unwrap();
    let plain = lamella(&["color", "--format", "json", p]);
    assert!(plain.status.success(), "{}", stderr(&plain));
    let without = dir.join("plain.json");
    std::fs::write(&without, FILM).unwrap();
    let reference = lamella(&["color", "--format", "json", without.to_str().unwrap()]);
    assert_eq!(plain.stdout, reference.stdout);
    for args in commands(p, &dir).into_iter().take(5) {
        let args: Vec<&str> = args.iter().map(String::as_str).collect();
        let out = lamella(&args);
        assert!(out.status.success(), "{args:?}: {}", stderr(&out));
    }
}

#[test]
fn sections_are_typed_values() {
    let text = film_with(
        r#""illuminant": "a", "observer": "10", "preview": {"shape": "torus", "lights": [{"type": "sky", "illuminant": "D50"}]}"#,
    );
    let s = Scene::from_json(&text, &|_| Err("no files".into())).unwrap();
    assert_eq!(s.illuminant.name(), "A");
    assert_eq!(s.observer, Observer::Cie1964_10);
    let preview = s.preview.as_ref().unwrap();
    assert_eq!(preview.shape, lamella::render::Shape::Torus);
    assert_eq!(preview.lights[0].illuminant.as_ref().unwrap().name(), "D50");
    assert!(s.film && s.coating.is_none() && s.warnings.is_empty());

    let custom = film_with(r#""illuminant": {"csv": "booth.csv"}"#);
    let load = |p: &str| match p {
        "booth.csv" => Ok("wavelength_nm,power\n300,1\n900,2\n".to_string()),
        _ => Err("missing".to_string()),
    };
    let s = Scene::from_json(&custom, &load).unwrap();
    assert_eq!(s.illuminant.name(), "booth.csv");
    let narrow = |_: &str| Ok("wavelength_nm,power\n450,1\n900,2\n".to_string());
    let err = Scene::from_json(&custom, &narrow).unwrap_err().to_string();
    assert!(
        err.contains("wavelengths[0] = 400") && err.contains("booth.csv"),
        "{err}"
    );
}

const COATING_ONLY: &str = r#"{
  "coating": {"binder": "lacquer", "platelet": [{"material": "tio2", "thickness_nm": 80}]},
  "materials": {"lacquer": {"n": 1.5}},
  "wavelengths_nm": {"from": 400, "to": 700, "step": 10}
}"#;

#[test]
fn a_coating_only_scene_is_refused_by_the_film_commands_and_reported() {
    let dir = temp_dir("coating-only");
    let path = dir.join("scene.json");
    std::fs::write(&path, COATING_ONLY).unwrap();
    for args in commands(path.to_str().unwrap(), &dir) {
        let args: Vec<&str> = args.iter().map(String::as_str).collect();
        let out = lamella(&args);
        match args[0] {
            // `report` gives the coating's own report.
            "multiangle" | "render" | "report" => {
                assert!(out.status.success(), "{args:?}: {}", stderr(&out))
            }
            _ => {
                let err = stderr(&out);
                assert_eq!(out.status.code(), Some(2), "{args:?}: {err}");
                assert!(
                    err.contains("stack") && err.contains("lamella multiangle"),
                    "{args:?}: {err}"
                );
                assert!(out.stdout.is_empty());
            }
        }
    }
}

fn warnings_of(text: &str) -> Vec<(WarningKind, String)> {
    Scene::from_json(text, &|_| Err("no files".into()))
        .unwrap()
        .warnings
        .into_iter()
        .map(|w| (w.kind, w.to_string()))
        .collect()
}

#[test]
fn warnings_name_what_and_where() {
    let rutile = FILM
        .replace(r#""material": "hi""#, r#""material": "rutile""#)
        .replace(r#""from": 400"#, r#""from": 380"#);
    assert_eq!(
        warnings_of(&rutile),
        [(
            WarningKind::OutsideValidRange,
            "stack[0].material: \"rutile\" is used at 380 nm, outside 430–1530 nm where its source vouches for it; values there are extrapolated".to_string()
        )]
    );
    let tio2 = FILM
        .replace(r#""material": "lo""#, r#""material": "tio2""#)
        .replace(r#""from": 400"#, r#""from": 200"#);
    let w = warnings_of(&tio2);
    assert_eq!(w.len(), 2, "{w:?}");
    assert!(
        w[0].1
            .starts_with("stack[1].material: \"tio2\" is used at 200 nm"),
        "{w:?}"
    );
    assert!(
        w[1].1
            .starts_with("substrate: \"glass\" is used at 200 nm, outside 300–2500 nm"),
        "{w:?}"
    );

    let coarse = FILM.replace(r#""step": 10"#, r#""step": 20"#);
    let w = warnings_of(&coarse);
    assert_eq!(w.len(), 1);
    assert_eq!(w[0].0, WarningKind::CoarseStep);
    assert!(
        w[0].1
            .starts_with("wavelengths_nm: the wavelength step reaches 20 nm"),
        "{w:?}"
    );

    let thick = FILM.replace(r#""thickness_nm": 94"#, r#""thickness_nm": 60000"#);
    let w = warnings_of(&thick);
    assert_eq!(w.len(), 1);
    assert_eq!(w[0].0, WarningKind::ThickLayer);
    assert!(
        w[0].1.starts_with("stack[1].thickness_nm: 60000 nm"),
        "{w:?}"
    );
    assert!(w[0].1.contains("\"incoherent\": true"), "{w:?}");
}

#[test]
fn warnings_go_to_stderr_without_failing() {
    let dir = temp_dir("warnings");
    let path = dir.join("scene.json");
    let text = FILM
        .replace(r#""step": 10"#, r#""step": 20"#)
        .replace(r#""material": "hi""#, r#""material": "rutile""#)
        .replace(r#""from": 400"#, r#""from": 380"#);
    std::fs::write(&path, text).unwrap();
    let p = path.to_str().unwrap();
    let color = lamella(&["color", p]);
    assert!(color.status.success());
    let err = stderr(&color);
    assert!(
        err.contains("warning: ") && err.contains("stack[0].material"),
        "{err}"
    );
    assert!(err.contains("wavelengths_nm: the wavelength step"), "{err}");
    // spectrum computes no colour: the step warning is not shown.
    let spectrum = lamella(&["spectrum", p]);
    assert!(spectrum.status.success());
    let err = stderr(&spectrum);
    assert!(
        err.contains("stack[0].material") && !err.contains("wavelength step"),
        "{err}"
    );
}

const HUGE: &str = r#"{
  "stack": [{"material": "hi", "thickness_nm": 58}], "substrate": "glass",
  "materials": {"hi": {"n": 2.35}},
  "wavelengths_nm": {"from": 380, "to": 780, "step": 0.001},
  "angles_deg": {"from": 0, "to": 89, "step": 0.001}
}"#;

#[test]
fn work_that_cannot_fit_is_refused_before_it_starts() {
    let dir = temp_dir("huge");
    let path = dir.join("scene.json");
    std::fs::write(&path, HUGE).unwrap();
    let p = path.to_str().unwrap();
    let mut runs: Vec<Vec<String>> = commands(p, &dir)
        .into_iter()
        .filter(|a| a[0] != "spectrum" && a[0] != "multiangle")
        .collect();
    runs.push(
        ["spectrum", p, "--format", "json"]
            .map(String::from)
            .to_vec(),
    );
    for args in runs {
        let args: Vec<&str> = args.iter().map(String::as_str).collect();
        let out = lamella(&args);
        let err = stderr(&out);
        assert_eq!(out.status.code(), Some(2), "{args:?}: {err}");
        assert!(
            err.contains("wavelengths_nm × angles_deg = 400001 × ")
                && err.contains("would need about")
                && err.contains("over the 4.0 GiB limit"),
            "{args:?}: {err}"
        );
    }
    let scene = Scene::from_json(HUGE, &|_| Err("no files".into())).unwrap();
    let err = scene.check_grid_size(89_001, 48, "color").unwrap_err();
    assert_eq!(
        err.to_string(),
        "wavelengths_nm × angles_deg = 400001 × 89001 points: color would need about 1.6 TiB \
         for the whole grid, over the 4.0 GiB limit; use a coarser grid (`lamella spectrum \
         --format csv` streams any size)"
    );
    assert!(scene.check_grid_size(1, 48, "color").is_ok());
}

#[test]
fn a_disorder_ensemble_too_large_is_refused() {
    let text = FILM.replace(
        r#""stack": [{"material": "hi", "thickness_nm": 58}, {"material": "lo", "thickness_nm": 94}]"#,
        r#""stack": [{"repeat": 1000000, "stack": [{"material": "hi", "thickness_nm": 58, "sigma_nm": 1}]}],
           "disorder": {"realizations": 100000}"#,
    );
    let err = Scene::from_json(&text, &|_| Err("no files".into()))
        .unwrap_err()
        .to_string();
    assert!(
        err.starts_with("stack = 1000000 layers × 100000 realizations"),
        "{err}"
    );
}

/// Starts a long `spectrum -o`, waits for its temporary file, sends
/// `signal` and checks the exit code and that no file is left.
fn stopped_run_leaves_no_file(signal: &str, code: i32) {
    let dir = temp_dir(&format!("signal-{signal}"));
    let path = dir.join("scene.json");
    std::fs::write(&path, HUGE.replace(r#""step": 0.001}"#, r#""step": 0.01}"#)).unwrap();
    let out = dir.join("big.csv");
    let mut child = Command::new(env!("CARGO_BIN_EXE_lamella"))
        .args([
            "spectrum",
            path.to_str().unwrap(),
            "-o",
            out.to_str().unwrap(),
        ])
        .stderr(Stdio::null())
        .spawn()
        .unwrap();
    let tmp = dir.join(format!(".big.csv.{}.tmp", child.id()));
    let mut waited = 0;
    while !tmp.exists() {
        assert!(waited < 3000, "no temporary file appeared");
        std::thread::sleep(Duration::from_millis(10));
        waited += 1;
    }
    let killed = Command::new("kill")
        .args([&format!("-{signal}"), &child.id().to_string()])
        .status()
        .unwrap();
    assert!(killed.success());
    let status = child.wait().unwrap();
    assert_eq!(status.code(), Some(code), "{status:?}");
    let left: Vec<_> = std::fs::read_dir(&dir)
        .unwrap()
        .map(|e| e.unwrap().file_name())
        .collect();
    assert_eq!(left, ["scene.json"], "files left behind");
}

#[test]
fn sigterm_removes_the_temporary_output() {
    stopped_run_leaves_no_file("TERM", 143);
}

#[test]
fn sigint_removes_the_temporary_output() {
    stopped_run_leaves_no_file("INT", 130);
}
