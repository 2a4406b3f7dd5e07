//! `lamella materials`: the built-in library with its sources, or one
//! material's n and k against wavelength.

use std::path::PathBuf;

use lamella::grid::Range;
use lamella::materials::{Material, library};
use serde_json::{Value, json};

use super::{CliResult, Failure, write_out};

/// Output format of `lamella materials`.
#[derive(Debug, Clone, Copy, clap::ValueEnum)]
pub enum Format {
    /// Aligned columns for reading.
    Table,
    /// Comma-separated rows with a header.
    Csv,
    /// JSON.
    Json,
}

/// Flags of `lamella materials` (the command is described in `cli::args`).
#[derive(Debug, Clone, clap::Args)]
pub struct Args {
    /// A built-in material: print its n and k against wavelength instead of
    /// the list.
    pub name: Option<String>,
    /// With NAME: the wavelengths, FROM:TO:STEP in nm (default: the range its
    /// source vouches for, in 10 nm steps).
    #[arg(long, value_name = "FROM:TO:STEP")]
    pub wavelengths: Option<String>,
    /// Output format.
    #[arg(long, value_enum, default_value = "table")]
    pub format: Format,
    /// Write to this file (atomically) instead of stdout.
    #[arg(short = 'o', long = "output")]
    pub output: Option<PathBuf>,
}

/// Runs the command.
pub fn run(args: &Args) -> CliResult {
    let text = match &args.name {
        None => {
            if args.wavelengths.is_some() {
                return Err(Failure::input(
                    "--wavelengths: give a material NAME to tabulate (lamella materials NAME --wavelengths FROM:TO:STEP)",
                ));
            }
            list(args.format)?
        }
        Some(name) => {
            let m = library::find(name).ok_or_else(|| {
                let names: Vec<String> = library::all().into_iter().map(|m| m.name).collect();
                Failure::input(format!(
                    "materials {name}: not a built-in material (built in: {})",
                    names.join(", ")
                ))
            })?;
            let wavelengths = wavelengths(&m, args.wavelengths.as_deref())?;
            let (lo, hi) = m.valid_nm;
            if let Some(w) = wavelengths.iter().find(|&&w| w < lo || w > hi) {
                eprintln!(
                    "lamella: warning: materials {name}: {w} nm lies outside {lo}–{hi} nm where its source vouches for it; values there are extrapolated"
                );
            }
            table_of(&m, &wavelengths, args.format)?
        }
    };
    write_out(args.output.as_deref(), &[text.into_bytes()])
}

/// The wavelengths to tabulate: `FROM:TO:STEP`, or the valid range in 10 nm
/// steps.
fn wavelengths(m: &Material, spec: Option<&str>) -> Result<Vec<f64>, Failure> {
    let range = match spec {
        None => Range {
            from: m.valid_nm.0,
            to: m.valid_nm.1,
            step: 10.0,
        },
        Some(s) => {
            let parts: Vec<&str> = s.split(':').collect();
            let numbers: Option<Vec<f64>> = parts.iter().map(|p| p.trim().parse().ok()).collect();
            match numbers.as_deref() {
                Some(&[from, to, step]) => Range { from, to, step },
                _ => {
                    return Err(Failure::input(format!(
                        "--wavelengths {s}: expected FROM:TO:STEP in nm, e.g. 380:780:5"
                    )));
                }
            }
        }
    };
    let points = range
        .points("--wavelengths")
        .map_err(|e| Failure::input(e.to_string()))?;
    if let Some(w) = points.iter().find(|&&w| !(w >= 1.0)) {
        return Err(Failure::input(format!(
            "--wavelengths: {w} nm: wavelengths must be 1 nm or more"
        )));
    }
    Ok(points)
}

/// n and k of `m` at `wavelengths`; a value that cannot be computed is an
/// error naming the wavelength.
fn table_of(m: &Material, wavelengths: &[f64], format: Format) -> Result<String, Failure> {
    let mut nk = Vec::with_capacity(wavelengths.len());
    for &w in wavelengths {
        let z = m
            .dispersion
            .index(w)
            .ok()
            .filter(|z| z.re.is_finite() && z.im.is_finite())
            .ok_or_else(|| Failure {
                message: format!("the index of {} cannot be computed at {w} nm", m.name),
                code: 1,
            })?;
        nk.push((z.re, z.im));
    }
    let mut num = zmij::Buffer::new();
    let mut f = |x: f64| num.format(x).to_string();
    Ok(match format {
        Format::Json => {
            let doc = json!({
                "name": m.name, "model": m.dispersion.model_name(),
                "valid_nm": [m.valid_nm.0, m.valid_nm.1], "source": m.source,
                "wavelength_nm": wavelengths,
                "n": nk.iter().map(|p| p.0).collect::<Vec<_>>(),
                "k": nk.iter().map(|p| p.1).collect::<Vec<_>>(),
            });
            format!("{doc}\n")
        }
        Format::Csv => {
            let mut s = String::from("wavelength_nm,n,k\n");
            for (&w, &(n, k)) in wavelengths.iter().zip(&nk) {
                s.push_str(&format!("{},{},{}\n", f(w), f(n), f(k)));
            }
            s
        }
        Format::Table => {
            let mut s = format!(
                "{} ({}; {}–{} nm): {}\n{:>12} {:>10} {:>10}\n",
                m.name,
                m.dispersion.model_name(),
                m.valid_nm.0,
                m.valid_nm.1,
                m.source,
                "wavelength",
                "n",
                "k"
            );
            for (&w, &(n, k)) in wavelengths.iter().zip(&nk) {
                s.push_str(&format!("{w:>9} nm {n:>10.5} {k:>10.5}\n"));
            }
            s
        }
    })
}

/// The library: name, model, valid range, n and k at 550 nm, source.
fn list(format: Format) -> Result<String, Failure> {
    let all = library::all();
    let mut rows = Vec::with_capacity(all.len());
    for m in &all {
        let z = m.dispersion.index(550.0).map_err(|e| Failure {
            message: format!("the index of {} cannot be computed at 550 nm: {e}", m.name),
            code: 1,
        })?;
        rows.push((m, z.re, z.im));
    }
    Ok(match format {
        Format::Json => {
            let list: Vec<Value> = rows
                .iter()
                .map(|(m, n, k)| {
                    json!({"name": m.name, "model": m.dispersion.model_name(),
                           "valid_nm": [m.valid_nm.0, m.valid_nm.1],
                           "n_550": n, "k_550": k, "source": m.source})
                })
                .collect();
            format!("{}\n", Value::from(list))
        }
        Format::Csv => {
            let mut s = String::from("name,model,valid_from_nm,valid_to_nm,n_550,k_550,source\n");
            for (m, n, k) in &rows {
                s.push_str(&format!(
                    "{},{},{},{},{n},{k},\"{}\"\n",
                    m.name,
                    m.dispersion.model_name(),
                    m.valid_nm.0,
                    m.valid_nm.1,
                    m.source.replace('"', "\"\"")
                ));
            }
            s
        }
        Format::Table => {
            let mut s = format!(
                "{:<15} {:<15} {:<13} {:>8} {:>8}  {}\n",
                "name", "model", "valid (nm)", "n@550", "k@550", "source"
            );
            for (m, n, k) in &rows {
                let range = format!("{:.0}–{:.0}", m.valid_nm.0, m.valid_nm.1);
                s.push_str(&format!(
                    "{:<15} {:<15} {:<13} {n:>8.4} {k:>8.4}  {}\n",
                    m.name,
                    m.dispersion.model_name(),
                    range,
                    m.source
                ));
            }
            s
        }
    })
}
