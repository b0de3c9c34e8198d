//! Property: replaying the same records and corrections into a fresh ledger gives the same
//! balances and the same chain head, and the balance equals the sum of the latest readings.

mod common;

use chrono::DateTime;
use proptest::prelude::*;
use sinkbook::cli::run_line;
use sinkbook::report::{Format, render};
use std::path::Path;

#[derive(Debug, Clone)]
enum Op {
    Record { well: usize, month: u32, kg: u64 },
    Correct { target: usize, kg: u64 },
}

fn op() -> impl Strategy<Value = Op> {
    prop_oneof![
        3 => (0usize..2, 1u32..=12, 1u64..50_000_000).prop_map(|(well, month, kg)| Op::Record { well, month, kg }),
        1 => (0usize..64, 1u64..50_000_000).prop_map(|(target, kg)| Op::Correct { target, kg }),
    ]
}

fn line(db: &Path, words: &[&str]) -> String {
    let now = DateTime::parse_from_rfc3339("2027-01-15T09:00:00Z")
        .unwrap()
        .to_utc();
    let words: Vec<String> = words.iter().map(|w| w.to_string()).collect();
    render(&run_line(&words, db, now).unwrap(), Format::Json)
}

/// Replays the ops; returns (balance JSON, verify JSON, expected total grams).
fn replay(db: &Path, ops: &[Op]) -> (String, String, i64) {
    sinkbook::store::Store::init(db, sinkbook::store::Wait::default()).unwrap();
    line(
        db,
        &[
            "project",
            "add",
            "TFS",
            "--name",
            "T",
            "--method",
            "saline-aquifer",
            "--operator",
            "N",
        ],
    );
    line(
        db,
        &["site", "add", "TFS", "W0", "--kind", "injection-well"],
    );
    line(
        db,
        &["site", "add", "TFS", "W1", "--kind", "injection-well"],
    );
    // The latest grams of each line of corrections, by the seq that started it.
    let mut latest: Vec<(u64, i64)> = Vec::new(); // (current seq of the line, grams)
    let mut next_seq = 0u64;
    for (i, op) in ops.iter().enumerate() {
        match op {
            Op::Record { well, month, kg } => {
                let from = format!("2026-{month:02}-01");
                let to = format!("2026-{month:02}-28");
                let mass = format!("{kg} kg");
                let key = format!("op{i}");
                let site = format!("W{well}");
                line(
                    db,
                    &[
                        "record",
                        "injection",
                        "TFS",
                        "--site",
                        &site,
                        "--mass",
                        &mass,
                        "--from",
                        &from,
                        "--to",
                        &to,
                        "--key",
                        &key,
                    ],
                );
                latest.push((next_seq, *kg as i64 * 1000));
                next_seq += 1;
            }
            Op::Correct { target, kg } if !latest.is_empty() => {
                let slot = target % latest.len();
                let seq = latest[slot].0.to_string();
                let mass = format!("{kg} kg");
                line(
                    db,
                    &[
                        "correct", "TFS", &seq, "--mass", &mass, "--reason", "re-read",
                    ],
                );
                latest[slot] = (next_seq, *kg as i64 * 1000);
                next_seq += 1;
            }
            Op::Correct { .. } => {}
        }
    }
    let total = latest.iter().map(|l| l.1).sum();
    (
        line(db, &["balance", "TFS", "--by", "year"]),
        line(db, &["verify"]),
        total,
    )
}

proptest! {
    #![proptest_config(ProptestConfig { cases: 12, ..ProptestConfig::default() })]

    #[test]
    fn replay_is_deterministic_and_sums_the_latest(ops in proptest::collection::vec(op(), 1..20)) {
        let (first, second) = (common::Ledger::unmade(common::on_postgres(), "a.db"), common::Ledger::unmade(common::on_postgres(), "b.db"));
        let a = replay(&first.path, &ops);
        let b = replay(&second.path, &ops);
        prop_assert_eq!(&a, &b);
        let balance: serde_json::Value = serde_json::from_str(&a.0).unwrap();
        let stored = balance["balance"][0]["cumulative_sequestered_t"].as_f64().unwrap_or(0.0);
        prop_assert_eq!(stored, a.2 as f64 / 1e6);
    }
}
