//! The two backends side by side, in one run: the same generated meter file (one row per
//! meter-day, so as many entries as rows) imported by `sinkbook import` into a SQLite file and
//! into a PostgreSQL registry (a throwaway database on 127.0.0.1:5432, user postgres, dropped
//! after), then `balance TFS --by quarter`, `totals` and one `record injection` on each. Every
//! figure stands beside a baseline measured in the same run on the same backend: the database's
//! own bulk load of the same CSV into a plain table (sqlite3 `.import`, psql `\copy`), its plain
//! `GROUP BY kind` sum over the same entries, and the same `record` into a ledger of 100 entries
//! (an append costs the same at any size: target within 2×). `SINKBOOK_BENCH_ROWS` sets the
//! sizes, comma-separated (default 1,000,000); with more than one, each step's growth from the
//! first size is printed too. Run with `cargo bench --bench backends` (needs `sqlite3`, `psql`
//! and the server; `/usr/bin/time` for peak memory; says so when they are missing).

mod common;

use std::path::{Path, PathBuf};
use std::process::Command;
use std::time::Instant;

/// Records timed per ledger; the median is reported.
const RECORDS: usize = 5;

/// Entries in the small ledger the record's baseline appends to.
const SMALL: u64 = 100;

/// Runs one SQL statement as postgres on database `db`.
fn psql(db: &str, sql: &str) -> bool {
    Command::new("psql")
        .args(["-h", "127.0.0.1", "-U", "postgres", "-d", db, "-qAtc", sql])
        .output()
        .is_ok_and(|o| o.status.success())
}

/// A throwaway database, dropped however the run ends.
struct Database(String);

impl Database {
    fn create(tag: &str) -> Option<Database> {
        let name = format!("skb_bench_{}_{tag}", std::process::id());
        psql("postgres", &format!("CREATE DATABASE {name}")).then_some(Database(name))
    }

    fn url(&self) -> PathBuf {
        PathBuf::from(format!("postgres://postgres@127.0.0.1/{}", self.0))
    }
}

impl Drop for Database {
    fn drop(&mut self) {
        psql(
            "postgres",
            &format!("DROP DATABASE IF EXISTS {} WITH (FORCE)", self.0),
        );
    }
}

/// Seconds a command takes, insisting on success.
fn timed(mut cmd: Command) -> f64 {
    let t = Instant::now();
    let o = cmd.output().unwrap();
    let s = t.elapsed().as_secs_f64();
    assert!(
        o.status.success(),
        "{cmd:?}: {}",
        String::from_utf8_lossy(&o.stderr)
    );
    s
}

/// Seconds and peak memory (MB, when /usr/bin/time is there) of a sinkbook command on `db`.
fn sinkbook(db: &Path, args: &[&str]) -> (f64, Option<f64>) {
    let (secs, peak, _) = common::measured(db, args);
    (secs, peak)
}

/// The database's own tools on one backend: its bulk load and its plain sum.
enum Shell<'a> {
    File(&'a Path),
    Server(&'a Database),
}

impl Shell<'_> {
    /// Loads `csv` into a plain table of text columns, as the database's shell does it.
    fn import(&self, csv: &Path, scratch: &Path) -> f64 {
        let csv = csv.to_str().unwrap();
        match self {
            Shell::File(_) => {
                let mut c = Command::new("sqlite3");
                c.arg(scratch.join("plain.db"))
                    .arg(format!(".import --csv {csv} readings"));
                timed(c)
            }
            Shell::Server(db) => {
                assert!(psql(
                    &db.0,
                    "CREATE TABLE plain_readings (timestamp TEXT, site TEXT, quantity TEXT, \
                     unit TEXT, co2_fraction TEXT, meter TEXT)"
                ));
                let mut c = Command::new("psql");
                c.args(["-h", "127.0.0.1", "-U", "postgres", "-d", &db.0, "-qAtc"])
                    .arg(format!(
                        "\\copy plain_readings FROM '{csv}' WITH (FORMAT csv, HEADER true)"
                    ));
                timed(c)
            }
        }
    }

    /// The plain `GROUP BY` sum over the project's entries.
    fn sum(&self) -> f64 {
        let sql = "SELECT kind, sum(grams) FROM entries WHERE project = 'TFS' GROUP BY kind";
        match self {
            Shell::File(db) => {
                let mut c = Command::new("sqlite3");
                c.arg(db).arg(sql);
                timed(c)
            }
            Shell::Server(db) => {
                let mut c = Command::new("psql");
                c.args([
                    "-h",
                    "127.0.0.1",
                    "-U",
                    "postgres",
                    "-d",
                    &db.0,
                    "-qAtc",
                    sql,
                ]);
                timed(c)
            }
        }
    }
}

/// One step's figures on one backend: ours, the baseline's, and our peak memory.
#[derive(Clone, Copy, Default)]
struct Figure {
    ours: f64,
    baseline: f64,
    peak_mb: Option<f64>,
}

/// Import, balance, totals and record on one backend; `round` counts the runs before, so each
/// run's records into the small ledger are new entries (other days), not repeats of a key.
fn measure(
    db: &Path,
    small: &Path,
    shell: &Shell<'_>,
    csv: &Path,
    scratch: &Path,
    round: usize,
) -> [Figure; 4] {
    common::ledger(db);
    let (import, import_mb) = sinkbook(db, &["import", "TFS", csv.to_str().unwrap()]);
    let import_base = shell.import(csv, scratch);
    let (balance, balance_mb) = sinkbook(db, &["balance", "TFS", "--by", "quarter"]);
    let (totals, totals_mb) = sinkbook(db, &["totals"]);
    let sum = shell.sum();
    let ((record, record_mb), (record_small, _)) =
        common::records(db, small, 1 + round * RECORDS, RECORDS);
    [
        Figure {
            ours: import,
            baseline: import_base,
            peak_mb: import_mb,
        },
        Figure {
            ours: balance,
            baseline: sum,
            peak_mb: balance_mb,
        },
        Figure {
            ours: totals,
            baseline: sum,
            peak_mb: totals_mb,
        },
        Figure {
            ours: record,
            baseline: record_small,
            peak_mb: record_mb,
        },
    ]
}

const STEPS: [(&str, &str); 4] = [
    ("import", "bulk load of the CSV"),
    ("balance --by quarter", "GROUP BY sum"),
    ("totals", "GROUP BY sum"),
    ("record injection", "record at 100 entries"),
];

fn main() {
    let sizes = common::sizes("1000000");
    let Some(small_db) = Database::create("small") else {
        println!("PostgreSQL not measured: psql could not create a database on 127.0.0.1:5432");
        return;
    };
    let dir = tempfile::tempdir().unwrap();
    let small_csv = dir.path().join("small.csv");
    common::one_per_day(&small_csv, SMALL);
    let small_file = dir.path().join("small.db");
    for small in [small_file.clone(), small_db.url()] {
        common::ledger(&small);
        common::sinkbook(&small, &["import", "TFS", small_csv.to_str().unwrap()]);
    }
    println!("load average at the start: {}", common::load_average());
    let mut runs = Vec::new();
    for (round, &rows) in sizes.iter().enumerate() {
        let scratch = tempfile::tempdir().unwrap();
        let csv = scratch.path().join("meters.csv");
        common::one_per_day(&csv, rows);
        let server = Database::create(&rows.to_string()).expect("a database for the run");
        let file = scratch.path().join("bench.db");
        let on_file = measure(
            &file,
            &small_file,
            &Shell::File(&file),
            &csv,
            scratch.path(),
            round,
        );
        let on_server = measure(
            &server.url(),
            &small_db.url(),
            &Shell::Server(&server),
            &csv,
            scratch.path(),
            round,
        );
        println!(
            "\n{rows} meter rows → {rows} entries ({:.1} MB); load average now {}",
            std::fs::metadata(&csv).unwrap().len() as f64 / 1e6,
            common::load_average()
        );
        println!(
            "| step | baseline | SQLite (s) | baseline (s) | ÷ baseline | peak MB | PostgreSQL (s) | baseline (s) | ÷ baseline | peak MB | PostgreSQL ÷ SQLite |"
        );
        println!("|---|---|---|---|---|---|---|---|---|---|---|");
        for (i, (step, base)) in STEPS.iter().enumerate() {
            let (f, p) = (on_file[i], on_server[i]);
            println!(
                "| {step} | {base} | {:.3} | {:.3} | {:.2} | {} | {:.3} | {:.3} | {:.2} | {} | {:.2} |",
                f.ours,
                f.baseline,
                f.ours / f.baseline,
                common::mb(f.peak_mb),
                p.ours,
                p.baseline,
                p.ours / p.baseline,
                common::mb(p.peak_mb),
                p.ours / f.ours
            );
        }
        runs.push((rows, on_file, on_server));
    }
    if let [(first, file0, server0), rest @ ..] = runs.as_slice() {
        for (rows, file, server) in rest {
            println!(
                "\ngrowth from {first} to {rows} entries ({:.0}× the rows): each step's time, divided",
                *rows as f64 / *first as f64
            );
            println!("| step | SQLite | PostgreSQL |");
            println!("|---|---|---|");
            for (i, (step, _)) in STEPS.iter().enumerate() {
                println!(
                    "| {step} | {:.2} | {:.2} |",
                    file[i].ours / file0[i].ours,
                    server[i].ours / server0[i].ours
                );
            }
        }
    }
}
