//! Every refused input: exit 1, one line on stderr naming the field and the value, nothing written.

mod common;
use common::Ledger;

fn refused(l: &Ledger, args: &[&str], needle: &str) {
    let before = l.count("TFS");
    let r = l.run(args);
    assert_eq!(r.code, 1, "{args:?} should be refused; stderr: {}", r.err);
    assert_eq!(
        r.err.trim_end().lines().count(),
        1,
        "one line expected: {}",
        r.err
    );
    assert!(
        r.err.contains(needle),
        "{args:?}: expected {needle:?} in {:?}",
        r.err
    );
    assert!(r.out.is_empty(), "nothing printed on stdout: {}", r.out);
    assert_eq!(l.count("TFS"), before, "{args:?} wrote an entry");
}

fn inject(extra: &[&'static str]) -> Vec<&'static str> {
    let mut base = vec![
        "record",
        "injection",
        "TFS",
        "--site",
        "TF-I1",
        "--from",
        "2026-01-01",
        "--to",
        "2026-01-31",
    ];
    base.extend_from_slice(extra);
    base
}

#[test]
fn quantities() {
    let l = Ledger::with_tfs();
    refused(
        &l,
        &inject(&["--mass", "0 t"]),
        r#"--mass "0 t": must be greater than zero"#,
    );
    refused(
        &l,
        &inject(&["--mass", "-5 t"]),
        r#"--mass "-5 t": must be greater than zero"#,
    );
    refused(
        &l,
        &inject(&["--mass", "12 stone"]),
        r#"--mass "12 stone": unknown unit "stone""#,
    );
    refused(
        &l,
        &inject(&["--mass", "12"]),
        r#"--mass "12": a unit is needed"#,
    );
    refused(
        &l,
        &inject(&["--mass", "1,200 t"]),
        r#"--mass "1,200 t": commas are refused"#,
    );
    refused(&l, &inject(&["--mass", "1e40 Mt"]), r#"--mass "1e40 Mt""#);
    refused(
        &l,
        &inject(&["--mass", "10 t", "--co2-fraction", "1.2"]),
        r#"--co2-fraction "1.2": must be greater than 0 and at most 1"#,
    );
    refused(
        &l,
        &inject(&["--mass", "10 t", "--co2-fraction", "0"]),
        r#"--co2-fraction "0""#,
    );
    refused(
        &l,
        &inject(&["--mass", "10 t", "--co2-fraction", "abc"]),
        r#"--co2-fraction "abc": not a decimal number"#,
    );
    refused(&l, &inject(&[]), "a quantity is needed: --mass");
}

#[test]
fn dates_and_periods() {
    let l = Ledger::with_tfs();
    let base = [
        "record",
        "injection",
        "TFS",
        "--site",
        "TF-I1",
        "--mass",
        "10 t",
    ];
    let with = |from: &'static str, to: &'static str| {
        let mut v = base.to_vec();
        v.extend_from_slice(&["--from", from, "--to", to]);
        v
    };
    refused(
        &l,
        &with("2026-02-01", "2026-01-31"),
        r#"--to "2026-01-31": ends before it starts"#,
    );
    refused(
        &l,
        &with("2026-02-30", "2026-03-01"),
        r#"--from "2026-02-30": is not an ISO 8601 date"#,
    );
    refused(
        &l,
        &with("01/02/2026", "2026-03-01"),
        r#"--from "01/02/2026""#,
    );
    refused(&l, &with("2026-01-01", "tomorrow"), r#"--to "tomorrow""#);
}

#[test]
fn projects_sites_and_keys() {
    let l = Ledger::with_tfs();
    let mut unknown = inject(&["--mass", "10 t"]);
    unknown[2] = "XYZ";
    refused(&l, &unknown, r#"project "XYZ": is not registered"#);
    let mut site = inject(&["--mass", "10 t"]);
    site[4] = "TF-I9";
    refused(&l, &site, r#"--site "TF-I9": is not a site of project TFS"#);
    site[4] = "TF-M1";
    refused(
        &l,
        &site,
        "site TF-M1 is a monitoring-well; injection entries are recorded at sites of kind injection-well",
    );
    assert_eq!(l.run(&inject(&["--mass", "10 t", "--key", "k"])).code, 0);
    refused(
        &l,
        &inject(&["--mass", "11 t", "--key", "k"]),
        r#"--key "k": key "k" already holds seq 0 with a different reading"#,
    );
    refused(
        &l,
        &[
            "project",
            "add",
            "TFS",
            "--name",
            "x",
            "--method",
            "eor",
            "--operator",
            "y",
        ],
        r#"project "TFS": is already registered"#,
    );
    refused(
        &l,
        &[
            "project",
            "add",
            "NEW",
            "--name",
            "x",
            "--method",
            "coal",
            "--operator",
            "y",
        ],
        r#"--method "coal": is not a method"#,
    );
    refused(
        &l,
        &["site", "add", "TFS", "W 1", "--kind", "field"],
        r#"site "W 1": must be 1 to 32 characters"#,
    );
    refused(
        &l,
        &["site", "add", "TFS", "W1", "--kind", "well"],
        r#"--kind "well": is not a site kind"#,
    );
    refused(
        &l,
        &["correct", "TFS", "7", "--mass", "1 t", "--reason", "x"],
        r#"seq "7": there is no entry with seq 7"#,
    );
    refused(
        &l,
        &["correct", "TFS", "0", "--mass", "1 t", "--reason", " "],
        r#"--reason " ": must not be empty"#,
    );
}

#[test]
fn an_import_makes_only_metered_entries() {
    let l = Ledger::with_tfs();
    let file = concat!(
        env!("CARGO_MANIFEST_DIR"),
        "/sample-projects/tfs-meters-2026.csv"
    );
    for kind in [
        "calibration",
        "reversal",
        "seal",
        "tracer-sample",
        "survey",
        "leakage",
    ] {
        let args = ["import", "TFS", file, "--kind", kind, "--skip-bad"];
        refused(
            &l,
            &args,
            &format!("--kind \"{kind}\": is not a metered entry kind"),
        );
    }
}

#[test]
fn ledger_files() {
    let dir = tempfile::tempdir().unwrap();
    let run = |db: &std::path::Path, args: &[&str]| {
        assert_cmd::Command::cargo_bin("sinkbook")
            .unwrap()
            .arg("--db")
            .arg(db)
            .args(args)
            .output()
            .unwrap()
    };
    let missing = dir.path().join("missing.db");
    let o = run(&missing, &["project", "list"]);
    assert_eq!(o.status.code(), Some(1));
    assert!(
        String::from_utf8_lossy(&o.stderr)
            .contains("does not exist (create it with `sinkbook init`")
    );
    assert!(
        !missing.exists(),
        "a missing ledger must not be created by a read"
    );

    let text = dir.path().join("notes.txt");
    let words = "not a database, just words that are long enough to fill a header page";
    std::fs::write(&text, words).unwrap();
    let o = run(&text, &["project", "list"]);
    assert_eq!(o.status.code(), Some(1));
    assert!(
        String::from_utf8_lossy(&o.stderr).contains("is not a sinkbook ledger"),
        "{}",
        String::from_utf8_lossy(&o.stderr)
    );
    let o = run(&text, &["init"]);
    assert_eq!(o.status.code(), Some(1));
    assert_eq!(
        std::fs::read_to_string(&text).unwrap(),
        words,
        "a foreign file is left untouched"
    );

    // Another application's SQLite file is refused and left untouched.
    let other = dir.path().join("other.db");
    {
        use diesel::{Connection, connection::SimpleConnection};
        let mut c = diesel::SqliteConnection::establish(other.to_str().unwrap()).unwrap();
        c.batch_execute("CREATE TABLE t (x INTEGER); INSERT INTO t VALUES (1);")
            .unwrap();
    }
    let o = run(&other, &["project", "list"]);
    assert_eq!(o.status.code(), Some(1));
    let err = String::from_utf8_lossy(&o.stderr);
    assert!(
        err.contains("is not a sinkbook ledger (SQLite application_id 0x0"),
        "{err}"
    );
    let o = run(&other, &["init"]);
    assert_eq!(o.status.code(), Some(1));
    assert!(String::from_utf8_lossy(&o.stderr).contains("refusing to touch it"));
}

#[test]
fn usage_errors_exit_2() {
    let l = Ledger::with_tfs();
    assert_eq!(l.run(&["record", "injection"]).code, 2);
    assert_eq!(l.run(&["balance", "TFS", "--by", "week"]).code, 2);
    assert_eq!(l.run(&["frobnicate"]).code, 2);
}

#[test]
fn masses_beyond_the_ledger_are_refused_never_wrapped() {
    let l = Ledger::with_tfs();
    // 9,000,000 Mt is 9 × 10^18 g: three of them would leave i64 grams (9.22 × 10^18). Each is
    // refused at parse, above the ledger's limit of 10^18 g (1,000,000 Mt).
    for key in ["a", "b", "c"] {
        let mut args = inject(&["--mass", "9000000 Mt", "--key"]);
        args.push(key);
        refused(
            &l,
            &args,
            "--mass \"9000000 Mt\": is above the largest mass",
        );
    }
    // Three readings of 300,000 Mt are kept exactly: 900,000 Mt = 9 × 10^17 g.
    for key in ["d", "e", "f"] {
        let mut args = inject(&["--mass", "300000 Mt", "--over-permit", "--key"]);
        args.push(key);
        l.ok(&args);
    }
    let b: serde_json::Value =
        serde_json::from_str(&l.ok(&["--format", "json", "balance", "TFS", "--by", "year"]))
            .unwrap();
    assert_eq!(b["balance"][0]["injected_t"], 900_000_000_000.0);
    // A fourth would take the project's entries to 1.2 × 10^18 g, beyond the limit: refused.
    let mut args = inject(&["--mass", "300000 Mt", "--over-permit", "--key"]);
    args.push("g");
    refused(
        &l,
        &args,
        "would sum to more than the largest mass the ledger keeps",
    );
}
