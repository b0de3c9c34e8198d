//! A reading that states no CO2 fraction keeps the default 1 but is recorded as assumed, and
//! `meters` and `balance` say how many tonnes rest on an assumed concentration.

mod common;
use common::Ledger;
use serde_json::Value;

fn inject(l: &Ledger, site: &str, mass: &str, fraction: Option<&str>, from: &str, to: &str) {
    let mut args = vec![
        "record",
        "injection",
        "TFS",
        "--site",
        site,
        "--mass",
        mass,
        "--from",
        from,
        "--to",
        to,
    ];
    if let Some(f) = fraction {
        args.extend(["--co2-fraction", f]);
    }
    l.ok(&args);
}

fn row<'a>(meters: &'a Value, meter: &str) -> &'a Value {
    meters
        .as_array()
        .unwrap()
        .iter()
        .find(|r| r["meter"] == meter)
        .unwrap_or_else(|| panic!("no row of {meter}: {meters}"))
}

#[test]
fn tonnes_on_an_assumed_fraction_are_counted_by_meter_and_in_the_balance() {
    let l = Ledger::with_tfs();
    // TF-I1: 1 000 t at a stated 98 % → 980 t. TF-I2: 500 t with no fraction (assumed 1) →
    // 500 t, and 200 t at a stated 100 % → 200 t. So 500 t of the 1 680 t rest on an assumed
    // concentration, all of it TF-I2's, in Q1.
    inject(
        &l,
        "TF-I1",
        "1000 t",
        Some("0.98"),
        "2026-01-01",
        "2026-01-31",
    );
    inject(&l, "TF-I2", "500 t", None, "2026-02-01", "2026-02-28");
    inject(
        &l,
        "TF-I2",
        "200 t",
        Some("100%"),
        "2026-03-01",
        "2026-03-31",
    );

    let entries = l.json(&["entries", "TFS"]);
    let sources: Vec<Value> = entries
        .as_array()
        .unwrap()
        .iter()
        .map(|e| {
            e["reading"]
                .as_array()
                .unwrap()
                .iter()
                .find(|p| p[0] == "co2_fraction_source")
                .map_or(Value::Null, |p| p[1].clone())
        })
        .collect();
    assert_eq!(sources, [Value::Null, "assumed".into(), "stated".into()]);

    let m = l.json(&["meters", "TFS", "--year", "2026"]);
    assert_eq!(row(&m, "(TF-I2)")["co2_t"], 700.0);
    assert_eq!(row(&m, "(TF-I2)")["co2_on_an_assumed_fraction_t"], 500.0);
    assert_eq!(row(&m, "(TF-I1)")["co2_on_an_assumed_fraction_t"], 0.0);
    let table = l.ok(&["meters", "TFS", "--year", "2026"]);
    assert!(
        table.contains("ASSUMED CONCENTRATION: 500.000 t of CO2 in 2026"),
        "{table}"
    );

    let balance = l.ok(&["balance", "TFS", "--by", "year"]);
    assert!(
        balance.contains("500.000 t of CO2 in 1 entry of the mass balance"),
        "{balance}"
    );
}

#[test]
fn a_correction_keeps_an_assumed_fraction_assumed_until_one_is_stated() {
    let l = Ledger::with_tfs();
    inject(&l, "TF-I2", "500 t", None, "2026-02-01", "2026-02-28");
    // Re-read as 520 t, still with no analysis: 520 t assumed.
    l.ok(&[
        "correct", "TFS", "0", "--mass", "520 t", "--reason", "re-read",
    ]);
    let m = l.json(&["meters", "TFS", "--year", "2026"]);
    assert_eq!(row(&m, "(TF-I2)")["co2_on_an_assumed_fraction_t"], 520.0);
    // The analysis arrives: 97 % → 520 t × 0.97 = 504.4 t, none of it assumed.
    l.ok(&[
        "correct",
        "TFS",
        "1",
        "--co2-fraction",
        "0.97",
        "--reason",
        "stream analysis",
    ]);
    let m = l.json(&["meters", "TFS", "--year", "2026"]);
    assert_eq!(row(&m, "(TF-I2)")["co2_t"], 504.4);
    assert_eq!(row(&m, "(TF-I2)")["co2_on_an_assumed_fraction_t"], 0.0);
    let balance = l.ok(&["balance", "TFS", "--by", "year"]);
    assert!(!balance.contains("ASSUMED CONCENTRATION"), "{balance}");
}

#[test]
fn an_old_reading_of_fraction_one_counts_as_assumed() {
    // The fixture of tests/migrations.rs, written before readings noted the source: seq 1
    // injected 500 t and seq 3 leaked 2 t, both at the default fraction 1 → 502 t in 2 entries
    // (seq 0's 98 % was stated).
    let l = Ledger::unmade(false, "old.sqlite");
    std::fs::copy("tests/fixtures/ledger-2026-12-03.sqlite", &l.path).unwrap();
    let balance = l.ok(&["balance", "TFS", "--by", "year"]);
    assert!(
        balance.contains("502.000 t of CO2 in 2 entries of the mass balance"),
        "{balance}"
    );
    let m = l.json(&["meters", "TFS", "--year", "2026"]);
    assert_eq!(row(&m, "FM-101")["co2_on_an_assumed_fraction_t"], 500.0);
    assert_eq!(row(&m, "(TF-M1)")["co2_on_an_assumed_fraction_t"], 2.0);
}
