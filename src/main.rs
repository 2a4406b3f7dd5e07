//! `lamella`: the command-line front end of the structural-colour engine.

// `!(x > 0.0)` is written on purpose: it also rejects NaN.
#![allow(clippy::neg_cmp_op_on_partial_ord)]

mod cli;

use std::process::ExitCode;

use clap::Parser;

use cli::args::Args;

fn main() -> ExitCode {
    let args = match Args::try_parse() {
        Ok(a) => a,
        Err(e) => {
            let code = if e.use_stderr() { 2 } else { 0 };
            let _ = e.print();
            return ExitCode::from(code);
        }
    };
    // This thread joins the pool as worker 0, so a 2-core machine starts one
    // extra thread rather than two and never waits on a sleeping main thread.
    // The server keeps this thread for its event loop, so its pool gets
    // threads of its own.
    let serving = matches!(args.command, cli::args::Command::Serve(_));
    let pool = rayon::ThreadPoolBuilder::new();
    let _ = if serving {
        pool
    } else {
        pool.use_current_thread()
    }
    .build_global();
    let result = cli::args::run(args);
    match result {
        Ok(()) => ExitCode::SUCCESS,
        Err(f) => {
            eprintln!("lamella: {}", f.message);
            ExitCode::from(f.code)
        }
    }
}
