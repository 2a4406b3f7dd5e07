//! Every `lamella …` command shown in the README's shell blocks and in the
//! worked examples of `--help` runs as written, from a folder holding the
//! repository's shipped files, and exits 0 (or 3 for a `compare` outside
//! its tolerance or a `match` whose target is not reached, which the README
//! documents); `lamella serve`, which runs until stopped, serves its page
//! at the address it prints. Every subcommand's help
//! opens with what it does and ends with an example.

use std::path::Path;
use std::process::Command;

/// The README's shell commands, continuation lines joined, in order.
fn commands() -> Vec<String> {
    let readme = include_str!("../README.md");
    let mut out = Vec::new();
    let mut in_block = false;
    let mut pending = String::new();
    for line in readme.lines() {
        if line.trim_start().starts_with("```") {
            in_block = line.trim() == "```sh";
            continue;
        }
        if !in_block {
            continue;
        }
        let line = line.trim();
        if let Some(head) = line.strip_suffix('\\') {
            pending.push_str(head);
            continue;
        }
        pending.push_str(line);
        let command = std::mem::take(&mut pending);
        // Scheduler scripts (shell variables) show a recipe, not a command.
        if command.starts_with("lamella ") && !command.contains('$') {
            out.push(command);
        }
    }
    out
}

/// Splits a command line on spaces, honouring single quotes.
fn words(command: &str) -> Vec<String> {
    let mut out = Vec::new();
    let (mut word, mut quoted) = (String::new(), false);
    for ch in command.chars() {
        match ch {
            '\'' => quoted = !quoted,
            ' ' if !quoted => {
                if !word.is_empty() {
                    out.push(std::mem::take(&mut word));
                }
            }
            _ => word.push(ch),
        }
    }
    if !word.is_empty() {
        out.push(word);
    }
    out
}

/// The subcommands `lamella --help` lists.
fn subcommands() -> Vec<String> {
    let help = run_lamella(&["--help"]);
    help.lines()
        .skip_while(|l| !l.starts_with("Commands:"))
        .skip(1)
        .take_while(|l| l.starts_with("  "))
        .filter_map(|l| l.split_whitespace().next())
        .filter(|&c| c != "help")
        .map(str::to_owned)
        .collect()
}

fn run_lamella(args: &[&str]) -> String {
    let out = Command::new(env!("CARGO_BIN_EXE_lamella"))
        .args(args)
        .output()
        .unwrap();
    assert!(out.status.success(), "{args:?}");
    String::from_utf8(out.stdout).unwrap()
}

/// Runs `commands` from a scratch folder linked to the shipped files.
fn run_all(commands: &[String], label: &str) {
    let root = Path::new(env!("CARGO_MANIFEST_DIR"));
    let dir = std::env::temp_dir().join(format!("lamella-{label}-{}", std::process::id()));
    std::fs::create_dir_all(&dir).unwrap();
    for shipped in ["scenes", "bench", "tests"] {
        let link = dir.join(shipped);
        if !link.exists() {
            std::os::unix::fs::symlink(root.join(shipped), link).unwrap();
        }
    }
    for command in commands {
        let args = words(command);
        if args[1] == "serve" {
            serves(&args, &dir, command);
            continue;
        }
        let out = Command::new(env!("CARGO_BIN_EXE_lamella"))
            .args(&args[1..])
            .current_dir(&dir)
            .output()
            .unwrap();
        let code = out.status.code();
        let reported = matches!(args[1].as_str(), "match" | "compare") && code == Some(3);
        assert!(
            code == Some(0) || reported,
            "`{command}` exited {code:?}: {}",
            String::from_utf8_lossy(&out.stderr)
        );
    }
    std::fs::remove_dir_all(&dir).unwrap();
}

/// `lamella serve` runs until stopped: it must print the page's address,
/// answer the page there, and is then stopped.
fn serves(args: &[String], dir: &Path, command: &str) {
    use std::io::{BufRead, Read, Write};
    // A busy default port on the test machine must not fail the test.
    let port: &[&str] = if args.iter().any(|a| a == "--port") {
        &[]
    } else {
        &["--port", "0"]
    };
    let mut child = Command::new(env!("CARGO_BIN_EXE_lamella"))
        .args(&args[1..])
        .args(port)
        .current_dir(dir)
        .stdout(std::process::Stdio::piped())
        .stderr(std::process::Stdio::null())
        .spawn()
        .unwrap();
    let mut line = String::new();
    std::io::BufReader::new(child.stdout.take().unwrap())
        .read_line(&mut line)
        .unwrap();
    let address = line
        .split_whitespace()
        .find_map(|w| w.strip_prefix("http://"))
        .and_then(|w| w.split_once('/'))
        .map(|(host, _)| host.to_owned());
    let page = address.as_ref().map(|host| {
        let mut s = std::net::TcpStream::connect(host).unwrap();
        write!(
            s,
            "GET / HTTP/1.1\r\nHost: {host}\r\nConnection: close\r\n\r\n"
        )
        .unwrap();
        let mut reply = String::new();
        let _ = s.read_to_string(&mut reply);
        reply
    });
    let _ = child.kill();
    let _ = child.wait();
    assert!(
        page.is_some_and(|p| p.starts_with("HTTP/1.1 200")),
        "`{command}` did not serve its page: {line:?}"
    );
}

#[test]
fn every_readme_command_runs_as_written() {
    let commands = commands();
    assert!(commands.len() >= 10, "{commands:?}");
    run_all(&commands, "readme");
}

#[test]
fn every_help_opens_with_what_it_does_and_its_example_runs() {
    let top = run_lamella(&["--help"]);
    assert!(top.contains("Exit codes") && top.contains("143"), "{top}");
    let names = subcommands();
    assert!(names.len() >= 11, "{names:?}");
    let mut examples = Vec::new();
    for name in &names {
        let help = run_lamella(&[name, "--help"]);
        let first = help.lines().next().unwrap_or("");
        assert!(
            !first.starts_with("Flags") && first.split_whitespace().count() >= 4,
            "`lamella {name} --help` opens with {first:?}"
        );
        let tail: Vec<&str> = help
            .lines()
            .rev()
            .take_while(|l| l.starts_with("  lamella "))
            .collect();
        assert!(
            !tail.is_empty()
                && tail
                    .iter()
                    .all(|l| l.trim().starts_with(&format!("lamella {name}"))),
            "`lamella {name} --help` does not end with an example of itself"
        );
        examples.extend(tail.iter().map(|l| l.trim().to_owned()));
    }
    run_all(&examples, "help");
}
