//! The fuzz targets (`pvhazard::fuzz`) as a deterministic randomised harness: every input
//! of the committed corpus (`fuzz/corpus/<target>/`), then inputs mutated from it by a
//! seeded generator. By default a short smoke pass; `PVHAZARD_FUZZ_RUNS=1000000` runs that
//! many inputs per target, and `PVHAZARD_FUZZ_SEED` picks another sequence.

use std::panic::{catch_unwind, AssertUnwindSafe};
use std::path::Path;

/// Pieces the mutator splices in: numbers at the edges of f64, unit spellings, TOML syntax
/// and characters that a careless parser might slice through.
const TOKENS: &[&str] = &[
    "0",
    "-",
    "+",
    ".",
    "e",
    "E",
    "e-",
    "1e308",
    "1e-320",
    "1e400",
    "99999999999999999999",
    "nan",
    "inf",
    " ",
    "g",
    "a",
    "(g)",
    "(a)",
    "bar",
    "barg",
    "bara",
    "psi",
    "kPa",
    "MPa",
    "mbar",
    "m3",
    "L",
    "gal",
    "ft3",
    "mm",
    "in",
    "m",
    "C",
    "F",
    "K",
    "R",
    "°",
    "³",
    "µ",
    "/",
    "/min",
    "/s",
    "kg",
    "lb",
    "J",
    "MJ",
    "W/m2K",
    "s",
    "min",
    "h",
    "=",
    "\"",
    "'",
    "\n",
    "[",
    "]",
    "[[vessel]]",
    "[[cylinder]]",
    "[site]",
    "{",
    "}",
    ",",
    "#",
    "\\u0000",
    "\u{7}",
    "é",
    "Ж",
    "\u{202E}",
    "\u{FFFD}",
    "tag = ",
    "name = ",
    "volume = ",
    "cd = ",
];

/// splitmix64: small, fast and the same on every machine.
struct Rng(u64);

impl Rng {
    fn next(&mut self) -> u64 {
        self.0 = self.0.wrapping_add(0x9E37_79B9_7F4A_7C15);
        let mut z = self.0;
        z = (z ^ (z >> 30)).wrapping_mul(0xBF58_476D_1CE4_E5B9);
        z = (z ^ (z >> 27)).wrapping_mul(0x94D0_49BB_1331_11EB);
        z ^ (z >> 31)
    }

    fn below(&mut self, n: usize) -> usize {
        (self.next() % n.max(1) as u64) as usize
    }
}

fn corpus(target: &str) -> Vec<Vec<u8>> {
    let dir = Path::new(env!("CARGO_MANIFEST_DIR"))
        .join("fuzz/corpus")
        .join(target);
    let mut names: Vec<_> = std::fs::read_dir(&dir)
        .unwrap_or_else(|e| panic!("{}: {e}", dir.display()))
        .map(|e| e.expect("a corpus entry").path())
        .filter(|p| p.is_file())
        .collect();
    // Sorted, so that the sequence does not depend on the folder's order.
    names.sort();
    let inputs: Vec<Vec<u8>> = names
        .iter()
        .map(|p| std::fs::read(p).expect("a corpus file"))
        .collect();
    assert!(!inputs.is_empty(), "no corpus in {}", dir.display());
    inputs
}

/// One to four edits of `input`: a byte changed, a token inserted, a range deleted or
/// repeated, a piece of another input spliced in, or the end cut off.
fn mutate(rng: &mut Rng, input: &[u8], corpus: &[Vec<u8>]) -> Vec<u8> {
    let mut v = input.to_vec();
    for _ in 0..1 + rng.below(4) {
        let at = rng.below(v.len() + 1);
        match rng.below(6) {
            0 if !v.is_empty() => {
                let i = rng.below(v.len());
                v[i] = rng.next() as u8;
            }
            1 => {
                let t = TOKENS[rng.below(TOKENS.len())].as_bytes();
                v.splice(at..at, t.iter().copied());
            }
            2 if !v.is_empty() => {
                let end = (at + 1 + rng.below(16)).min(v.len());
                v.drain(at.min(end)..end);
            }
            3 if !v.is_empty() => {
                let start = rng.below(v.len());
                let end = (start + 1 + rng.below(32)).min(v.len());
                let piece = v[start..end].to_vec();
                v.splice(at..at, piece);
            }
            4 => {
                let other = &corpus[rng.below(corpus.len())];
                if !other.is_empty() {
                    let start = rng.below(other.len());
                    let end = (start + 1 + rng.below(64)).min(other.len());
                    v.splice(at..at, other[start..end].iter().copied());
                }
            }
            _ => v.truncate(at),
        }
    }
    v
}

/// The corpus, then `runs` inputs in all (at least the corpus).
fn harness(target: &str, default_runs: usize, check: fn(&[u8])) {
    let runs: usize = std::env::var("PVHAZARD_FUZZ_RUNS")
        .ok()
        .and_then(|v| v.parse().ok())
        .unwrap_or(default_runs);
    let seed: u64 = std::env::var("PVHAZARD_FUZZ_SEED")
        .ok()
        .and_then(|v| v.parse().ok())
        .unwrap_or(0x5EED);
    let corpus = corpus(target);
    let mut rng = Rng(seed);
    let started = std::time::Instant::now();
    let total = runs.max(corpus.len());
    for i in 0..total {
        let input = if i < corpus.len() {
            corpus[i].clone()
        } else {
            let base = &corpus[rng.below(corpus.len())];
            mutate(&mut rng, base, &corpus)
        };
        if let Err(e) = catch_unwind(AssertUnwindSafe(|| check(&input))) {
            eprintln!(
                "{target}: input {i} (seed {seed}) broke a property: {:?}",
                String::from_utf8_lossy(&input)
            );
            std::panic::resume_unwind(e);
        }
    }
    println!(
        "{target}: {total} inputs in {:.1} s (seed {seed})",
        started.elapsed().as_secs_f64()
    );
}

#[test]
fn the_quantity_parsers_hold_their_properties_on_mutated_input() {
    harness("quantity", 100_000, pvhazard::fuzz::quantity);
}

#[test]
fn the_site_reader_holds_its_properties_on_mutated_input() {
    harness("site_file", 50_000, pvhazard::fuzz::site_file);
}
