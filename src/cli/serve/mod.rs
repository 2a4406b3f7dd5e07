//! `lamella serve`: a local web page for designing by eye. A small HTTP
//! server (axum on a one-thread tokio runtime) holds no design of its own:
//! every request carries the edited scene document, which is validated by
//! `Scene::from_json` as for any command, and answered by the same library
//! calls and CLI record builders as `color`, `spectrum`, `multiangle`,
//! `match`, `chart` and `render`. The page (HTML, CSS, JavaScript, written
//! by hand) is embedded in the binary.
//!
//! Security: loopback only unless `--allow-remote`; a random token in the
//! printed URL's fragment, required on every API call; requests whose Host
//! or Origin is not the server's own are refused (DNS rebinding, other web
//! pages); bodies are size-limited; each request's work is bounded; files a
//! scene names are read only inside the scene's folder; nothing is written
//! but SCENE, on an explicit save.

mod api;
mod files;
mod guard;
mod jobs;
mod page;

use std::net::{IpAddr, Ipv4Addr, SocketAddr};
use std::path::PathBuf;
use std::sync::Arc;

use axum::Router;
use axum::routing::{get, post};

use super::{CliResult, Failure};

/// The port `lamella serve` listens on unless told otherwise.
pub const DEFAULT_PORT: u16 = 7387;

/// Flags of `lamella serve` (the command is described in `cli::args`).
#[derive(Debug, Clone, clap::Args)]
pub struct Args {
    /// Scene file (JSON) to open; the page's Save writes the edited design
    /// back to it (atomically, only on that click). Without one, a small
    /// starter design opens and can only be downloaded.
    pub scene: Option<PathBuf>,
    /// Port to listen on; 0 picks a free one (the printed URL shows it).
    #[arg(long, default_value_t = DEFAULT_PORT)]
    pub port: u16,
    /// Address to listen on. Anything but the loopback address needs
    /// --allow-remote.
    #[arg(long, default_value_t = IpAddr::V4(Ipv4Addr::LOCALHOST))]
    pub host: IpAddr,
    /// Allow listening on a non-loopback address: anyone who can reach it
    /// and has the URL (with its token) can then drive the designer and
    /// save over SCENE.
    #[arg(long)]
    pub allow_remote: bool,
}

/// What every handler shares.
pub struct Server {
    /// The token every API call must carry (`x-lamella-token`).
    token: String,
    /// Host header values that name this server (`127.0.0.1:PORT`, …);
    /// `None` when listening on every address (`--host 0.0.0.0
    /// --allow-remote`), where any name may reach it.
    hosts: Option<Vec<String>>,
    /// The scene file given on the command line and its confined folder.
    files: files::Files,
    /// Generation counters of live requests, and the match job.
    jobs: jobs::Jobs,
}

/// Runs the command: serves until stopped by a signal (Ctrl-C: exit 130).
pub fn run(args: &Args) -> CliResult {
    if !args.host.is_loopback() && !args.allow_remote {
        return Err(Failure::input(format!(
            "--host {}: not a loopback address; add --allow-remote to listen on it",
            args.host
        )));
    }
    let files = files::Files::open(args.scene.as_deref())?;
    let runtime = tokio::runtime::Builder::new_current_thread()
        .enable_io()
        .enable_time()
        .build()
        .map_err(|e| Failure::io(std::path::Path::new("<runtime>"), e))?;
    runtime.block_on(serve(args, files))
}

async fn serve(args: &Args, files: files::Files) -> CliResult {
    let address = SocketAddr::new(args.host, args.port);
    let listener = tokio::net::TcpListener::bind(address).await.map_err(|e| {
        Failure::input(format!(
            "--port {}: cannot listen on {address}: {e}",
            args.port
        ))
    })?;
    let port = listener
        .local_addr()
        .map_err(|e| Failure::io(std::path::Path::new("<socket>"), e))?
        .port();
    let shown = match args.host {
        IpAddr::V6(h) => format!("[{h}]:{port}"),
        IpAddr::V4(h) => format!("{h}:{port}"),
    };
    let mut hosts = vec![
        format!("127.0.0.1:{port}"),
        format!("localhost:{port}"),
        format!("[::1]:{port}"),
    ];
    if !hosts.contains(&shown) {
        hosts.push(shown.clone());
    }
    let server = Arc::new(Server {
        token: guard::new_token(),
        hosts: (!args.host.is_unspecified()).then_some(hosts),
        files,
        jobs: jobs::Jobs::default(),
    });
    if !args.host.is_loopback() {
        eprintln!(
            "lamella: warning: listening on {shown}, reachable from other machines: \
             anyone with the URL below can drive the designer and save over the scene{}",
            if args.host.is_unspecified() {
                " (on every address, so requests are not checked for the server's name)"
            } else {
                ""
            }
        );
    }
    // Ctrl-C, SIGTERM and SIGHUP end the process as for every command,
    // removing the temporary file of a save in progress.
    super::output::clean_up_on_signal();
    // Written once and never again: a closed stdout must not stop the server.
    use std::io::Write;
    let mut out = std::io::stdout().lock();
    let _ = writeln!(
        out,
        "lamella serve: open http://{shown}/#token={}\n(Ctrl-C stops the server)",
        server.token
    );
    let _ = out.flush();
    drop(out);
    axum::serve(listener, router(server))
        .await
        .map_err(|e| Failure::io(std::path::Path::new("<socket>"), e))
}

/// Every route, behind the guard and the body limit.
fn router(server: Arc<Server>) -> Router {
    Router::new()
        .route("/", get(page::index))
        .route("/app.js", get(page::script))
        .route("/style.css", get(page::style))
        .route("/api/session", get(api::session))
        .route("/api/live", post(api::live))
        .route("/api/spectrum", post(api::spectrum))
        .route("/api/spectra-chart", post(api::spectra_chart))
        .route("/api/render", post(api::render))
        .route("/api/report", post(api::report))
        .route("/api/save", post(api::save))
        .route("/api/match", post(api::start_match))
        .route("/api/match/{id}", get(api::match_status))
        .route("/api/match/{id}/cancel", post(api::cancel_match))
        .layer(axum::middleware::from_fn_with_state(
            server.clone(),
            guard::check,
        ))
        .layer(axum::extract::DefaultBodyLimit::disable())
        .layer(tower_http::limit::RequestBodyLimitLayer::new(
            guard::MAX_BODY_BYTES,
        ))
        .layer(axum::middleware::map_response(guard::json_refusals))
        .with_state(server)
}
