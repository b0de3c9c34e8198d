//! Writers at once, on the backend under test (`SINKBOOK_TEST_BACKEND`): many processes into
//! one project and into several lose nothing and fork no chain; a writer finding the ledger
//! held waits as long as `--wait` says, then records or gives up in one line; readers never wait.

mod common;

use common::writers::record_at_once;
use common::{Ledger, NOW};
use diesel::connection::SimpleConnection;
use diesel::prelude::*;
use std::process::{Command, Stdio};

const WRITERS: usize = 4;
const RECORDS: usize = 60;

#[test]
fn four_writers_of_sixty_records_into_one_project_lose_nothing() {
    record_at_once(&Ledger::with_tfs(), &[("TFS", "TF-I1")], WRITERS, RECORDS);
}

#[test]
fn four_writers_of_sixty_records_into_two_projects_lose_nothing() {
    let l = Ledger::with_tfs();
    l.add_kre(&[("KR-I1", "injection-well")]);
    record_at_once(&l, &[("TFS", "TF-I1"), ("KRE", "KR-I1")], WRITERS, RECORDS);
}

/// Another writer holding the ledger as a long import would: on a file a raw SQLite
/// connection inside BEGIN IMMEDIATE, on the registry a session holding TFS's chain lock.
/// Released when dropped.
enum Held {
    File(#[allow(dead_code)] SqliteConnection),
    Registry(#[allow(dead_code)] PgConnection),
}

fn hold(l: &Ledger) -> Held {
    match &l.registry {
        None => {
            let mut c = SqliteConnection::establish(l.path.to_str().unwrap()).unwrap();
            c.batch_execute("BEGIN IMMEDIATE").unwrap();
            Held::File(c)
        }
        Some(db) => {
            let mut c = PgConnection::establish(&db.url()).unwrap();
            c.batch_execute(
                "SELECT pg_advisory_lock(hashtextextended('sinkbook chain ' || 'TFS', 0))",
            )
            .unwrap();
            Held::Registry(c)
        }
    }
}

/// `sinkbook --wait WAIT record injection TFS …` with key `key`.
fn record_waiting(l: &Ledger, wait: &str, key: &str) -> Command {
    let mut c = Command::new(assert_cmd::cargo::cargo_bin("sinkbook"));
    c.env("SINKBOOK_NOW", NOW)
        .env_remove("SINKBOOK_DB")
        .arg("--db")
        .arg(&l.path)
        .args([
            "--wait",
            wait,
            "record",
            "injection",
            "TFS",
            "--site",
            "TF-I1",
        ])
        .args(["--mass", "10 t", "--co2-fraction", "0.985"])
        .args(["--from", "2026-01-01", "--to", "2026-01-01", "--key", key]);
    c
}

#[test]
fn a_writer_waits_for_the_one_holding_the_ledger_then_records() {
    let l = Ledger::with_tfs();
    let held = hold(&l);
    let mut writer = record_waiting(&l, "5s", "after-the-wait")
        .stdout(Stdio::piped())
        .stderr(Stdio::piped())
        .spawn()
        .unwrap();
    std::thread::sleep(std::time::Duration::from_millis(1500));
    assert!(
        writer.try_wait().unwrap().is_none(),
        "the writer ended while the ledger was held: {:?}",
        writer.wait_with_output()
    );
    drop(held);
    let o = writer.wait_with_output().unwrap();
    assert!(o.status.success(), "{}", String::from_utf8_lossy(&o.stderr));
    let listed = l.json(&["entries", "TFS"]);
    assert_eq!(listed[0]["key"], "after-the-wait");
    assert_eq!(listed.as_array().unwrap().len(), 1);
    l.ok(&["verify"]);
}

#[test]
fn a_writer_held_up_past_its_wait_gives_up_in_one_line_naming_the_wait() {
    let l = Ledger::with_tfs();
    l.inject("TF-I1", "10 t", "2026-01-01", "2026-01-01", "first");
    let held = hold(&l);
    let o = record_waiting(&l, "200ms", "never").output().unwrap();
    // Readers never wait for a writer, not even with no wait at all.
    let mut reads = vec![];
    for args in [
        vec!["entries", "TFS"],
        vec!["balance", "TFS"],
        vec!["totals"],
        vec!["verify"],
    ] {
        let mut all = vec!["--wait", "0s"];
        all.extend(args);
        reads.push((all.clone(), l.run(&all)));
    }
    drop(held);
    let err = String::from_utf8_lossy(&o.stderr);
    assert_eq!(o.status.code(), Some(1), "{err}");
    assert_eq!(err.trim_end().lines().count(), 1, "one line: {err}");
    assert!(
        err.contains("waited 200ms for another writer to finish")
            && err.contains("--wait")
            && err.contains("nothing was written"),
        "{err}"
    );
    for (args, r) in reads {
        assert_eq!(r.code, 0, "{args:?} waited for the writer: {}", r.err);
    }
    let listed = l.json(&["entries", "TFS"]);
    assert_eq!(listed.as_array().unwrap().len(), 1, "nothing written");
    assert_eq!(listed[0]["key"], "first");
}

#[test]
fn a_wait_that_is_not_a_duration_is_refused_naming_it() {
    let l = Ledger::with_tfs();
    for bad in ["30", "1.5s", "2d", "ten seconds", "25h"] {
        let o = record_waiting(&l, bad, "k").output().unwrap();
        let err = String::from_utf8_lossy(&o.stderr);
        assert_eq!(o.status.code(), Some(1), "--wait {bad}: {err}");
        assert_eq!(err.trim_end().lines().count(), 1, "one line: {err}");
        assert!(err.contains(&format!("--wait {bad:?}")), "{err}");
    }
    assert_eq!(l.count("TFS"), 0, "nothing written");
}
