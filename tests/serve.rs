//! `lamella serve` over HTTP, against a server on a free port: every API
//! endpoint gives what the commands give for the same design (`color`,
//! `spectrum`, `multiangle`, `match`), errors carry the CLI's message, and
//! the guards refuse a missing token, a foreign Host or Origin, an oversize
//! body, an absurd grid, too much work and files outside the scene's folder.

#[path = "common/served.rs"]
mod served;

use std::path::{Path, PathBuf};
use std::process::Command;

use serde_json::{Value, json};
use served::Served;

const BIN: &str = env!("CARGO_BIN_EXE_lamella");

fn root() -> &'static Path {
    Path::new(env!("CARGO_MANIFEST_DIR"))
}

/// A fresh scratch folder for one test.
fn scratch(name: &str) -> PathBuf {
    let dir = std::env::temp_dir().join(format!("lamella-serve-{name}-{}", std::process::id()));
    let _ = std::fs::remove_dir_all(&dir);
    std::fs::create_dir_all(&dir).unwrap();
    dir
}

fn document(path: &Path) -> Value {
    serde_json::from_str(&std::fs::read_to_string(path).unwrap()).unwrap()
}

fn lamella(args: &[&str]) -> (Option<i32>, String, String) {
    let out = Command::new(BIN).args(args).output().unwrap();
    (
        out.status.code(),
        String::from_utf8(out.stdout).unwrap(),
        String::from_utf8(out.stderr).unwrap(),
    )
}

fn cli_json(args: &[&str]) -> Value {
    let (code, stdout, stderr) = lamella(args);
    assert_eq!(code, Some(0), "{args:?}: {stderr}");
    serde_json::from_str(&stdout).unwrap()
}

fn scene_arg(name: &str) -> String {
    root().join("scenes").join(name).display().to_string()
}

#[test]
fn live_colours_equal_lamella_color() {
    let scene = scene_arg("teal_label_foil.json");
    let server = Served::start(Path::new(BIN), &[&scene]);
    assert!(server.url.contains(&format!(":{}/", server.port)) && server.port != 0);
    let doc = document(Path::new(&scene));
    let r = server.post("/api/live", &json!({"scene": doc}));
    assert_eq!(r.status, 200);
    let live = r.json();
    assert_eq!(
        live["colours"],
        cli_json(&["color", &scene, "--format", "json"])
    );
    assert!(live["strip"]["svg"].as_str().unwrap().contains("<svg"));
    assert!(live["ab"]["svg"].as_str().unwrap().contains("<svg"));
    assert!(live["server_ms"].as_f64().unwrap() > 0.0);
    let vars = live["variables"].as_array().unwrap();
    assert_eq!(vars.len(), 2);
    assert_eq!(vars[0]["pointer"], "/stack/0/stack/0");
    // Another view, with a target: the same flags as the command.
    let view = json!({"side": "transmit", "illuminant": "D50", "observer": "CIE1931_2",
                      "polarization": "s", "gamut": "chroma"});
    let live = server
        .post(
            "/api/live",
            &json!({"scene": doc, "view": view, "target": {"lab": "60,-20,5"}}),
        )
        .json();
    let cli = cli_json(&[
        "color",
        &scene,
        "--format",
        "json",
        "--side",
        "transmit",
        "--illuminant",
        "D50",
        "--observer",
        "CIE1931_2",
        "--polarization",
        "s",
        "--gamut",
        "chroma",
    ]);
    assert_eq!(live["colours"], cli);
    let de = live["delta_e00"].as_array().unwrap();
    assert_eq!(de.len(), cli.as_array().unwrap().len());
    let first = &cli[0];
    let expected = lamella::colorimetry::delta_e2000(
        [
            first["L"].as_f64().unwrap(),
            first["a"].as_f64().unwrap(),
            first["b"].as_f64().unwrap(),
        ],
        [60.0, -20.0, 5.0],
    );
    assert_eq!(de[0].as_f64().unwrap(), expected);
}

#[test]
fn analyser_view_equals_lamella_color_and_chart_refusals_are_messages() {
    let scene = scene_arg("cnc_giftbox_window.json");
    let server = Served::start(Path::new(BIN), &[&scene]);
    let doc = document(Path::new(&scene));
    let live = server
        .post(
            "/api/live",
            &json!({"scene": doc, "view": {"analyzer": "left"}}),
        )
        .json();
    assert_eq!(
        live["colours"],
        cli_json(&["color", &scene, "--format", "json", "--analyzer", "left"])
    );
    // Each chart is drawn, or says why not as `lamella chart` does, never
    // a failed request.
    let dir = scratch("chiral");
    let (code, _, stderr) = lamella(&[
        "chart",
        &scene,
        "--kind",
        "ab-travel",
        "-o",
        dir.join("ab.svg").to_str().unwrap(),
    ]);
    for key in ["strip", "ab"] {
        let part = &live[key];
        if code == Some(0) {
            assert!(part["svg"].is_string(), "{key}: {part}");
        } else {
            assert_eq!(
                stderr.lines().last().unwrap(),
                format!("lamella: {}", part["error"].as_str().unwrap())
            );
        }
    }
    std::fs::remove_dir_all(&dir).unwrap();
}

#[test]
fn a_newer_live_request_supersedes_an_older_one() {
    let scene = root()
        .join("bench/serve_20layers.json")
        .display()
        .to_string();
    let server = std::sync::Arc::new(Served::start(Path::new(BIN), &[&scene]));
    let mut slow = document(Path::new(&scene));
    slow["wavelengths_nm"] = json!({"from": 380, "to": 780, "step": 0.2});
    slow["angles_deg"] = json!({"from": 0, "to": 48, "step": 1});
    let session = |doc: &Value| {
        let token = server.token.clone();
        let host = server.host();
        let body = json!({"scene": doc}).to_string();
        let server = server.clone();
        move || {
            server.raw(
                "POST",
                "/api/live",
                &[
                    ("Host", &host),
                    ("x-lamella-token", &token),
                    ("x-lamella-session", "s1"),
                ],
                body.as_bytes(),
            )
        }
    };
    let older = std::thread::spawn(session(&slow));
    std::thread::sleep(std::time::Duration::from_millis(40));
    let newer = session(&document(Path::new(&scene)))();
    assert_eq!(newer.status, 200);
    let older = older.join().unwrap();
    assert_eq!(
        older.status,
        409,
        "{}",
        String::from_utf8_lossy(&older.body)
    );
    assert_eq!(older.json()["superseded"], true);
}

#[test]
fn spectrum_equals_lamella_spectrum() {
    let scene = scene_arg("quarter_wave_mirror.json");
    let server = Served::start(Path::new(BIN), &[&scene]);
    let r = server.post(
        "/api/spectrum",
        &json!({"scene": document(Path::new(&scene))}),
    );
    assert_eq!(r.status, 200);
    assert_eq!(r.header("content-type"), Some("application/json"));
    let (code, cli, _) = lamella(&["spectrum", &scene, "--format", "json"]);
    assert_eq!(code, Some(0));
    assert_eq!(String::from_utf8(r.body).unwrap(), cli);
}

#[test]
fn coating_geometries_equal_lamella_multiangle() {
    let scene = scene_arg("pearl_compact_lid.json");
    let server = Served::start(Path::new(BIN), &[&scene]);
    let mut live = server
        .post("/api/live", &json!({"scene": document(Path::new(&scene))}))
        .json();
    let coating = live["coating"].as_object_mut().unwrap();
    let ab = coating.remove("ab").unwrap();
    assert!(ab["svg"].as_str().unwrap().contains("<svg"));
    assert_eq!(
        Value::Object(coating.clone()),
        cli_json(&["multiangle", &scene, "--format", "json"])
    );
    assert!(!live["variables"].as_array().unwrap().is_empty());
}

fn finished_match(server: &Served, body: &Value) -> Value {
    let started = server.post("/api/match", body);
    assert_eq!(
        started.status,
        200,
        "{}",
        String::from_utf8_lossy(&started.body)
    );
    let id = started.json()["job"].as_u64().unwrap();
    loop {
        let s = server.call("GET", &format!("/api/match/{id}"), b"").json();
        if s["state"] != "running" {
            return s;
        }
        std::thread::sleep(std::time::Duration::from_millis(50));
    }
}

#[test]
fn match_equals_lamella_match_and_cancels() {
    let dir = scratch("match");
    let scene = root()
        .join("bench/design_5layer.json")
        .display()
        .to_string();
    let server = Served::start(Path::new(BIN), &[&scene]);
    let doc = document(Path::new(&scene));
    let body = json!({"scene": doc, "target": {"lab": "60,20,-30"}, "angle": 15,
                      "max_evals": 400, "seed": 7});
    let done = finished_match(&server, &body);
    assert_eq!(done["state"], "done", "{done}");
    let out = dir.join("matched.json");
    let (code, stdout, stderr) = lamella(&[
        "match",
        &scene,
        "--target-lab",
        "60,20,-30",
        "--angle",
        "15",
        "--max-evals",
        "400",
        "--seed",
        "7",
        "--out-scene",
        out.to_str().unwrap(),
    ]);
    assert!(matches!(code, Some(0 | 3)), "{stderr}");
    let mut cli: Value = serde_json::from_str(&stdout).unwrap();
    let cli = cli.as_object_mut().unwrap();
    for key in ["scene", "out_scene", "wall_time_s"] {
        cli.remove(key);
    }
    assert_eq!(done["report"], Value::Object(cli.clone()));
    assert_eq!(done["scene"], document(&out));
    // A long search, cancelled: it stops and says so.
    let body = json!({"scene": doc, "target": {"hex": "#3366CC"}, "max_evals": 60000});
    let id = server.post("/api/match", &body).json()["job"]
        .as_u64()
        .unwrap();
    let busy = server.post("/api/match", &body);
    assert_eq!(busy.status, 409, "one match at a time");
    assert_eq!(
        server
            .call("POST", &format!("/api/match/{id}/cancel"), b"{}")
            .status,
        200
    );
    let state = loop {
        let s = server.call("GET", &format!("/api/match/{id}"), b"").json();
        if s["state"] != "running" && s["state"] != "cancelling" {
            break s;
        }
        std::thread::sleep(std::time::Duration::from_millis(20));
    };
    assert_eq!(state["state"], "cancelled", "{state}");
    assert!(state["evaluations"].as_u64().unwrap() < 60000);
    std::fs::remove_dir_all(&dir).unwrap();
}

#[test]
fn charts_render_report_and_page() {
    let scene = scene_arg("teal_label_foil.json");
    let server = Served::start(Path::new(BIN), &[&scene]);
    let doc = document(Path::new(&scene));
    let r = server.post(
        "/api/spectra-chart",
        &json!({"scene": doc, "angles": [0, 45]}),
    );
    assert!(r.json()["svg"].as_str().unwrap().contains("<svg"));
    let r = server.post("/api/render", &json!({"scene": doc, "size": "64x48"}));
    assert_eq!(r.status, 200);
    assert_eq!(r.header("content-type"), Some("image/png"));
    assert!(r.body.starts_with(b"\x89PNG"));
    let r = server.post("/api/report", &json!({"scene": doc}));
    assert_eq!(r.status, 200);
    let html = String::from_utf8(r.body).unwrap();
    assert!(html.contains("Quillon Tea label foil") && html.contains("<svg"));
    let session = server.call("GET", "/api/session", b"").json();
    assert_eq!(session["scene"], doc);
    assert_eq!(session["can_save"], true);
    // The page itself needs no token (it holds none), only the right Host.
    let host = server.host();
    let page = server.raw("GET", "/", &[("Host", &host)], b"");
    assert_eq!(page.status, 200);
    assert!(String::from_utf8(page.body).unwrap().contains("app.js"));
    for asset in ["/app.js", "/style.css"] {
        assert_eq!(
            server.raw("GET", asset, &[("Host", &host)], b"").status,
            200
        );
    }
}

#[test]
fn save_writes_scene_atomically_and_only_when_asked() {
    let dir = scratch("save");
    let path = dir.join("scene.json");
    std::fs::copy(root().join("scenes/teal_label_foil.json"), &path).unwrap();
    let server = Served::start(Path::new(BIN), &[path.to_str().unwrap()]);
    let mut doc = document(&path);
    doc["stack"][0]["stack"][0]["thickness_nm"] = json!(161.5);
    server.post("/api/live", &json!({"scene": doc}));
    assert_ne!(document(&path), doc, "nothing is written before Save");
    let r = server.post("/api/save", &json!({"scene": doc}));
    assert_eq!(r.status, 200);
    assert_eq!(document(&path), doc);
    let files: Vec<_> = std::fs::read_dir(&dir).unwrap().flatten().collect();
    assert_eq!(files.len(), 1, "no temporary file left behind");
    // An invalid design is refused and the file kept.
    doc["stack"][0]["stack"][0]["thickness_nm"] = json!(-5);
    assert_eq!(server.post("/api/save", &json!({"scene": doc})).status, 400);
    assert_eq!(
        document(&path)["stack"][0]["stack"][0]["thickness_nm"],
        161.5
    );
    drop(server);
    // Without SCENE there is nothing to save over.
    let starter = Served::start(Path::new(BIN), &[]);
    let session = starter.call("GET", "/api/session", b"").json();
    assert_eq!(session["can_save"], false);
    let r = starter.post("/api/save", &json!({"scene": session["scene"]}));
    assert_eq!(r.status, 400);
    assert!(r.json()["error"].as_str().unwrap().contains("download"));
    std::fs::remove_dir_all(&dir).unwrap();
}

#[test]
fn errors_carry_the_cli_message() {
    let dir = scratch("errors");
    let path = dir.join("scene.json");
    std::fs::copy(root().join("scenes/teal_label_foil.json"), &path).unwrap();
    let server = Served::start(Path::new(BIN), &[path.to_str().unwrap()]);
    let mut doc = document(&path);
    doc["stack"][1]["thickness_nm"] = json!(-5);
    let r = server.post("/api/live", &json!({"scene": doc}));
    assert_eq!(r.status, 400);
    let message = r.json()["error"].as_str().unwrap().to_owned();
    std::fs::write(&path, doc.to_string()).unwrap();
    let (code, _, stderr) = lamella(&["color", path.to_str().unwrap()]);
    assert_eq!(code, Some(2));
    assert_eq!(stderr.trim_end(), format!("lamella: {message}"));
    assert!(message.contains("stack[1].thickness_nm = -5"), "{message}");
    // Flags' values by the flags' names.
    std::fs::copy(root().join("scenes/teal_label_foil.json"), &path).unwrap();
    let doc = document(&path);
    let r = server.post(
        "/api/live",
        &json!({"scene": doc, "view": {"side": "sideways"}}),
    );
    assert_eq!(r.status, 400);
    assert!(
        r.json()["error"]
            .as_str()
            .unwrap()
            .contains("side = sideways")
    );
    let r = server.post(
        "/api/live",
        &json!({"scene": doc, "view": {"illuminant": "booth.csv"}}),
    );
    assert_eq!(r.status, 400);
    let r = server.call("POST", "/api/live", b"{not json");
    assert_eq!(r.status, 400);
    assert!(
        r.json()["error"]
            .as_str()
            .unwrap()
            .starts_with("request body")
    );
    std::fs::remove_dir_all(&dir).unwrap();
}

#[test]
fn guards_refuse_token_host_origin_and_size() {
    let scene = scene_arg("teal_label_foil.json");
    let server = Served::start(Path::new(BIN), &[&scene]);
    let host = server.host();
    let body = json!({"scene": document(Path::new(&scene))}).to_string();
    let token = server.token.clone();
    let no_token = server.raw("POST", "/api/live", &[("Host", &host)], body.as_bytes());
    assert_eq!(no_token.status, 401);
    assert!(no_token.json()["error"].as_str().unwrap().contains("token"));
    let wrong = server.raw(
        "POST",
        "/api/live",
        &[("Host", &host), ("x-lamella-token", "0123")],
        body.as_bytes(),
    );
    assert_eq!(wrong.status, 401);
    assert_eq!(
        server
            .raw("GET", "/api/session", &[("Host", &host)], b"")
            .status,
        401
    );
    // Another web page driving the server from the user's browser.
    let foreign = server.raw(
        "POST",
        "/api/live",
        &[
            ("Host", &host),
            ("x-lamella-token", &token),
            ("Origin", "http://example.com"),
        ],
        body.as_bytes(),
    );
    assert_eq!(foreign.status, 403);
    assert!(foreign.json()["error"].as_str().unwrap().contains("Origin"));
    let own = format!("http://{host}");
    let ok = server.raw(
        "POST",
        "/api/live",
        &[
            ("Host", &host),
            ("x-lamella-token", &token),
            ("Origin", &own),
        ],
        body.as_bytes(),
    );
    assert_eq!(ok.status, 200);
    // DNS rebinding: a name resolving to 127.0.0.1 carries its own Host.
    let port = server.port.to_string();
    let rebound = format!("attacker.example:{port}");
    for h in [rebound.as_str(), "127.0.0.1", "localhost:1"] {
        let r = server.raw("GET", "/", &[("Host", h)], b"");
        assert_eq!(r.status, 403, "Host {h}");
        let r = server.raw(
            "GET",
            "/api/session",
            &[("Host", h), ("x-lamella-token", &token)],
            b"",
        );
        assert_eq!(r.status, 403, "Host {h}");
    }
    assert_eq!(
        server
            .raw("GET", "/", &[("Host", &format!("localhost:{port}"))], b"")
            .status,
        200
    );
    // Oversize body.
    let big = vec![b' '; 3 << 20];
    let r = server.call("POST", "/api/live", &big);
    assert_eq!(r.status, 413);
    assert!(
        r.json()["error"]
            .as_str()
            .unwrap()
            .starts_with("request body: larger than")
    );
}

#[test]
fn work_per_request_is_bounded() {
    let scene = scene_arg("teal_label_foil.json");
    let server = Served::start(Path::new(BIN), &[&scene]);
    let doc = document(Path::new(&scene));
    let mut fine = doc.clone();
    fine["wavelengths_nm"] = json!({"from": 380, "to": 780, "step": 0.001});
    let r = server.post("/api/live", &json!({"scene": fine}));
    assert_eq!(r.status, 400);
    let e = r.json()["error"].as_str().unwrap().to_owned();
    assert!(e.contains("wavelengths_nm") && e.contains(&scene), "{e}");
    let r = server.post("/api/live", &json!({"scene": doc, "strip_width": 100000}));
    assert_eq!(r.status, 400);
    assert!(
        r.json()["error"]
            .as_str()
            .unwrap()
            .contains("strip_width = 100000")
    );
    let r = server.post("/api/render", &json!({"scene": doc, "size": "4000x4000"}));
    assert_eq!(r.status, 400);
    assert!(
        r.json()["error"]
            .as_str()
            .unwrap()
            .contains("size = 4000x4000")
    );
    let r = server.post(
        "/api/match",
        &json!({"scene": doc, "target": {"hex": "#336699"}, "max_evals": 10_000_000}),
    );
    assert_eq!(r.status, 400);
    assert!(r.json()["error"].as_str().unwrap().contains("max_evals"));
    let r = server.post(
        "/api/spectra-chart",
        &json!({"scene": doc, "angles": [0, 10, 20, 30, 40, 50, 60]}),
    );
    assert_eq!(r.status, 400);
}

#[test]
fn scene_files_are_read_only_inside_the_scene_folder() {
    let dir = scratch("files");
    let inside = dir.join("designs");
    std::fs::create_dir_all(inside.join("tables")).unwrap();
    let nk = "wavelength_nm,n,k\n300,1.5,0\n900,1.5,0\n";
    std::fs::write(inside.join("tables/film.csv"), nk).unwrap();
    std::fs::write(dir.join("secret.csv"), nk).unwrap();
    std::os::unix::fs::symlink(dir.join("secret.csv"), inside.join("link.csv")).unwrap();
    let scene = |csv: &str| {
        json!({"materials": {"film": {"table": csv}}, "stack": [{"material": "film", "thickness_nm": 100}],
               "substrate": "glass", "wavelengths_nm": {"from": 400, "to": 700, "step": 10},
               "angles_deg": {"from": 0, "to": 30, "step": 30}})
    };
    let path = inside.join("scene.json");
    std::fs::write(&path, scene("tables/film.csv").to_string()).unwrap();
    let server = Served::start(Path::new(BIN), &[path.to_str().unwrap()]);
    assert_eq!(
        server
            .post("/api/live", &json!({"scene": scene("tables/film.csv")}))
            .status,
        200
    );
    assert_eq!(
        server
            .post("/api/live", &json!({"scene": scene("./tables/film.csv")}))
            .status,
        200
    );
    let secret = dir.join("secret.csv").display().to_string();
    for escape in [
        "../secret.csv",
        secret.as_str(),
        "link.csv",
        "tables/../../secret.csv",
    ] {
        let r = server.post("/api/live", &json!({"scene": scene(escape)}));
        assert_eq!(r.status, 400, "{escape}");
        let e = r.json()["error"].as_str().unwrap().to_owned();
        assert!(
            e.contains("scene's folder") && e.contains(escape),
            "{escape}: {e}"
        );
    }
    drop(server);
    // Without SCENE no file is read at all.
    let starter = Served::start(Path::new(BIN), &[]);
    let r = starter.post("/api/live", &json!({"scene": scene("tables/film.csv")}));
    assert_eq!(r.status, 400);
    std::fs::remove_dir_all(&dir).unwrap();
}

#[test]
fn remote_addresses_need_allow_remote() {
    let (code, _, stderr) = lamella(&["serve", "--host", "0.0.0.0", "--port", "0"]);
    assert_eq!(code, Some(2));
    assert!(stderr.contains("--allow-remote"), "{stderr}");
}

#[test]
fn every_address_with_allow_remote_warns_and_still_needs_the_token() {
    let mut child = Command::new(BIN)
        .args([
            "serve",
            "--host",
            "0.0.0.0",
            "--allow-remote",
            "--port",
            "0",
        ])
        .stdout(std::process::Stdio::piped())
        .stderr(std::process::Stdio::piped())
        .spawn()
        .unwrap();
    use std::io::{BufRead, Read};
    let mut line = String::new();
    std::io::BufReader::new(child.stdout.take().unwrap())
        .read_line(&mut line)
        .unwrap();
    assert!(line.contains("http://0.0.0.0:"), "{line}");
    let port = line
        .split("0.0.0.0:")
        .nth(1)
        .unwrap()
        .split('/')
        .next()
        .unwrap()
        .to_owned();
    let ask = |headers: &str| {
        let mut s =
            std::net::TcpStream::connect(("127.0.0.1", port.parse::<u16>().unwrap())).unwrap();
        use std::io::Write;
        write!(
            s,
            "GET /api/session HTTP/1.1\r\n{headers}Connection: close\r\n\r\n"
        )
        .unwrap();
        let mut reply = String::new();
        let _ = s.read_to_string(&mut reply);
        reply
    };
    let token = line.split("#token=").nth(1).unwrap().trim().to_owned();
    let name = format!("Host: designer.lan:{port}\r\n");
    assert!(ask(&format!("{name}x-lamella-token: {token}\r\n")).starts_with("HTTP/1.1 200"));
    assert!(ask(&name).starts_with("HTTP/1.1 401"));
    let foreign = format!("{name}Origin: http://example.com\r\nx-lamella-token: {token}\r\n");
    assert!(ask(&foreign).starts_with("HTTP/1.1 403"));
    let _ = child.kill();
    let _ = child.wait();
    let mut stderr = String::new();
    child
        .stderr
        .take()
        .unwrap()
        .read_to_string(&mut stderr)
        .unwrap();
    assert!(
        stderr.contains("warning") && stderr.contains("reachable from other machines"),
        "{stderr}"
    );
}

#[test]
fn ctrl_c_stops_the_server_with_exit_code_130() {
    let mut child = Command::new(BIN)
        .args(["serve", "--port", "0"])
        .stdout(std::process::Stdio::piped())
        .stderr(std::process::Stdio::null())
        .spawn()
        .unwrap();
    let mut line = String::new();
    std::io::BufRead::read_line(
        &mut std::io::BufReader::new(child.stdout.take().unwrap()),
        &mut line,
    )
    .unwrap();
    assert!(line.contains("http://127.0.0.1:"), "{line}");
    let sent = Command::new("kill")
        .args(["-INT", &child.id().to_string()])
        .status()
        .unwrap();
    assert!(sent.success());
    assert_eq!(child.wait().unwrap().code(), Some(130));
}
