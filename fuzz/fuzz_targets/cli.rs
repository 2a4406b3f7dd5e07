//! The command line in process: one token per line of the input, `@name`
//! for the fixture files (`tests/input_checks/command_line.rs`).
#![no_main]
// The binary's modules write `!(x > 0.0)` on purpose: it also rejects NaN.
#![allow(clippy::neg_cmp_op_on_partial_ord)]

#[path = "../../src/cli/mod.rs"]
mod cli;
#[allow(dead_code)]
#[path = "../../tests/input_checks/command_line.rs"]
mod command_line;

use std::sync::OnceLock;

use command_line::{Sandbox, check_cli, tokens};

static SANDBOX: OnceLock<Sandbox> = OnceLock::new();

libfuzzer_sys::fuzz_target!(|data: &[u8]| {
    let sandbox = SANDBOX.get_or_init(|| {
        let root = std::env::temp_dir().join(format!("lamella-fuzz-cli-{}", std::process::id()));
        Sandbox::new(&root)
    });
    check_cli(sandbox, &tokens(data));
});
