//! Meter import throughput: 1,000,000 generated meter rows imported by `sinkbook import`
//! (validating, converting, rolling up by meter-day, hash-chaining, keeping the file's bytes)
//! beside the sqlite3 shell's plain `.import` of the same CSV into a plain table, in the same
//! run, for two files: many rows per meter-day (two meters, a reading a minute: 730 entries)
//! and one row per meter-day (1,000 meters × 1,000 days: 1,000,000 entries). Also the time of
//! `balance --by quarter` on the first ledger and each import's peak memory. Run with
//! `cargo bench --bench import` (needs `sqlite3` and `/usr/bin/time` for the baseline and the
//! memory figure; says so when they are missing).

mod common;

use std::io::Write;
use std::path::Path;
use std::process::Command;
use std::time::Instant;

const ROWS: u64 = 1_000_000;

/// Two meters, one mass (t) and one volumetric (Mscf), a reading every 63 s through 2026.
fn many_per_day(path: &Path) {
    let mut f = std::io::BufWriter::new(std::fs::File::create(path).unwrap());
    writeln!(f, "timestamp,site,quantity,unit,co2_fraction,meter").unwrap();
    let start = chrono::DateTime::parse_from_rfc3339("2026-01-01T00:00:00Z").unwrap();
    let mut x: u64 = 0x2545_F491_4F6C_DD1D;
    for i in 0..ROWS / 2 {
        let t = (start + chrono::Duration::seconds(63 * i as i64)).format("%Y-%m-%dT%H:%M:%SZ");
        x ^= x << 13;
        x ^= x >> 7;
        x ^= x << 17;
        let u = (x % 10_000) as f64 / 10_000.0;
        writeln!(f, "{t},TF-I1,{:.4},t,0.985,FM-101", 0.5 + 0.4 * u).unwrap();
        writeln!(f, "{t},TF-I2,{:.3},Mscf,0.99,FM-201", 9.0 + 3.0 * u).unwrap();
    }
}

fn timed(mut cmd: Command) -> (f64, std::process::Output) {
    let t = Instant::now();
    let o = cmd.output().unwrap();
    (t.elapsed().as_secs_f64(), o)
}

/// Imports `csv` into a new ledger and the shell's `.import` into a plain table; prints both
/// and their ratio, and the import's peak memory. Returns the ledger.
fn measure(dir: &Path, tag: &str, name: &str, csv: &Path) -> std::path::PathBuf {
    let db = dir.join(format!("{tag}.db"));
    common::ledger(&db);
    let (ours, peak_mb, out) = common::measured(&db, &["import", "TFS", csv.to_str().unwrap()]);
    let entries = String::from_utf8_lossy(&out.stdout)
        .lines()
        .next()
        .unwrap_or("")
        .rsplit("→ ")
        .next()
        .unwrap_or("")
        .to_string();
    println!(
        "{name}: {ROWS} rows ({:.1} MB) → {entries}",
        std::fs::metadata(csv).unwrap().len() as f64 / 1e6
    );
    println!(
        "  sinkbook import      {ours:>7.3} s  {:>10.0} rows/s",
        ROWS as f64 / ours
    );
    let plain = dir.join(format!("{tag}-plain.db"));
    let mut shell = Command::new("sqlite3");
    shell
        .arg(&plain)
        .arg(".mode csv")
        .arg(format!(".import {} readings", csv.display()));
    match timed(shell) {
        (secs, o) if o.status.success() => {
            println!(
                "  sqlite3 .import      {secs:>7.3} s  {:>10.0} rows/s  (baseline, same run)",
                ROWS as f64 / secs
            );
            println!(
                "  ratio                {:>7.2}  (sinkbook rows/s ÷ sqlite3 rows/s)",
                secs / ours
            );
        }
        _ => println!("  sqlite3 .import      not measured: no sqlite3 shell on this machine"),
    }
    match peak_mb {
        Some(mb) => println!("  import peak memory   {mb:>7.1} MB  (target < 100 MB)"),
        None => println!("  import peak memory   not measured: no /usr/bin/time"),
    }
    db
}

fn main() {
    let dir = tempfile::tempdir().unwrap();
    let many = dir.path().join("many-per-day.csv");
    many_per_day(&many);
    let db = measure(
        dir.path(),
        "many",
        "many rows per meter-day (target ratio ≥ 1.5)",
        &many,
    );
    let t = Instant::now();
    common::sinkbook(&db, &["balance", "TFS", "--by", "quarter"]);
    println!(
        "  balance --by quarter {:>7.3} s  (target < 0.1 s)",
        t.elapsed().as_secs_f64()
    );
    let one = dir.path().join("one-per-day.csv");
    common::one_per_day(&one, ROWS);
    measure(
        dir.path(),
        "one",
        "one row per meter-day (target ratio ≥ 1)",
        &one,
    );
}
