//! Errors that say what happened: a ledger file cut short or garbled is damaged (exit 3), not
//! "not a ledger"; a stored row that no longer decodes is named by project and seq; a standard
//! output that cannot be written ends the command with one line and exit 1, never a panic.

mod common;
use assert_cmd::Command;
use common::{Ledger, NOW, Run};
use diesel::connection::SimpleConnection;
use diesel::{Connection, SqliteConnection};
use std::path::Path;

/// A ledger file (these tests cut its bytes and alter its SQLite rows) with six entries.
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

fn raw(path: &Path) -> SqliteConnection {
    SqliteConnection::establish(path.to_str().unwrap()).unwrap()
}

fn run_on(db: &Path, args: &[&str]) -> Run {
    let o = Command::cargo_bin("sinkbook")
        .unwrap()
        .env("SINKBOOK_NOW", NOW)
        .env_remove("SINKBOOK_DB")
        .arg("--db")
        .arg(db)
        .args(args)
        .output()
        .unwrap();
    Run::from(o)
}

#[test]
fn a_truncated_ledger_file_is_damaged_not_foreign() {
    let l = ledger_with_entries();
    // Everything into the main file, so that cutting it cuts committed pages.
    raw(&l.path)
        .batch_execute("PRAGMA wal_checkpoint(TRUNCATE);")
        .unwrap();
    let whole = std::fs::read(&l.path).unwrap();
    assert!(whole.len() > 8192, "{} bytes", whole.len());
    for cut in [60, 4096, whole.len() / 2] {
        let copy = l.dir.path().join(format!("cut-{cut}.db"));
        std::fs::write(&copy, &whole[..cut]).unwrap();
        for args in [&["verify"][..], &["totals"], &["entries", "TFS"], &["init"]] {
            let r = run_on(&copy, args);
            assert_eq!(r.code, 3, "cut at {cut}, {args:?}: {}{}", r.out, r.err);
            assert_eq!(r.err.trim().lines().count(), 1, "{}", r.err);
            assert!(r.err.contains("is damaged"), "cut at {cut}: {}", r.err);
            assert!(!r.err.contains("not a sinkbook ledger"), "{}", r.err);
        }
        assert_eq!(
            std::fs::read(&copy).unwrap(),
            whole[..cut],
            "the damaged file was changed"
        );
    }
}

#[test]
fn a_row_that_does_not_decode_is_named_by_its_seq() {
    let l = ledger_with_entries();
    // A byte of seq 3's reading made invalid UTF-8, with the update trigger out of the way.
    raw(&l.path)
        .batch_execute(
            "DROP TRIGGER entries_append_only_update;
             UPDATE entries SET reading = CAST(X'5B5BFF5D5D' AS TEXT) WHERE seq = 3;",
        )
        .unwrap();
    for args in [&["verify"][..], &["totals"], &["balance", "TFS"]] {
        let r = l.run(args);
        assert_eq!(r.code, 3, "{args:?}: {}{}", r.out, r.err);
        assert!(
            r.err
                .contains("project TFS seq 3: a stored field does not decode"),
            "{args:?}: {}",
            r.err
        );
        assert_eq!(r.err.trim().lines().count(), 1, "{}", r.err);
    }
}

/// `sinkbook … > /dev/full`: the write fails, and the command says so in one line, exit 1.
#[cfg(target_os = "linux")]
#[test]
fn a_full_standard_output_exits_1_with_one_line() {
    let l = ledger_with_entries();
    let full = || {
        std::fs::OpenOptions::new()
            .write(true)
            .open("/dev/full")
            .unwrap()
    };
    let report = |args: &[&str]| -> Run {
        let o = std::process::Command::new(assert_cmd::cargo::cargo_bin("sinkbook"))
            .env("SINKBOOK_NOW", NOW)
            .arg("--db")
            .arg(&l.path)
            .args(args)
            .stdout(full())
            .output()
            .unwrap();
        Run::from(o)
    };
    let r = report(&["entries", "TFS"]);
    assert_eq!(r.code, 1, "{}", r.err);
    assert_eq!(r.err.trim().lines().count(), 1, "{}", r.err);
    assert!(
        r.err.contains("standard output: No space left on device"),
        "{}",
        r.err
    );
    assert!(!r.err.contains("panicked"), "{}", r.err);

    // A record's entry is committed before its output is written: the line says so.
    let r = report(&[
        "record",
        "injection",
        "TFS",
        "--site",
        "TF-I1",
        "--mass",
        "10 t",
        "--from",
        "2026-07-01",
        "--to",
        "2026-07-31",
    ]);
    assert_eq!(r.code, 1, "{}", r.err);
    assert!(r.err.contains("the command completed"), "{}", r.err);
    assert_eq!(l.count("TFS"), 7);
}
