//! `totals` keeps unlike quantities apart: tonnes stored geologically, mineralized in a plant
//! and removed by weathering each have their own stored and claimable columns, and the rows
//! still add up to the "all" row in every column.

mod common;
use common::Ledger;
use serde_json::Value;

/// TFS injects 500 t (fraction 1) in 2025 and 1 000 t at 98.5 % (985 t) in 2026; the ex-situ
/// plant XSM carbonates 1 000 t of feed from 2 % to 20 % CO2 in January 2026, taking up
/// 1000 × 0.18 / 0.8 = 225 t, and emits 25 t doing it: 200 t net.
fn two_routes() -> Ledger {
    let l = Ledger::with_tfs();
    for (mass, fraction, from, to) in [
        ("500 t", "1", "2025-06-01", "2025-06-30"),
        ("1000 t", "0.985", "2026-01-01", "2026-01-31"),
    ] {
        l.ok(&[
            "record",
            "injection",
            "TFS",
            "--site",
            "TF-I1",
            "--mass",
            mass,
            "--co2-fraction",
            fraction,
            "--from",
            from,
            "--to",
            to,
        ]);
    }
    l.add_xsm();
    let r = l.carbonate("1000 t", "2%", "20%", "2026-01-05", "2026-01-30");
    assert_eq!(r.code, 0, "{}", r.err);
    l.ok(&[
        "record",
        "emission",
        "XSM",
        "--site",
        "AS-P1",
        "--mass",
        "25 t",
        "--co2-fraction",
        "1",
        "--from",
        "2026-01-01",
        "--to",
        "2026-01-31",
    ]);
    l
}

fn line<'a>(rows: &'a [Value], project: &str) -> &'a Value {
    rows.iter()
        .find(|r| r["project"] == project)
        .unwrap_or_else(|| panic!("no line {project}"))
}

#[test]
fn stored_and_claimable_stay_in_their_route() {
    let l = two_routes();
    let t = l.json(&["totals"]);
    let rows = t.as_array().unwrap();
    // No buffer, no stated uncertainty, no retention loss: claimable = stored.
    let tfs = line(rows, "TFS");
    assert_eq!(tfs["stored_geological_t"], 1485.0); // 500 + 985
    assert_eq!(tfs["mineralized_t"], 0.0);
    assert_eq!(tfs["claimable_geological_t"], 1485.0);
    assert_eq!(tfs["claimable_mineralized_t"], 0.0);
    let xsm = line(rows, "XSM");
    assert_eq!(xsm["stored_geological_t"], 0.0);
    assert_eq!(xsm["mineralized_t"], 200.0); // 225 − 25
    assert_eq!(xsm["claimable_mineralized_t"], 200.0);
    assert_eq!(xsm["weathering_net_removal_t"], 0.0);
    let all = line(rows, "all");
    assert_eq!(all["stored_geological_t"], 1485.0);
    assert_eq!(all["mineralized_t"], 200.0);
    assert_eq!(all["claimable_geological_t"], 1485.0);
    assert_eq!(all["claimable_mineralized_t"], 200.0);
    assert!(
        all.get("stored_t").is_none(),
        "no column adds the routes: {all}"
    );
    // Headroom against TFS's 2.5 Mt permit: 2 500 000 − 1 485 = 2 498 515 t.
    assert_eq!(tfs["headroom_t"], 2_498_515.0);
}

#[test]
fn the_years_add_up_to_the_all_row_in_every_column() {
    let l = two_routes();
    let t = l.json(&["totals", "--by", "year"]);
    let rows = t.as_array().unwrap();
    let all = line(rows, "all");
    let figures: Vec<&String> = all
        .as_object()
        .unwrap()
        .iter()
        .filter(|(k, v)| k.ends_with("_t") && v.is_number())
        .map(|(k, _)| k)
        .collect();
    assert!(figures.len() >= 12, "{all}");
    for key in figures {
        let sum: f64 = rows
            .iter()
            .filter(|r| r["project"] != "all")
            .map(|r| r[key.as_str()].as_f64().unwrap_or(0.0))
            .sum();
        assert!(
            (sum - all[key.as_str()].as_f64().unwrap()).abs() < 1e-6,
            "{key}: the years add to {sum}, the all row says {}",
            all[key.as_str()]
        );
    }
    // TFS 2025: 500 t; TFS 2026: 985 t; XSM 2026: 200 t mineralized.
    let year = |p: &str, y: &str| {
        rows.iter()
            .find(|r| r["project"] == p && r["year"] == y)
            .unwrap()
    };
    assert_eq!(year("TFS", "2025")["stored_geological_t"], 500.0);
    assert_eq!(year("TFS", "2026")["stored_geological_t"], 985.0);
    assert_eq!(year("XSM", "2026")["mineralized_t"], 200.0);
}
