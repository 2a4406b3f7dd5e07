//! Measured reflectance CSV (`lamella fit --measured`), with the default
//! angle picked by the input's first byte (`tests/input_checks/documents.rs`).
#![no_main]

#[allow(dead_code)]
#[path = "../../tests/input_checks/documents.rs"]
mod documents;

const ANGLES: [f64; 6] = [0.0, 89.9, -45.0, 90.0, f64::NAN, f64::INFINITY];

libfuzzer_sys::fuzz_target!(|data: &[u8]| {
    let Some((&first, rest)) = data.split_first() else {
        return;
    };
    if let Ok(text) = std::str::from_utf8(rest) {
        documents::check_measured(text, ANGLES[first as usize % ANGLES.len()]);
    }
});
