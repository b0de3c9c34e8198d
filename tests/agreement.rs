//! One project view behind every report: `balance`, `totals`, `chart` and `reconcile` give the
//! same stored figure, period by period, for every project of the demo ledger.

mod common;

use common::Demo;
use serde_json::Value;
use std::collections::BTreeMap;

/// The rows of a command's table: a one-table command prints an array, a several-table one an
/// object keyed by table name.
fn rows<'a>(v: &'a Value, table: &str) -> &'a Vec<Value> {
    match v {
        Value::Array(a) => a,
        _ => v[table].as_array().unwrap(),
    }
}

fn tonnes(r: &Value, key: &str) -> f64 {
    r[key]
        .as_f64()
        .unwrap_or_else(|| panic!("{key} missing in {r}"))
}

/// Each year's stored figure as `balance --by year` gives it: Subpart RR's sequestered_t,
/// a basalt project's stored_t, a weathering project's net_t.
fn balance_by_year(demo: &Demo, code: &str) -> BTreeMap<String, f64> {
    let v = demo.json(&["balance", code, "--by", "year"]);
    let key = match code {
        "EVW" => "net_t",
        "CRB" => "stored_t",
        _ => "sequestered_t",
    };
    rows(&v, "balance")
        .iter()
        .filter(|r| r["period"] != "total")
        .map(|r| (r["period"].as_str().unwrap().to_string(), tonnes(r, key)))
        .collect()
}

#[test]
fn chart_balance_totals_and_reconcile_agree_on_every_demo_project() {
    let demo = Demo::new();
    let totals = demo.json(&["totals", "--by", "year"]);
    for code in ["TFS", "KRE", "CRB", "EVW"] {
        let balance = balance_by_year(&demo, code);
        assert!(!balance.is_empty(), "{code}: balance has no years");
        // totals --by year: the same stored figure each year.
        let from_totals: BTreeMap<String, f64> = rows(&totals, "totals")
            .iter()
            .filter(|r| r["project"] == code)
            .map(|r| {
                // Each route's stored figure has its own column.
                let key = match code {
                    "EVW" => "weathering_net_removal_t",
                    _ => "stored_geological_t",
                };
                (r["year"].as_str().unwrap().to_string(), tonnes(r, key))
            })
            .collect();
        assert_eq!(from_totals, balance, "{code}: totals against balance");
        // chart: the stored series is the running sum of the same figures.
        let svg = demo.dir().join(format!("{code}.svg"));
        let chart = demo.json(&[
            "chart",
            code,
            "--by",
            "year",
            "--out",
            svg.to_str().unwrap(),
        ]);
        let plotted: Vec<(String, f64)> = rows(&chart, "chart_values")
            .iter()
            .filter(|r| r["series"] == "stored")
            .map(|r| {
                let p = r["period"].as_str().unwrap().to_string();
                (p, tonnes(r, "cumulative_t"))
            })
            .collect();
        let mut running = 0.0;
        let expected: Vec<(String, f64)> = balance
            .iter()
            .map(|(p, t)| {
                running += t;
                (p.clone(), running)
            })
            .collect();
        assert_eq!(plotted.len(), expected.len(), "{code}: chart periods");
        for ((p, got), (q, want)) in plotted.iter().zip(&expected) {
            assert_eq!(p, q, "{code}: chart period");
            assert!(
                (got - want).abs() < 1e-6,
                "{code} {p}: chart {got} t, balance {want} t"
            );
        }
        // reconcile: the ledger's stored figure against a report naming every year.
        let report = demo.dir().join(format!("{code}.csv"));
        let mut csv = String::from("period,quantity,value,unit\n");
        for year in balance.keys() {
            csv.push_str(&format!("{year},stored,0,t\n"));
        }
        std::fs::write(&report, csv).unwrap();
        let r = demo.json(&["reconcile", code, report.to_str().unwrap()]);
        let from_reconcile: BTreeMap<String, f64> = r["reconciliation"]
            .as_array()
            .unwrap()
            .iter()
            .map(|l| {
                (
                    l["period"].as_str().unwrap().to_string(),
                    tonnes(l, "ledger_t"),
                )
            })
            .collect();
        assert_eq!(from_reconcile, balance, "{code}: reconcile against balance");
    }
}
