//! Seals: tree heads over a project's entries, recomputed by Python's hashlib; sealed periods
//! refusing what is dated in them, and late adjustments that leave the sealed figures alone.

mod common;
use common::Ledger;
use std::io::Write;
use std::process::{Command, Stdio};

const LATER: &str = "2027-02-10T08:00:00Z";

/// tests/recompute_chain.py over `entries --format json`: its `seal` lines.
fn python_seal_lines(l: &Ledger, project: &str) -> Vec<String> {
    let entries = l.ok(&["--format", "json", "entries", project]);
    let child = Command::new("python3")
        .arg(concat!(
            env!("CARGO_MANIFEST_DIR"),
            "/tests/recompute_chain.py"
        ))
        .arg(project)
        .stdin(Stdio::piped())
        .stdout(Stdio::piped())
        .stderr(Stdio::piped())
        .spawn();
    let mut child = match child {
        Ok(c) => c,
        Err(e) => panic!("python3 is needed to recompute the seal roots independently: {e}"),
    };
    child
        .stdin
        .take()
        .unwrap()
        .write_all(entries.as_bytes())
        .unwrap();
    let out = child.wait_with_output().unwrap();
    assert!(
        out.status.success(),
        "python disagrees on {project}: {}",
        String::from_utf8_lossy(&out.stderr)
    );
    String::from_utf8(out.stdout)
        .unwrap()
        .lines()
        .filter(|l| l.starts_with("seal "))
        .map(str::to_string)
        .collect()
}

fn python_available() -> bool {
    let ok = Command::new("python3")
        .arg("--version")
        .output()
        .is_ok_and(|o| o.status.success());
    if !ok && std::env::var("CI").is_ok_and(|v| v == "true") {
        panic!("python3 is missing: with CI=true the independent seal-root check must run");
    }
    ok
}

#[test]
fn python_recomputes_every_seal_root_of_the_demo() {
    if !python_available() {
        eprintln!("skipped: python3 not available, the independent seal-root check did not run");
        return;
    }
    let l = Ledger::demo();
    l.ok(&["seal", "KRE", "--period", "2026-Q1"]);
    l.ok(&["seal", "KRE", "--period", "2026-Q2"]);
    let projects = l.json(&["project", "list"]);
    let mut seals = 0;
    for p in projects.as_array().unwrap() {
        let code = p["code"].as_str().unwrap();
        let listed = l.json(&["entries", code]);
        let sealed: Vec<&serde_json::Value> = listed
            .as_array()
            .unwrap()
            .iter()
            .filter(|e| e["kind"] == "seal")
            .collect();
        let lines = python_seal_lines(&l, code);
        assert_eq!(lines.len(), sealed.len(), "{code}");
        for (line, e) in lines.iter().zip(&sealed) {
            let reading: std::collections::HashMap<String, String> =
                serde_json::from_value(serde_json::Value::Object(
                    e["reading"]
                        .as_array()
                        .unwrap()
                        .iter()
                        .map(|p| (p[0].as_str().unwrap().to_string(), p[1].clone()))
                        .collect(),
                ))
                .unwrap();
            assert_eq!(
                line,
                &format!(
                    "seal {} {} {}",
                    e["seq"], reading["tree_size"], reading["root"]
                )
            );
        }
        seals += lines.len();
    }
    assert!(seals >= 2, "the demo ledger holds seals");
    let v = l.json(&["verify"]);
    let kre = v
        .as_array()
        .unwrap()
        .iter()
        .find(|r| r["project"] == "KRE")
        .unwrap();
    assert_eq!(kre["seals"], 2);
}

fn sealed_tfs() -> Ledger {
    let l = Ledger::with_tfs();
    for (i, (from, to)) in [("2026-01-01", "2026-01-31"), ("2026-02-01", "2026-02-28")]
        .iter()
        .enumerate()
    {
        let r = l.inject("TF-I1", "1000 t", from, to, &format!("k{i}"));
        assert_eq!(r.code, 0, "{}", r.err);
    }
    l
}

#[test]
fn a_seal_fixes_its_tree_head_and_figures() {
    let l = sealed_tfs();
    let s = l.json(&["seal", "TFS", "--period", "2026-Q1"]);
    assert_eq!(s[0]["tree_size"], 2);
    let root = s[0]["root"].as_str().unwrap();
    assert_eq!(root.len(), 64);
    assert!(
        root.bytes()
            .all(|b| b.is_ascii_digit() || (b'a'..=b'f').contains(&b))
    );
    // 2 × 1000 t at 98.5 % CO2 — computed.
    assert_eq!(s[0]["stored_t"], 1970.0);
    crate::snapshot!(
        "seal_table",
        l.run_at(LATER, &["seal", "TFS", "--period", "2026-Q2"]).out
    );
    let overlap = l.run(&["seal", "TFS", "--period", "2026-03"]);
    assert_eq!(overlap.code, 1);
    assert!(overlap.err.contains("sealed by seq 2"), "{}", overlap.err);
    let bad = l.run(&["seal", "TFS", "--period", "2026-Q5"]);
    assert_eq!(bad.code, 1);
    assert!(bad.err.contains("--period \"2026-Q5\""), "{}", bad.err);
    l.ok(&["verify"]);
}

#[test]
fn sealed_periods_refuse_or_take_late_adjustments() {
    let l = sealed_tfs();
    l.ok(&["seal", "TFS", "--period", "2026-Q1"]);
    let before = l.json(&["balance", "TFS", "--by", "quarter"]);

    let r = l.inject("TF-I2", "50 t", "2026-03-01", "2026-03-31", "late-1");
    assert_eq!(r.code, 1);
    assert!(r.err.contains("sealed by seq 2"), "{}", r.err);
    assert_eq!(l.count("TFS"), 3, "nothing written");

    let fix = [
        "correct",
        "TFS",
        "0",
        "--mass",
        "900 t",
        "--reason",
        "meter re-read",
    ];
    let refused = l.run_at(LATER, &fix);
    assert_eq!(refused.code, 1);
    assert!(refused.err.contains("sealed by seq 2"), "{}", refused.err);
    let mut late_fix = vec!["--late"];
    late_fix.extend_from_slice(&fix);
    let late = l.run_at(LATER, &late_fix);
    assert_eq!(late.code, 0, "{}", late.err);
    let mut late_record = vec!["--late"];
    late_record.extend_from_slice(&[
        "record",
        "injection",
        "TFS",
        "--site",
        "TF-I2",
        "--mass",
        "50 t",
        "--from",
        "2026-03-01",
        "--to",
        "2026-03-31",
        "--key",
        "late-1",
    ]);
    assert_eq!(l.run_at(LATER, &late_record).code, 0);

    let entries = l.json(&["entries", "TFS"]);
    let fix_entry = &entries[3];
    assert_eq!(fix_entry["period_from"], "2027-02-10");
    assert_eq!(fix_entry["corrects"], serde_json::Value::Null);
    // 900 t − 1000 t at 98.5 % — computed: −98.5 t.
    assert_eq!(fix_entry["co2_g"], -98_500_000);
    let late_entry = &entries[4];
    assert_eq!(late_entry["period_from"], "2027-02-10");
    assert!(
        late_entry["reading"]
            .as_array()
            .unwrap()
            .iter()
            .any(|p| p[0] == "late_for" && p[1] == "2026-Q1")
    );

    let after = l.json(&["balance", "TFS", "--by", "quarter"]);
    assert_eq!(
        before["balance"][0]["sequestered_t"], after["balance"][0]["sequestered_t"],
        "the sealed quarter's figures stay as sealed"
    );
    // Correcting the late difference itself is refused; the sealed entry is corrected again.
    let again = l.run_at(
        LATER,
        &[
            "--late", "correct", "TFS", "3", "--mass", "1 t", "--reason", "x",
        ],
    );
    assert_eq!(again.code, 1);
    assert!(again.err.contains("correct seq 0 again"), "{}", again.err);
    let settings = l.run(&["project", "set", "TFS", "--buffer", "10%"]);
    assert_eq!(
        settings.code, 0,
        "2026-12-01 is outside 2026-Q1: {}",
        settings.err
    );
    l.ok(&["verify"]);
}

/// A late injection after the year is sealed: balance, totals and the annual page list it in
/// their own late-adjustment lines, it counts in the period it was recorded in, and every figure
/// of the sealed year stays as sealed.
#[test]
fn late_adjustments_have_their_own_lines_and_leave_the_sealed_year_alone() {
    let l = sealed_tfs();
    let seal = l.json(&["seal", "TFS", "--period", "2026"]);
    let before = l.json(&["balance", "TFS", "--by", "year"]);
    let totals_before = l.json(&["totals", "--by", "year"]);
    assert!(before.get("late_adjustments").is_none(), "{before}");
    let r = l.run_at(
        LATER,
        &[
            "--late",
            "record",
            "injection",
            "TFS",
            "--site",
            "TF-I2",
            "--mass",
            "50 t",
            "--co2-fraction",
            "0.985",
            "--from",
            "2026-03-01",
            "--to",
            "2026-03-31",
            "--key",
            "late-march",
        ],
    );
    assert_eq!(r.code, 0, "{}", r.err);

    let after = l.json(&["balance", "TFS", "--by", "year"]);
    let rows = after["balance"].as_array().unwrap();
    assert_eq!(rows[0]["period"], "2026");
    assert_eq!(
        rows[0], before["balance"][0],
        "the sealed year's row changed"
    );
    // The sealed year's figures are the seal's: 2 × 1000 t at 98.5 % — computed: 1970 t.
    assert_eq!(rows[0]["sequestered_t"], seal[0]["stored_t"]);
    assert_eq!(rows[0]["sequestered_t"], 1970.0);
    // The late 50 t at 98.5 % (computed: 49.25 t) counts in 2027, the year it was recorded.
    assert_eq!(rows[1]["period"], "2027");
    assert_eq!(rows[1]["sequestered_t"], 49.25);
    let late = after["late_adjustments"].as_array().expect("a late table");
    assert_eq!(late.len(), 1, "{late:?}");
    let line = &late[0];
    assert_eq!(
        line["seq"], 3,
        "entries 0, 1, the seal 2, then the late one"
    );
    assert_eq!(line["sealed_period"], "2026");
    assert_eq!(line["kind"], "injection");
    assert_eq!(line["period_from"], "2026-03-01");
    assert_eq!(line["period_to"], "2026-03-31");
    assert_eq!(line["entry_t"], 49.25);
    assert_eq!(line["recorded_at"], "2027-02-10 08:00:00");
    let table = l.ok(&["balance", "TFS", "--by", "year"]);
    assert!(table.contains("Late adjustments"), "{table}");

    let totals = l.json(&["totals", "--by", "year"]);
    // One table prints as its rows; more, as an object of tables by id.
    let year = |t: &serde_json::Value, y: &str| {
        t.get("totals")
            .unwrap_or(t)
            .as_array()
            .unwrap()
            .iter()
            .find(|r| r["project"] == "TFS" && r["year"] == y)
            .cloned()
    };
    assert_eq!(year(&totals, "2026"), year(&totals_before, "2026"));
    assert!(year(&totals_before, "2026").is_some());
    assert_eq!(totals["late_adjustments"][0]["project"], "TFS");
    assert_eq!(totals["late_adjustments"][0]["seq"], 3);

    let page = l.dir.path().join("tfs-2026.html");
    l.ok(&[
        "report",
        "TFS",
        "--year",
        "2026",
        "--out",
        page.to_str().unwrap(),
    ]);
    let html = std::fs::read_to_string(&page).unwrap();
    let at = html
        .find(r#"<table id="table-late_adjustments""#)
        .expect("the page's late adjustments table");
    let end = at + html[at..].find("</table>").unwrap();
    let row = &html[at..end];
    for cell in ["2026-03-01", "2026-03-31", "49.250", "2027-02-10 08:00:00"] {
        assert!(row.contains(cell), "{cell} not in {row}");
    }
    l.ok(&["verify"]);
}
