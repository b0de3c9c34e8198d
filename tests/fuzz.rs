//! Fuzzing every parser a user's text or file reaches, on the stable toolchain with proptest:
//! masses, decimals, fractions, standard volumes, dates, leak rates, areas, temperatures and
//! pressures, formulas, import column maps, CSV records and bundle lines. The property of each:
//! it never panics, and what it accepts prints back to text that parses to the same value
//! (the same grams, the same date, the same line byte for byte).
//!
//! `cargo test` runs every target with a fixed seed; `cargo test --release -- --ignored fuzz
//! --nocapture` runs them long (`SINKBOOK_FUZZ_CASES` per target, default 200,000, from a seed
//! it prints), printing the count and the cases per second. Every input that ever failed is
//! kept under tests/fuzz-corpus/TARGET/ and replayed by `the_corpus_still_passes`; the long run
//! writes what it finds there. tests/fuzz-corpus/bundle-line/real-*.txt are lines of a real
//! bundle (the demo's), which the bundle target's mutations start from.

use proptest::prelude::*;
use proptest::strategy::BoxedStrategy;
use proptest::test_runner::{Config, RngAlgorithm, TestError, TestRng, TestRunner};
use sinkbook::accounting::leakage::LeakRate;
use sinkbook::bundle::line::Line;
use sinkbook::chem::formula::Formula;
use sinkbook::import::csv_records::{Record, Records};
use sinkbook::import::meter_csv::ColumnMap;
use sinkbook::ledger::period::parse_date;
use sinkbook::quantity::area::Area;
use sinkbook::quantity::conditions::{atmosphere, parse_pressure, parse_temperature};
use sinkbook::quantity::fraction::parse_uncertainty;
use sinkbook::quantity::volume::StandardVolume;
use sinkbook::quantity::{Decimal, Fraction, MassReading};
use std::path::PathBuf;
use std::time::Instant;

/// A parser under test: its name (the corpus folder), what it is fed, and its property
/// (Err says what broke).
struct Target {
    name: &'static str,
    input: fn() -> BoxedStrategy<Vec<u8>>,
    check: fn(&[u8]) -> Result<(), String>,
}

fn text(b: &[u8]) -> Result<&str, String> {
    std::str::from_utf8(b).map_err(|_| "skip".into())
}

/// Any text, or text shaped like what the parser reads (a number, a unit, conditions), so the
/// cases reach past the first refusal.
fn quantity_text() -> BoxedStrategy<Vec<u8>> {
    prop_oneof![
        "\\PC{0,40}",
        "[-+]?[0-9]{0,7}(\\.[0-9]{0,7})?([eE][-+]?[0-9]{1,3})?%? ?(g|kg|t|kt|Mt|lb|short_ton|long_ton|m3|scf|Mscf|MMscf|Sm3|t/h|kg/d|t/day|ha|m2|km2|acre|C|F|K|bar|psia|kPa|MPa|psig|barg)?(@-?[0-9]{1,3}(\\.[0-9])?(C|F|K),[0-9]{1,3}(\\.[0-9]{1,3})?(psia|kPa|bar|MPa))?",
    ]
    .prop_map(String::into_bytes)
    .boxed()
}

fn date_text() -> BoxedStrategy<Vec<u8>> {
    prop_oneof![
        "\\PC{0,14}",
        "[+-]?[0-9]{1,6}-[0-9]{1,2}-[0-9]{1,2}",
        " ?[0-9]{4}-[01][0-9]-[0-3][0-9] ?",
    ]
    .prop_map(String::into_bytes)
    .boxed()
}

fn formula_text() -> BoxedStrategy<Vec<u8>> {
    prop_oneof![
        "\\PC{0,24}",
        "[A-Za-z0-9()\\[\\].·⋅* ]{0,24}",
        "((Ca|Mg|Fe|Si|O|H|C|Na|K|Al)[0-9]{0,2}){1,5}([·.*][0-9]?H2O)?",
    ]
    .prop_map(String::into_bytes)
    .boxed()
}

fn columns_text() -> BoxedStrategy<Vec<u8>> {
    prop_oneof!["\\PC{0,40}", "([a-z_]{1,12}=[A-Za-z ]{0,8},?){0,6}",]
        .prop_map(String::into_bytes)
        .boxed()
}

/// Meter files: any bytes, or rows built of the characters that matter to CSV (quotes,
/// separators, line ends) among plausible fields.
fn csv_bytes() -> BoxedStrategy<Vec<u8>> {
    prop_oneof![
        proptest::collection::vec(any::<u8>(), 0..300),
        proptest::collection::vec(
            prop_oneof![
                Just(b"\"".to_vec()),
                Just(b",".to_vec()),
                Just(b"\n".to_vec()),
                Just(b"\r\n".to_vec()),
                Just(b"\r".to_vec()),
                Just(b"\xef\xbb\xbf".to_vec()),
                Just(b"2026-05-01T06:00:00Z".to_vec()),
                Just(b"TF-I1".to_vec()),
                Just(b"310.5".to_vec()),
                Just(b"t".to_vec()),
            ],
            0..60
        )
        .prop_map(|parts| parts.concat()),
    ]
    .boxed()
}

/// Bundle lines: lines of a real bundle (the corpus's seeds) with bytes changed, cut or added,
/// and JSON-shaped text.
fn bundle_text() -> BoxedStrategy<Vec<u8>> {
    let seeds = corpus("bundle-line");
    assert!(
        !seeds.is_empty(),
        "tests/fuzz-corpus/bundle-line holds real bundle lines"
    );
    let mutated = (
        proptest::sample::select(seeds),
        proptest::collection::vec((any::<prop::sample::Index>(), any::<u8>(), 0..3u8), 1..4),
    )
        .prop_map(|((_, line), edits)| {
            let mut b = line;
            for (at, byte, how) in edits {
                if b.is_empty() {
                    b.push(byte);
                    continue;
                }
                let i = at.index(b.len());
                match how {
                    0 => b[i] = byte,
                    1 => {
                        b.remove(i);
                    }
                    _ => b.insert(i, byte),
                }
            }
            b
        });
    prop_oneof![
        mutated,
        "\\{(\"[a-z_]{1,9}\":(\"[a-z0-9 ]{0,6}\"|-?[0-9]{1,20}|null|true|\\[\\]|\\{\\}),?){0,5}\\}"
            .prop_map(String::into_bytes),
    ]
    .boxed()
}

fn check_mass(b: &[u8]) -> Result<(), String> {
    let Ok(r) = MassReading::parse(text(b)?) else {
        return Ok(());
    };
    let again =
        MassReading::parse(&r.to_string()).map_err(|e| format!("{r} does not parse: {e}"))?;
    if again.grams_exact() != r.grams_exact() || again.to_mass() != r.to_mass() {
        return Err(format!("{r} parses to other grams"));
    }
    Ok(())
}

/// What `parse` accepts prints back to text it reads as the same value.
fn round_trips<T, E>(b: &[u8], parse: fn(&str) -> Result<T, E>) -> Result<(), String>
where
    T: std::fmt::Display + std::fmt::Debug + PartialEq,
    E: std::fmt::Debug,
{
    let Ok(v) = parse(text(b)?) else {
        return Ok(());
    };
    match parse(&v.to_string()) {
        Ok(w) if w == v => Ok(()),
        other => Err(format!("{v} reads back as {other:?}")),
    }
}

fn check_decimal(b: &[u8]) -> Result<(), String> {
    round_trips(b, Decimal::parse)
}

fn check_fraction(b: &[u8]) -> Result<(), String> {
    let t = text(b)?;
    let _ = parse_uncertainty(t);
    let Ok(f) = Fraction::parse(t) else {
        return Ok(());
    };
    let v = f.value();
    if !v.is_positive() || v.cmp_value(Decimal::from_int(1)).is_gt() {
        return Err(format!("{f} is outside (0, 1]"));
    }
    round_trips(b, Fraction::parse)
}

fn check_volume(b: &[u8]) -> Result<(), String> {
    let Ok(v) = StandardVolume::parse(text(b)?) else {
        return Ok(());
    };
    let again =
        StandardVolume::parse(&v.to_string()).map_err(|e| format!("{v} does not parse: {e}"))?;
    if again.to_string() != v.to_string() || again.m3() != v.m3() {
        return Err(format!("{v} reads back as {again}"));
    }
    Ok(())
}

fn check_date(b: &[u8]) -> Result<(), String> {
    round_trips(b, parse_date)
}

fn check_rate(b: &[u8]) -> Result<(), String> {
    round_trips(b, LeakRate::parse)
}

fn check_area(b: &[u8]) -> Result<(), String> {
    round_trips(b, Area::parse)
}

fn check_conditions(b: &[u8]) -> Result<(), String> {
    let t = text(b)?;
    let _ = parse_temperature(t);
    let _ = parse_pressure(t, atmosphere());
    Ok(())
}

fn check_formula(b: &[u8]) -> Result<(), String> {
    round_trips(b, Formula::parse)
}

fn check_columns(b: &[u8]) -> Result<(), String> {
    let _ = ColumnMap::parse(Some(text(b)?));
    Ok(())
}

/// Every record's lines follow the one before it, and a record's last line is not before its
/// first: a quote left open is counted over every line it took.
fn check_csv(b: &[u8]) -> Result<(), String> {
    let mut records = Records::new(b);
    let mut rec = Record::default();
    let mut last = 0;
    while let Ok(true) = records.next_into(&mut rec) {
        if rec.line <= last || rec.last_line < rec.line {
            return Err(format!(
                "record at lines {}-{} after line {last}",
                rec.line, rec.last_line
            ));
        }
        last = rec.last_line;
    }
    Ok(())
}

fn check_bundle(b: &[u8]) -> Result<(), String> {
    let t = text(b)?;
    let Ok(line) = Line::parse(t) else {
        return Ok(());
    };
    if line.to_text() != format!("{t}\n") {
        return Err("a line accepted is not written back byte for byte".into());
    }
    Ok(())
}

const TARGETS: &[Target] = &[
    Target {
        name: "mass",
        input: quantity_text,
        check: check_mass,
    },
    Target {
        name: "decimal",
        input: quantity_text,
        check: check_decimal,
    },
    Target {
        name: "fraction",
        input: quantity_text,
        check: check_fraction,
    },
    Target {
        name: "volume",
        input: quantity_text,
        check: check_volume,
    },
    Target {
        name: "date",
        input: date_text,
        check: check_date,
    },
    Target {
        name: "rate",
        input: quantity_text,
        check: check_rate,
    },
    Target {
        name: "area",
        input: quantity_text,
        check: check_area,
    },
    Target {
        name: "conditions",
        input: quantity_text,
        check: check_conditions,
    },
    Target {
        name: "formula",
        input: formula_text,
        check: check_formula,
    },
    Target {
        name: "columns",
        input: columns_text,
        check: check_columns,
    },
    Target {
        name: "csv",
        input: csv_bytes,
        check: check_csv,
    },
    Target {
        name: "bundle-line",
        input: bundle_text,
        check: check_bundle,
    },
];

/// A target's property, with a panic turned into a failure (proptest's runner does the same).
fn holds(t: &Target, input: &[u8]) -> Result<(), String> {
    match std::panic::catch_unwind(|| (t.check)(input)) {
        Ok(Err(e)) if e == "skip" => Ok(()),
        Ok(r) => r,
        Err(_) => Err("panicked".into()),
    }
}

fn corpus_dir(target: &str) -> PathBuf {
    PathBuf::from(env!("CARGO_MANIFEST_DIR"))
        .join("tests/fuzz-corpus")
        .join(target)
}

/// The kept inputs of a target, by file name.
fn corpus(target: &str) -> Vec<(String, Vec<u8>)> {
    let Ok(dir) = std::fs::read_dir(corpus_dir(target)) else {
        return Vec::new();
    };
    let mut all: Vec<(String, Vec<u8>)> = dir
        .map(|e| e.unwrap().path())
        .map(|p| {
            let name = p.file_name().unwrap().to_string_lossy().into_owned();
            (name, std::fs::read(&p).unwrap())
        })
        .collect();
    all.sort();
    all
}

/// Runs `cases` cases of a target from `seed`; on a failure keeps the (shrunk) input in the
/// corpus when `keep`, and returns what broke.
fn run(t: &Target, cases: u32, seed: [u8; 32], keep: bool) -> Result<(), String> {
    let config = Config {
        cases,
        failure_persistence: None,
        max_shrink_iters: 2000,
        ..Config::default()
    };
    let mut runner =
        TestRunner::new_with_rng(config, TestRng::from_seed(RngAlgorithm::ChaCha, &seed));
    let result = runner.run(&(t.input)(), |input| {
        holds(t, &input).map_err(TestCaseError::fail)
    });
    match result {
        Ok(()) => Ok(()),
        Err(TestError::Fail(why, input)) => {
            if keep {
                let dir = corpus_dir(t.name);
                std::fs::create_dir_all(&dir).unwrap();
                let name = format!(
                    "found-{}.txt",
                    &sinkbook::ledger::Hash::of(&input).to_hex()[..12]
                );
                std::fs::write(dir.join(&name), &input).unwrap();
            }
            Err(format!(
                "{}: {why} on {:?}",
                t.name,
                String::from_utf8_lossy(&input)
            ))
        }
        Err(TestError::Abort(why)) => Err(format!("{}: aborted: {why}", t.name)),
    }
}

#[test]
fn every_parser_holds_its_property_with_a_fixed_seed() {
    let mut broken = Vec::new();
    for t in TARGETS {
        if let Err(e) = run(t, 512, [42; 32], false) {
            broken.push(e);
        }
    }
    assert!(broken.is_empty(), "{broken:#?}");
}

#[test]
fn the_corpus_still_passes() {
    let mut replayed = 0;
    for t in TARGETS {
        for (name, input) in corpus(t.name) {
            holds(t, &input).unwrap_or_else(|e| panic!("tests/fuzz-corpus/{}/{name}: {e}", t.name));
            replayed += 1;
        }
    }
    let folders: Vec<String> = std::fs::read_dir(corpus_dir(""))
        .unwrap()
        .map(|e| e.unwrap().file_name().to_string_lossy().into_owned())
        .collect();
    for f in &folders {
        assert!(
            TARGETS.iter().any(|t| t.name == f),
            "tests/fuzz-corpus/{f} is no target's: its inputs would never be replayed"
        );
    }
    assert!(replayed > 0, "the corpus is empty");
}

/// The long run: `cargo test --release -- --ignored fuzz --nocapture`.
#[test]
#[ignore = "long: run with cargo test --release -- --ignored fuzz"]
fn fuzz_every_parser_long() {
    let cases: u32 = std::env::var("SINKBOOK_FUZZ_CASES")
        .ok()
        .and_then(|n| n.parse().ok())
        .unwrap_or(200_000);
    let seed: [u8; 32] =
        sinkbook::ledger::Hash::of(format!("{:?}", std::time::SystemTime::now()).as_bytes()).0;
    eprintln!("seed {}", sinkbook::ledger::Hash(seed).to_hex());
    let mut broken = Vec::new();
    let mut total = 0u64;
    let all = Instant::now();
    for t in TARGETS {
        let start = Instant::now();
        let r = run(t, cases, seed, true);
        let s = start.elapsed().as_secs_f64();
        eprintln!(
            "{:<12} {cases} cases in {s:.1} s: {:.0} cases/s{}",
            t.name,
            f64::from(cases) / s,
            if r.is_err() {
                " — FAILED, input kept in the corpus"
            } else {
                ""
            }
        );
        total += u64::from(cases);
        broken.extend(r.err());
    }
    let s = all.elapsed().as_secs_f64();
    eprintln!(
        "all targets: {total} cases in {s:.1} s: {:.0} cases/s",
        total as f64 / s
    );
    assert!(broken.is_empty(), "{broken:#?}");
}
