//! Verification end to end: uncertainty on balance lines, the chain to claimable tonnes,
//! reversals against the buffer pool, reconciliation verdicts and exit codes, totals as of a
//! date, and the SVG chart.

mod common;
use common::{Demo, Ledger};
use serde_json::Value;

fn project(l: &Ledger, extra: &[&str]) {
    let mut a = vec![
        "project",
        "add",
        "P",
        "--name",
        "Pilot",
        "--method",
        "saline-aquifer",
        "--operator",
        "Northdeep Storage Cooperative",
        "--permit-ref",
        "NSC-1",
        "--permit-capacity",
        "10 Mt",
    ];
    a.extend_from_slice(extra);
    l.ok(&a);
}

fn month(l: &Ledger, site: &str, m: u32, mass: &str) {
    let from = format!("2026-{m:02}-01");
    let to = format!("2026-{m:02}-28");
    l.ok(&[
        "record",
        "injection",
        "P",
        "--site",
        site,
        "--mass",
        mass,
        "--from",
        &from,
        "--to",
        &to,
    ]);
}

#[test]
fn readings_of_one_meter_keep_its_relative_uncertainty() {
    // The correlated-meter rule (docs/uncertainty.md): 12 readings of one ±1 % meter stay ±1 %,
    // where treating them as independent would give ±1 %/√12 = ±0.29 %.
    let l = Ledger::new();
    project(&l, &[]);
    l.ok(&[
        "site",
        "add",
        "P",
        "W1",
        "--kind",
        "injection-well",
        "--uncertainty",
        "1%",
    ]);
    for m in 1..=12 {
        month(&l, "W1", m, "50000 t");
    }
    let b = l.json(&["balance", "P", "--by", "year"]);
    assert_eq!(b["balance"][0]["sequestered_t"], 600_000.0);
    assert!((b["balance"][0]["sequestered_u_pct"].as_f64().unwrap() - 1.0).abs() < 1e-9);
}

#[test]
fn different_meters_combine_in_quadrature() {
    // IPCC 2006 Vol. 1 Ch. 3 Approach 1 (from memory), example computed in REFERENCES.md:
    // 600 kt ±1 % + 400 kt ±1.5 % → ±0.849 %.
    let l = Ledger::new();
    project(&l, &[]);
    l.ok(&[
        "site",
        "add",
        "P",
        "W1",
        "--kind",
        "injection-well",
        "--uncertainty",
        "1%",
    ]);
    l.ok(&[
        "site",
        "add",
        "P",
        "W2",
        "--kind",
        "injection-well",
        "--uncertainty",
        "1.5%",
    ]);
    month(&l, "W1", 3, "600 kt");
    month(&l, "W2", 3, "400 kt");
    let b = l.json(&["balance", "P", "--by", "year"]);
    let pct = b["balance"][0]["sequestered_u_pct"].as_f64().unwrap();
    assert!((pct - 0.849).abs() < 5e-4, "{pct}");
    // A record's own uncertainty wins over the site's; a calibration changes it from its date.
    l.ok(&[
        "record",
        "calibration",
        "P",
        "--site",
        "W1",
        "--date",
        "2026-05-31",
        "--uncertainty",
        "0.4%",
    ]);
    month(&l, "W1", 6, "100 kt");
    l.ok(&[
        "record",
        "injection",
        "P",
        "--site",
        "W1",
        "--mass",
        "100 kt",
        "--uncertainty",
        "2%",
        "--from",
        "2026-07-01",
        "--to",
        "2026-07-28",
    ]);
    let q = l.json(&["balance", "P", "--by", "quarter"]);
    assert!((q["balance"][1]["sequestered_u_pct"].as_f64().unwrap() - 0.4).abs() < 1e-9);
    assert!((q["balance"][2]["sequestered_u_pct"].as_f64().unwrap() - 2.0).abs() < 1e-9);
}

#[test]
fn the_chain_from_stored_to_claimable_and_the_deduction_rule() {
    let l = Ledger::new();
    project(&l, &[]);
    l.ok(&[
        "site",
        "add",
        "P",
        "W1",
        "--kind",
        "injection-well",
        "--uncertainty",
        "8%",
    ]);
    l.set(
        "P",
        &[
            "--buffer",
            "10%",
            "--assumed-annual-loss",
            "0.01%",
            "--horizon",
            "100",
            "--from",
            "2026-01-01",
        ],
    );
    month(&l, "W1", 1, "1000 t");
    let c = &l.json(&["balance", "P", "--by", "year"])["claims"][0];
    // 1000 t ± 8 % → conservative 920 t; retention (1 − 0.0001)^100 = 0.990049 → 910.846 t;
    // 10 % buffer → 91.085 t withheld, 819.761 t claimable (computed, REFERENCES.md).
    assert_eq!(c["stored_t"], 1000.0);
    assert_eq!(c["conservative_t"], 920.0);
    let durable = c["durable_t"].as_f64().unwrap();
    assert!(
        (durable - 920.0 * 0.9999f64.powi(100)).abs() < 1e-6,
        "{durable}"
    );
    let buffer = c["buffer_withheld_t"].as_f64().unwrap();
    assert!((buffer - durable * 0.1).abs() < 1e-6);
    assert!((c["claimable_t"].as_f64().unwrap() - (durable - buffer)).abs() < 1e-9);
    // Deducting only the excess over 5 %: 3 % of 1000 t.
    let e = &l.json(&["balance", "P", "--by", "year", "--deduct-excess-over", "5%"])["claims"][0];
    assert_eq!(e["conservative_t"], 970.0);
    let human = l.ok(&["balance", "P", "--by", "year", "--deduct-excess-over", "5%"]);
    assert!(
        human.contains("only the share of each period's uncertainty above 5.00 % deducted"),
        "{human}"
    );
    // Temporary storage in tonne-years (Moura-Costa & Wilson 2000): 20 of 55 years → 363.64 t per 1000.
    l.set("P", &["--years-held", "20", "--from", "2026-01-01"]);
    let t = &l.json(&["balance", "P", "--by", "year"])["claims"][0];
    assert!((t["durable_t"].as_f64().unwrap() - 920.0 * 20.0 / 55.0).abs() < 1e-6);
}

fn pool_case(reversal: &str) -> Value {
    let l = Ledger::new();
    project(&l, &[]);
    l.ok(&["site", "add", "P", "W1", "--kind", "injection-well"]);
    l.set("P", &["--buffer", "10%", "--from", "2025-01-01"]);
    // Stored and claimed in 2025; the reversal of March 2026 leaves 2026 at a loss, drawn on
    // the pool 2025 contributed to.
    l.ok(&[
        "record",
        "injection",
        "P",
        "--site",
        "W1",
        "--mass",
        "1000 t",
        "--from",
        "2025-01-01",
        "--to",
        "2025-01-28",
    ]);
    l.ok(&[
        "record",
        "reversal",
        "P",
        "--site",
        "W1",
        "--mass",
        reversal,
        "--date",
        "2026-03-15",
        "--reason",
        "leak found in a later survey",
    ]);
    let b = l.json(&["balance", "P", "--by", "year"]);
    b["buffer_pool"]
        .as_array()
        .unwrap()
        .iter()
        .find(|r| r["event"].as_str().unwrap().starts_with("loss 2026"))
        .unwrap()
        .clone()
}

#[test]
fn reversals_cancel_the_buffer_first_then_claimable() {
    // The pool holds 100 t (10 % of 1000 t) and 900 t were claimable.
    let small = pool_case("40 t");
    assert_eq!(
        (
            small["cancelled_from_buffer_t"].as_f64(),
            small["cancelled_from_claimable_t"].as_f64()
        ),
        (Some(40.0), Some(0.0))
    );
    let equal = pool_case("100 t");
    assert_eq!(
        (
            equal["cancelled_from_buffer_t"].as_f64(),
            equal["cancelled_from_claimable_t"].as_f64()
        ),
        (Some(100.0), Some(0.0))
    );
    let large = pool_case("250 t");
    assert_eq!(
        (
            large["cancelled_from_buffer_t"].as_f64(),
            large["cancelled_from_claimable_t"].as_f64()
        ),
        (Some(100.0), Some(150.0))
    );
    let beyond = pool_case("1200 t");
    assert_eq!(beyond["shortfall_t"], 200.0);
}

#[test]
fn totals_as_of_reproduce_an_earlier_table_byte_for_byte() {
    let l = Ledger::new();
    project(&l, &[]);
    l.ok(&[
        "site",
        "add",
        "P",
        "W1",
        "--kind",
        "injection-well",
        "--uncertainty",
        "1%",
    ]);
    month(&l, "W1", 1, "1000 t");
    let then = l.ok(&["totals", "--as-of", "2027-01-15"]);
    // Later entries, a correction, a new setting and a new project, all recorded on 16 January.
    let later = |args: &[&str]| {
        let o = assert_cmd::Command::cargo_bin("sinkbook")
            .unwrap()
            .env("SINKBOOK_NOW", "2027-01-16T10:00:00Z")
            .arg("--db")
            .arg(&l.path)
            .args(args)
            .output()
            .unwrap();
        assert!(o.status.success(), "{}", String::from_utf8_lossy(&o.stderr));
    };
    later(&[
        "record",
        "injection",
        "P",
        "--site",
        "W1",
        "--mass",
        "500 t",
        "--from",
        "2026-02-01",
        "--to",
        "2026-02-28",
    ]);
    later(&[
        "correct", "P", "0", "--mass", "900 t", "--reason", "re-read",
    ]);
    later(&["project", "set", "P", "--buffer", "20%"]);
    later(&[
        "project",
        "add",
        "Q",
        "--name",
        "Q",
        "--method",
        "eor",
        "--operator",
        "Other Operator",
    ]);
    assert_eq!(l.ok(&["totals", "--as-of", "2027-01-15"]), then);
    let now = l.json(&["totals"]);
    assert_eq!(now[0]["stored_geological_t"], 1400.0);
    let filtered = l.json(&["totals", "--operator", "Other Operator"]);
    assert_eq!(filtered[0]["project"], "Q");
    crate::snapshot!("totals_as_of", then);
}

#[test]
fn reconciliation_verdicts_and_exit_codes() {
    let l = Ledger::new();
    project(&l, &[]);
    l.ok(&["site", "add", "P", "W1", "--kind", "injection-well"]);
    for m in 1..=12 {
        month(&l, "W1", m, "10000 t");
    }
    let report = |rows: &str| {
        let p = l.dir.path().join("report.csv");
        std::fs::write(&p, format!("period,quantity,value,unit\n{rows}")).unwrap();
        p.display().to_string()
    };
    // 4 % off in one quarter: 1 000 t against a 5 % threshold of 120 000 t → within.
    let ok = report(
        "2026-Q1,stored,29000,t\n2026-Q2,stored,30000,t\n2026-Q3,stored,30000,t\n2026-Q4,stored,30000,t\n2026,injected,120000,t\n",
    );
    let r = l.run(&["reconcile", "P", &ok]);
    assert_eq!(r.code, 0, "{}", r.err);
    assert!(r.out.contains("within materiality"));
    crate::snapshot!("reconcile_within", r.out);
    // 7 000 t off → material at 5 % (6 000 t): exit 4.
    let bad = report("2026,stored,113000,t\n");
    let r = l.run(&["reconcile", "P", &bad]);
    assert_eq!(r.code, 4);
    assert!(r.out.contains("MATERIAL"));
    // A looser threshold makes it within.
    assert_eq!(
        l.run(&["reconcile", "P", &bad, "--materiality", "6%"]).code,
        0
    );
    // Bad reports are refused with the line.
    let r = l.run(&["reconcile", "P", &report("2026-Q5,stored,1,t\n")]);
    assert_eq!(r.code, 1);
    assert!(r.err.contains("report line 2: period"), "{}", r.err);
    let r = l.run(&["reconcile", "P", &report("2026,stored,1,stone\n")]);
    assert!(r.err.contains("unit \"stone\""), "{}", r.err);
    let r = l.run(&["reconcile", "P", &report("")]);
    assert!(r.err.contains("holds no figures"), "{}", r.err);
}

#[test]
fn svg_chart_parses_and_holds_the_series() {
    let l = Ledger::new();
    project(&l, &[]);
    l.ok(&[
        "site",
        "add",
        "P",
        "W1",
        "--kind",
        "injection-well",
        "--uncertainty",
        "1%",
    ]);
    for m in 1..=6 {
        month(&l, "W1", m, "10000 t");
    }
    let out = l.dir.path().join("p.svg");
    l.ok(&["chart", "P", "--out", out.to_str().unwrap()]);
    let svg = std::fs::read_to_string(&out).unwrap();
    let doc = roxmltree::Document::parse(&svg).unwrap();
    let text: Vec<&str> = doc.descendants().filter_map(|n| n.text()).collect();
    for want in ["stored", "conservative", "durable", "Cumulative CO2 (t)"] {
        assert!(text.iter().any(|t| t.contains(want)), "{want} missing");
    }
    assert!(text.iter().any(|t| t.contains("Permitted capacity")));
    assert_eq!(
        doc.descendants()
            .filter(|n| n.has_tag_name("polyline"))
            .count(),
        3
    );
    assert_eq!(
        l.run(&["chart", "--out", out.to_str().unwrap()]).code,
        2,
        "a project or --totals is required"
    );
}

#[test]
fn bad_settings_and_reversals_are_refused() {
    let l = Ledger::new();
    project(&l, &[]);
    l.ok(&["site", "add", "P", "W1", "--kind", "injection-well"]);
    for (args, needle) in [
        (
            &["project", "set", "P", "--buffer", "120%"][..],
            "--buffer \"120%\"",
        ),
        (&["project", "set", "P"][..], "nothing to set"),
        (
            &["project", "set", "P", "--horizon", "-5"][..],
            "--horizon \"-5\"",
        ),
        (
            &[
                "record",
                "reversal",
                "P",
                "--site",
                "W1",
                "--mass",
                "0 t",
                "--date",
                "2026-01-01",
                "--reason",
                "x",
            ][..],
            "--mass \"0 t\"",
        ),
        (
            &[
                "record",
                "calibration",
                "P",
                "--site",
                "W1",
                "--date",
                "2026-01-01",
                "--uncertainty",
                "-1%",
            ][..],
            "--uncertainty \"-1%\"",
        ),
        (
            &[
                "site",
                "add",
                "P",
                "F1",
                "--kind",
                "field",
                "--area",
                "12 furlong",
            ][..],
            "--area \"12 furlong\"",
        ),
        (
            &["balance", "P", "--deduct-excess-over", "abc"][..],
            "--deduct-excess-over \"abc\"",
        ),
        (
            &["totals", "--as-of", "2026-13-01"][..],
            "--as-of \"2026-13-01\"",
        ),
        (&["totals", "--method", "coal"][..], "--method \"coal\""),
    ] {
        let r = l.run(args);
        assert_eq!(r.code, 1, "{args:?}: {}", r.err);
        assert_eq!(r.err.trim_end().lines().count(), 1);
        assert!(r.err.contains(needle), "{args:?}: {}", r.err);
    }
}

#[test]
fn a_weathering_project_reconciles_its_net_removal() {
    let demo = Demo::new();
    let (dir, run) = (demo.dir(), |args: &[&str]| demo.run(args));
    let b: Value = serde_json::from_slice(
        &run(&["--format", "json", "balance", "EVW", "--by", "year"]).stdout,
    )
    .unwrap();
    let net_2026 = b["balance"]
        .as_array()
        .unwrap()
        .iter()
        .find(|r| r["period"] == "2026")
        .unwrap()["net_t"]
        .as_f64()
        .unwrap();
    // A report 1 % under the ledger's 2026 net removal: within materiality.
    let report = dir.join("evw.csv");
    std::fs::write(
        &report,
        format!(
            "period,quantity,value,unit\n2026,weathering-net,{:.3},t\n",
            net_2026 * 0.99
        ),
    )
    .unwrap();
    let o = run(&[
        "--format",
        "json",
        "reconcile",
        "EVW",
        report.to_str().unwrap(),
    ]);
    assert_eq!(
        o.status.code(),
        Some(0),
        "{}",
        String::from_utf8_lossy(&o.stderr)
    );
    let r: Value = serde_json::from_slice(&o.stdout).unwrap();
    let line = &r["reconciliation"][0];
    assert_eq!(line["quantity"], "weathering-net");
    assert_eq!(line["ledger_t"], net_2026);
    assert!((line["difference_pct"].as_f64().unwrap() - 1.0).abs() < 0.01);
    // The year is judged on the net removal the report gives: 1 % misstated, within 5 %.
    let y = &r["materiality"][0];
    assert!(
        (y["misstatement_t"].as_f64().unwrap() - net_2026 * 0.01).abs() < 1e-3,
        "{y}"
    );
    // 10 % under: material, exit 4.
    std::fs::write(
        &report,
        format!(
            "period,quantity,value,unit\n2026,weathering-net,{:.3},t\n",
            net_2026 * 0.9
        ),
    )
    .unwrap();
    assert_eq!(
        run(&["reconcile", "EVW", report.to_str().unwrap()])
            .status
            .code(),
        Some(4)
    );
}

#[test]
fn a_basalt_project_reconciles_its_mineralized_tonnes() {
    let demo = Demo::new();
    let (dir, run) = (demo.dir(), |args: &[&str]| demo.run(args));
    let m: Value = serde_json::from_slice(
        &run(&["--format", "json", "mineralization", "CRB", "--by", "year"]).stdout,
    )
    .unwrap();
    let y2025 = m["mineralization"]
        .as_array()
        .unwrap()
        .iter()
        .find(|r| r["period"] == "2025")
        .unwrap()["mineralized_t"]
        .as_f64()
        .unwrap();
    let report = dir.join("crb.csv");
    // The same figure as the mineralization table: no difference, the year judged on it.
    std::fs::write(
        &report,
        format!("period,quantity,value,unit\n2025,mineralized,{y2025:.6},t\n"),
    )
    .unwrap();
    let o = run(&[
        "--format",
        "json",
        "reconcile",
        "CRB",
        report.to_str().unwrap(),
    ]);
    assert_eq!(
        o.status.code(),
        Some(0),
        "{}",
        String::from_utf8_lossy(&o.stderr)
    );
    let r: Value = serde_json::from_slice(&o.stdout).unwrap();
    assert_eq!(r["reconciliation"][0]["ledger_t"], y2025);
    assert_eq!(r["reconciliation"][0]["difference_t"], 0.0);
    assert_eq!(r["materiality"][0]["stored_ledger_t"], y2025);
}
