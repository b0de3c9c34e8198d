//! Bundles: export → load → export gives the same bytes; any flipped byte is caught by `check`
//! and makes `load` write nothing; a later bundle extends an earlier copy, a fork is refused.

mod common;
use common::Ledger;
use sinkbook::bundle::{Item, Line};
use sinkbook::ledger::Hash;
use sinkbook::ledger::signature::{self, Signed, Statement};
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

/// A new key file for `role`, beside the ledger.
fn key(l: &Ledger, role: &str) -> String {
    let path = l.dir.path().join(format!("{role}.key"));
    let p = path.to_str().unwrap().to_string();
    l.ok(&["key", "new", "--out", &p]);
    p
}

/// Signs `period` as `role` with a new key.
fn sign(l: &Ledger, period: &str, role: &str) {
    let k = key(l, &format!("{role}-{period}"));
    l.ok(&[
        "sign",
        "TFS",
        "--period",
        period,
        "--role",
        role,
        "--key",
        &k,
        "--statement",
        &format!("{period} reviewed by the {role}."),
    ]);
}

/// `small_tfs` with April sealed (seq 4) and signed by the operator and a verifier.
fn signed_tfs() -> Ledger {
    let l = small_tfs();
    l.ok(&["seal", "TFS", "--period", "2026-04"]);
    sign(&l, "2026-04", "operator");
    sign(&l, "2026-04", "verifier");
    l
}

/// The byte ranges of the lines of `text` whose type is `kind`.
fn lines_of(text: &str, kind: &str) -> Vec<std::ops::Range<usize>> {
    let mut at = 0;
    let mut out = Vec::new();
    for line in text.split_inclusive('\n') {
        if line.starts_with(&format!("{{\"type\":\"{kind}\"")) {
            out.push(at..at + line.len());
        }
        at += line.len();
    }
    out
}

#[test]
fn every_flipped_byte_is_caught_and_load_writes_nothing() {
    let l = signed_tfs();
    let file = export(&l, "TFS", "tfs.bundle");
    let bytes = std::fs::read(&file).unwrap();
    let text = String::from_utf8(bytes.clone()).unwrap();
    for kind in [
        "\"import\"",
        "\"reading\"",
        "\"setting\"",
        "\"entry\"",
        "\"signature\"",
        "\"trailer\"",
    ] {
        assert!(text.contains(kind), "the bundle holds no {kind} line");
    }
    let signatures = lines_of(&text, "signature");
    assert_eq!(signatures.len(), 2, "{text}");
    let mut in_signatures = 0;
    let target = Ledger::new();
    let before = projects_json(&target);
    let flipped = l.dir.path().join("flipped.bundle");
    let positions = 240.min(bytes.len());
    for k in 0..positions {
        let at = k * (bytes.len() - 1) / (positions - 1);
        in_signatures += signatures.iter().filter(|r| r.contains(&at)).count();
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
    assert!(
        in_signatures >= 10,
        "only {in_signatures} flipped bytes fell in the signature lines"
    );
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

#[test]
fn signatures_travel_and_are_checked() {
    let l = signed_tfs();
    let file = export(&l, "TFS", "signed.bundle");
    let checked = l.ok(&["bundle", "check", file.to_str().unwrap()]);
    assert!(
        checked.contains("whole: 1 seal, 2 signed statements"),
        "{checked}"
    );
    let copy = Ledger::new();
    let r = load(&copy, &file);
    assert_eq!(r.code, 0, "{}", r.err);
    assert!(r.out.contains("2 new statements"), "{}", r.out);
    copy.ok(&["verify"]);
    let statements = |l: &Ledger| l.ok(&["--format", "json", "statements", "TFS"]);
    assert_eq!(statements(&l), statements(&copy));
    assert_eq!(statements(&copy).matches("\"yes\"").count(), 2);
    assert_eq!(
        std::fs::read(&file).unwrap(),
        std::fs::read(export(&copy, "TFS", "again.bundle")).unwrap()
    );

    // Altered and given a row hash to match, so only the checks of the signature and of the
    // seal it names can catch it: another key's public key; a head the seal does not hold,
    // properly signed by a key of its own.
    let text = std::fs::read_to_string(&file).unwrap();
    let ranges = lines_of(&text, "signature");
    let statement = |r: &std::ops::Range<usize>| match Line::parse(text[r.clone()].trim_end())
        .unwrap()
        .to_item("TFS")
        .unwrap()
    {
        Item::Signature(s) => s,
        other => panic!("{other:?}"),
    };
    let (first, second) = (statement(&ranges[0]), statement(&ranges[1]));
    let other_key = Statement {
        public_key: first.public_key,
        ..second.clone()
    };
    let key = ed25519_dalek::SigningKey::from_bytes(&[5u8; 32]);
    let wrong_head = signature::sign(
        1,
        Signed {
            root: Hash::of(b"another head"),
            ..second.signed.clone()
        },
        &key,
    );
    for (s, says) in [
        (other_key, "signature seq 1: signature does not verify"),
        (
            wrong_head,
            "signature seq 1 signed period 2026-04, 4 entries",
        ),
    ] {
        let bad = l.dir.path().join("altered.bundle");
        let altered = format!(
            "{}{}{}",
            &text[..ranges[1].start],
            Line::signature(&s).to_text(),
            &text[ranges[1].end..]
        );
        std::fs::write(&bad, altered).unwrap();
        let r = l.run(&["bundle", "check", bad.to_str().unwrap()]);
        assert_eq!(r.code, 3, "{}", r.err);
        assert!(r.err.contains(says), "{}", r.err);
    }
}

#[test]
fn export_through_a_seal_stops_at_it_and_a_later_bundle_extends_it() {
    let l = signed_tfs();
    let r = l.inject("TF-I2", "10 t", "2026-06-01", "2026-06-30", "after-seal");
    assert_eq!(r.code, 0, "{}", r.err);
    l.ok(&["seal", "TFS", "--period", "2026-06"]);
    sign(&l, "2026-06", "operator");
    assert_eq!(
        l.count("TFS"),
        7,
        "seqs 0-3, seal 4, the June entry 5, seal 6"
    );

    let bad = l.run(&[
        "bundle",
        "export",
        "TFS",
        "--out",
        "x.bundle",
        "--through-seal",
        "3",
    ]);
    assert_eq!(bad.code, 1, "{}", bad.err);
    assert!(
        bad.err.contains("--through-seal") && bad.err.contains("its seals: 4, 6"),
        "{}",
        bad.err
    );

    let out = l.dir.path().join("april.bundle");
    l.ok(&[
        "bundle",
        "export",
        "TFS",
        "--out",
        out.to_str().unwrap(),
        "--through-seal",
        "4",
    ]);
    let text = std::fs::read_to_string(&out).unwrap();
    assert!(text.starts_with(r#"{"type":"header","format":"sinkbook-bundle","version":2,"project":"TFS","seals":[4]}"#), "{text}");
    let entries = lines_of(&text, "entry");
    assert_eq!(entries.len(), 5, "entries 0 to 4");
    assert!(text[entries[4].clone()].starts_with(r#"{"type":"entry","seq":4,"kind":"seal""#));
    // Only the two statements over seal 4; the one over seal 6 stays out.
    let signatures = lines_of(&text, "signature");
    assert_eq!(signatures.len(), 2);
    assert!(
        signatures
            .iter()
            .all(|r| text[r.clone()].contains(r#""seal_seq":4,"#))
    );
    let checked = l.ok(&["bundle", "check", out.to_str().unwrap()]);
    assert!(
        checked.contains("whole: 1 seal, 2 signed statements"),
        "{checked}"
    );

    let copy = Ledger::new();
    let r = load(&copy, &out);
    assert_eq!(r.code, 0, "{}", r.err);
    assert_eq!(copy.count("TFS"), 5);
    let full = export(&l, "TFS", "full.bundle");
    let r = load(&copy, &full);
    assert_eq!(r.code, 0, "{}", r.err);
    assert!(
        r.out.contains("2 new entries, 1 new statements"),
        "{}",
        r.out
    );
    copy.ok(&["verify"]);
    assert_eq!(
        std::fs::read(&full).unwrap(),
        std::fs::read(export(&copy, "TFS", "copy.bundle")).unwrap()
    );
}

/// The signature lines as docs/bundle-format.md describes them, checked by Python alone
/// (hashlib for the row hash; the `cryptography` package's ed25519 for the signature), with
/// nothing of sinkbook's code.
#[test]
fn python_checks_the_signature_lines_from_the_format_alone() {
    let has = std::process::Command::new("python3")
        .args(["-c", "import cryptography"])
        .output()
        .is_ok_and(|o| o.status.success());
    if !has {
        common::tool_missing("python3 with the cryptography package (pip install cryptography)");
        return;
    }
    let l = signed_tfs();
    let file = export(&l, "TFS", "signed.bundle");
    let run = |bytes: &[u8]| common::python("recompute_signature.py", bytes);
    let text = std::fs::read_to_string(&file).unwrap();
    let r = run(text.as_bytes());
    assert_eq!(r.code, 0, "{}", r.err);
    assert_eq!(r.out, "signature 0 ok\nsignature 1 ok\n");
    // The same script fails on an altered statement: it checks something.
    let altered = text.replace("reviewed by the verifier.", "reviewed by the verifier!");
    assert_ne!(altered, text);
    let r = run(altered.as_bytes());
    assert_eq!(r.code, 1, "{}", r.out);
    assert!(r.err.contains("signature 1: row_hash differs"), "{}", r.err);
}

/// A weathering deduction parameter's source travels in the bundle's setting line: the copy
/// shows it, re-exports the same bytes, and a source altered in the file is caught by its row
/// hash.
#[test]
fn a_settings_source_survives_the_round_trip_and_is_checked() {
    let l = Ledger::new();
    l.ok(&[
        "project",
        "add",
        "EVW",
        "--name",
        "Ellery Vale Weathering",
        "--method",
        "enhanced-weathering",
        "--operator",
        "Northdeep Storage Cooperative",
    ]);
    l.set(
        "EVW",
        &[
            "--ocean-efficiency",
            "0.75",
            "--source",
            "monitoring plan EVW-MP-1 §4.2",
            "--from",
            "2026-01-01",
        ],
    );
    let first = export(&l, "EVW", "evw-1.bundle");
    let text = std::fs::read_to_string(&first).unwrap();
    assert!(
        text.contains(r#""source":"monitoring plan EVW-MP-1 §4.2""#),
        "{text}"
    );
    let copy = Ledger::new();
    let r = load(&copy, &first);
    assert_eq!(r.code, 0, "{}", r.err);
    let shown = copy.ok(&["project", "show", "EVW"]);
    assert!(
        shown.contains("Source of ocean re-equilibration efficiency = 0.75 from 2026-01-01: monitoring plan EVW-MP-1 §4.2."),
        "{shown}"
    );
    let again = export(&copy, "EVW", "evw-2.bundle");
    assert_eq!(
        std::fs::read(&first).unwrap(),
        std::fs::read(&again).unwrap()
    );
    let altered = l.dir.path().join("altered.bundle");
    std::fs::write(&altered, text.replace("EVW-MP-1 §4.2", "EVW-MP-9 §4.2")).unwrap();
    let r = l.run(&["bundle", "check", altered.to_str().unwrap()]);
    assert_eq!(r.code, 3, "{}{}", r.out, r.err);
    assert!(r.err.contains("setting 0"), "{}", r.err);
}
