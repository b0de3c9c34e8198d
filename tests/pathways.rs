//! A leak or a loss by a pathway that is no site of the project: `record leakage` and `record
//! reversal` take a pathway without a site, the figures count it, `verify` passes, and a kind
//! recorded at a site still needs one.

mod common;
use common::Ledger;
use serde_json::Value;

/// TFS with 1 000 t injected at 98.5 % in January 2026 (985 t of CO2) and a no-leak survey of
/// the legacy well W-3 on 1 March.
fn tfs_with_legacy_well() -> Ledger {
    let l = Ledger::with_tfs();
    let r = l.inject("TF-I1", "1000 t", "2026-01-01", "2026-01-31", "jan-i1");
    assert_eq!(r.code, 0, "{}", r.err);
    l.ok(&[
        "record",
        "survey",
        "TFS",
        "--site",
        "TF-M1",
        "--date",
        "2026-03-01",
        "--result",
        "no-leak",
        "--pathway",
        "legacy well W-3",
    ]);
    l
}

fn leak_at_the_legacy_well(l: &Ledger) -> String {
    l.ok(&[
        "record",
        "leakage",
        "TFS",
        "--pathway",
        "legacy well W-3",
        "--rate",
        "0.5 t/d",
        "--since-last-survey",
        "--to",
        "2026-03-10",
    ])
}

fn reverse_by_the_fault(l: &Ledger) -> String {
    l.ok(&[
        "record",
        "reversal",
        "TFS",
        "--pathway",
        "fault F2",
        "--mass",
        "40 t",
        "--date",
        "2026-11-20",
        "--reason",
        "CO2 found in the shallow aquifer along fault F2",
    ])
}

fn table<'a>(v: &'a Value, id: &str) -> &'a Vec<Value> {
    v[id]
        .as_array()
        .unwrap_or_else(|| panic!("no table {id}: {v}"))
}

#[test]
fn leakage_and_reversal_without_a_site_count_and_verify() {
    let l = tfs_with_legacy_well();
    leak_at_the_legacy_well(&l);
    reverse_by_the_fault(&l);

    // The leak's start is unknown: backdated to the no-leak survey of its pathway on 1 March
    // (later than injection's first day, 1 January), so it covers 1–10 March, 10 days:
    // 0.5 t/d × 10 d = 5 t.
    let entries = l.json(&["entries", "TFS"]);
    let leak = entries
        .as_array()
        .unwrap()
        .iter()
        .find(|e| e["kind"] == "leakage")
        .unwrap();
    assert_eq!(leak["site"], "");
    assert_eq!(leak["period_from"], "2026-03-01");
    assert_eq!(leak["co2_t"], 5.0);

    // Sequestered 2026 = 985 t injected − 5 t surface leakage = 980 t (RR-12).
    let b = l.json(&["balance", "TFS", "--by", "year"]);
    let year = &table(&b, "balance")[0];
    assert_eq!(year["surface_leakage_t"], 5.0);
    assert_eq!(year["sequestered_t"], 980.0);
    let leaks = table(&b, "leakage");
    assert_eq!(leaks[0]["pathway"], "legacy well W-3");
    assert_eq!(leaks[0]["site"], "");

    // The reversal is dated inside 2026, the claim period: stored 980 t − 40 t reversed =
    // 940 t, no meter states an uncertainty and no buffer or loss is set, so 940 t claimable.
    let reversals = table(&b, "reversals");
    assert_eq!(reversals.len(), 1);
    assert_eq!(reversals[0]["pathway"], "fault F2");
    assert_eq!(reversals[0]["site"], "");
    assert_eq!(reversals[0]["co2_t"], 40.0);
    let claims = table(&b, "claims");
    assert_eq!(claims[0]["stored_t"], 940.0);
    assert_eq!(claims[0]["claimable_t"], 940.0);

    let totals = l.json(&["totals"]);
    let tfs = totals
        .as_array()
        .unwrap()
        .iter()
        .find(|r| r["project"] == "TFS")
        .unwrap();
    assert_eq!(tfs["reversed_t"], 40.0);

    let v = l.run(&["verify"]);
    assert_eq!(v.code, 0, "{}{}", v.out, v.err);
    assert!(v.out.contains("intact"), "{}", v.out);
}

#[test]
fn the_human_tables_name_the_pathway() {
    let l = tfs_with_legacy_well();
    leak_at_the_legacy_well(&l);
    reverse_by_the_fault(&l);
    let out = l.ok(&["balance", "TFS", "--by", "year"]);
    assert!(out.contains("Reversals, project TFS"), "{out}");
    assert!(out.contains("fault F2"), "{out}");
    assert!(out.contains("legacy well W-3"), "{out}");
    // A daily rate counts its days: 0.5 t/d × 10 d = 5 t (no × 24 h).
    assert!(out.contains("0.5 t/d × 10 d,"), "{out}");
}

#[test]
fn a_reversal_says_where_and_other_kinds_still_need_a_site() {
    let l = tfs_with_legacy_well();
    let r = l.run(&[
        "record",
        "reversal",
        "TFS",
        "--mass",
        "40 t",
        "--date",
        "2026-11-20",
        "--reason",
        "lost somewhere",
    ]);
    assert_eq!(r.code, 1, "{}", r.err);
    assert!(r.err.contains("--site, --pathway or both"), "{}", r.err);
    let r = l.run(&[
        "record",
        "injection",
        "TFS",
        "--mass",
        "1 t",
        "--from",
        "2026-02-01",
        "--to",
        "2026-02-01",
    ]);
    assert_eq!(r.code, 2, "{}", r.err);
    assert!(r.err.contains("--site"), "{}", r.err);
    assert_eq!(l.count("TFS"), 2, "nothing written");
}

#[test]
fn a_correction_of_a_leak_at_no_site_stays_at_no_site() {
    // The leak re-measured at 7 t: sequestered 985 − 7 = 978 t.
    let l = tfs_with_legacy_well();
    leak_at_the_legacy_well(&l);
    l.ok(&[
        "correct",
        "TFS",
        "2",
        "--mass",
        "7 t",
        "--reason",
        "re-measured by chamber survey",
    ]);
    let b = l.json(&["balance", "TFS", "--by", "year"]);
    assert_eq!(table(&b, "balance")[0]["sequestered_t"], 978.0);
    let v = l.run(&["verify"]);
    assert_eq!(v.code, 0, "{}{}", v.out, v.err);
}
