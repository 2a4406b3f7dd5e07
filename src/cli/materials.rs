//! `lamella materials`: the built-in library with its sources.

use lamella::materials::library;

use super::{CliResult, write_out};

/// Lists the built-in materials as a table.
pub fn run() -> CliResult {
    let mut text = format!(
        "{:<15} {:<15} {:<13} {:>8} {:>8}  {}\n",
        "name", "model", "valid (nm)", "n@550", "k@550", "source"
    );
    for m in library::all() {
        let n = m
            .dispersion
            .index(550.0)
            .map(|n| (format!("{:.4}", n.re), format!("{:.4}", n.im)));
        let (n, k) = n.unwrap_or_else(|_| ("-".into(), "-".into()));
        let range = format!("{:.0}–{:.0}", m.valid_nm.0, m.valid_nm.1);
        text.push_str(&format!(
            "{:<15} {:<15} {:<13} {:>8} {:>8}  {}\n",
            m.name,
            m.dispersion.model_name(),
            range,
            n,
            k,
            m.source
        ));
    }
    write_out(None, &[text.into_bytes()])
}
