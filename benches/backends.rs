//! The two backends side by side, in one run: the same generated meter file (one row per
//! meter-day, so as many entries as rows; 1,000,000 unless `SINKBOOK_BENCH_ROWS` says) imported
//! by `sinkbook import` into a SQLite file and into a PostgreSQL registry (a throwaway
//! database on 127.0.0.1:5432, user postgres, dropped after), then `balance TFS --by quarter`
//! and `totals` on each. Prints each step's seconds per backend and their ratio. Run with
//! `cargo bench --bench backends` (needs `psql` and the server; says so when they are missing).

mod common;

use std::path::{Path, PathBuf};
use std::process::Command;
use std::time::Instant;

/// Runs one SQL statement as postgres on its maintenance database.
fn psql(sql: &str) -> bool {
    Command::new("psql")
        .args([
            "-h",
            "127.0.0.1",
            "-U",
            "postgres",
            "-d",
            "postgres",
            "-qAtc",
            sql,
        ])
        .status()
        .is_ok_and(|s| s.success())
}

/// The throwaway database, dropped however the run ends.
struct Database(String);

impl Drop for Database {
    fn drop(&mut self) {
        psql(&format!("DROP DATABASE IF EXISTS {} WITH (FORCE)", self.0));
    }
}

/// Seconds a sinkbook command takes on `db`.
fn seconds(db: &Path, args: &[&str]) -> f64 {
    let t = Instant::now();
    common::sinkbook(db, args);
    t.elapsed().as_secs_f64()
}

/// Import, balance and totals on one ledger, in seconds.
fn measure(db: &Path, csv: &Path) -> [f64; 3] {
    common::ledger(db);
    [
        seconds(db, &["import", "TFS", csv.to_str().unwrap()]),
        seconds(db, &["balance", "TFS", "--by", "quarter"]),
        seconds(db, &["totals"]),
    ]
}

fn main() {
    let rows: u64 = std::env::var("SINKBOOK_BENCH_ROWS")
        .ok()
        .map(|r| {
            r.parse()
                .expect("SINKBOOK_BENCH_ROWS is a whole number of rows")
        })
        .unwrap_or(1_000_000);
    let dir = tempfile::tempdir().unwrap();
    let csv = dir.path().join("meters.csv");
    common::one_per_day(&csv, rows);
    let db = Database(format!("skb_bench_{}", std::process::id()));
    if !psql(&format!("CREATE DATABASE {}", db.0)) {
        println!("PostgreSQL not measured: psql could not create a database on 127.0.0.1:5432");
        return;
    }
    let file = measure(&dir.path().join("bench.db"), &csv);
    let server = measure(
        &PathBuf::from(format!("postgres://postgres@127.0.0.1/{}", db.0)),
        &csv,
    );
    println!(
        "{rows} meter rows → {rows} entries ({:.1} MB)",
        std::fs::metadata(&csv).unwrap().len() as f64 / 1e6
    );
    println!("| step | SQLite file (s) | PostgreSQL registry (s) | PostgreSQL ÷ SQLite |");
    println!("|---|---|---|---|");
    for (i, step) in ["import", "balance --by quarter", "totals"]
        .iter()
        .enumerate()
    {
        println!(
            "| {step} | {:.3} | {:.3} | {:.2} |",
            file[i],
            server[i],
            server[i] / file[i]
        );
    }
}
