//! The command line driven in process with fuzzed tokens: what `lamella`
//! promises for any argument list. Clap's own refusals exit 2 (help and
//! version 0); arguments that parse run the command against small fixture
//! files, and it either succeeds, writing no NaN or infinity, or fails with
//! exit code 1 or 2 and a one-line message. Never a panic.
//!
//! Shared by the `cli` fuzz target and `tests/fuzz_cli.rs`. The includer
//! declares the binary's `cli` module at its crate root.
//!
//! Sandbox: commands run with a scratch folder as the current directory, and
//! an argument list is only run when no token holds `/`, `\` or `..`, so
//! every file a command writes lands in the scratch folder. A token `@name`
//! stands for the absolute path of fixture `name` (see [`FIXTURES`]), which
//! is restored after every run in case a command wrote over it.

use std::ffi::OsString;
use std::os::unix::ffi::OsStringExt;
use std::path::{Path, PathBuf};

use clap::{CommandFactory, Parser};

use crate::cli::args::{self, Args, Command};

/// Fixture files: placeholder, file name, content.
pub const FIXTURES: &[(&str, &str, &str)] = &[
    ("@film", "film.json", include_str!("fixtures/film.json")),
    (
        "@coating",
        "coating.json",
        include_str!("fixtures/coating.json"),
    ),
    (
        "@preview",
        "preview.json",
        include_str!("fixtures/preview.json"),
    ),
    (
        "@measured_geometry",
        "measured_geometry.csv",
        include_str!("fixtures/measured_geometry.csv"),
    ),
    (
        "@measured",
        "measured.csv",
        include_str!("fixtures/measured.csv"),
    ),
    ("@light", "light.csv", include_str!("fixtures/light.csv")),
    ("@nk", "nk.csv", include_str!("fixtures/nk.csv")),
    ("@cube", "cube.obj", include_str!("fixtures/cube.obj")),
];

/// Values worth trying for any flag, beside the names clap knows.
pub const VALUES: &[&str] = &[
    "0",
    "1",
    "2",
    "-1",
    "7",
    "100",
    "0.5",
    "-0",
    "1e308",
    "-1e308",
    "1e-320",
    "nan",
    "NaN",
    "inf",
    "-inf",
    "18446744073709551616",
    "4294967296",
    "65536",
    "",
    " ",
    ",",
    "x",
    "45as15",
    "45as-15",
    "45as110",
    "15as80",
    "45as200",
    "45",
    "15",
    "45as15,45as110",
    "1200x800",
    "320x320",
    "8x8",
    "0x0",
    "99999x2",
    "16384x16384",
    "sky",
    "sky,intensity=0.6",
    "area,azimuth_deg=-35,elevation_deg=30,size_deg=24,intensity=1.2",
    "directional,azimuth_deg=10,elevation_deg=20,illuminant=A",
    "sphere",
    "torus",
    "sheet",
    "mesh:@cube",
    "black",
    "white",
    "#3366CC",
    "#fff",
    "50,10,-20",
    "50,nan,0",
    "30:50,10,-20",
    "45as15:40,5,20",
    "0.8,1.2",
    "1.2,0.8",
    "60,200",
    "1/2",
    "2/2",
    "0/1",
    "3/2",
    "D65",
    "A",
    "F11",
    "LED-B1",
    "CIE1931_2",
    "CIE1964_10",
    "on",
    "off",
    "out.png",
    "out.svg",
    "out.csv",
    "out.json",
    "report",
    "--",
    "-",
];

/// Outputs the commands would print are written to this file instead, so
/// that a test run's terminal stays clean.
const STDOUT_FILE: &str = "stdout.txt";

/// JSON keys whose value may be `null` by design.
const NULLABLE: &[&str] = &[
    "flop_index",
    "flop_note",
    "hue_travel_deg",
    "scale",
    "delta_e00_per_sigma_index",
];

/// The scratch folders of a run.
pub struct Sandbox {
    fixtures: PathBuf,
    work: PathBuf,
}

impl Sandbox {
    /// Writes the fixtures under `root` and makes `root/work` the current
    /// directory of the process.
    pub fn new(root: &Path) -> Sandbox {
        let sandbox = Sandbox {
            fixtures: root.join("fixtures"),
            work: root.join("work"),
        };
        std::fs::create_dir_all(&sandbox.fixtures).expect("fixture folder");
        std::fs::create_dir_all(&sandbox.work).expect("work folder");
        sandbox.restore();
        std::env::set_current_dir(&sandbox.work).expect("enter the work folder");
        sandbox
    }

    /// The fixtures exactly as shipped: extra files removed, changed ones rewritten.
    fn restore(&self) {
        for entry in std::fs::read_dir(&self.fixtures)
            .expect("fixture folder")
            .flatten()
        {
            let name = entry.file_name();
            if !FIXTURES.iter().any(|(_, file, _)| name == *file) {
                remove(&entry.path());
            }
        }
        for (_, file, text) in FIXTURES {
            let path = self.fixtures.join(file);
            if std::fs::read(&path).ok().as_deref() != Some(text.as_bytes()) {
                remove(&path);
                std::fs::write(&path, text).expect("write a fixture");
            }
        }
    }

    /// Empties the work folder.
    fn clear(&self) {
        for entry in std::fs::read_dir(&self.work)
            .expect("work folder")
            .flatten()
        {
            remove(&entry.path());
        }
    }

    /// The token with every placeholder replaced by its fixture's path.
    fn substitute(&self, token: &[u8]) -> OsString {
        let mut bytes = token.to_vec();
        for (placeholder, file, _) in FIXTURES {
            let path = self.fixtures.join(file);
            let path = path.as_os_str().as_encoded_bytes();
            bytes = replace(&bytes, placeholder.as_bytes(), path);
        }
        OsString::from_vec(bytes)
    }
}

fn remove(path: &Path) {
    let _ = std::fs::remove_dir_all(path).or_else(|_| std::fs::remove_file(path));
}

fn replace(haystack: &[u8], needle: &[u8], with: &[u8]) -> Vec<u8> {
    let mut out = Vec::with_capacity(haystack.len());
    let mut i = 0;
    while i < haystack.len() {
        if haystack[i..].starts_with(needle) {
            out.extend_from_slice(with);
            i += needle.len();
        } else {
            out.push(haystack[i]);
            i += 1;
        }
    }
    out
}

/// A fuzz input as tokens: one per line, at most 40.
pub fn tokens(input: &[u8]) -> Vec<Vec<u8>> {
    input
        .split(|&b| b == b'\n')
        .take(40)
        .map(<[u8]>::to_vec)
        .collect()
}

/// The tokens as a command line, for messages.
pub fn show(tokens: &[Vec<u8>]) -> String {
    let words: Vec<_> = tokens.iter().map(|t| String::from_utf8_lossy(t)).collect();
    format!("{:?}", words.join(" "))
}

/// What an argument list did.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Outcome {
    /// Clap refused it or printed help or version, with this exit code.
    Parsed(u8),
    /// It parsed but could reach outside the sandbox, or the command reads
    /// no input (`materials`), so it was not run.
    NotRun,
    /// The command ran, with this exit code.
    Ran(u8),
}

/// Parses `tokens` as `lamella`'s arguments and, when they parse, runs the
/// command in the sandbox, checking every promise of the command line.
pub fn check_cli(sandbox: &Sandbox, tokens: &[Vec<u8>]) -> Outcome {
    let contained = tokens
        .iter()
        .all(|t| !t.contains(&b'/') && !t.contains(&b'\\') && !t.windows(2).any(|w| w == b".."));
    let argv = std::iter::once(OsString::from("lamella"))
        .chain(tokens.iter().map(|t| sandbox.substitute(t)));
    let mut parsed = match Args::try_parse_from(argv) {
        Ok(a) => a,
        Err(e) => {
            assert!(
                !e.render().to_string().trim().is_empty(),
                "empty clap message"
            );
            return Outcome::Parsed(if e.use_stderr() { 2 } else { 0 });
        }
    };
    if !contained || !bound(&mut parsed.command) {
        return Outcome::NotRun;
    }
    sandbox.clear();
    let result = args::run(parsed);
    sandbox.restore();
    match result {
        Ok(()) => {
            check_outputs(&sandbox.work, tokens);
            Outcome::Ran(0)
        }
        Err(f) => {
            // 3: `match` ran but did not reach its target, or `compare` found
            // a point outside its tolerance; their outputs are written all
            // the same.
            let first = tokens.first().map(Vec::as_slice);
            let unreached = f.code == 3 && (first == Some(b"match") || first == Some(b"compare"));
            if unreached {
                check_outputs(&sandbox.work, tokens);
            }
            assert!(
                f.code == 1 || f.code == 2 || unreached,
                "exit code {} for {}",
                f.code,
                show(tokens)
            );
            let message = &f.message;
            assert!(
                !message.trim().is_empty() && lamella::error::one_line(message) == *message,
                "not one line: {message:?} for {}",
                show(tokens)
            );
            Outcome::Ran(f.code)
        }
    }
}

/// Keeps a run short (small budgets, sizes and counts; the checks of the
/// values themselves have already happened or do not depend on the size)
/// and sends stdout to a file. False for commands not worth running.
fn bound(command: &mut Command) -> bool {
    let to_file = |o: &mut Option<PathBuf>| {
        o.get_or_insert_with(|| STDOUT_FILE.into());
    };
    let small_chart = |size: &mut (u32, u32)| {
        if size.0 as u64 * size.1 as u64 > 320 * 320 {
            *size = (320, 320);
        }
    };
    match command {
        Command::Spectrum { output, .. }
        | Command::Color { output, .. }
        | Command::Multiangle { output, .. } => to_file(output),
        Command::Field(a) => {
            a.points = a.points.min(2000);
            to_file(&mut a.output);
        }
        Command::Bands(a) => to_file(&mut a.output),
        Command::Match(a) => {
            a.max_evals = a.max_evals.min(60);
            to_file(&mut a.output);
        }
        Command::Tolerance(a) => {
            a.samples = a.samples.min(16);
            to_file(&mut a.output);
        }
        Command::Fit(a) => {
            a.max_evals = a.max_evals.min(60);
            to_file(&mut a.output);
            if a.chart.is_some() {
                small_chart(a.chart_size.get_or_insert((320, 320)));
            }
        }
        Command::Sweep(a) => {
            a.samples = a.samples.map(|n| n.min(16));
            a.grid = a.grid.map(|k| k.min(4));
            to_file(&mut a.output);
        }
        Command::Render(a) => {
            let large = match &a.size {
                None => true,
                Some(s) => lamella::raster::parse_size(s, lamella::render::SIZE_LIMITS)
                    .is_ok_and(|(w, h)| w * h > 24 * 24),
            };
            if large {
                a.size = Some("24x16".into());
            }
            a.ssaa = a
                .ssaa
                .map(|n| if (1..=8).contains(&n) { n.min(2) } else { n });
            a.turntable = a.turntable.map(|n| n.min(2));
        }
        Command::Materials(a) => to_file(&mut a.output),
        Command::Chart(a) => {
            small_chart(&mut a.size);
            a.steps = Some(a.steps.unwrap_or(3).min(3));
        }
        Command::Report(a) => small_chart(&mut a.size),
        Command::Compare(a) => to_file(&mut a.output),
        // Serves until stopped: driven by tests/serve.rs instead.
        Command::Serve(_) => return false,
    }
    true
}

/// Every text file a successful command wrote: no NaN or infinity, and in
/// JSON no `null` outside the keys that may hold one.
fn check_outputs(dir: &Path, tokens: &[Vec<u8>]) {
    for entry in std::fs::read_dir(dir).expect("work folder").flatten() {
        let path = entry.path();
        if path.is_dir() {
            check_outputs(&path, tokens);
            continue;
        }
        let Ok(text) = std::fs::read_to_string(&path) else {
            continue; // PNG
        };
        let words = text.split(|c: char| !c.is_ascii_alphanumeric());
        for w in words {
            assert!(
                !matches!(w, "NaN" | "nan" | "inf" | "Inf" | "infinity" | "Infinity"),
                "{} holds {w} after {}",
                path.display(),
                show(tokens)
            );
        }
        let json = text.trim_start().starts_with(['{', '[']);
        let values: Vec<serde_json::Value> = if json {
            serde_json::from_str(&text).into_iter().collect()
        } else {
            // JSON lines (`sweep`).
            text.lines()
                .filter_map(|l| serde_json::from_str(l).ok())
                .collect()
        };
        for v in &values {
            check_nulls(v, "", &path, tokens);
        }
    }
}

fn check_nulls(v: &serde_json::Value, key: &str, path: &Path, tokens: &[Vec<u8>]) {
    match v {
        serde_json::Value::Null => assert!(
            NULLABLE.contains(&key),
            "{}: `{key}` is null after {}",
            path.display(),
            show(tokens)
        ),
        serde_json::Value::Array(items) => {
            items.iter().for_each(|x| check_nulls(x, key, path, tokens))
        }
        serde_json::Value::Object(map) => map
            .iter()
            .for_each(|(k, x)| check_nulls(x, k, path, tokens)),
        _ => {}
    }
}

/// Every subcommand name, flag and possible value clap knows, the
/// placeholders and [`VALUES`]: the dictionary of token mutations.
pub fn dictionary() -> Vec<String> {
    let mut command = Args::command();
    command.build();
    let mut words: Vec<String> = Vec::new();
    let mut add = |w: String| {
        if !words.contains(&w) {
            words.push(w);
        }
    };
    add("--help".into());
    add("--version".into());
    for sub in command.get_subcommands() {
        add(sub.get_name().to_string());
        for arg in sub.get_arguments() {
            if let Some(long) = arg.get_long() {
                add(format!("--{long}"));
            }
            if let Some(short) = arg.get_short() {
                add(format!("-{short}"));
            }
            for value in arg.get_possible_values() {
                add(value.get_name().to_string());
            }
        }
    }
    for (placeholder, _, _) in FIXTURES {
        add(placeholder.to_string());
    }
    for v in VALUES {
        add(v.to_string());
    }
    words
}
