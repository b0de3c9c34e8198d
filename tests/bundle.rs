//! Bundles: export → load → export gives the same bytes; any flipped byte is caught by `check`
//! and makes `load` write nothing; a later bundle extends an earlier copy, a fork is refused.

mod common;
use common::Ledger;
use std::path::{Path, PathBuf};

fn export(l: &Ledger, project: &str, name: &str) -> PathBuf {
    let out = l.dir.path().join(name);
    l.ok(&["bundle", "export", project, "--out", out.to_str().unwrap()]);
    out
}

fn load(l: &Ledger, file: &Path) -> common::Run {
    l.run(&["bundle", "load", file.to_str().unwrap()])
}

fn projects_json(l: &Ledger) -> String {
    l.ok(&["--format", "json", "project", "list"])
}

/// TFS with a setting, an imported meter export (its bytes kept) and two recorded entries.
fn small_tfs() -> Ledger {
    let l = Ledger::with_tfs();
    l.ok(&["project", "set", "TFS", "--buffer", "5%"]);
    let csv = l.dir.path().join("meters.csv");
    std::fs::write(
        &csv,
        "timestamp,site,quantity,unit,co2_fraction,meter\n2026-03-01,TF-I1,100,t,0.99,FM-101\n2026-03-01T12:00:00Z,TF-I1,50.5,t,0.98,FM-101\n2026-03-02,TF-I1,101,t,0.99,FM-101\n",
    )
    .unwrap();
    l.ok(&["import", "TFS", csv.to_str().unwrap()]);
    for (i, (from, to)) in [("2026-04-01", "2026-04-30"), ("2026-05-01", "2026-05-31")]
        .iter()
        .enumerate()
    {
        let r = l.inject("TF-I2", "20000.5 t", from, to, &format!("m{i}"));
        assert_eq!(r.code, 0, "{}", r.err);
    }
    l
}

#[test]
fn export_load_export_gives_the_same_bytes_for_every_demo_project() {
    let demo = Ledger::demo();
    let copy = Ledger::new();
    for p in ["TFS", "KRE", "CRB", "EVW"] {
        let first = export(&demo, p, &format!("{p}-1.bundle"));
        let checked = demo.ok(&["bundle", "check", first.to_str().unwrap()]);
        assert!(checked.contains("whole"), "{checked}");
        let r = load(&copy, &first);
        assert_eq!(r.code, 0, "{p}: {}", r.err);
        let again = export(&copy, p, &format!("{p}-2.bundle"));
        assert!(
            std::fs::read(&first).unwrap() == std::fs::read(&again).unwrap(),
            "{p}: the bundle re-exported from the loaded copy differs"
        );
    }
    // The loaded copy verifies and reports the same figures as the original.
    copy.ok(&["verify"]);
    assert_eq!(
        demo.ok(&["--format", "json", "balance", "TFS"]),
        copy.ok(&["--format", "json", "balance", "TFS"])
    );
    let report = sample_report(&demo);
    let reconciled = |l: &Ledger| {
        l.ok(&[
            "--format",
            "json",
            "reconcile",
            "TFS",
            "--recompute",
            &report,
        ])
    };
    assert_eq!(reconciled(&demo), reconciled(&copy));
}

/// The demo's monitoring report for TFS, written beside the ledger.
fn sample_report(l: &Ledger) -> String {
    let p = l.dir.path().join("tfs-monitoring-report-2026.csv");
    std::fs::write(
        &p,
        include_str!("../sample-projects/tfs-monitoring-report-2026.csv"),
    )
    .unwrap();
    p.to_str().unwrap().to_string()
}

#[test]
fn every_flipped_byte_is_caught_and_load_writes_nothing() {
    let l = small_tfs();
    let file = export(&l, "TFS", "tfs.bundle");
    let bytes = std::fs::read(&file).unwrap();
    let text = String::from_utf8(bytes.clone()).unwrap();
    for kind in [
        "\"import\"",
        "\"reading\"",
        "\"setting\"",
        "\"entry\"",
        "\"trailer\"",
    ] {
        assert!(text.contains(kind), "the bundle holds no {kind} line");
    }
    let target = Ledger::new();
    let before = projects_json(&target);
    let flipped = l.dir.path().join("flipped.bundle");
    let positions = 240.min(bytes.len());
    for k in 0..positions {
        let at = k * (bytes.len() - 1) / (positions - 1);
        let mut b = bytes.clone();
        b[at] ^= 0x01;
        std::fs::write(&flipped, &b).unwrap();
        let r = l.run(&["bundle", "check", flipped.to_str().unwrap()]);
        assert_eq!(
            r.code, 3,
            "byte {at} flipped: check said {}{}",
            r.out, r.err
        );
        assert_eq!(r.err.trim_end().lines().count(), 1, "{}", r.err);
        assert!(r.err.contains("line "), "names no line: {}", r.err);
        let r = load(&target, &flipped);
        assert_eq!(r.code, 3, "byte {at} flipped: load said {}", r.err);
    }
    assert_eq!(
        projects_json(&target),
        before,
        "a refused load wrote something"
    );
    assert_eq!(
        target.run(&["entries", "TFS"]).code,
        1,
        "TFS was registered"
    );
}

#[test]
fn a_later_bundle_extends_the_copy_and_a_fork_is_refused() {
    let operator = small_tfs();
    let b1 = export(&operator, "TFS", "b1.bundle");
    let verifier = Ledger::new();
    assert_eq!(load(&verifier, &b1).code, 0);
    let held = verifier.count("TFS");

    // The operator goes on: a new site, a setting, more entries.
    operator.ok(&["site", "add", "TFS", "TF-I3", "--kind", "injection-well"]);
    operator.ok(&["project", "set", "TFS", "--assumed-annual-loss", "0.01%"]);
    let r = operator.inject("TF-I3", "1500 t", "2026-06-01", "2026-06-30", "later");
    assert_eq!(r.code, 0, "{}", r.err);
    let b2 = export(&operator, "TFS", "b2.bundle");
    let r = load(&verifier, &b2);
    assert_eq!(r.code, 0, "{}", r.err);
    assert!(r.out.contains("1 new entries"), "{}", r.out);
    assert_eq!(verifier.count("TFS"), held + 1);
    let copy = export(&verifier, "TFS", "copy.bundle");
    assert_eq!(std::fs::read(&copy).unwrap(), std::fs::read(&b2).unwrap());

    // The same bundle again adds nothing; the older one is refused.
    let r = load(&verifier, &b2);
    assert_eq!(r.code, 0, "{}", r.err);
    assert!(r.out.contains("0 new entries"), "{}", r.out);
    let r = load(&verifier, &b1);
    assert_eq!(r.code, 1, "{}", r.err);
    assert!(r.err.contains("older bundle"), "{}", r.err);

    // A fork: the same beginning, then other entries, more of them than the copy holds.
    let fork = small_tfs();
    fork.ok(&["site", "add", "TFS", "TF-I3", "--kind", "injection-well"]);
    fork.ok(&["project", "set", "TFS", "--assumed-annual-loss", "0.01%"]);
    for (i, mass) in ["1499 t", "10 t"].iter().enumerate() {
        let r = fork.inject(
            "TF-I3",
            mass,
            "2026-06-01",
            "2026-06-30",
            &format!("fork{i}"),
        );
        assert_eq!(r.code, 0, "{}", r.err);
    }
    let bf = export(&fork, "TFS", "fork.bundle");
    let r = load(&verifier, &bf);
    assert_eq!(r.code, 3, "{}", r.err);
    assert!(r.err.contains("fork"), "{}", r.err);
    assert_eq!(verifier.count("TFS"), held + 1, "the fork wrote something");
}

#[test]
fn seals_travel_and_a_seal_left_off_the_header_is_caught() {
    let l = small_tfs();
    l.ok(&["seal", "TFS", "--period", "2026-04"]);
    let r = l.inject("TF-I2", "10 t", "2026-06-01", "2026-06-30", "after-seal");
    assert_eq!(r.code, 0, "{}", r.err);
    l.ok(&["seal", "TFS", "--period", "2026-06"]);
    let file = export(&l, "TFS", "sealed.bundle");
    let checked = l.ok(&["bundle", "check", file.to_str().unwrap()]);
    assert!(checked.contains("whole"), "{checked}");
    let text = std::fs::read_to_string(&file).unwrap();
    let header = text.lines().next().unwrap();
    assert!(header.ends_with(r#""seals":[4,6]}"#), "{header}");
    let hidden = l.dir.path().join("hidden.bundle");
    std::fs::write(
        &hidden,
        text.replacen(r#""seals":[4,6]"#, r#""seals":[4]"#, 1),
    )
    .unwrap();
    let r = l.run(&["bundle", "check", hidden.to_str().unwrap()]);
    assert_eq!(r.code, 3, "{}", r.err);
    assert!(r.err.contains("entry seq 6"), "{}", r.err);
    let copy = Ledger::new();
    assert_eq!(load(&copy, &file).code, 0);
    copy.ok(&["verify"]);
}

#[test]
fn a_missing_file_is_refused_and_a_cut_bundle_is_damaged() {
    let l = small_tfs();
    let r = l.run(&["bundle", "check", "no-such.bundle"]);
    assert_eq!(r.code, 1, "{}", r.err);
    assert!(r.err.contains("no-such.bundle"), "{}", r.err);
    let file = export(&l, "TFS", "tfs.bundle");
    let text = std::fs::read_to_string(&file).unwrap();
    let cut = l.dir.path().join("cut.bundle");
    // Whole lines dropped from the end: the trailer is missing.
    let keep: String = text.lines().take(5).map(|s| format!("{s}\n")).collect();
    std::fs::write(&cut, keep).unwrap();
    let r = l.run(&["bundle", "check", cut.to_str().unwrap()]);
    assert_eq!(r.code, 3, "{}", r.err);
    assert!(r.err.contains("before its trailer"), "{}", r.err);
    // An entry line removed from the middle: the chain no longer links.
    let lines: Vec<&str> = text.lines().collect();
    let entry = lines
        .iter()
        .position(|s| s.contains("\"type\":\"entry\""))
        .unwrap();
    let without: String = lines
        .iter()
        .enumerate()
        .filter(|(i, _)| *i != entry)
        .map(|(_, s)| format!("{s}\n"))
        .collect();
    std::fs::write(&cut, without).unwrap();
    let r = l.run(&["bundle", "check", cut.to_str().unwrap()]);
    assert_eq!(r.code, 3, "{}", r.err);
    assert!(r.err.contains("seq 1 where 0 was due"), "{}", r.err);
}
