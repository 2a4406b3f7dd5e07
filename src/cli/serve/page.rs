//! The page's assets, embedded in the binary: written by hand, no build step.

use axum::http::header;
use axum::response::IntoResponse;

/// `GET /`: the page.
pub async fn index() -> impl IntoResponse {
    (
        [
            (header::CONTENT_TYPE, "text/html; charset=utf-8"),
            (header::CACHE_CONTROL, "no-store"),
        ],
        include_str!("page/index.html"),
    )
}

/// `GET /app.js`: the page's script.
pub async fn script() -> impl IntoResponse {
    (
        [
            (header::CONTENT_TYPE, "text/javascript; charset=utf-8"),
            (header::CACHE_CONTROL, "no-store"),
        ],
        include_str!("page/app.js"),
    )
}

/// `GET /style.css`: the page's style sheet.
pub async fn style() -> impl IntoResponse {
    (
        [
            (header::CONTENT_TYPE, "text/css; charset=utf-8"),
            (header::CACHE_CONTROL, "no-store"),
        ],
        include_str!("page/style.css"),
    )
}
