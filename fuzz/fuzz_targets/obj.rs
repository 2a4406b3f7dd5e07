//! Wavefront OBJ meshes (`--shape mesh:FILE`; `tests/input_checks/documents.rs`).
#![no_main]

#[allow(dead_code)]
#[path = "../../tests/input_checks/documents.rs"]
mod documents;

libfuzzer_sys::fuzz_target!(|data: &[u8]| documents::check_obj(data));
