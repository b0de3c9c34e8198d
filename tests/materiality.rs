//! `reconcile` judges every line of a monitoring report: the stored figure and each term it is
//! computed from count toward the year's misstatement at the finest period the report gives, a
//! period the report leaves out is "not reported", a report with nothing assessable exits 5,
//! and the threshold is 5 % of the year's stored total unless `--materiality` says otherwise.

mod common;
use common::Ledger;
use serde_json::Value;

fn report(l: &Ledger, rows: &str) -> String {
    let p = l.dir.path().join("report.csv");
    std::fs::write(&p, format!("period,quantity,value,unit\n{rows}")).unwrap();
    p.display().to_string()
}

/// `reconcile --format json`, any exit code: (code, lines, materiality rows).
fn judged(l: &Ledger, args: &[&str]) -> (i32, Vec<Value>, Vec<Value>) {
    let mut all = vec!["--format", "json", "reconcile", "P"];
    all.extend_from_slice(args);
    let r = l.run(&all);
    let v: Value = serde_json::from_str(&r.out).unwrap_or_else(|_| panic!("{}", r.err));
    let rows = |k: &str| v[k].as_array().cloned().unwrap_or_default();
    (r.code, rows("reconciliation"), rows("materiality"))
}

#[test]
fn a_report_of_injected_alone_is_judged_and_material() {
    // 12 × 10 000 t = 120 000 t injected and stored. The report's 111 600 t is 7 % under:
    // 120 000 − 111 600 = 8 400 t misstated, over 5 % of 120 000 = 6 000 t → material, exit 4.
    let l = Ledger::with_pilot("10000 t");
    let (code, lines, years) = judged(&l, &[&report(&l, "2026,injected,111600,t\n")]);
    assert_eq!(code, 4);
    assert_eq!(lines[0]["note"], "counted");
    assert_eq!(years.len(), 1, "the year is judged");
    let y = &years[0];
    assert_eq!(y["counted"], "injected");
    assert_eq!(y["stored_ledger_t"], 120_000.0);
    assert_eq!(y["misstatement_t"], 8_400.0);
    assert_eq!(y["threshold_t"], 6_000.0);
    assert_eq!(y["verdict"], "MATERIAL");
}

#[test]
fn a_period_the_report_leaves_out_is_not_reported_not_misstated() {
    // Each quarter stores 3 × 10 000 = 30 000 t. The report gives Q1 to Q3, exact, and no Q4:
    // Q4 is listed as not reported, the misstatement is 0 t → within, exit 0.
    let l = Ledger::with_pilot("10000 t");
    let rows = "2026-Q1,stored,30000,t\n2026-Q2,stored,30000,t\n2026-Q3,stored,30000,t\n";
    let (code, lines, years) = judged(&l, &[&report(&l, rows)]);
    assert_eq!(code, 0);
    let q4 = lines.iter().find(|l| l["period"] == "2026-Q4").unwrap();
    assert_eq!(q4["ledger_t"], 30_000.0);
    assert_eq!(q4["report_t"], Value::Null);
    assert_eq!(q4["note"], "not reported");
    assert_eq!(years[0]["misstatement_t"], 0.0);
    assert_eq!(years[0]["verdict"], "within materiality");
}

#[test]
fn a_term_and_stored_over_one_quarter_count_once() {
    // Q1 given as 29 000 t injected and 29 000 t stored against the ledger's 30 000 t each: one
    // error seen twice, counted once (max(1 000, 1 000) = 1 000 t, not 2 000 t); Q2–Q4 exact.
    let l = Ledger::with_pilot("10000 t");
    let mut rows = String::from("2026-Q1,injected,29000,t\n2026-Q1,stored,29000,t\n");
    for q in 2..=4 {
        rows += &format!("2026-Q{q},injected,30000,t\n2026-Q{q},stored,30000,t\n");
    }
    let (code, lines, years) = judged(&l, &[&report(&l, &rows)]);
    assert_eq!(code, 0);
    assert_eq!(lines.len(), 8);
    assert!(lines.iter().all(|l| l["note"] == "counted"), "{lines:?}");
    assert_eq!(years[0]["misstatement_t"], 1_000.0);
    assert_eq!(years[0]["counted"], "injected, stored");
}

#[test]
fn a_report_with_nothing_assessable_exits_5() {
    // Subpart RR starts from injected: received is listed but is no term of stored, so a report
    // of received alone assesses nothing.
    let l = Ledger::with_pilot("10000 t");
    let file = report(&l, "2026,received,120000,t\n");
    let (code, lines, years) = judged(&l, &[&file]);
    assert_eq!(code, 5);
    assert_eq!(
        lines[0]["note"],
        "not added: not a term of the stored figure"
    );
    assert_eq!(years[0]["verdict"], "not assessed");
    let r = l.run(&["reconcile", "P", &file]);
    assert_eq!(r.code, 5);
    assert!(r.err.contains("not assessed"), "{}", r.err);
    assert!(r.out.contains("not assessed"), "{}", r.out);
}

#[test]
fn five_percent_of_stored_unless_the_programme_sets_another_level() {
    // 12 × 50 000 t = 600 000 t stored, the report 15 000 t (2.5 %) under. Stored tonnes above
    // 500 kt do not bring in the 2 % of Regulation (EU) 2018/2067 Art. 23, which is about
    // emissions: 5 % = 30 000 t → within. A programme's 2 % = 12 000 t → material.
    let l = Ledger::with_pilot("50000 t");
    let file = report(&l, "2026,stored,585000,t\n");
    let (code, _, years) = judged(&l, &[&file]);
    assert_eq!(code, 0);
    assert_eq!(years[0]["threshold_pct"], 5.0);
    assert_eq!(years[0]["threshold_t"], 30_000.0);
    let (code, _, years) = judged(&l, &[&file, "--materiality", "2%"]);
    assert_eq!(code, 4);
    assert_eq!(years[0]["threshold_t"], 12_000.0);
    let out = l.run(&["reconcile", "P", &file]).out;
    assert!(
        out.contains("sinkbook's default") && out.contains("500 kt of annual emissions"),
        "{out}"
    );
    let out = l.run(&["reconcile", "P", &file, "--materiality", "2%"]).out;
    assert!(out.contains("set by --materiality 2%"), "{out}");
    for bad in ["0%", "100%", "abc"] {
        let r = l.run(&["reconcile", "P", &file, "--materiality", bad]);
        assert_eq!(r.code, 1, "{bad}");
        assert!(r.err.contains("--materiality"), "{}", r.err);
    }
    // The old options are gone.
    assert_eq!(
        l.run(&["reconcile", "P", &file, "--large-materiality", "2%"])
            .code,
        2
    );
}
