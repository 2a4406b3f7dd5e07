//! The API: each handler turns a request (the edited scene document and
//! how to look at it) into the library's results, through the same record
//! builders as the commands, so the page and the CLI give the same numbers.
//! Errors are JSON `{"error": message}` with the message the CLI prints.

use std::panic::{AssertUnwindSafe, catch_unwind};
use std::path::{Path, PathBuf};
use std::sync::Arc;
use std::time::Instant;

use axum::Json;
use axum::body::Bytes;
use axum::extract::{Path as UrlPath, State};
use axum::http::{HeaderMap, StatusCode, header};
use axum::response::{IntoResponse, Response};
use clap::ValueEnum;
use lamella::angle_colour::{Polarization, Viewing};
use lamella::chart::{self, AbTravel, AngleStrip, SpectraChart};
use lamella::colorimetry::{BUILT_IN_ILLUMINANTS, delta_e2000};
use lamella::design::coating::design_items;
use lamella::design::matching::{Goal, MatchSettings, match_colour};
use lamella::design::report::match_report;
use lamella::design::variables::{edited_document, varying_in};
use lamella::optics::aniso::Handedness;
use lamella::render::{Preview, SIZE_LIMITS, Shape, builtin_mesh};
use lamella::scene::Scene;
use serde::Deserialize;
use serde_json::{Value, json};

use super::super::chart::chartable;
use super::super::choices::{GamutChoice, HandednessChoice, PolarizationChoice, SideChoice};
use super::super::color::{self, ViewArgs};
use super::super::design_args::TargetArgs;
use super::super::{Failure, film_scene, matching, multiangle, spectrum};
use super::Server;
use super::jobs::{Cancelled, MatchJob, Superseded, Ticket};

/// Most wavelengths of a design the page computes.
pub const MAX_WAVELENGTHS: usize = 2001;
/// Most wavelength × angle points of a design the page computes.
pub const MAX_POINTS: usize = 100_000;
/// Most evaluations of one match run from the page (the command's default).
pub const MAX_MATCH_EVALS: usize = 60_000;
/// Most pixels of a preview render from the page.
pub const MAX_RENDER_PIXELS: u32 = 1024 * 1024;
/// Largest supersampling of a preview render from the page.
const MAX_RENDER_SSAA: u32 = 2;
/// Most angles of the spectra chart.
const MAX_SPECTRA_ANGLES: usize = 6;

/// Angles of the page's colour strip while the design changes: about one
/// per 3 pixels of the strip as the page shows it. At rest (`fine`) the
/// strip is drawn as `lamella chart` draws it.
const STRIP_SAMPLES: usize = 240;

/// Chart sizes in pixels (drawn as SVG, scaled by the page).
const STRIP_SIZE: (u32, u32) = (900, 420);
/// Widest strip the page may ask for.
const MAX_STRIP_WIDTH: u32 = 2400;
const AB_SIZE: (u32, u32) = (1200, 560);
const SPECTRA_SIZE: (u32, u32) = (1200, 600);

/// The header naming the page session whose newer requests supersede its
/// older ones.
const SESSION_HEADER: &str = "x-lamella-session";

/// A refused or failed request.
#[derive(Debug)]
pub struct ApiError {
    status: StatusCode,
    body: Value,
}

impl ApiError {
    /// An error with this status and message.
    pub fn new(status: StatusCode, message: impl Into<String>) -> Self {
        ApiError {
            status,
            body: json!({"error": message.into()}),
        }
    }
}

impl From<Failure> for ApiError {
    fn from(f: Failure) -> Self {
        ApiError {
            status: if f.code == 2 {
                StatusCode::BAD_REQUEST
            } else {
                StatusCode::UNPROCESSABLE_ENTITY
            },
            body: json!({"error": f.message, "exit_code": f.code}),
        }
    }
}

impl From<Superseded> for ApiError {
    fn from(_: Superseded) -> Self {
        ApiError {
            status: StatusCode::CONFLICT,
            body: json!({"error": "superseded by a newer request", "superseded": true}),
        }
    }
}

impl IntoResponse for ApiError {
    fn into_response(self) -> Response {
        (self.status, Json(self.body)).into_response()
    }
}

type Answer<T = Json<Value>> = Result<T, ApiError>;

/// How the page looks at the design: the names of the CLI's flags.
#[derive(Debug, Default, Clone, Deserialize)]
#[serde(default, deny_unknown_fields)]
pub struct View {
    illuminant: Option<String>,
    observer: Option<String>,
    side: Option<String>,
    polarization: Option<String>,
    analyzer: Option<String>,
    gamut: Option<String>,
}

/// A target colour: `hex` `#RRGGBB` or `lab` `L,a,b`, as `--target-hex`
/// and `--target-lab`.
#[derive(Debug, Default, Clone, Deserialize)]
#[serde(default, deny_unknown_fields)]
pub struct Target {
    hex: Option<String>,
    lab: Option<String>,
}

/// A request body: the design, the view, and what one endpoint needs.
#[derive(Debug, Default, Clone, Deserialize)]
#[serde(default, deny_unknown_fields)]
pub struct Request {
    scene: Option<Value>,
    view: View,
    target: Option<Target>,
    /// Spectra chart: angles of incidence and curves drawn.
    angles: Option<Vec<f64>>,
    curves: Option<Vec<String>>,
    transmittance: bool,
    /// Live: the strip at the chart's full angle sampling (the design at rest).
    fine: bool,
    /// Live: the strip's width in pixels, to be shown at its own size (its
    /// colour columns then meet without seams).
    strip_width: Option<u32>,
    /// Render: `WxH`.
    size: Option<String>,
    /// Match: the target's angle or geometry, budget and seed.
    angle: Option<f64>,
    geometry: Option<String>,
    max_evals: Option<usize>,
    seed: Option<u64>,
}

fn parse(body: &Bytes) -> Answer<Request> {
    serde_json::from_slice(body)
        .map_err(|e| ApiError::new(StatusCode::BAD_REQUEST, format!("request body: {e}")))
}

impl Request {
    /// The target as `--target-lab` and `--target-hex`.
    fn target_args(&self) -> TargetArgs {
        let target = self.target.clone().unwrap_or_default();
        TargetArgs {
            target_lab: target.lab,
            target_hex: target.hex,
        }
    }

    fn document(&self) -> Answer<&Value> {
        self.scene.as_ref().ok_or_else(|| {
            ApiError::new(
                StatusCode::BAD_REQUEST,
                "request body: give the design as `scene`",
            )
        })
    }
}

/// One value of a clap value enum by its command-line name.
fn choice<T: ValueEnum>(key: &str, text: &str) -> Result<T, Failure> {
    T::from_str(text, false).map_err(|_| {
        let names: Vec<String> = T::value_variants()
            .iter()
            .filter_map(|v| v.to_possible_value().map(|p| p.get_name().to_owned()))
            .collect();
        Failure::input(format!("{key} = {text}: expected {}", names.join(", ")))
    })
}

impl View {
    /// The flags of `color` this view stands for, and the analyser.
    fn args(&self) -> Result<(ViewArgs, Option<Handedness>), Failure> {
        if let Some(name) = &self.illuminant
            && name.to_ascii_lowercase().ends_with(".csv")
        {
            return Err(Failure::input(format!(
                "illuminant = {name}: the page takes built-in illuminants; name a measured light \
                 in the scene's `illuminant` instead"
            )));
        }
        let args = ViewArgs {
            side: match &self.side {
                Some(s) => choice::<SideChoice>("side", s)?,
                None => SideChoice::Reflect,
            },
            illuminant: self.illuminant.clone(),
            observer: self.observer.clone(),
            polarization: match &self.polarization {
                Some(p) => choice::<PolarizationChoice>("polarization", p)?,
                None => PolarizationChoice::Unpolarized,
            },
            gamut: match &self.gamut {
                Some(g) => choice::<GamutChoice>("gamut", g)?,
                None => GamutChoice::Clip,
            },
        };
        let analyzer = match &self.analyzer {
            Some(a) => Some(choice::<HandednessChoice>("analyzer", a)?.into()),
            None => None,
        };
        Ok((args, analyzer))
    }
}

/// The design of a request, validated and within the page's limits.
fn design(server: &Server, request: &Request) -> Answer<Scene> {
    let scene = server.files.scene(request.document()?)?;
    let (nw, na) = (scene.wavelengths_nm.len(), scene.angles_deg.len());
    if nw > MAX_WAVELENGTHS || nw.saturating_mul(na) > MAX_POINTS {
        return Err(Failure::input(format!(
            "{}: wavelengths_nm × angles_deg = {nw} × {na} points: the page computes at most \
             {MAX_WAVELENGTHS} wavelengths and {MAX_POINTS} points, to answer at once; use a \
             coarser grid here and the command line for finer ones",
            server.files.label()
        ))
        .into());
    }
    Ok(scene)
}

/// The channel of a request: its page session and kind.
fn channel(headers: &HeaderMap, kind: &str) -> String {
    let session = headers
        .get(SESSION_HEADER)
        .and_then(|v| v.to_str().ok())
        .unwrap_or("");
    format!("{session}/{kind}")
}

/// Runs blocking work off the runtime's thread.
async fn blocking<T: Send + 'static>(
    work: impl FnOnce() -> Answer<T> + Send + 'static,
) -> Answer<T> {
    tokio::task::spawn_blocking(work).await.map_err(|e| {
        ApiError::new(
            StatusCode::INTERNAL_SERVER_ERROR,
            format!("the computation failed: {e}"),
        )
    })?
}

/// `GET /api/session`: the document to open and the choices the page offers.
pub async fn session(State(server): State<Arc<Server>>) -> Json<Value> {
    let materials: Vec<String> = lamella::materials::library::all()
        .into_iter()
        .map(|m| m.name)
        .collect();
    Json(json!({
        "scene": server.files.document,
        "file": server.files.name(),
        "can_save": server.files.name().is_some(),
        "materials": materials,
        "illuminants": BUILT_IN_ILLUMINANTS,
        "observers": ["CIE1931_2", "CIE1964_10"],
        "limits": {
            "max_wavelengths": MAX_WAVELENGTHS,
            "max_points": MAX_POINTS,
            "max_match_evals": MAX_MATCH_EVALS,
            "max_render_pixels": MAX_RENDER_PIXELS,
        },
        "version": lamella::report::VERSION,
        "cautions": lamella::report::CAUTIONS,
    }))
}

/// A chart's SVG, or the message of why it cannot be drawn for this design.
fn drawn(label: &str, chart: lamella::Result<String>) -> Value {
    match chart {
        Ok(svg) => json!({"svg": svg}),
        Err(e) => json!({"error": format!("{label}: {e}")}),
    }
}

/// `POST /api/live`: what the page shows after every change: the colour
/// per angle (as `lamella color --format json`), the strip and the a*b*
/// travel charts, ΔE2000 to the target, the design variables; for a
/// coating, the geometries (as `lamella multiangle --format json`) and
/// their a*b* travel.
pub async fn live(State(server): State<Arc<Server>>, headers: HeaderMap, body: Bytes) -> Answer {
    let request = parse(&body)?;
    let ticket = server.jobs.ticket(&channel(&headers, "live"));
    blocking(move || live_answer(&server, &request, &ticket).map(Json)).await
}

/// The body of `/api/live`, checking between stages whether a newer
/// request has superseded this one.
pub fn live_answer(server: &Server, request: &Request, ticket: &Ticket) -> Answer<Value> {
    let started = Instant::now();
    let scene = design(server, request)?;
    let label = server.files.label();
    let path = PathBuf::from(&label);
    let (view, analyzer) = request.view.args()?;
    let items = design_items(&scene, scene.coating.as_ref());
    let variables: Vec<Value> = varying_in(&scene, items)
        .iter()
        .map(|v| {
            json!({"pointer": v.pointer, "material": v.material, "thickness_nm": v.nominal_nm,
                   "low_nm": v.low_nm, "high_nm": v.high_nm})
        })
        .collect();
    let mut out = json!({
        "title": scene.title,
        "warnings": server.files.warnings(&scene),
        "variables": variables,
    });
    let target = request.target_args();
    if scene.coating.is_some() {
        ticket.current()?;
        out["coating"] = coating_answer(&scene, &path, &view)?;
    }
    if scene.require_film().is_ok() {
        ticket.current()?;
        film_scene(&path, &scene, "serve")?;
        let (viewing, spectra, colours) = color::colours_of(&scene, &path, &view, analyzer)?;
        out["colours"] = json!(color::records(&spectra.angles_deg, &colours));
        if let Some(lab) = target.lab(&viewing, &scene.wavelengths_nm)? {
            out["target_lab"] = json!(lab);
            out["delta_e00"] = colours.iter().map(|c| delta_e2000(c.lab, lab)).collect();
        }
        let strip_size = match request.strip_width {
            Some(w) if (chart::SIZE_LIMITS.0..=MAX_STRIP_WIDTH).contains(&w) => (w, STRIP_SIZE.1),
            Some(w) => {
                return Err(Failure::input(format!(
                    "strip_width = {w}: give {} to {MAX_STRIP_WIDTH} pixels",
                    chart::SIZE_LIMITS.0
                ))
                .into());
            }
            None => STRIP_SIZE,
        };
        // The charts refuse what `lamella chart` refuses, each in its place.
        if let Err(f) = chartable(&path, &scene) {
            out["strip"] = json!({"error": f.message});
            out["ab"] = json!({"error": f.message});
        } else {
            ticket.current()?;
            out["strip"] = drawn(
                &label,
                if request.fine {
                    AngleStrip::compute(&scene, &viewing, None)
                } else {
                    AngleStrip::compute_sampled(&scene, &viewing, None, STRIP_SAMPLES)
                }
                .and_then(|c| chart::svg(&c, strip_size)),
            );
            ticket.current()?;
            out["ab"] = drawn(
                &label,
                AbTravel::compute(&[(&scene, &viewing)]).and_then(|c| chart::svg(&c, AB_SIZE)),
            );
        }
    }
    out["server_ms"] = json!(started.elapsed().as_secs_f64() * 1e3);
    Ok(out)
}

/// A coating's geometries and their a*b* travel.
fn coating_answer(scene: &Scene, path: &Path, view: &ViewArgs) -> Answer<Value> {
    let args = multiangle::Args {
        spectra: false,
        geometries: None,
        illuminant: view.illuminant.clone(),
        observer: view.observer.clone(),
        gamut: view.gamut,
    };
    let (viewing, m) = multiangle::measurement(scene, path, &args)?;
    let mut doc = multiangle::document(scene, &viewing, &m, false);
    let travel = AbTravel::of_coating(&scene.title, &m, &viewing);
    doc["ab"] = drawn(&path.display().to_string(), chart::svg(&travel, AB_SIZE));
    Ok(doc)
}

/// `POST /api/spectrum`: the design's spectra exactly as
/// `lamella spectrum --format json` writes them.
pub async fn spectrum(State(server): State<Arc<Server>>, body: Bytes) -> Answer<Response> {
    let request = parse(&body)?;
    blocking(move || {
        let scene = design(&server, &request)?;
        let path = PathBuf::from(server.files.label());
        let at = |e| Failure::scene(&path, e);
        scene.require_film().map_err(at)?;
        let text = spectrum::json_document(&scene, spectrum::Basis::Linear, None).map_err(at)?;
        Ok(([(header::CONTENT_TYPE, "application/json")], text).into_response())
    })
    .await
}

/// The viewing of a request without computing colours.
fn viewing_of(scene: &Scene, path: &Path, view: &View) -> Result<Viewing, Failure> {
    let (args, analyzer) = view.args()?;
    let mut viewing = args.viewing(scene, path)?;
    viewing.analyzer = analyzer;
    Ok(viewing)
}

/// `POST /api/spectra-chart`: the spectra chart (SVG) at `angles`.
pub async fn spectra_chart(
    State(server): State<Arc<Server>>,
    headers: HeaderMap,
    body: Bytes,
) -> Answer {
    let request = parse(&body)?;
    let ticket = server.jobs.ticket(&channel(&headers, "spectra"));
    blocking(move || {
        let scene = design(&server, &request)?;
        let label = server.files.label();
        let path = PathBuf::from(&label);
        chartable(&path, &scene)?;
        let viewing = viewing_of(&scene, &path, &request.view)?;
        let angles = request
            .angles
            .clone()
            .unwrap_or_else(|| vec![0.0, 30.0, 60.0]);
        if angles.len() > MAX_SPECTRA_ANGLES {
            return Err(Failure::input(format!(
                "angles: {} angles; the page draws at most {MAX_SPECTRA_ANGLES}",
                angles.len()
            ))
            .into());
        }
        let names = (request.curves.clone())
            .unwrap_or_else(|| vec!["unpolarized".into(), "s".into(), "p".into()]);
        let mut curves: Vec<Polarization> = Vec::new();
        for n in &names {
            let p = choice::<PolarizationChoice>("curves", n)?.into();
            if !curves.contains(&p) {
                curves.push(p);
            }
        }
        ticket.current()?;
        let chart = SpectraChart::compute(
            &[(&scene, &viewing)],
            &angles,
            Some(&curves),
            request.transmittance,
        )
        .and_then(|c| chart::svg(&c, SPECTRA_SIZE));
        Ok(Json(drawn(&label, chart)))
    })
    .await
}

/// `POST /api/render`: a preview render (PNG) of `size` (`WxH`, at most
/// [`MAX_RENDER_PIXELS`]) with the scene's `preview` settings.
pub async fn render(
    State(server): State<Arc<Server>>,
    headers: HeaderMap,
    body: Bytes,
) -> Answer<Response> {
    let request = parse(&body)?;
    let ticket = server.jobs.ticket(&channel(&headers, "render"));
    blocking(move || {
        let scene = design(&server, &request)?;
        let path = PathBuf::from(server.files.label());
        let at = |e| Failure::scene(&path, e);
        let mut settings = scene.preview.clone().unwrap_or_default();
        // The page's analyser, as `lamella render --analyzer`.
        if let (_, Some(h)) = request.view.args()? {
            settings.analyzer = Some(h);
        }
        if let Some(size) = &request.size {
            (settings.width, settings.height) = lamella::raster::parse_size(size, SIZE_LIMITS)
                .map_err(|e| Failure::input(format!("size: {e}")))?;
        }
        if settings.width.saturating_mul(settings.height) > MAX_RENDER_PIXELS {
            return Err(Failure::input(format!(
                "size = {}x{}: the page renders at most {MAX_RENDER_PIXELS} pixels; use \
                 `lamella render` for larger images",
                settings.width, settings.height
            ))
            .into());
        }
        settings.ssaa = settings.ssaa.min(MAX_RENDER_SSAA);
        settings.turntable = 0;
        let mesh = match (builtin_mesh(&settings.shape), &settings.shape) {
            (Some(m), _) => m,
            (None, Shape::Mesh(_)) => scene.preview_mesh.clone().expect("read with the preview"),
            (None, _) => unreachable!("every other shape is built in"),
        };
        let preview = Preview::new(&scene, &mesh, &settings).map_err(at)?;
        ticket.current()?;
        let image = catch_unwind(AssertUnwindSafe(|| {
            preview.render(0, &|_| {
                if ticket.current().is_err() {
                    std::panic::resume_unwind(Box::new(Superseded));
                }
            })
        }))
        .map_err(|_| Superseded)?;
        let png =
            lamella::raster::png((image.width, image.height), &image.rgb).ok_or_else(|| {
                ApiError::new(
                    StatusCode::INTERNAL_SERVER_ERROR,
                    "the image could not be encoded",
                )
            })?;
        Ok(([(header::CONTENT_TYPE, "image/png")], png).into_response())
    })
    .await
}

/// `POST /api/report`: the HTML report of the design, as `lamella report`
/// writes its `index.html` (charts inline).
pub async fn report(State(server): State<Arc<Server>>, body: Bytes) -> Answer<Response> {
    let request = parse(&body)?;
    blocking(move || {
        let scene = design(&server, &request)?;
        let path = PathBuf::from(server.files.label());
        let (view, _) = request.view.args()?;
        let html = super::super::report::html(&scene, &path, &view, super::super::report::SIZE)?;
        Ok(([(header::CONTENT_TYPE, "text/html; charset=utf-8")], html).into_response())
    })
    .await
}

/// `POST /api/save`: writes the design over SCENE (atomically).
pub async fn save(State(server): State<Arc<Server>>, body: Bytes) -> Answer {
    let request = parse(&body)?;
    blocking(move || {
        let name = server.files.save(request.document()?)?;
        Ok(Json(json!({"saved": name})))
    })
    .await
}

/// `POST /api/match`: starts `match` toward `target` at `angle` (films) or
/// `geometry` (coatings); answers the job's number.
pub async fn start_match(State(server): State<Arc<Server>>, body: Bytes) -> Answer {
    let request = parse(&body)?;
    let scene = design(&server, &request)?;
    let path = PathBuf::from(server.files.label());
    let (view, analyzer) = request.view.args()?;
    if analyzer.is_some() {
        return Err(
            Failure::input("analyzer: match looks without an analyser; leave it out").into(),
        );
    }
    let viewing = view.viewing(&scene, &path)?;
    let lab = (request.target_args())
        .lab(&viewing, &scene.wavelengths_nm)?
        .ok_or_else(|| Failure::input("target: give a target colour (hex or lab)"))?;
    let at = matching::main_point(&scene, request.geometry.as_deref(), request.angle)?;
    let max_evals = request.max_evals.unwrap_or(MAX_MATCH_EVALS);
    if !(1..=MAX_MATCH_EVALS).contains(&max_evals) {
        return Err(Failure::input(format!(
            "max_evals = {max_evals}: the page runs 1 to {MAX_MATCH_EVALS} evaluations"
        ))
        .into());
    }
    let seed = request.seed.unwrap_or(1);
    let settings = MatchSettings {
        goals: vec![Goal { at, lab }],
        max_total_nm: None,
        brightness_weight: 0.0,
        budget: matching::budget(max_evals, seed),
    };
    let job = server.jobs.start_match(max_evals).ok_or_else(|| {
        ApiError::new(
            StatusCode::CONFLICT,
            "a match is already running; cancel it first",
        )
    })?;
    let id = job.id;
    tokio::task::spawn_blocking(move || run_match(&job, &scene, &path, &viewing, &settings, seed));
    Ok(Json(json!({"job": id})))
}

fn run_match(
    job: &MatchJob,
    scene: &Scene,
    path: &Path,
    viewing: &Viewing,
    settings: &MatchSettings,
    seed: u64,
) {
    let run = catch_unwind(AssertUnwindSafe(|| {
        match_colour(scene, viewing, settings, &|n, best| job.progress(n, best))
    }));
    let bad = |e| json!({"error": Failure::scene(path, e).message});
    let (error, body) = match run {
        Err(payload) if payload.is::<Cancelled>() => (false, json!({"cancelled": true})),
        Err(_) => (true, json!({"error": "the search failed"})),
        Ok(Err(e)) => (true, bad(e)),
        Ok(Ok(out)) => {
            match edited_document(&scene.document, &out.variables, &out.thicknesses_nm) {
                Err(e) => (true, bad(e)),
                Ok(doc) => {
                    let mut report = match_report(&out);
                    report.insert("max_evals".into(), json!(job.max_evals));
                    report.insert("seed".into(), json!(seed));
                    (false, json!({"report": report, "scene": doc}))
                }
            }
        }
    };
    job.finish(error, body);
}

/// `GET /api/match/{id}`: progress, then the report and the matched scene.
pub async fn match_status(State(server): State<Arc<Server>>, UrlPath(id): UrlPath<u64>) -> Answer {
    let job = server
        .jobs
        .find_match(id)
        .ok_or_else(|| ApiError::new(StatusCode::NOT_FOUND, format!("no match job {id}")))?;
    let mut out = json!({
        "job": id,
        "evaluations": job.evaluations.load(std::sync::atomic::Ordering::Relaxed),
        "max_evals": job.max_evals,
    });
    if let Some(best) = job.best() {
        out["best_cost"] = json!(best);
    }
    let outcome = job.outcome.lock().map(|o| o.clone()).unwrap_or(None);
    out["state"] = json!(match &outcome {
        None if job.cancelled() => "cancelling",
        None => "running",
        Some((true, _)) => "failed",
        Some((false, b)) if b.get("cancelled").is_some() => "cancelled",
        Some((false, _)) => "done",
    });
    if let Some((_, body)) = outcome
        && let (Some(o), Some(b)) = (out.as_object_mut(), body.as_object())
    {
        o.extend(b.clone());
    }
    Ok(Json(out))
}

/// `POST /api/match/{id}/cancel`: stops the search at its next progress report.
pub async fn cancel_match(State(server): State<Arc<Server>>, UrlPath(id): UrlPath<u64>) -> Answer {
    let job = server
        .jobs
        .find_match(id)
        .ok_or_else(|| ApiError::new(StatusCode::NOT_FOUND, format!("no match job {id}")))?;
    job.cancel();
    Ok(Json(json!({"job": id, "cancelling": true})))
}
