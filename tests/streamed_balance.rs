//! The balance reads the chain row by row and folds it: what a row recorded later says about
//! an earlier one still counts — a correction replaces the entry it names, a calibration dated
//! before a reading sets that reading's uncertainty — and `--as-of` a day before them gives
//! the figures as they were.

mod common;

use common::Ledger;
use serde_json::Value;

const LATER: &str = "2027-02-10T09:00:00Z";

fn quarter<'a>(b: &'a Value, period: &str) -> &'a Value {
    b["balance"]
        .as_array()
        .unwrap()
        .iter()
        .find(|r| r["period"] == period)
        .unwrap_or_else(|| panic!("no {period} in {b}"))
}

#[test]
fn a_correction_and_a_calibration_recorded_later_count_in_the_streamed_balance() {
    let l = Ledger::with_tfs();
    // seq 0: 100 t at TF-I1 in March; seq 1: 1000 t at TF-I2 in April.
    let r = l.inject("TF-I1", "100 t", "2026-03-01", "2026-03-31", "a");
    assert_eq!(r.code, 0, "{}", r.err);
    let r = l.inject("TF-I2", "1000 t", "2026-04-01", "2026-04-30", "b");
    assert_eq!(r.code, 0, "{}", r.err);
    let before = l.json(&["balance", "TFS", "--by", "quarter"]);
    assert_eq!(quarter(&before, "2026-Q1")["injected_t"], 98.5);
    assert_eq!(quarter(&before, "2026-Q1")["sequestered_u_t"], 0.0);

    // Recorded later: seq 0 corrected to 200 t, and TF-I1's meter calibrated (2 %) as of a
    // day before its reading.
    let fix = [
        "correct", "TFS", "0", "--mass", "200 t", "--reason", "re-read",
    ];
    let r = l.run_at(LATER, &fix);
    assert_eq!(r.code, 0, "{}", r.err);
    let cal = [
        "record",
        "calibration",
        "TFS",
        "--site",
        "TF-I1",
        "--date",
        "2026-02-28",
        "--uncertainty",
        "2%",
    ];
    let r = l.run_at(LATER, &cal);
    assert_eq!(r.code, 0, "{}", r.err);

    let after = l.json(&["balance", "TFS", "--by", "quarter"]);
    let q1 = quarter(&after, "2026-Q1");
    assert_eq!(q1["injected_t"], 197.0, "the correction replaces seq 0");
    let u = q1["sequestered_u_t"].as_f64().unwrap();
    assert!((u - 3.94).abs() < 1e-9, "2 % of 197 t, got ± {u} t");
    assert_eq!(quarter(&after, "2026-Q2")["injected_t"], 985.0);
    assert_eq!(q1["cumulative_sequestered_t"], 197.0);

    // As the ledger held it before the correction and the calibration were recorded.
    let held = l.json(&["balance", "TFS", "--by", "quarter", "--as-of", "2027-01-31"]);
    assert_eq!(quarter(&held, "2026-Q1")["injected_t"], 98.5);
    assert_eq!(quarter(&held, "2026-Q1")["sequestered_u_t"], 0.0);
}
