//! Tampering: the database refuses changes, and with its triggers dropped `verify` still catches
//! every altered, deleted or reordered entry, naming the seq.

mod common;
use common::Ledger;
use diesel::connection::SimpleConnection;
use diesel::{Connection, SqliteConnection};

/// A ledger file (these tests rewrite its SQLite rows and bytes directly; the registry's
/// refusals are tests/registry.rs's) with six entries.
fn ledger_with_entries() -> Ledger {
    let l = common::on_file(Ledger::with_tfs);
    for m in 1..=6 {
        let r = l.inject(
            "TF-I1",
            &format!("{}00 t", 300 + m),
            &format!("2026-0{m}-01"),
            &format!("2026-0{m}-28"),
            &format!("k{m}"),
        );
        assert_eq!(r.code, 0, "{}", r.err);
    }
    l
}

fn raw(l: &Ledger) -> SqliteConnection {
    SqliteConnection::establish(l.path.to_str().unwrap()).unwrap()
}

const DROP_TRIGGERS: &str =
    "DROP TRIGGER entries_append_only_update; DROP TRIGGER entries_append_only_delete;
     DROP TRIGGER projects_append_only_update; DROP TRIGGER sites_append_only_update;";

/// Applies raw SQL with the triggers dropped, then expects verify to exit 3 naming `seq`.
fn tampered(sql: &str, needle: &str) {
    let l = ledger_with_entries();
    assert_eq!(l.run(&["verify"]).code, 0);
    raw(&l)
        .batch_execute(&format!("{DROP_TRIGGERS} {sql}"))
        .unwrap();
    let r = l.run(&["verify"]);
    assert_eq!(r.code, 3, "verify should fail after {sql}: {}", r.out);
    assert!(r.err.contains(needle), "expected {needle:?} in {}", r.err);
}

#[test]
fn updates_and_deletes_are_refused_by_the_database() {
    let l = ledger_with_entries();
    let mut c = raw(&l);
    for sql in [
        "UPDATE entries SET grams = grams + 1 WHERE seq = 2",
        "DELETE FROM entries WHERE seq = 5",
        "UPDATE projects SET permit_capacity_g = 1",
        "DELETE FROM sites",
    ] {
        let e = c.batch_execute(sql).unwrap_err().to_string();
        assert!(e.contains("append-only"), "{sql}: {e}");
    }
    assert_eq!(l.count("TFS"), 6);
    assert_eq!(l.run(&["verify"]).code, 0);
}

#[test]
fn altered_amount() {
    tampered(
        "UPDATE entries SET grams = grams + 1000000 WHERE seq = 3",
        "project TFS seq 3: leaf hash differs",
    );
}

/// The running figures each row keeps for appends (Σ |grams|, cumulative stored: what the mass
/// limit and the permit are checked against) are recounted as the chain is read, so a changed
/// one stops verify naming its seq instead of letting a permit check run on it.
#[test]
fn altered_running_figure() {
    tampered(
        "UPDATE entries SET tally_stored_g = tally_stored_g - 1000000 WHERE seq = 5",
        "project TFS seq 5: the running figures kept with it",
    );
}

/// Reads check what they read: a forged amount stops every report that reads entries, naming
/// the seq, instead of being counted.
#[test]
fn reports_refuse_a_forged_amount() {
    let l = ledger_with_entries();
    raw(&l)
        .batch_execute(&format!(
            "{DROP_TRIGGERS} UPDATE entries SET grams = grams + 1000000 WHERE seq = 4"
        ))
        .unwrap();
    for args in [
        &["balance", "TFS"][..],
        &["balance", "TFS", "--by", "quarter"],
        &["totals"],
        &["entries", "TFS"],
        &["--format", "json", "entries", "TFS"],
    ] {
        let r = l.run(args);
        assert_eq!(
            r.code, 3,
            "{args:?} should refuse the forged entry: {}",
            r.out
        );
        assert!(
            r.err.contains("project TFS seq 4: leaf hash differs"),
            "{args:?}: {}",
            r.err
        );
    }
}

#[test]
fn altered_date() {
    tampered(
        "UPDATE entries SET period_to = '2026-02-27' WHERE seq = 1",
        "project TFS seq 1: leaf hash differs",
    );
}

#[test]
fn altered_reading_text() {
    tampered(
        r#"UPDATE entries SET reading = replace(reading, '30400 t', '30500 t') WHERE seq = 3"#,
        "seq 3: leaf hash differs",
    );
}

#[test]
fn deleted_entry() {
    tampered(
        "DELETE FROM entries WHERE seq = 2",
        "project TFS seq 2: sequence broken: expected seq 2, found seq 3",
    );
}

#[test]
fn swapped_entries() {
    // Swap the contents of seq 1 and seq 2 (each keeping its hashes) by renumbering.
    tampered(
        "UPDATE entries SET seq = 100 WHERE seq = 1; UPDATE entries SET seq = 1 WHERE seq = 2; UPDATE entries SET seq = 2 WHERE seq = 100;",
        "project TFS seq 1: leaf hash differs",
    );
}

#[test]
fn rehashed_leaf_breaks_the_chain() {
    // A forger who recomputes the leaf of an altered entry still breaks the next chain link
    // unless every later hash is rewritten too; --expect-head catches even that.
    let l = ledger_with_entries();
    let head = {
        let v: serde_json::Value =
            serde_json::from_str(&l.ok(&["--format", "json", "verify"])).unwrap();
        v[0]["chain_hash"].as_str().unwrap().to_string()
    };
    raw(&l)
        .batch_execute(&format!(
            "{DROP_TRIGGERS} UPDATE entries SET chain_hash = leaf_hash WHERE seq = 2"
        ))
        .unwrap();
    let r = l.run(&["verify"]);
    assert_eq!(r.code, 3);
    assert!(
        r.err.contains("seq 2: chain hash does not follow"),
        "{}",
        r.err
    );

    let l2 = ledger_with_entries();
    raw(&l2)
        .batch_execute(&format!(
            "{DROP_TRIGGERS} DELETE FROM entries WHERE seq = 5"
        ))
        .unwrap();
    assert_eq!(
        l2.run(&["verify"]).code,
        0,
        "dropping the tail alone leaves a consistent shorter chain"
    );
    let r = l2.run(&["verify", "TFS", "--expect-head", &head]);
    assert_eq!(r.code, 3, "the published head is gone");
    assert!(
        r.err.contains("the chain no longer holds head"),
        "{}",
        r.err
    );
    assert_eq!(l.run(&["verify", "TFS", "--expect-head", "xyz"]).code, 1);
}

#[test]
fn altered_permit_is_caught() {
    tampered(
        "UPDATE projects SET permit_capacity_g = 9000000000000",
        "project TFS registration differs from its row hash",
    );
}

#[test]
fn corrupted_file_is_caught_by_integrity_check() {
    let l = ledger_with_entries();
    let whole = l.ok(&["verify", "--deep"]);
    assert!(
        whole.contains("integrity_check found the file's structure whole"),
        "{whole}"
    );
    // Checkpoint the WAL so the pages live in the main file, then scribble over a page.
    raw(&l)
        .batch_execute("PRAGMA wal_checkpoint(TRUNCATE);")
        .unwrap();
    let mut bytes = std::fs::read(&l.path).unwrap();
    assert!(bytes.len() >= 4096 * 3, "{} bytes", bytes.len());
    // Overwrite the b-tree page header of every page after the first.
    for page in bytes.chunks_mut(4096).skip(1) {
        for b in &mut page[..64] {
            *b = 0x5a;
        }
    }
    std::fs::write(&l.path, bytes).unwrap();
    let r = l.run(&["verify", "--deep"]);
    assert_ne!(r.code, 0, "a scribbled page must not verify");
    assert!(r.code == 3 || r.code == 1, "{}: {}", r.code, r.err);
}
