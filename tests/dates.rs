//! Activity time and knowledge time, never confused: `--through DATE` counts what happened up
//! to and including that day (an entry spanning it counts for its days up to it, split by days
//! as periods split entries), `--as-of DATE` what the ledger held at the end of that day.
//!
//! The ledger for these tests (TFS, no uncertainty stated, injections at CO2 fraction 0.985),
//! recorded at the tests' clock (2027-01-15) unless said:
//! - A: TF-I1, 100 t → 98.5 t CO2, 2026-03-01 – 03-31
//! - B: TF-I2, 1000 t → 985 t, 2026-06-01 – 07-10 (40 days, 30 of them in June)
//! - C: TF-I1, 10 t → 9.85 t, 2026-07-15 – 07-20
//! - D: TF-I1, 1 t → 0.985 t, 2026-06-30 – 07-02 (3 days, 1 in June), recorded 2027-02-10

mod common;

use common::Ledger;
use serde_json::Value;

const LATER: &str = "2027-02-10T09:00:00Z";

// The entries' grams, and their parts each side of 30 June 2026 (by days, whole grams; a
// left-over gram goes to the part with the larger remainder).
const A: i64 = 98_500_000;
/// 985 t × 30/40 and × 10/40.
const B_JUNE: i64 = 738_750_000;
const B_JULY: i64 = 246_250_000;
const C: i64 = 9_850_000;
/// 985,000 g × 1/3 = 328,333⅓ and × 2/3 = 656,666⅔: the left-over gram goes to July.
const D_JUNE: i64 = 328_333;
const D_JULY: i64 = 656_667;

fn ledger() -> Ledger {
    let l = Ledger::with_tfs();
    for (site, mass, from, to, key) in [
        ("TF-I1", "100 t", "2026-03-01", "2026-03-31", "a"),
        ("TF-I2", "1000 t", "2026-06-01", "2026-07-10", "b"),
        ("TF-I1", "10 t", "2026-07-15", "2026-07-20", "c"),
    ] {
        assert_eq!(l.inject(site, mass, from, to, key).code, 0);
    }
    let r = l.run_at(
        LATER,
        &[
            "record",
            "injection",
            "TFS",
            "--site",
            "TF-I1",
            "--mass",
            "1 t",
            "--co2-fraction",
            "0.985",
            "--from",
            "2026-06-30",
            "--to",
            "2026-07-02",
            "--key",
            "d",
        ],
    );
    assert_eq!(r.code, 0, "{}", r.err);
    l
}

/// Tonnes as JSON gives them (six decimals), in grams.
fn grams(v: &Value) -> i64 {
    (v.as_f64().unwrap() * 1e6).round() as i64
}

/// `field` of the row of `project` of `totals --format json ARGS`, in grams.
fn totals_g(l: &Ledger, args: &[&str], project: &str, field: &str) -> Option<i64> {
    let mut all = vec!["totals"];
    all.extend_from_slice(args);
    let v = l.json(&all);
    let row = v
        .as_array()
        .unwrap()
        .iter()
        .find(|r| r["project"] == project);
    row.map(|r| grams(&r[field]))
}

/// The balance's quarters as (period, injected g).
fn quarters(l: &Ledger, args: &[&str]) -> Vec<(String, i64)> {
    let mut all = vec!["balance", "TFS", "--by", "quarter"];
    all.extend_from_slice(args);
    let v: Value = l.json(&all);
    v["balance"]
        .as_array()
        .unwrap()
        .iter()
        .map(|r| {
            (
                r["period"].as_str().unwrap().to_string(),
                grams(&r["injected_t"]),
            )
        })
        .collect()
}

#[test]
fn totals_through_counts_the_days_up_to_the_date_and_as_of_what_was_recorded_by_then() {
    let l = ledger();
    let through = A + B_JUNE + D_JUNE;
    let all = A + B_JUNE + B_JULY + C + D_JUNE + D_JULY;
    assert_eq!(all, 1_094_335_000, "98.5 + 985 + 9.85 + 0.985 t");
    let injected = |args: &[&str]| totals_g(&l, args, "TFS", "injected_t").unwrap();
    assert_eq!(injected(&["--through", "2026-06-30"]), through);
    // Stored is injected (nothing produced or leaked); the headroom is 2.5 Mt less it.
    assert_eq!(
        totals_g(
            &l,
            &["--through", "2026-06-30"],
            "TFS",
            "stored_geological_t"
        ),
        Some(through)
    );
    assert_eq!(
        totals_g(&l, &["--through", "2026-06-30"], "TFS", "headroom_t"),
        Some(2_500_000_000_000 - through)
    );
    assert_eq!(injected(&[]), all);
    // The ledger on 31 January 2027 did not hold D yet, whatever days D covers.
    assert_eq!(
        injected(&["--as-of", "2027-01-31"]),
        A + B_JUNE + B_JULY + C
    );
    assert_eq!(
        injected(&["--as-of", "2027-01-31", "--through", "2026-06-30"]),
        A + B_JUNE
    );
    // A through date before everything counts nothing; one after everything counts it all.
    assert_eq!(injected(&["--through", "2026-02-28"]), 0);
    assert_eq!(injected(&["--through", "2026-12-31"]), all);
    // By year, the one year is the same figure.
    let v = l.json(&["totals", "--by", "year", "--through", "2026-06-30"]);
    let rows = v.as_array().unwrap();
    assert_eq!(rows[0]["year"], "2026");
    assert_eq!(grams(&rows[0]["injected_t"]), through);
    // The title says which date was asked, and a note how spanning entries counted.
    let table = l.ok(&["totals", "--through", "2026-06-30", "--as-of", "2027-01-31"]);
    assert!(
        table.starts_with("Totals across projects, activity through 2026-06-30, as the ledger held them at 2027-01-31 23:59:59 UTC\n"),
        "{table}"
    );
    assert!(
        table.contains(
            "Activity through 2026-06-30: an entry spanning that day counts for its days up to it"
        ),
        "{table}"
    );
}

#[test]
fn as_of_a_day_before_anything_was_recorded_holds_nothing_though_activity_then_was_recorded_later()
{
    let l = ledger();
    // Everything was recorded from 2027-01-15 on: the ledger held no project at mid-2026.
    assert_eq!(
        totals_g(&l, &["--as-of", "2026-06-30"], "TFS", "injected_t"),
        None
    );
    assert_eq!(
        totals_g(&l, &["--as-of", "2026-06-30"], "all", "injected_t"),
        Some(0)
    );
    assert_eq!(
        totals_g(&l, &["--through", "2026-06-30"], "all", "injected_t"),
        Some(A + B_JUNE + D_JUNE)
    );
}

#[test]
fn balance_takes_both_dates() {
    let l = ledger();
    // Without dates, B and D are split between the quarters by days.
    assert_eq!(
        quarters(&l, &[]),
        [
            ("2026-Q1".to_string(), A),
            ("2026-Q2".to_string(), B_JUNE + D_JUNE),
            ("2026-Q3".to_string(), B_JULY + C + D_JULY),
        ]
    );
    // Through June: the same first half, and no third quarter.
    assert_eq!(
        quarters(&l, &["--through", "2026-06-30"]),
        [
            ("2026-Q1".to_string(), A),
            ("2026-Q2".to_string(), B_JUNE + D_JUNE),
        ]
    );
    // Through 5 July: B's 35 of 40 days (861.875 t, of which June's 30 are 738.75 t as before)
    // and D whole; C not yet.
    assert_eq!(
        quarters(&l, &["--through", "2026-07-05"]),
        [
            ("2026-Q1".to_string(), A),
            ("2026-Q2".to_string(), B_JUNE + D_JUNE),
            ("2026-Q3".to_string(), 861_875_000 - B_JUNE + D_JULY),
        ]
    );
    // As of 31 January 2027: no D.
    assert_eq!(
        quarters(&l, &["--as-of", "2027-01-31"]),
        [
            ("2026-Q1".to_string(), A),
            ("2026-Q2".to_string(), B_JUNE),
            ("2026-Q3".to_string(), B_JULY + C),
        ]
    );
    let table = l.ok(&["balance", "TFS", "--as-of", "2027-01-31"]);
    assert!(
        table.starts_with("Mass balance (40 CFR 98.443) by quarter, project TFS, as the ledger held it at 2027-01-31 23:59:59 UTC\n"),
        "{table}"
    );
    // The ledger held no TFS at all before it was registered on the tests' clock.
    let r = l.run(&["balance", "TFS", "--as-of", "2026-06-30"]);
    assert_eq!(r.code, 0, "{}", r.err);
    assert!(!r.out.contains("2026-Q"), "{}", r.out);
}

#[test]
fn claims_through_a_date_take_the_settings_in_force_on_it() {
    let l = ledger();
    // A 10 % buffer taking effect on 1 September 2026 (recorded now, so backdated).
    l.set("TFS", &["--buffer", "10%", "--from", "2026-09-01"]);
    let buffer = |args: &[&str]| totals_g(&l, args, "TFS", "buffer_held_t").unwrap();
    let durable = |args: &[&str]| totals_g(&l, args, "TFS", "durable_t").unwrap();
    // The year's claim uses the settings of its last day: 10 % of the durable tonnes.
    let d = durable(&[]);
    assert!(d > 0);
    assert_eq!(buffer(&[]), (d + 5) / 10);
    // Through June, no buffer was in force yet.
    assert_eq!(buffer(&["--through", "2026-06-30"]), 0);
}

#[test]
fn dates_that_are_not_dates_are_refused_naming_the_option() {
    let l = ledger();
    for (args, named) in [
        (
            &["totals", "--through", "2026-06-31"][..],
            "--through \"2026-06-31\"",
        ),
        (
            &["balance", "TFS", "--through", "30/06/2026"][..],
            "--through \"30/06/2026\"",
        ),
        (
            &["balance", "TFS", "--as-of", "2026-13-01"][..],
            "--as-of \"2026-13-01\"",
        ),
    ] {
        let r = l.run(args);
        assert_eq!(r.code, 1, "{args:?}: {}", r.out);
        assert_eq!(r.err.lines().count(), 1, "{}", r.err);
        assert!(r.err.contains(named), "{}", r.err);
    }
}

/// The demo recorded everything at the tests' clock (2027-01-15): as of mid-2026 the ledger
/// held nothing, while the activity through mid-2026 is the first half of each project's year
/// (TFS meters by the day, so it is the first two quarters of its balance exactly).
#[test]
fn on_the_demo_as_of_mid_year_is_empty_and_through_mid_year_is_the_first_half() {
    let l = Ledger::demo();
    let v = l.json(&["totals", "--as-of", "2026-06-30"]);
    let rows = v.as_array().unwrap();
    assert_eq!(rows.len(), 1, "only the all line: {v}");
    assert_eq!(grams(&rows[0]["injected_t"]), 0);
    let first_half: i64 = quarters(&l, &[])
        .iter()
        .filter(|(p, _)| p == "2026-Q1" || p == "2026-Q2")
        .map(|(_, t)| t)
        .sum();
    let through = totals_g(&l, &["--through", "2026-06-30"], "TFS", "injected_t").unwrap();
    assert_eq!(through, first_half);
    assert!(through > 0);
}
