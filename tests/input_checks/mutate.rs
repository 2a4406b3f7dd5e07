//! Seeded mutations of seed documents for the in-suite fuzz tests: byte
//! flips, truncations, inserted fragments, numbers swapped for huge,
//! negative, tiny or not-a-number text, lines deleted or repeated, and for
//! JSON, members deleted or duplicated and values swapped for odd ones.
//! Each edit is a few numbers that proptest draws (and shrinks).

use proptest::prelude::*;
use proptest::test_runner::{Config, RngAlgorithm, TestRng, TestRunner};
use serde_json::Value;

/// Replacements for a number.
pub const NUMBERS: &[&str] = &[
    "0",
    "-0",
    "-1",
    "1e308",
    "-1e308",
    "1e309",
    "1e-320",
    "NaN",
    "nan",
    "inf",
    "-inf",
    "18446744073709551616",
    "4294967297",
    "9007199254740993",
    "0.1e999999",
    "1.5",
    "-2.5e3",
    "",
    "1e",
    "--1",
    "0x10",
    "00",
];

/// Replacements for a JSON value.
pub const JSON_VALUES: &[&str] = &[
    "null",
    "true",
    "[]",
    "{}",
    "\"\"",
    "\"a\\nb\"",
    "\"\\u0000\"",
    "\"x\"",
    "[1]",
    "[1,2]",
    "[2,1]",
    "[[1,2],[2,3]]",
    "{\"a\":1}",
    "-1",
    "0",
    "1e308",
    "1e-320",
    "18446744073709551616",
    "0.5",
    "\"air\"",
    "\"45as15\"",
    "\"black\"",
    "\"mesh:nk.csv\"",
    "\"light.csv\"",
    "\"nk.csv\"",
];

/// One edit; `at` and `pick` are reduced modulo what they index.
#[derive(Debug, Clone, Copy)]
pub struct Edit {
    pub kind: u8,
    pub at: usize,
    pub pick: usize,
}

/// A strategy for one to four edits.
pub fn edits() -> impl Strategy<Value = Vec<Edit>> {
    let edit = (0u8..9, any::<usize>(), any::<usize>()).prop_map(|(kind, at, pick)| Edit {
        kind,
        at,
        pick,
    });
    proptest::collection::vec(edit, 1..=4)
}

/// A runner with a fixed seed and no failure files, for `cases` cases.
pub fn runner(cases: u32) -> TestRunner {
    let config = Config {
        cases,
        failure_persistence: None,
        ..Config::default()
    };
    TestRunner::new_with_rng(config, TestRng::deterministic_rng(RngAlgorithm::ChaCha))
}

/// `seed` with `edits` applied; `fragments` are inserted or swapped in.
pub fn apply(seed: &[u8], edits: &[Edit], fragments: &[&str]) -> Vec<u8> {
    edits
        .iter()
        .fold(seed.to_vec(), |doc, e| edit(&doc, *e, fragments))
}

fn edit(doc: &[u8], e: Edit, fragments: &[&str]) -> Vec<u8> {
    let at = e.at % (doc.len() + 1);
    let number = NUMBERS[e.pick % NUMBERS.len()];
    match e.kind {
        0 => {
            let mut d = doc.to_vec();
            if !d.is_empty() {
                let i = e.at % d.len();
                d[i] ^= 1 << (e.pick % 8);
            }
            d
        }
        1 => doc[..at].to_vec(),
        2 => [
            &doc[..at],
            fragments[e.pick % fragments.len()].as_bytes(),
            &doc[at..],
        ]
        .concat(),
        3 => swap_number(doc, e.at, number),
        4 | 5 => {
            let mut lines: Vec<&[u8]> = doc.split_inclusive(|&b| b == b'\n').collect();
            if !lines.is_empty() {
                let i = e.at % lines.len();
                if e.kind == 4 {
                    lines.insert(i, lines[i]);
                } else {
                    lines.remove(i);
                }
            }
            lines.concat()
        }
        _ => match serde_json::from_slice::<Value>(doc) {
            Ok(v) => {
                let target = e.at % size(&v).max(1);
                let mut out = String::new();
                write(&v, &mut out, &mut 0, target, e);
                out.into_bytes()
            }
            Err(_) => swap_number(doc, e.at, number),
        },
    }
}

/// The `nth` (modulo their count) run of number characters replaced by `with`.
fn swap_number(doc: &[u8], nth: usize, with: &str) -> Vec<u8> {
    let part = |b: &u8| b.is_ascii_digit() || b".eE+-".contains(b);
    let mut runs = Vec::new();
    let mut i = 0;
    while i < doc.len() {
        if part(&doc[i]) {
            let start = i;
            while i < doc.len() && part(&doc[i]) {
                i += 1;
            }
            if doc[start..i].iter().any(u8::is_ascii_digit) {
                runs.push(start..i);
            }
        } else {
            i += 1;
        }
    }
    if runs.is_empty() {
        return doc.to_vec();
    }
    let r = runs[nth % runs.len()].clone();
    [&doc[..r.start], with.as_bytes(), &doc[r.end..]].concat()
}

/// Number of object members and array elements, at every depth.
fn size(v: &Value) -> usize {
    match v {
        Value::Object(m) => m.values().map(|x| 1 + size(x)).sum(),
        Value::Array(xs) => xs.iter().map(|x| 1 + size(x)).sum(),
        _ => 0,
    }
}

/// Writes `v` as JSON; the member or element numbered `target` (in writing
/// order) is deleted (kind 6), written twice (7) or given an odd value (8).
fn write(v: &Value, out: &mut String, n: &mut usize, target: usize, e: Edit) {
    let children: Vec<(Option<&String>, &Value)> = match v {
        Value::Object(m) => m.iter().map(|(k, x)| (Some(k), x)).collect(),
        Value::Array(xs) => xs.iter().map(|x| (None, x)).collect(),
        leaf => return out.push_str(&leaf.to_string()),
    };
    let (open, close) = if v.is_object() {
        ('{', '}')
    } else {
        ('[', ']')
    };
    out.push(open);
    let mut first = true;
    for (key, x) in children {
        let here = *n == target;
        *n += 1;
        let times = match e.kind {
            6 if here => 0,
            7 if here => 2,
            _ => 1,
        };
        for _ in 0..times {
            if !first {
                out.push(',');
            }
            first = false;
            if let Some(k) = key {
                out.push_str(&Value::String(k.clone()).to_string());
                out.push(':');
            }
            if here && e.kind == 8 {
                out.push_str(JSON_VALUES[e.pick % JSON_VALUES.len()]);
            } else {
                write(x, out, n, target, e);
            }
        }
    }
    out.push(close);
}
