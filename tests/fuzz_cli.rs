//! The command line under seeded mutations of real command lines, in
//! process: every argument list exits 0, 1 or 2 (clap's refusals 2; 3 from
//! a `match` that misses its target), a failing command says why in one
//! line, and a successful one writes no NaN
//! or infinity. The same check runs under libFuzzer in `fuzz/` (see
//! `fuzz/README.md`); here a fixed seed and a bounded number of cases keep
//! it in CI. This file is its own test binary because the check moves the
//! process into a scratch folder.

// The binary's modules write `!(x > 0.0)` on purpose: it also rejects NaN.
#![allow(clippy::neg_cmp_op_on_partial_ord)]

#[path = "../src/cli/mod.rs"]
mod cli;
#[path = "input_checks/command_line.rs"]
mod command_line;
#[path = "input_checks/mutate.rs"]
mod mutate;

use std::cell::RefCell;
use std::path::Path;

use command_line::{Outcome, Sandbox, check_cli, dictionary, tokens};

const DICTIONARY_FILE: &str = "fuzz/cli.dict";

/// The libFuzzer dictionary: every word of [`dictionary`] as a token of its own.
fn dictionary_text() -> String {
    let mut text = String::from(
        "# Tokens of the `cli` fuzz target, one per line of its input.\n\
         # Generated: LAMELLA_WRITE_DICT=1 cargo test --release --test fuzz_cli\n",
    );
    for word in dictionary() {
        let escaped: String = word
            .bytes()
            .map(|b| match b {
                b'"' | b'\\' => format!("\\{}", b as char),
                b' '..=b'~' => (b as char).to_string(),
                _ => format!("\\x{b:02x}"),
            })
            .collect();
        text.push_str(&format!("\"\\x0a{escaped}\\x0a\"\n"));
    }
    text
}

#[test]
fn fuzz_dictionary_is_current() {
    let path = Path::new(env!("CARGO_MANIFEST_DIR")).join(DICTIONARY_FILE);
    let text = dictionary_text();
    if std::env::var_os("LAMELLA_WRITE_DICT").is_some() {
        std::fs::write(&path, &text).expect("write the dictionary");
    }
    let committed = std::fs::read_to_string(&path).unwrap_or_default();
    assert!(
        committed == text,
        "{DICTIONARY_FILE} is out of date with the flags: run \
         LAMELLA_WRITE_DICT=1 cargo test --release --test fuzz_cli"
    );
}

#[test]
fn mutated_command_lines_exit_0_1_or_2() {
    let root = Path::new(env!("CARGO_MANIFEST_DIR"));
    let mut paths: Vec<_> = std::fs::read_dir(root.join("fuzz/seeds/cli"))
        .expect("seed folder")
        .map(|e| e.expect("entry").path())
        .collect();
    paths.sort();
    let seeds: Vec<Vec<u8>> = paths.iter().map(|p| std::fs::read(p).unwrap()).collect();
    let words: Vec<String> = dictionary().iter().map(|w| format!("\n{w}\n")).collect();
    let fragments: Vec<&str> = words.iter().map(String::as_str).collect();

    let scratch = std::env::temp_dir().join(format!("lamella-fuzz-cli-{}", std::process::id()));
    let sandbox = Sandbox::new(&scratch);
    let outcomes = RefCell::new(Vec::new());
    let run = |input: &[u8]| {
        outcomes
            .borrow_mut()
            .push(check_cli(&sandbox, &tokens(input)))
    };
    seeds.iter().for_each(|s| run(s));
    let strategy = (0..seeds.len(), mutate::edits());
    mutate::runner(1500)
        .run(&strategy, |(i, edits)| {
            run(&mutate::apply(&seeds[i], &edits, &fragments));
            Ok(())
        })
        .unwrap();
    std::env::set_current_dir(root).unwrap();
    let _ = std::fs::remove_dir_all(&scratch);

    // The mix reaches the commands: some succeed, some refuse their input.
    let outcomes = outcomes.into_inner();
    let count = |o: Outcome| outcomes.iter().filter(|&&x| x == o).count();
    println!(
        "{} argument lists: clap refused {}, help or version {}, not run {}, ran: exit 0 {}, 1 {}, 2 {}",
        outcomes.len(),
        count(Outcome::Parsed(2)),
        count(Outcome::Parsed(0)),
        count(Outcome::NotRun),
        count(Outcome::Ran(0)),
        count(Outcome::Ran(1)),
        count(Outcome::Ran(2)),
    );
    for expected in [Outcome::Ran(0), Outcome::Ran(2), Outcome::Parsed(2)] {
        assert!(outcomes.contains(&expected), "never {expected:?}");
    }
}

/// The `cli` fuzz target compiles the binary's `cli` module inside the fuzz
/// crate, which is built only by `cargo fuzz`: every crate that module uses
/// must be a dependency there too, or the fuzz build breaks unnoticed.
#[test]
fn fuzz_crate_has_every_dependency_of_the_cli_module() {
    let root = Path::new(env!("CARGO_MANIFEST_DIR"));
    let manifest = |p: &str| std::fs::read_to_string(root.join(p)).unwrap();
    let dependencies = |text: &str| -> Vec<String> {
        text.split("[dependencies]")
            .nth(1)
            .unwrap_or("")
            .lines()
            .take_while(|l| !l.starts_with('['))
            .filter_map(|l| l.split_once('=').map(|(name, _)| name.trim().to_owned()))
            .filter(|name| !name.is_empty() && !name.starts_with('#'))
            .collect()
    };
    let fuzz = dependencies(&manifest("fuzz/Cargo.toml"));
    let mut sources = String::new();
    let mut folders = vec![root.join("src/cli")];
    while let Some(folder) = folders.pop() {
        for entry in std::fs::read_dir(folder).unwrap() {
            let path = entry.unwrap().path();
            if path.is_dir() {
                folders.push(path);
            } else if path.extension().is_some_and(|e| e == "rs") {
                sources.push_str(&std::fs::read_to_string(path).unwrap());
            }
        }
    }
    for name in dependencies(&manifest("Cargo.toml")) {
        let path = name.replace('-', "_");
        let needle = format!("{path}::");
        let used = sources.match_indices(&needle).any(|(i, _)| {
            let before = sources[..i].chars().next_back();
            !before.is_some_and(|c| c.is_alphanumeric() || c == '_' || c == ':')
        });
        assert!(
            !used || fuzz.contains(&name),
            "src/cli uses `{name}`; add it to fuzz/Cargo.toml's [dependencies]"
        );
    }
}
