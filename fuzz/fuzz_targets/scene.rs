//! Scene JSON: `Scene::from_json` and the readers of the same document
//! (`tests/input_checks/documents.rs`).
#![no_main]

#[allow(dead_code)]
#[path = "../../tests/input_checks/documents.rs"]
mod documents;

libfuzzer_sys::fuzz_target!(|data: &[u8]| {
    if let Ok(text) = std::str::from_utf8(data) {
        documents::check_scene(text);
    }
});
