//! Recorded reconciliations: `reconcile --record` appends one to the ledger, `reconciliations`
//! lists it, the annual page shows it, bundles carry it, and `verify` catches one altered or
//! deleted. Bad input records nothing.

mod common;
use common::Ledger;
use diesel::connection::SimpleConnection;
use diesel::{Connection, SqliteConnection};
use serde_json::Value;
use sha2::{Digest, Sha256};

const BY: &str = "Thistlemoor Verification Partners";

/// Writes a report; returns its path and the SHA-256 of its bytes.
fn report(l: &Ledger, name: &str, rows: &str) -> (String, String) {
    let p = l.dir.path().join(name);
    let text = format!("period,quantity,value,unit\n{rows}");
    std::fs::write(&p, &text).unwrap();
    let sha: String = Sha256::digest(text.as_bytes())
        .iter()
        .map(|b| format!("{b:02x}"))
        .collect();
    (p.display().to_string(), sha)
}

/// `reconciliations P` as JSON: records, lines, years.
fn listed(l: &Ledger, args: &[&str]) -> (Vec<Value>, Vec<Value>, Vec<Value>) {
    let mut all = vec!["reconciliations", "P"];
    all.extend_from_slice(args);
    let v = l.json(&all);
    let rows = |k: &str| v[k].as_array().cloned().unwrap();
    (
        rows("reconciliations"),
        rows("reconciliation_lines"),
        rows("reconciliation_years"),
    )
}

#[test]
fn a_recorded_reconciliation_is_listed_with_every_line() {
    let l = Ledger::with_pilot("10000 t");
    // Q1 29 000 t against the ledger's 30 000 t: 1 000 t, within 5 % of 120 000 = 6 000 t.
    let (file, sha) = report(
        &l,
        "p-monitoring-2026.csv",
        "2026-Q1,stored,29000,t\n2026-Q2,stored,30000,t\n2026-Q3,stored,30000,t\n2026-Q4,stored,30000,t\n",
    );
    let (none, _, _) = listed(&l, &[]);
    assert!(none.is_empty());
    let shown = l.json(&["reconcile", "P", &file, "--record", "--by", BY]);
    let (records, lines, years) = listed(&l, &[]);
    assert_eq!(records.len(), 1);
    let r = &records[0];
    assert_eq!(r["seq"], 0);
    assert_eq!(r["role"], "verifier");
    assert_eq!(r["reconciled_by"], BY);
    assert_eq!(r["monitoring_report"], "p-monitoring-2026.csv");
    assert_eq!(r["report_sha256"], sha.as_str());
    assert_eq!(r["years"], "2026");
    assert_eq!(r["materiality_pct"], 5.0);
    assert_eq!(r["verdict"], "within materiality");
    // The chain it was made against: 12 entries, the head `verify` gives.
    assert_eq!(r["entries"], 12);
    let verified = l.json(&["verify"]);
    assert_eq!(r["chain_hash"], verified[0]["chain_hash"]);
    assert_eq!(verified[0]["reconciliations"], 1);
    // Every line as reconcile printed it.
    assert_eq!(lines.len(), 4);
    for (kept, printed) in lines
        .iter()
        .zip(shown["reconciliation"].as_array().unwrap())
    {
        for k in [
            "period",
            "quantity",
            "ledger_t",
            "report_t",
            "difference_t",
            "note",
        ] {
            assert_eq!(kept[k], printed[k], "{k}");
        }
    }
    assert_eq!(lines[0]["difference_t"], 1_000.0);
    assert_eq!(years[0]["misstatement_t"], 1_000.0);
    assert_eq!(years[0]["threshold_t"], 6_000.0);
    // A second one, by the operator, material: seq 1; the year filter keeps both, 2025 none.
    let (bad, _) = report(&l, "p-2026-b.csv", "2026,stored,100000,t\n");
    let r = l.run(&["reconcile", "P", &bad, "--record", "--role", "operator"]);
    assert_eq!(r.code, 4, "{}", r.err);
    assert!(
        r.out.contains("recorded reconciliation 1 of project P"),
        "{}",
        r.out
    );
    let (records, _, _) = listed(&l, &["--year", "2026"]);
    assert_eq!(records.len(), 2);
    assert_eq!(records[1]["role"], "operator");
    assert_eq!(records[1]["verdict"], "MATERIAL");
    assert_eq!(records[1]["reconciled_by"], Value::Null);
    assert!(listed(&l, &["--year", "2025"]).0.is_empty());
    assert_eq!(l.run(&["verify"]).code, 0);
}

#[test]
fn bad_input_records_nothing() {
    let l = Ledger::with_pilot("10000 t");
    let (file, _) = report(&l, "r.csv", "2026,stored,120000,t\n");
    let long = "x".repeat(201);
    for (args, code, needle) in [
        (
            vec!["reconcile", "P", &file, "--record", "--by", &long],
            1,
            "--by",
        ),
        (vec!["reconcile", "Q", &file, "--record"], 1, "Q"),
        (vec!["reconcile", "P", &file, "--by", BY], 2, "--record"),
        (
            vec!["reconcile", "P", &file, "--record", "--materiality", "0%"],
            1,
            "--materiality",
        ),
    ] {
        let r = l.run(&args);
        assert_eq!(r.code, code, "{args:?}: {}", r.err);
        assert!(r.err.contains(needle), "{args:?}: {}", r.err);
    }
    let (bad, _) = report(&l, "bad.csv", "2026,stored,1,stone\n");
    let r = l.run(&["reconcile", "P", &bad, "--record"]);
    assert_eq!(r.code, 1);
    assert!(listed(&l, &[]).0.is_empty());
    assert_eq!(l.json(&["verify"])[0]["reconciliations"], 0);
}

fn raw(l: &Ledger) -> SqliteConnection {
    SqliteConnection::establish(l.path.to_str().unwrap()).unwrap()
}

/// A ledger file holding two recorded reconciliations of P.
fn two_recorded() -> Ledger {
    let l = common::on_file(|| Ledger::with_pilot("10000 t"));
    for name in ["a.csv", "b.csv"] {
        let (file, _) = report(&l, name, "2026,stored,120000,t\n");
        l.ok(&["reconcile", "P", &file, "--record"]);
    }
    assert_eq!(l.run(&["verify"]).code, 0);
    l
}

#[test]
fn the_database_refuses_to_change_a_recorded_reconciliation() {
    let l = two_recorded();
    let mut c = raw(&l);
    for sql in [
        "UPDATE reconciliations SET verdict = 'MATERIAL' WHERE seq = 0",
        "DELETE FROM reconciliations WHERE seq = 1",
        "INSERT OR REPLACE INTO reconciliations SELECT * FROM reconciliations WHERE seq = 0",
    ] {
        let e = c.batch_execute(sql).unwrap_err().to_string();
        assert!(e.contains("append-only"), "{sql}: {e}");
    }
    assert_eq!(listed(&l, &[]).0.len(), 2);
}

#[test]
fn verify_names_an_altered_or_deleted_reconciliation() {
    const DROP: &str = "DROP TRIGGER reconciliations_append_only_update; \
                        DROP TRIGGER reconciliations_append_only_delete;";
    for (sql, needle) in [
        (
            "UPDATE reconciliations SET verdict = 'MATERIAL' WHERE seq = 1",
            "reconciliations row seq 1 differs from its row hash",
        ),
        (
            "UPDATE reconciliations SET report_sha256 = '00' || substr(report_sha256, 3) WHERE seq = 0",
            "reconciliations row seq 0 differs from its row hash",
        ),
        // A deleted row, from the middle or the end of the run, leaves its ledger-chain link.
        (
            "DELETE FROM reconciliations WHERE seq = 0",
            "reconciliation 0 of project P is gone",
        ),
        (
            "DELETE FROM reconciliations WHERE seq = 1",
            "reconciliation 1 of project P is gone",
        ),
    ] {
        let l = two_recorded();
        raw(&l).batch_execute(&format!("{DROP} {sql}")).unwrap();
        let r = l.run(&["verify"]);
        assert_eq!(r.code, 3, "{sql}: {}", r.out);
        assert!(r.err.contains(needle), "{sql}: {}", r.err);
        assert!(r.err.contains("project P"), "{}", r.err);
    }
}

#[test]
fn the_demo_page_lists_the_reconciliation_of_its_year() {
    let l = Ledger::demo();
    let out = l.dir.path().join("tfs-2026.html");
    l.ok(&[
        "report",
        "TFS",
        "--year",
        "2026",
        "--out",
        out.to_str().unwrap(),
    ]);
    let html = std::fs::read_to_string(&out).unwrap();
    let doc = roxmltree::Document::parse_with_options(
        &html,
        roxmltree::ParsingOptions {
            allow_dtd: true,
            ..Default::default()
        },
    )
    .unwrap();
    let text = |n: roxmltree::Node<'_, '_>| -> String {
        n.descendants()
            .filter_map(|d| d.text())
            .collect::<Vec<_>>()
            .join("|")
    };
    let table = doc
        .descendants()
        .find(|n| n.attribute("id") == Some("table-reconciliations"))
        .expect("a table of recorded reconciliations");
    let header = text(table.children().find(|c| c.has_tag_name("thead")).unwrap());
    for h in ["Monitoring report", "Reconciled by", "Verdict", "Years"] {
        assert!(header.contains(h), "{h} missing from {header}");
    }
    let rows: Vec<String> = table
        .descendants()
        .filter(|n| n.has_tag_name("tr"))
        .skip(1)
        .map(text)
        .collect();
    assert_eq!(rows.len(), 1, "{rows:?}");
    for want in ["tfs-monitoring-report-2026.csv", BY, "verifier", "2026"] {
        assert!(rows[0].contains(want), "{want} missing from {}", rows[0]);
    }
    // The same record `reconciliations` lists, its verdict and lines on the page too.
    let listed = l.json(&["reconciliations", "TFS"]);
    let verdict = listed["reconciliations"][0]["verdict"].as_str().unwrap();
    assert!(rows[0].contains(verdict));
    let lines = doc
        .descendants()
        .find(|n| n.attribute("id") == Some("table-reconciliation_lines"))
        .expect("the recorded lines");
    let n = lines.descendants().filter(|n| n.has_tag_name("tr")).count() - 1;
    assert_eq!(n, listed["reconciliation_lines"].as_array().unwrap().len());
    // Another year's page lists none.
    let other = l.dir.path().join("tfs-2025.html");
    l.ok(&[
        "report",
        "TFS",
        "--year",
        "2025",
        "--out",
        other.to_str().unwrap(),
    ]);
    let html = std::fs::read_to_string(&other).unwrap();
    assert!(!html.contains("table-reconciliations"));
    assert!(html.contains("No reconciliation of TFS 2025 is recorded"));
}

#[test]
fn bundles_carry_recorded_reconciliations_and_check_them() {
    let l = Ledger::demo();
    let file = l.dir.path().join("tfs.bundle");
    let file = file.to_str().unwrap();
    l.ok(&["bundle", "export", "TFS", "--out", file]);
    let checked = l.ok(&["bundle", "check", file]);
    assert!(checked.contains("1 reconciliation"), "{checked}");
    let text = std::fs::read_to_string(file).unwrap();
    assert!(text.starts_with(r#"{"type":"header","format":"sinkbook-bundle","version":2,"#));
    // Loaded into another ledger: the same records, verified there.
    let copy = Ledger::new();
    let loaded = copy.ok(&["bundle", "load", file]);
    assert!(loaded.contains("1 new reconciliations"), "{loaded}");
    let records = |x: &Ledger| x.json(&["reconciliations", "TFS"]);
    assert_eq!(records(&l), records(&copy));
    assert_eq!(copy.run(&["verify"]).code, 0);
    assert!(
        copy.ok(&["bundle", "load", file])
            .contains("0 new reconciliations")
    );
    // The reconciliation's verdict altered in the file: caught on its line.
    let (n, line) = text
        .lines()
        .enumerate()
        .find(|(_, l)| l.starts_with(r#"{"type":"reconciliation""#))
        .unwrap();
    let altered = line.replacen("within materiality", "MATERIAL", 1);
    assert_ne!(altered, line);
    let bad = l.dir.path().join("bad.bundle");
    std::fs::write(&bad, text.replacen(line, &altered, 1)).unwrap();
    let r = l.run(&["bundle", "check", bad.to_str().unwrap()]);
    assert_eq!(r.code, 3);
    assert!(
        r.err.contains(&format!(
            "line {}: reconciliation 0 differs from its row_hash",
            n + 1
        )),
        "{}",
        r.err
    );
    // A bundle of a version this build does not read is refused by name.
    let v3 = text.replacen(r#""version":2"#, r#""version":3"#, 1);
    std::fs::write(&bad, v3).unwrap();
    let r = l.run(&["bundle", "check", bad.to_str().unwrap()]);
    assert_eq!(r.code, 3);
    assert!(
        r.err
            .contains("version 3 is not a version this build reads"),
        "{}",
        r.err
    );
}

/// The reconciliation lines as docs/bundle-format.md describes them, their row hashes and run
/// recomputed by Python's standard library alone, with nothing of sinkbook's code.
#[test]
fn python_checks_the_reconciliation_lines_from_the_format_alone() {
    let has = std::process::Command::new("python3")
        .arg("--version")
        .output()
        .is_ok_and(|o| o.status.success());
    if !has {
        common::tool_missing("python3");
        return;
    }
    let l = two_recorded();
    let file = l.dir.path().join("p.bundle");
    l.ok(&["bundle", "export", "P", "--out", file.to_str().unwrap()]);
    let run = |bytes: &[u8]| common::python("recompute_reconciliation.py", bytes);
    let text = std::fs::read_to_string(&file).unwrap();
    let r = run(text.as_bytes());
    assert_eq!(r.code, 0, "{}", r.err);
    assert_eq!(r.out, "reconciliation 0 ok\nreconciliation 1 ok\n");
    // An altered report name in the second record: the script catches it.
    let altered = text.replacen("\"report_name\":\"b.csv\"", "\"report_name\":\"c.csv\"", 1);
    assert_ne!(altered, text);
    let r = run(altered.as_bytes());
    assert_eq!(r.code, 1, "{}", r.out);
    assert!(
        r.err.contains("reconciliation 1: row_hash differs"),
        "{}",
        r.err
    );
}
