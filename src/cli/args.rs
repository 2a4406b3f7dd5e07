//! The command line: arguments of every subcommand and the dispatch to them.

use std::path::PathBuf;

use clap::{Parser, Subcommand};

use crate::cli;
use crate::cli::CliResult;
use crate::cli::help;

/// Structural colour design: thin-film spectra, colour and design tools.
#[derive(Parser)]
#[command(name = "lamella", version, about, long_about = None, after_help = help::EXIT_CODES)]
pub struct Args {
    /// The subcommand and its arguments.
    #[command(subcommand)]
    pub command: Command,
}

/// The subcommands. Each one's doc comment is its `--help` (first line: what
/// it does) and its `after_help` ends with a worked example.
#[derive(Subcommand)]
pub enum Command {
    /// Reflectance, transmittance and absorptance per polarization for every
    /// angle and wavelength of a scene.
    ///
    /// Columns: wavelength_nm, angle_deg, R_s, R_p, R, T_s, T_p, T and A
    /// (unpolarized R, T and A are the means of s and p); with anisotropic
    /// layers R_s is the total (co- plus cross-polarized) for s-polarized
    /// incident light, and so on. With --basis circular: R_L, R_R, R, T_L,
    /// T_R, T, A for left- and right-handed incident light (handedness named
    /// by the helix the electric field traces in space at one instant). With
    /// --layer-absorption also A_1 … A_K, then A_substrate and A_backing for
    /// a substrate sheet.
    #[command(after_help = help::SPECTRUM)]
    Spectrum {
        /// Scene file (JSON).
        scene: PathBuf,
        /// Output format. JSON also holds the complex reflection and
        /// transmission Jones matrices (`jones_r`, `jones_t`) of coherent
        /// stacks.
        #[arg(long, value_enum, default_value = "csv")]
        format: cli::spectrum::Format,
        /// Polarization basis of the columns and Jones matrices: linear
        /// (s, p) or circular (left, right).
        #[arg(long, value_enum, default_value = "linear")]
        basis: cli::spectrum::Basis,
        /// Add the unpolarized absorptance of each layer as written in the
        /// scene's stack (A_1 … A_K, a layer in a repeat group summed over
        /// its periods), then A_substrate and A_backing when the substrate
        /// is a sheet (A_backing for a black backing); they add up to A.
        #[arg(long)]
        layer_absorption: bool,
        /// Write to this file (atomically) instead of stdout.
        #[arg(short = 'o', long = "output")]
        output: Option<PathBuf>,
    },
    /// The electric field intensity |E|² against depth through the stack at
    /// one wavelength, angle and polarization (the standing wave in the film).
    ///
    /// Columns: z_nm (depth from the first interface, negative in the
    /// incident medium), layer (0 for the incident medium, 1 … K for the
    /// layers as written in the scene's stack, a layer in a repeat group
    /// numbered the same in every period, K + 1 for the substrate) and E2
    /// (|E|² relative to the incident wave's). A margin of the incident and
    /// exit media is included, and both sides of every interface. The
    /// nominal design is shown (thickness disorder is not applied); a stack
    /// with incoherent layers or a substrate sheet is refused. JSON adds the
    /// wavelength, angle, polarization and each layer's pointer, material and
    /// thickness.
    #[command(after_help = help::FIELD)]
    Field(cli::field::Args),
    /// Photonic bands of a repeat group: cos KΛ = ½ tr M of one period for s
    /// and p over the scene's wavelengths and angles, and the stop bands.
    ///
    /// The period is that of the first repeat group in the stack (depth
    /// first), at its nominal thicknesses (the first period of a graded
    /// group). Where |½ tr M| > 1 the Bloch wave decays from period to
    /// period: a stop band of the infinite stack (P. Yeh, A. Yariv and C.-S.
    /// Hong, J. Opt. Soc. Am. 67, 423, 1977). CSV columns: wavelength_nm,
    /// angle_deg, half_trace_s, half_trace_p; with --stop-bands: angle_deg,
    /// polarization, from_nm, to_nm (edges refined between grid points; a
    /// band running off the grid ends at its first or last wavelength).
    /// JSON holds both: half_trace_s and half_trace_p as [angle][wavelength]
    /// arrays and stop_bands as objects {angle_deg, polarization, from_nm,
    /// to_nm}.
    #[command(after_help = help::BANDS)]
    Bands(cli::bands::Args),
    /// CIE XYZ, xy, CIELAB, LCh, sRGB and hex at every angle of a scene, with
    /// the colour travel between angles.
    ///
    /// The light and observer come from the scene (default D65 and the CIE
    /// 1964 10° observer) unless given here. Colours outside sRGB are marked
    /// (`in_gamut` false, `≈` before the hex code in the table).
    #[command(after_help = help::COLOR)]
    Color {
        /// Scene file (JSON).
        scene: PathBuf,
        /// Output format.
        #[arg(long, value_enum, default_value = "table")]
        format: cli::RecordFormat,
        #[command(flatten)]
        view: cli::color::ViewArgs,
        #[command(flatten)]
        analyzer: cli::color::AnalyzerArgs,
        /// Also give Display P3 values (`display_p3`, `display_p3_hex`,
        /// `display_p3_in_gamut`) beside sRGB.
        #[arg(long)]
        display_p3: bool,
        /// Write to this file (atomically) instead of stdout.
        #[arg(short = 'o', long = "output")]
        output: Option<PathBuf>,
    },
    /// Colour of an effect-pigment coating at the multi-angle geometries
    /// (45as15 …), with the flop index and hue travel.
    ///
    /// The scene's `coating` holds platelets in a binder over a background;
    /// `45as15` is illumination at 45° and detection 15° from the specular
    /// direction toward the normal. Per geometry: reflectance factor, XYZ,
    /// CIELAB, C*, h, sRGB, hex and gamut.
    #[command(after_help = help::MULTIANGLE)]
    Multiangle {
        /// Scene file (JSON) with a `coating` section.
        scene: PathBuf,
        /// Output format.
        #[arg(long, value_enum, default_value = "table")]
        format: cli::RecordFormat,
        #[command(flatten)]
        args: cli::multiangle::Args,
        /// Write to this file (atomically) instead of stdout.
        #[arg(short = 'o', long = "output")]
        output: Option<PathBuf>,
    },
    /// Optimise the `vary_nm` thicknesses toward a target colour (ΔE00) at
    /// one or more angles; writes the optimised scene and a JSON report.
    ///
    /// With a `coating` section the platelet's layers are optimised and the
    /// goals are given at geometries (--geometry, --goal 45as110:L,a,b).
    #[command(after_help = help::MATCH)]
    Match(Box<cli::matching::MatchArgs>),
    /// Monte Carlo tolerance of a design: ΔE00 percentiles, yield and the
    /// layers the colour is most sensitive to.
    ///
    /// Every layer as written in the scene draws an independent Gaussian
    /// thickness error (a layer in a repeat group carries the same error into
    /// each period, unless --per-period) and, with --sigma-n, an independent
    /// error in its real index. The report gives ΔE00 from the nominal colour
    /// at each scene angle (median, 95th percentile, maximum, yield within
    /// --limit) and overall (each sample's worst angle among those that
    /// count, all unless --yield-angles). Sensitivity: each layer as written
    /// alone is moved by +1σ and −1σ (in every period of its group); its
    /// ΔE00 (worst counted angle, mean of the two) ranks the layers, largest
    /// first (combined with the index effect when --sigma-n is given). With
    /// a `coating` section the layers are the platelet's (each error shared
    /// by every platelet of the batch) and the colour is judged at each of
    /// the coating's geometries instead of angles (report key `geometries`;
    /// --yield-geometries chooses among them).
    #[command(after_help = help::TOLERANCE)]
    Tolerance(Box<cli::tolerance::ToleranceArgs>),
    /// Fit the `vary_nm` thicknesses to a measured reflectance spectrum.
    ///
    /// The measured CSV has columns wavelength_nm and R (0–1), and angle_deg
    /// or geometry for readings at several angles or geometries; the fitted
    /// scene is written to --out-scene and the report (rms, thicknesses,
    /// their uncertainties where the data determine them) to stdout; --chart
    /// draws measured against fitted spectra with their residuals.
    #[command(after_help = help::FIT)]
    Fit(Box<cli::fit::FitArgs>),
    /// Evaluate many designs over the `vary_nm` ranges as JSON lines.
    ///
    /// Each line: `index` (the design's number in the whole sweep),
    /// `thicknesses_nm` (one per `vary_nm` layer, document order), `L`, `a`,
    /// `b`, `srgb`, `hex`, and `delta_e00` to the target when one is given.
    /// Design i is the same in every run (grid order, or the seeded stream),
    /// so `--shard I/N` (I from 1 to N) evaluates the I-th of N contiguous
    /// shares and the shard files concatenated in order equal the whole
    /// sweep.
    #[command(after_help = help::SWEEP)]
    Sweep(Box<cli::sweep::SweepArgs>),
    /// A preview image of an object (sphere, cylinder, torus, bottle, wavy
    /// sheet, flat pane or OBJ mesh) wearing the coating, shaded from the
    /// real spectra, in a studio environment or under lights.
    ///
    /// Each flag overrides the same key of the scene's `preview` object.
    #[command(after_help = help::RENDER)]
    Render(cli::render::RenderArgs),
    /// List the built-in materials (model, valid range, n and k at 550 nm,
    /// source), or give one material's n and k against wavelength.
    ///
    /// A wavelength outside the range the material's source vouches for is
    /// tabulated (extrapolated) with a warning.
    #[command(after_help = help::MATERIALS)]
    Materials(cli::materials::Args),
    /// Draw a chart of colour against angle, spectra, the field inside the
    /// stack or its photonic bands as PNG or SVG (format from the -o
    /// extension).
    #[command(after_help = help::CHART)]
    Chart(cli::chart::Args),
    /// Write every chart of a scene and an HTML report into a folder.
    ///
    /// The report (index.html) holds the stack, the colour per angle, the
    /// travel summary, gamut warnings, the cautions on using computed colour,
    /// the lamella version, the date and the command that made it. For a
    /// scene with a `coating`: the coating's make-up, the colour at each
    /// geometry (as `multiangle`), the flop index, the hue travel, and the
    /// a*b* travel and reflectance factor spectra across the geometries.
    #[command(after_help = help::REPORT)]
    Report(cli::report::Args),
    /// Compare a sample's colour with a reference's at every angle or
    /// geometry in both: ΔE2000, ΔE*ab, ΔE94, CMC and ΔL*, ΔC*, ΔH* in words,
    /// judged against tolerances.
    ///
    /// REFERENCE and SAMPLE are each a scene (a film, compared at its
    /// angles, or a coating, at its geometries) or a measured file (a table
    /// or CGATS; see the README, "Measured data"). Colour is computed from
    /// each spectrum under the chosen light and observer. With --tolerance
    /// or --tolerances each point passes when its difference by --formula
    /// is at most its limit; without, every point passes and no limit is
    /// reported. Exit code 3 when any point fails.
    #[command(after_help = help::COMPARE)]
    Compare(Box<cli::compare::Args>),
    /// A local web page for designing by eye: sliders for the `vary_nm`
    /// layers, the colour against angle, a*b* travel, spectra, a preview
    /// and `match`, all computed by lamella as the commands compute them.
    ///
    /// Listens on 127.0.0.1 and prints the page's address with a random
    /// token; serves until Ctrl-C (exit code 130). The page can download
    /// the edited scene, or write it back over SCENE on an explicit Save
    /// (atomically); nothing else is written. Files a scene names are read
    /// only from inside its folder.
    #[command(after_help = help::SERVE)]
    Serve(cli::serve::Args),
}

/// Runs the subcommand.
pub fn run(args: Args) -> CliResult {
    match args.command {
        Command::Spectrum {
            scene,
            format,
            basis,
            layer_absorption,
            output,
        } => cli::spectrum::run(&scene, format, basis, layer_absorption, output.as_deref()),
        Command::Field(a) => cli::field::run(&a),
        Command::Bands(a) => cli::bands::run(&a),
        Command::Color {
            scene,
            format,
            view,
            analyzer,
            display_p3,
            output,
        } => cli::color::run(
            &scene,
            format,
            &view,
            &analyzer,
            display_p3,
            output.as_ref(),
        ),
        Command::Multiangle {
            scene,
            format,
            args,
            output,
        } => cli::multiangle::run(&scene, format, &args, output.as_ref()),
        Command::Match(a) => cli::matching::run(&a),
        Command::Tolerance(a) => cli::tolerance::run(&a),
        Command::Fit(a) => cli::fit::run(&a),
        Command::Sweep(a) => cli::sweep::run(&a),
        Command::Render(args) => cli::render::run(&args),
        Command::Materials(a) => cli::materials::run(&a),
        Command::Chart(a) => cli::chart::run(&a),
        Command::Report(a) => cli::report::run(&a),
        Command::Compare(a) => cli::compare::run(&a),
        Command::Serve(a) => cli::serve::run(&a),
    }
}
