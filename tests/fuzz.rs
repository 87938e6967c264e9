//! Mutation fuzzing of the three input readers (the case parser with its validation and the
//! `check` estimates, soil files, the climate CSV reader) with proptest: every mutated input gives
//! a result or an error that names its file, never a panic (proptest reports a panic as a failure
//! and shrinks it to a smallest mutation).
//!
//! CI runs a short budget (`FUZZ_CASES`, default 1000 mutants per harness and seed round). A long
//! run, for example ten minutes per harness:
//!
//! ```text
//! FUZZ_SECONDS=600 cargo test --release --test fuzz -- --nocapture --test-threads 3
//! ```
//!
//! Each round draws a new seed from the clock unless `FUZZ_SEED` fixes it; a failure prints
//! the seed and the shrunk input.
use frostline::case::parse_case;
use frostline::physics::climate::{read_series_from, ReadOptions};
use frostline::physics::library::parse_soil_file;
use proptest::prelude::*;
use proptest::test_runner::{Config, RngAlgorithm, TestRng, TestRunner};
use std::time::{Duration, Instant};

/// Values a user could plausibly mistype or an attacker could plant.
const TOKENS: &[&str] = &[
    "0",
    "-1",
    "1",
    "0.001",
    "-0.0",
    "1e308",
    "-1e308",
    "1e-300",
    "nan",
    "inf",
    "-inf",
    "2.5",
    "99999999999",
    "1e9",
    "\"\"",
    "\"x\"",
    "[]",
    "{}",
    "true",
    "[[a]]",
    "\"/dev/zero\"",
    "\"../\"",
    "1990-01-01",
    "9999-12-31",
    "0001-01-01",
    "99999999999-01-01",
    ",",
    "=",
    "#",
    "\n",
    "\"",
    "é",
    "\u{0}",
    "-",
    ".",
    "[",
    "]",
];

/// One edit of a text.
#[derive(Debug, Clone)]
enum Edit {
    /// Replace what follows the first '=' (or ',') of line `line` with a token.
    Value { line: usize, token: usize },
    /// Insert a token at a byte position (rounded down to a character boundary).
    Insert { at: usize, token: usize },
    /// Delete `len` bytes from `at`.
    Delete { at: usize, len: usize },
    /// Repeat line `line` `times` times.
    Repeat { line: usize, times: usize },
    /// Cut the text at `at`.
    Truncate { at: usize },
}

fn edit() -> impl Strategy<Value = Edit> {
    let t = 0..TOKENS.len();
    prop_oneof![
        4 => (0..400usize, t.clone()).prop_map(|(line, token)| Edit::Value { line, token }),
        2 => (0..20_000usize, t).prop_map(|(at, token)| Edit::Insert { at, token }),
        2 => (0..20_000usize, 1..40usize).prop_map(|(at, len)| Edit::Delete { at, len }),
        1 => (0..400usize, 2..5usize).prop_map(|(line, times)| Edit::Repeat { line, times }),
        1 => (0..20_000usize).prop_map(|at| Edit::Truncate { at }),
    ]
}

fn floor_char(s: &str, at: usize) -> usize {
    let mut at = at % (s.len() + 1);
    while !s.is_char_boundary(at) {
        at -= 1;
    }
    at
}

fn apply(text: &str, edits: &[Edit]) -> String {
    let mut s = text.to_string();
    for e in edits {
        match *e {
            Edit::Value { line, token } => {
                let mut lines: Vec<String> = s.lines().map(String::from).collect();
                if lines.is_empty() {
                    continue;
                }
                let k = line % lines.len();
                if let Some(p) = lines[k].find(['=', ',']) {
                    lines[k] = format!("{} {}", &lines[k][..=p], TOKENS[token]);
                }
                s = lines.join("\n");
            }
            Edit::Insert { at, token } => {
                let at = floor_char(&s, at);
                s.insert_str(at, TOKENS[token]);
            }
            Edit::Delete { at, len } => {
                let a = floor_char(&s, at);
                let b = floor_char(&s, a + len.min(s.len() - a));
                s.replace_range(a..b.max(a), "");
            }
            Edit::Repeat { line, times } => {
                let mut lines: Vec<String> = s.lines().map(String::from).collect();
                if lines.is_empty() {
                    continue;
                }
                let k = line % lines.len();
                let copy = lines[k].clone();
                for _ in 1..times {
                    lines.insert(k, copy.clone());
                }
                s = lines.join("\n");
            }
            Edit::Truncate { at } => {
                let at = floor_char(&s, at);
                s.truncate(at);
            }
        }
    }
    s
}

/// Run `test` on mutants of `texts` for the budget; `test` says whether the mutant was read
/// without error.
fn fuzz(texts: Vec<(String, String)>, test: impl Fn(&str, &str) -> Result<bool, TestCaseError>) {
    let accepted = std::cell::Cell::new(0u64);
    let cases: u32 = std::env::var("FUZZ_CASES")
        .ok()
        .and_then(|v| v.parse().ok())
        .unwrap_or(1000);
    let seconds: u64 = std::env::var("FUZZ_SECONDS")
        .ok()
        .and_then(|v| v.parse().ok())
        .unwrap_or(0);
    let fixed_seed: Option<u64> = std::env::var("FUZZ_SEED").ok().and_then(|v| v.parse().ok());
    let start = Instant::now();
    let n = texts.len();
    let strategy = (0..n, prop::collection::vec(edit(), 1..6));
    let (mut total, mut round) = (0u64, 0u64);
    loop {
        let seed = fixed_seed.unwrap_or_else(|| {
            std::time::SystemTime::now()
                .duration_since(std::time::UNIX_EPOCH)
                .map_or(0, |d| d.as_nanos() as u64)
        }) ^ round.wrapping_mul(0x9E37_79B9_7F4A_7C15);
        let mut seed_bytes = [0u8; 32];
        seed_bytes[..8].copy_from_slice(&seed.to_le_bytes());
        let mut runner = TestRunner::new_with_rng(
            Config {
                cases,
                failure_persistence: None,
                ..Config::default()
            },
            TestRng::from_seed(RngAlgorithm::ChaCha, &seed_bytes),
        );
        let result = runner.run(&strategy, |(k, edits)| {
            let (name, text) = &texts[k];
            let ok = test(name, &apply(text, &edits))?;
            accepted.set(accepted.get() + u64::from(ok));
            Ok(())
        });
        if let Err(e) = result {
            panic!("seed {seed} (FUZZ_SEED={seed} reproduces it): {e}");
        }
        total += u64::from(cases);
        round += 1;
        if fixed_seed.is_some() || start.elapsed() >= Duration::from_secs(seconds) {
            break;
        }
    }
    eprintln!(
        "{total} mutants in {:.0} s, {} of them read without error, no panic",
        start.elapsed().as_secs_f64(),
        accepted.get()
    );
}

fn files_in(dir: &str, ext: &str) -> Vec<(String, String)> {
    let mut v: Vec<(String, String)> = std::fs::read_dir(dir)
        .expect("bundled directory")
        .filter_map(|e| e.ok().map(|e| e.path()))
        .filter(|p| p.extension().is_some_and(|x| x == ext))
        .map(|p| {
            let text = std::fs::read_to_string(&p).expect("bundled file");
            (p.display().to_string(), text)
        })
        .collect();
    v.sort();
    v
}

/// Case files (every bundled example, mutated): parse, validate and, when valid, the `check`
/// estimates (mesh size limits, closed-form frost depth, ISO 13370). An error names the case file
/// or the file it refers to (a climate series or soil file).
#[test]
fn mutated_case_files_never_panic() {
    fuzz(files_in("examples", "toml"), |name, text| {
        let names_a_file = |e: &frostline::error::Error| {
            let m = e.to_string();
            m.contains(name) || m.contains("(file)")
        };
        match parse_case(name, text) {
            Ok(case) => match frostline::report::text::check_text(&case) {
                Ok(_) => Ok(true),
                Err(e) => {
                    prop_assert!(names_a_file(&e), "{e}");
                    Ok(false)
                }
            },
            Err(e) => {
                prop_assert!(names_a_file(&e), "{e}");
                Ok(false)
            }
        }
    });
}

/// Soil files (every bundled soil, mutated).
#[test]
fn mutated_soil_files_never_panic() {
    fuzz(
        files_in("soils", "toml"),
        |name, text| match parse_soil_file(name, text) {
            Ok(_) => Ok(true),
            Err(e) => {
                prop_assert!(e.to_string().contains(name), "{e}");
                Ok(false)
            }
        },
    );
}

/// Climate CSV files (the first 800 lines of each bundled series, mutated), and the winter
/// statistics of what reads.
#[test]
fn mutated_climate_csv_never_panic() {
    let texts = files_in("climate", "csv")
        .into_iter()
        .map(|(n, t)| (n, t.lines().take(800).collect::<Vec<_>>().join("\n")))
        .collect();
    fuzz(texts, |name, text| {
        match read_series_from(text.as_bytes(), name, &ReadOptions::default()) {
            Ok(s) => {
                let _ = frostline::physics::climate::freezing_indices(&s);
                let _ = frostline::physics::climate::annual_sinusoid(&s);
                Ok(true)
            }
            Err(e) => {
                prop_assert!(e.to_string().contains(name), "{e}");
                Ok(false)
            }
        }
    });
}
