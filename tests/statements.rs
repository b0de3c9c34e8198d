//! Keys and signed statements: key files only their owner reads, statements signed over a
//! seal's tree head, judged again by `statements` and `verify`.

mod common;
use common::Ledger;
use diesel::connection::SimpleConnection;
use diesel::{Connection, SqliteConnection};

/// A key file with a fixed secret (key file format: docs/ledger-format.md), so tables are stable.
fn fixed_key(l: &Ledger, name: &str, byte: u8) -> String {
    let path = l.dir.path().join(name);
    let seed: String = std::iter::repeat_n(format!("{byte:02x}"), 32).collect();
    std::fs::write(&path, format!("sinkbook ed25519 secret key v1\n{seed}\n")).unwrap();
    path.to_str().unwrap().to_string()
}

fn sealed_and_signed() -> (Ledger, String, String) {
    let l = Ledger::with_tfs();
    let r = l.inject("TF-I1", "1000 t", "2026-01-01", "2026-01-31", "k1");
    assert_eq!(r.code, 0, "{}", r.err);
    let op = fixed_key(&l, "operator.key", 1);
    let ver = fixed_key(&l, "verifier.key", 2);
    let early = l.run(&[
        "sign",
        "TFS",
        "--period",
        "2026-Q1",
        "--role",
        "verifier",
        "--key",
        &ver,
        "--statement",
        "Reviewed.",
    ]);
    assert_eq!(early.code, 1, "a verifier signs only a sealed period");
    assert!(early.err.contains("is not sealed"), "{}", early.err);
    // The operator's statement on an unsealed period seals it first.
    l.ok(&[
        "sign",
        "TFS",
        "--period",
        "2026-Q1",
        "--role",
        "operator",
        "--key",
        &op,
        "--statement",
        "Q1 as reported.",
    ]);
    l.ok(&[
        "sign",
        "TFS",
        "--period",
        "2026-Q1",
        "--role",
        "verifier",
        "--key",
        &ver,
        "--statement",
        "No material misstatement found.",
    ]);
    (l, op, ver)
}

#[test]
fn keys_are_private_and_never_overwritten() {
    let l = Ledger::new();
    let file = l.dir.path().join("k.key");
    let f = file.to_str().unwrap();
    let out = l.ok(&["key", "new", "--out", f]);
    assert!(out.contains("Fingerprint"), "{out}");
    #[cfg(unix)]
    {
        use std::os::unix::fs::PermissionsExt;
        let mode = std::fs::metadata(&file).unwrap().permissions().mode() & 0o777;
        assert_eq!(mode, 0o600);
    }
    let before = std::fs::read(&file).unwrap();
    let again = l.run(&["key", "new", "--out", f]);
    assert_eq!(again.code, 1);
    assert!(again.err.contains("never overwritten"), "{}", again.err);
    assert_eq!(std::fs::read(&file).unwrap(), before);
    let shown = l.ok(&["--format", "json", "key", "show", f]);
    let v: serde_json::Value = serde_json::from_str(&shown).unwrap();
    assert_eq!(v[0]["public_key"].as_str().unwrap().len(), 64);
    std::fs::write(l.dir.path().join("junk.key"), "junk").unwrap();
    let junk = l.run(&[
        "key",
        "show",
        l.dir.path().join("junk.key").to_str().unwrap(),
    ]);
    assert_eq!(junk.code, 1);
}

#[test]
fn statements_are_listed_with_their_checks() {
    let (l, _, _) = sealed_and_signed();
    crate::snapshot!("statements", l.ok(&["statements", "TFS"]));
    let v: serde_json::Value =
        serde_json::from_str(&l.ok(&["--format", "json", "verify", "TFS"])).unwrap();
    assert_eq!(v[0]["statements"], 2);
    assert_eq!(v[0]["seals"], 1);
}

/// The ledger file's SQLite, to alter rows as a forger would.
fn raw(l: &Ledger) -> SqliteConnection {
    SqliteConnection::establish(l.path.to_str().unwrap()).unwrap()
}

#[test]
fn an_altered_statement_or_seal_is_caught() {
    for (sql, needle) in [
        (
            "DROP TRIGGER signatures_append_only_update; UPDATE signatures SET statement = 'Reviewed, all fine.' WHERE seq = 1;",
            "row hash",
        ),
        (
            "DROP TRIGGER entries_append_only_update; UPDATE entries SET grams = 1 WHERE seq = 0;",
            "seq 0",
        ),
    ] {
        let (l, _, _) = common::on_file(sealed_and_signed);
        raw(&l).batch_execute(sql).unwrap();
        let r = l.run(&["verify"]);
        assert_eq!(r.code, 3, "after {sql}: {}", r.out);
        assert!(r.err.contains(needle), "{needle:?} in {}", r.err);
    }
}

#[test]
fn a_forged_signature_is_caught() {
    // A changed signature breaks the row hash; one that also recomputed the row hash would still
    // fail the ed25519 check (unit tests in src/ledger/signature.rs).
    let (l, _, _) = common::on_file(sealed_and_signed);
    let v: serde_json::Value =
        serde_json::from_str(&l.ok(&["--format", "json", "statements", "TFS"])).unwrap();
    let sig = v[1]["signature"].as_str().unwrap();
    let flipped = format!(
        "{}{}",
        if sig.starts_with('0') { "1" } else { "0" },
        &sig[1..]
    );
    raw(&l)
        .batch_execute(&format!(
            "DROP TRIGGER signatures_append_only_update; UPDATE signatures SET signature = '{flipped}' WHERE seq = 1;"
        ))
        .unwrap();
    let r = l.run(&["verify"]);
    assert_eq!(r.code, 3);
    assert!(r.err.contains("signature 1 of project TFS"), "{}", r.err);
}

/// `registry operators`: each project by operator with its last seal, and whether a
/// verifier's statement signs it; a project with no seal, and a seal only its operator signed,
/// say so.
#[test]
fn operators_list_each_project_s_last_seal_and_its_verifier_s_statement() {
    let (l, op, _) = sealed_and_signed();
    l.add_kre(&[]);
    crate::snapshot!("registry_operators", l.ok(&["registry", "operators"]));
    let v: serde_json::Value =
        serde_json::from_str(&l.ok(&["--format", "json", "registry", "operators"])).unwrap();
    assert_eq!(v[0]["project"], "KRE");
    assert_eq!(v[0]["last_seal"], "none");
    assert_eq!(v[1]["project"], "TFS");
    assert_eq!(v[1]["last_seal"], "2026-Q1");
    assert_eq!(
        v[1]["tree_size"], 1,
        "the seal covers the one injection before it"
    );
    assert_eq!(v[1]["verifier_statement"], "yes");
    // A later seal signed only by the operator carries no verifier's statement.
    let r = l.inject("TF-I1", "500 t", "2026-04-01", "2026-04-30", "k2");
    assert_eq!(r.code, 0, "{}", r.err);
    l.ok(&[
        "sign",
        "TFS",
        "--period",
        "2026-Q2",
        "--role",
        "operator",
        "--key",
        &op,
        "--statement",
        "Q2 as reported.",
    ]);
    let csv = l.ok(&["--format", "csv", "registry", "operators"]);
    let tfs = csv.lines().find(|r| r.contains(",TFS,")).unwrap();
    assert!(tfs.contains(",2026-Q2,") && tfs.ends_with(",no"), "{csv}");
}
