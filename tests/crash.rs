//! Crashes and full disks during an import. The planner's fault point
//! (`SINKBOOK_FAULT_AFTER_ROWS`, a test hook) aborts the process after N rows, for N spread over
//! the file; a real SIGKILL stops it at moments spread over its run; a file-size limit
//! (RLIMIT_FSIZE with SIGXFSZ ignored) stands for a full disk. After each, the ledger file is
//! whole (SQLite's integrity check), `verify` passes, and the ledger is exactly as before the
//! import or as after the whole import, nothing in between (the fault point on the backend under
//! test; the kill and the full disk on a ledger file, whose bytes they watch or limit).

mod common;
use common::{Ledger, NOW};
use std::path::Path;
use std::process::{Child, Command, Output, Stdio};
use std::time::Instant;

const ROWS: u64 = 1_500;
const POINTS: u64 = 60;
/// Rows of the large meter file, and the kills of an import of it that come while it runs, at
/// moments spread over it, besides the one as its commit is written.
const LARGE_ROWS: u64 = 60_000;
const KILL_MOMENTS: u32 = 12;

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

/// 60,000 readings of one meter over 25 days of March, a row every 36 seconds: a file whose
/// import takes long enough to be interrupted and writes megabytes.
fn large_meter_file(l: &Ledger) -> std::path::PathBuf {
    let mut csv = String::from("timestamp,site,quantity,unit,co2_fraction\n");
    for i in 0..LARGE_ROWS {
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
    file
}

/// `sinkbook import TFS FILE` started as a child process, its output discarded.
fn spawn_import(l: &Ledger, file: &Path) -> Child {
    Command::new(assert_cmd::cargo::cargo_bin("sinkbook"))
        .env("SINKBOOK_NOW", NOW)
        .arg("--db")
        .arg(&l.path)
        .arg("import")
        .arg("TFS")
        .arg(file)
        .stdout(Stdio::null())
        .stderr(Stdio::null())
        .spawn()
        .unwrap()
}

/// The bytes the ledger holds on disk: its file and its write-ahead log.
fn bytes_on_disk(l: &Ledger) -> u64 {
    let wal = l.path.with_extension("db-wal");
    [&l.path, &wal]
        .iter()
        .map(|p| std::fs::metadata(p).map(|m| m.len()).unwrap_or(0))
        .sum()
}

/// One import of the large file into a fresh ledger, killed (SIGKILL) once `moment` says so
/// unless it ended first; then the ledger must be whole, verify, and equal `before` or `after`.
/// Returns whether the kill came while the import ran, and whether it left the ledger as before.
fn kill_import(
    file: &Path,
    before: &str,
    after: &str,
    moment: impl Fn(&Ledger, &mut Child),
) -> (bool, bool) {
    let l = common::on_file(tfs_with_one_entry);
    let mut child = spawn_import(&l, file);
    moment(&l, &mut child);
    let ran = child.try_wait().unwrap().is_none();
    if ran {
        child.kill().unwrap();
    }
    child.wait().unwrap();
    let now = state(&l);
    assert!(
        now == before || now == after,
        "killed {}: the ledger is neither as before nor as after the import",
        if ran {
            "while it ran"
        } else {
            "after it ended"
        }
    );
    (ran, now == before)
}

/// A real `kill -9` of an import of the large file at moments spread over the time an import
/// takes (the first at once; an import that ends before its moment shortens the span for the
/// moments after it), until `KILL_MOMENTS` kills came while it ran; and once as soon as the
/// ledger's bytes on disk have grown by 64 KiB (its single commit being written: the import
/// keeps its pages in memory until then).
#[test]
fn an_import_killed_at_any_moment_leaves_the_ledger_before_or_after() {
    let whole = common::on_file(tfs_with_one_entry);
    let file = large_meter_file(&whole);
    let before = state(&whole);
    let started = Instant::now();
    assert!(spawn_import(&whole, &file).wait().unwrap().success());
    let mut span = started.elapsed();
    let after = state(&whole);
    assert_ne!(before, after);

    let (mut landed, mut tries, mut as_before) = (0, 0, 0);
    while landed < KILL_MOMENTS && tries < 3 * KILL_MOMENTS {
        let delay = span * landed / KILL_MOMENTS;
        tries += 1;
        match kill_import(&file, &before, &after, |_, _| std::thread::sleep(delay)) {
            (true, unchanged) => {
                landed += 1;
                as_before += u32::from(unchanged);
            }
            (false, _) => span = delay,
        }
    }
    let (grown, grown_before) = kill_import(&file, &before, &after, |l, child| {
        let from = bytes_on_disk(l);
        while bytes_on_disk(l) < from + 65_536 && child.try_wait().unwrap().is_none() {
            std::thread::yield_now();
        }
    });
    let left = |unchanged: bool| if unchanged { "as before" } else { "as after" };
    eprintln!(
        "{landed} kills while the import ran, at moments spread over it ({tries} tries): {as_before} left the ledger as before, {} as after; one as its commit was written ({}): {}",
        landed - as_before,
        if grown {
            "while it ran"
        } else {
            "after it ended"
        },
        left(grown_before)
    );
    assert_eq!(landed, KILL_MOMENTS, "in {tries} tries");
}

#[test]
fn a_full_disk_is_said_plainly_and_leaves_the_ledger_as_it_was() {
    let l = common::on_file(tfs_with_one_entry);
    let before = state(&l);
    let file = large_meter_file(&l);
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
