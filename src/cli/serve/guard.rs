//! The checks every request passes before a handler sees it: the Host
//! header names this server, an Origin (when sent) is the page's own (the
//! address in Host), and API calls carry the session token.

use std::sync::Arc;

use axum::extract::{Request, State};
use axum::http::{HeaderMap, StatusCode, header};
use axum::middleware::Next;
use axum::response::{IntoResponse, Response};
use rand::Rng;

use super::Server;
use super::api::ApiError;

/// Largest request body accepted, bytes: a scene document with inline
/// tables fits many times over.
pub const MAX_BODY_BYTES: usize = 2 << 20;

/// The header that carries the token.
pub const TOKEN_HEADER: &str = "x-lamella-token";

/// A fresh random token: 128 bits from the operating system's generator
/// (through `rand`'s thread generator), as hex.
pub fn new_token() -> String {
    let bytes: [u8; 16] = rand::rng().random();
    bytes.iter().map(|b| format!("{b:02x}")).collect()
}

/// Refuses a request whose Host or Origin is foreign (403) or an API call
/// without the token (401), with a JSON error.
pub async fn check(State(server): State<Arc<Server>>, request: Request, next: Next) -> Response {
    match refusal(&server, request.headers(), request.uri().path()) {
        Some(e) => e.into_response(),
        None => next.run(request).await,
    }
}

fn refusal(server: &Server, headers: &HeaderMap, path: &str) -> Option<ApiError> {
    let text = |name: &str| headers.get(name).and_then(|v| v.to_str().ok());
    let host = text(header::HOST.as_str()).unwrap_or("");
    let known = match &server.hosts {
        Some(hosts) => hosts.iter().any(|h| h.eq_ignore_ascii_case(host)),
        None => !host.is_empty(),
    };
    if !known {
        return Some(ApiError::new(
            StatusCode::FORBIDDEN,
            format!("Host `{host}` is not this server; open the address lamella serve printed"),
        ));
    }
    if let Some(origin) = text(header::ORIGIN.as_str()) {
        // The page's own origin is the address it was loaded from.
        if !origin.eq_ignore_ascii_case(&format!("http://{host}")) {
            return Some(ApiError::new(
                StatusCode::FORBIDDEN,
                format!(
                    "Origin `{origin}` is not this server: requests from other pages are refused"
                ),
            ));
        }
    }
    if path.starts_with("/api/") {
        let given = text(TOKEN_HEADER).unwrap_or("");
        if !same(given.as_bytes(), server.token.as_bytes()) {
            return Some(ApiError::new(
                StatusCode::UNAUTHORIZED,
                "missing or wrong token: open the full address lamella serve printed (with #token=…)",
            ));
        }
    }
    None
}

/// A body refused for its size (by the limit layer, before any handler) is
/// answered with a JSON error like every other refusal.
pub async fn json_refusals(response: Response) -> Response {
    let json = response
        .headers()
        .get(header::CONTENT_TYPE)
        .is_some_and(|t| t.as_bytes().starts_with(b"application/json"));
    if response.status() == StatusCode::PAYLOAD_TOO_LARGE && !json {
        return ApiError::new(
            StatusCode::PAYLOAD_TOO_LARGE,
            format!("request body: larger than the {MAX_BODY_BYTES} bytes the page may send"),
        )
        .into_response();
    }
    response
}

/// Byte strings compared in time independent of where they differ.
fn same(a: &[u8], b: &[u8]) -> bool {
    a.len() == b.len() && a.iter().zip(b).fold(0u8, |acc, (x, y)| acc | (x ^ y)) == 0
}
