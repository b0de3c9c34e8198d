//! Crashes and full disks during an import. The planner's fault point
//! (`SINKBOOK_FAULT_AFTER_ROWS`, a test hook) aborts the process after N rows, for N spread over
//! the file; a file-size limit (RLIMIT_FSIZE with SIGXFSZ ignored) stands for a full disk. After
//! each, the ledger file is whole (SQLite's integrity check), `verify` passes, and the ledger is
//! exactly as before the import or as after the whole import, nothing in between (on the
//! registry too, for the crash: the full disk is a file's).

mod common;
use common::{Ledger, NOW};
use std::process::{Command, Output};

const ROWS: u64 = 1_500;
const POINTS: u64 = 60;

/// 1,500 readings of two meters over 15 days, a row every few minutes.
fn meter_file(l: &Ledger) -> String {
    let mut csv = String::from("timestamp,site,quantity,unit,co2_fraction,meter\n");
    for i in 0..ROWS {
        let (meter, site) = if i % 2 == 0 {
            ("FM-101", "TF-I1")
        } else {
            ("FM-201", "TF-I2")
        };
        let minutes = (i / 2) * 29;
        csv.push_str(&format!(
            "2026-04-{:02}T{:02}:{:02}:00Z,{site},{}.25,t,0.99,{meter}\n",
            1 + minutes / 1440,
            minutes / 60 % 24,
            minutes % 60,
            1 + i % 40
        ));
    }
    let p = l.dir.path().join("april.csv");
    std::fs::write(&p, csv).unwrap();
    p.display().to_string()
}

fn import_with(l: &Ledger, file: &str, env: &[(&str, String)]) -> Output {
    let mut c = Command::new(assert_cmd::cargo::cargo_bin("sinkbook"));
    c.env("SINKBOOK_NOW", NOW)
        .arg("--db")
        .arg(&l.path)
        .args(["import", "TFS", file]);
    for (k, v) in env {
        c.env(k, v);
    }
    c.output().unwrap()
}

/// SQLite's own structural check of the ledger file, by the sqlite3 shell.
fn integrity(l: &Ledger) -> String {
    let o = Command::new("sqlite3")
        .arg(&l.path)
        .arg("PRAGMA integrity_check;")
        .output()
        .expect("the sqlite3 shell is needed for the integrity check (apt-get install sqlite3)");
    String::from_utf8_lossy(&o.stdout).trim().to_string()
}

/// Everything the ledger says about TFS that an import could change.
fn state(l: &Ledger) -> String {
    let entries = l.ok(&["--format", "json", "entries", "TFS"]);
    let verify = l.run(&["verify"]);
    assert_eq!(verify.code, 0, "verify: {}", verify.err);
    // A file's structure is SQLite's to check; a registry's database is its server's.
    if l.registry.is_none() {
        assert_eq!(integrity(l), "ok");
    }
    entries
}

fn tfs_with_one_entry() -> Ledger {
    let l = Ledger::with_tfs();
    l.inject("TF-I1", "10 t", "2026-01-01", "2026-01-01", "before");
    l
}

#[test]
fn an_import_stopped_at_any_row_leaves_the_ledger_before_or_after() {
    let whole = tfs_with_one_entry();
    let file = meter_file(&whole);
    let before = state(&whole);
    whole.ok(&["import", "TFS", &file]);
    let after = state(&whole);
    assert_ne!(before, after);

    let l = tfs_with_one_entry();
    let file = meter_file(&l);
    let (mut stopped, mut completed) = (0, 0);
    // Points 1, 26, 51, … through the file, and past its last row.
    for k in 0..=POINTS {
        let n = 1 + k * (ROWS + 25) / POINTS;
        let o = import_with(&l, &file, &[("SINKBOOK_FAULT_AFTER_ROWS", n.to_string())]);
        let now = state(&l);
        if o.status.success() {
            assert!(n > ROWS, "the import ran past its fault point {n}");
            assert_eq!(
                now, after,
                "fault point {n}: completed, but not as the whole import"
            );
            completed += 1;
            break;
        }
        assert_eq!(o.status.code(), None, "fault point {n}: {o:?}");
        assert_eq!(now, before, "fault point {n}: the ledger changed");
        stopped += 1;
    }
    assert!(stopped >= 50, "only {stopped} fault points inside the file");
    assert_eq!(completed, 1);
}

#[test]
fn a_full_disk_is_said_plainly_and_leaves_the_ledger_as_it_was() {
    // A limit on the size of the files the process writes: a ledger file's.
    let l = common::on_file(tfs_with_one_entry);
    let before = state(&l);
    let mut csv = String::from("timestamp,site,quantity,unit,co2_fraction\n");
    for i in 0..60_000u64 {
        csv.push_str(&format!(
            "2026-03-{:02}T{:02}:{:02}:{:02}Z,TF-I1,{}.5,kg,0.99\n",
            1 + i / 2400,
            i / 100 % 24,
            i % 100 / 2,
            i % 2 * 30,
            i % 97
        ));
    }
    let file = l.dir.path().join("march.csv");
    std::fs::write(&file, csv).unwrap();
    // A 1 MiB limit on the size of any file the import writes, the signal ignored so the
    // write fails with EFBIG as it would on a full disk.
    let script = "ulimit -f 2048; trap '' XFSZ; exec \"$0\" --db \"$1\" import TFS \"$2\"";
    let o = Command::new("sh")
        .args(["-c", script])
        .arg(assert_cmd::cargo::cargo_bin("sinkbook"))
        .arg(&l.path)
        .arg(&file)
        .env("SINKBOOK_NOW", NOW)
        .output()
        .unwrap();
    let err = String::from_utf8_lossy(&o.stderr);
    assert_eq!(o.status.code(), Some(1), "{err}");
    assert_eq!(err.trim_end().lines().count(), 1, "{err}");
    assert!(
        err.contains("could not write the ledger file")
            && err.contains("the disk is full or the file is larger than this process may write; nothing was written"),
        "{err}"
    );
    assert!(!err.contains("outside of a transaction"), "{err}");
    assert_eq!(state(&l), before);
}
