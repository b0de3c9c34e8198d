//! The commands end to end: recording, corrections, reports and their snapshots.

mod common;
use common::Ledger;

fn sample(l: &Ledger) {
    for (m, site, mass) in [
        ("01", "TF-I1", "35164.5 t"),
        ("01", "TF-I2", "25202.4 t"),
        ("02", "TF-I1", "37072.9 t"),
        ("04", "TF-I1", "36070.7 t"),
    ] {
        let last = if m == "02" {
            "28"
        } else if m == "04" {
            "30"
        } else {
            "31"
        };
        let r = l.inject(
            site,
            mass,
            &format!("2026-{m}-01"),
            &format!("2026-{m}-{last}"),
            &format!("{site}-{m}"),
        );
        assert_eq!(r.code, 0, "{}", r.err);
    }
}

#[test]
fn record_entries_and_balance_tables() {
    let l = Ledger::with_tfs();
    sample(&l);
    crate::snapshot!("entries_table", l.ok(&["entries", "TFS"]));
    crate::snapshot!(
        "balance_quarter",
        l.ok(&["balance", "TFS", "--by", "quarter"])
    );
    crate::snapshot!("balance_month", l.ok(&["balance", "TFS", "--by", "month"]));
    crate::snapshot!(
        "balance_year_json",
        l.ok(&["--format", "json", "balance", "TFS", "--by", "year"])
    );
    crate::snapshot!(
        "balance_quarter_csv",
        l.ok(&["--format", "csv", "balance", "TFS"])
    );
    crate::snapshot!("projects_table", l.ok(&["project", "list"]));
    crate::snapshot!("project_show", l.ok(&["project", "show", "TFS"]));
    crate::snapshot!("verify_table", l.ok(&["verify"]));
}

#[test]
fn injected_grams_are_mass_times_fraction_exactly() {
    let l = Ledger::with_tfs();
    // 1250.5 t × 0.985 = 1 231.7425 t exactly = 1 231 742 500 g.
    assert_eq!(
        l.inject("TF-I1", "1250.5 t", "2026-01-01", "2026-01-31", "a")
            .code,
        0
    );
    // 1000 short tons × 0.985 = 907 184.74 kg × 0.985 = 893 576 968.9 g → 893 576 969 g.
    assert_eq!(
        l.inject("TF-I1", "1000 short_ton", "2026-02-01", "2026-02-28", "b")
            .code,
        0
    );
    let v: serde_json::Value =
        serde_json::from_str(&l.ok(&["--format", "json", "entries", "TFS"])).unwrap();
    assert_eq!(v[0]["co2_g"], 1_231_742_500i64);
    assert_eq!(v[1]["co2_g"], 893_576_969i64);
    assert_eq!(
        v[1]["reading"][1],
        serde_json::json!(["mass", "1000 short_ton"])
    );
}

#[test]
fn human_tables_end_with_the_cautions_line() {
    let l = Ledger::with_tfs();
    sample(&l);
    for args in [
        &["entries", "TFS"][..],
        &["balance", "TFS"],
        &["verify"],
        &["project", "list"],
    ] {
        let out = l.ok(args);
        assert!(
            out.trim_end().ends_with(sinkbook::report::CAUTIONS),
            "{args:?}"
        );
    }
}

#[test]
fn same_key_same_reading_is_a_harmless_retry() {
    let l = Ledger::with_tfs();
    let first = l.inject("TF-I1", "100 t", "2026-01-01", "2026-01-31", "k1");
    assert_eq!(first.code, 0);
    let again = l.inject("TF-I1", "100 t", "2026-01-01", "2026-01-31", "k1");
    assert_eq!(again.code, 0, "{}", again.err);
    assert!(
        again.out.contains("already recorded as TFS seq 0"),
        "{}",
        again.out
    );
    assert_eq!(l.count("TFS"), 1);
    // Without --key, the key is derived from the content: the same command twice records once.
    let args = [
        "record",
        "injection",
        "TFS",
        "--site",
        "TF-I2",
        "--mass",
        "7 t",
        "--from",
        "2026-01-01",
        "--to",
        "2026-01-01",
    ];
    assert_eq!(l.run(&args).code, 0);
    assert!(l.ok(&args).contains("already recorded as TFS seq 1"));
    assert_eq!(l.count("TFS"), 2);
}

#[test]
fn corrections_replace_and_can_be_corrected() {
    let l = Ledger::with_tfs();
    sample(&l);
    l.ok(&[
        "correct",
        "TFS",
        "0",
        "--mass",
        "36000 t",
        "--reason",
        "flow computer re-read",
    ]);
    let twice = l.run(&["correct", "TFS", "0", "--mass", "1 t", "--reason", "again"]);
    assert_eq!(twice.code, 1);
    assert!(
        twice
            .err
            .contains("seq 0 was already corrected by seq 4; correct seq 4 instead"),
        "{}",
        twice.err
    );
    l.ok(&[
        "correct",
        "TFS",
        "4",
        "--co2-fraction",
        "0.99",
        "--reason",
        "lab re-analysis of the January composite",
    ]);
    let v: serde_json::Value =
        serde_json::from_str(&l.ok(&["--format", "json", "entries", "TFS"])).unwrap();
    assert_eq!(v[4]["corrects"], 0);
    // A correction of the mass keeps the corrected reading's CO2 fraction (0.985).
    assert_eq!(v[4]["co2_g"], 35_460_000_000i64);
    assert_eq!(v[4]["corrected_by"], 5);
    assert_eq!(v[5]["reading"][1], serde_json::json!(["mass", "36000 t"]));
    assert_eq!(v[5]["co2_g"], 35_640_000_000i64); // 36 000 t × 0.99
    assert_eq!(v[5]["reason"], "lab re-analysis of the January composite");
    // Q1 counts the latest correction of seq 0 (35 640 t) plus seqs 1 and 2.
    let b: serde_json::Value =
        serde_json::from_str(&l.ok(&["--format", "json", "balance", "TFS"])).unwrap();
    let q1 =
        35_640_000_000i64 + (25_202_400_000i64 * 985 / 1000) + (37_072_900_000i64 * 985 / 1000);
    assert_eq!(b["balance"][0]["period"], "2026-Q1");
    assert_eq!(b["balance"][0]["injected_t"], q1 as f64 / 1e6);
    crate::snapshot!("entries_with_corrections", l.ok(&["entries", "TFS"]));
}

#[test]
fn correcting_an_entry_of_another_project_is_refused() {
    let l = Ledger::with_tfs();
    sample(&l);
    l.add_kre(&[]);
    let r = l.run(&["correct", "KRE", "2", "--mass", "1 t", "--reason", "x"]);
    assert_eq!(r.code, 1);
    assert!(
        r.err.contains("no entry with seq 2 in this project"),
        "{}",
        r.err
    );
    assert_eq!(l.count("KRE"), 0);
}

#[test]
fn periods_spanning_quarters_are_split_by_days() {
    let l = Ledger::with_tfs();
    // 10 days: 1 in Q1, 9 in Q2.
    assert_eq!(
        l.inject("TF-I1", "1000 t", "2026-03-31", "2026-04-09", "span")
            .code,
        0
    );
    let b: serde_json::Value =
        serde_json::from_str(&l.ok(&["--format", "json", "balance", "TFS"])).unwrap();
    assert_eq!(b["balance"][0]["injected_t"], 98.5);
    assert_eq!(b["balance"][1]["injected_t"], 886.5);
    assert_eq!(b["balance"][1]["cumulative_sequestered_t"], 985.0);
}

#[test]
fn demo_builds_and_prints_its_tables() {
    let ledger = common::Ledger::unmade(common::on_postgres(), "demo.db");
    let db = ledger.path.clone();
    let o = assert_cmd::Command::cargo_bin("sinkbook")
        .unwrap()
        .env("SINKBOOK_NOW", common::NOW)
        .env_remove("COLUMNS")
        .env("TMPDIR", ledger.dir.path())
        .args(["demo", "--full", "--db"])
        .arg(&db)
        .output()
        .unwrap();
    assert!(o.status.success(), "{}", String::from_utf8_lossy(&o.stderr));
    let out = String::from_utf8(o.stdout).unwrap();
    let out = common::mask_reports(&out.replace(&db.display().to_string(), "[DB]"));
    crate::snapshot!("demo", common::mask_ledger_head(&out));
    // The sample projects' annual tables, pinned beside the quarterly ones the demo prints.
    for project in ["TFS", "KRE"] {
        let o = assert_cmd::Command::cargo_bin("sinkbook")
            .unwrap()
            .args(["balance", project, "--by", "year", "--db"])
            .arg(&db)
            .output()
            .unwrap();
        assert!(o.status.success());
        crate::snapshot!(
            format!("sample_{project}_year"),
            String::from_utf8(o.stdout).unwrap()
        );
    }
    // A second demo into the same file is refused: it builds fresh ledgers only.
    let again = assert_cmd::Command::cargo_bin("sinkbook")
        .unwrap()
        .args(["demo", "--db"])
        .arg(&db)
        .output()
        .unwrap();
    assert_eq!(again.status.code(), Some(1));
}

#[test]
fn demo_without_db_uses_a_temporary_file() {
    let (dir, tmp) = (tempfile::tempdir().unwrap(), tempfile::tempdir().unwrap());
    let o = assert_cmd::Command::cargo_bin("sinkbook")
        .unwrap()
        .current_dir(dir.path())
        .env_remove("SINKBOOK_DB")
        .env("SINKBOOK_NOW", common::NOW)
        .env_remove("COLUMNS")
        .env("TMPDIR", tmp.path())
        .arg("demo")
        .output()
        .unwrap();
    assert!(o.status.success());
    // The overview: projects, one balance per project by year, totals, and where the detail is.
    let out = common::mask_reports(&String::from_utf8(o.stdout).unwrap());
    crate::snapshot!("demo_overview", out.clone());
    for title in [
        "Mass balance (40 CFR 98.443) by year, project TFS",
        "Mass balance (40 CFR 98.443) by year, project KRE",
        "Mineralization by year, project CRB",
        "Enhanced weathering by year, project EVW",
        "Totals across projects",
        "The detailed tables",
    ] {
        assert_eq!(out.matches(title).count(), 1, "{title}");
    }
    for detail in [
        "Buffer pool, project TFS",
        "Meters by quarter",
        "Ledger verification",
    ] {
        assert!(!out.contains(detail), "{detail} is detail");
    }
    assert_eq!(
        std::fs::read_dir(dir.path()).unwrap().count(),
        0,
        "demo left files in the working directory"
    );
    // Only the folder of the report page it printed is kept, holding the page alone.
    let kept: Vec<_> = std::fs::read_dir(tmp.path())
        .unwrap()
        .map(|e| e.unwrap().path())
        .collect();
    assert_eq!(kept.len(), 1, "{kept:?}");
    let pages: Vec<_> = std::fs::read_dir(&kept[0])
        .unwrap()
        .map(|e| e.unwrap().file_name())
        .collect();
    assert_eq!(pages, ["tfs-2026.html"]);
}
