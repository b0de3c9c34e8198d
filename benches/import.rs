//! Meter import throughput: 1,000,000 generated meter rows imported by `sinkbook import`
//! (validating, converting, rolling up by meter-day, hash-chaining, keeping the file's bytes)
//! beside the sqlite3 shell's plain `.import` of the same CSV into a plain table, in the same
//! run, for three files: many rows per meter-day (two meters, a reading a minute: 730 entries),
//! ten rows per meter-day (1,000 meters, 100 days: 100,000 entries) and one row per meter-day
//! (1,000 meters × 1,000 days: 1,000,000 entries). Each prints both rates in rows/s, their
//! ratio, and both peak memories; also the time of `balance --by quarter` on the first ledger.
//! Run with `cargo bench --bench import` (needs `sqlite3` and `/usr/bin/time` for the baseline
//! and the memory figures; says so when they are missing). `SINKBOOK_BENCH_ROWS` sets the rows
//! per file (default 1,000,000).

mod common;

use std::ffi::OsStr;
use std::io::Write;
use std::path::{Path, PathBuf};
use std::process::Stdio;
use std::time::Instant;

/// Two meters, one mass (t) and one volumetric (Mscf), a reading every 63 s from 2025-01-01.
fn many_per_day(path: &Path, rows: u64) {
    let mut f = std::io::BufWriter::new(std::fs::File::create(path).unwrap());
    writeln!(f, "timestamp,site,quantity,unit,co2_fraction,meter").unwrap();
    let start = chrono::DateTime::parse_from_rfc3339("2025-01-01T00:00:00Z").unwrap();
    let mut x: u64 = 0x2545_F491_4F6C_DD1D;
    for i in 0..rows / 2 {
        let t = (start + chrono::Duration::seconds(63 * i as i64)).format("%Y-%m-%dT%H:%M:%SZ");
        x ^= x << 13;
        x ^= x >> 7;
        x ^= x << 17;
        let u = (x % 10_000) as f64 / 10_000.0;
        writeln!(f, "{t},TF-I1,{:.4},t,0.985,FM-101", 0.5 + 0.4 * u).unwrap();
        writeln!(f, "{t},TF-I2,{:.3},Mscf,0.99,FM-201", 9.0 + 3.0 * u).unwrap();
    }
}

/// 1,000 mass meters on two wells, ten readings each a day (every two hours from midnight),
/// from 2023-04-01: one entry per ten rows.
fn ten_per_day(path: &Path, rows: u64) {
    let mut f = std::io::BufWriter::new(std::fs::File::create(path).unwrap());
    writeln!(f, "timestamp,site,quantity,unit,co2_fraction,meter").unwrap();
    let start = chrono::NaiveDate::from_ymd_opt(2023, 4, 1).unwrap();
    for i in 0..rows {
        let (d, m, h) = (i / 10_000, (i / 10) % 1_000, i % 10);
        let day = start + chrono::Duration::days(d as i64);
        let site = if m % 2 == 0 { "TF-I1" } else { "TF-I2" };
        let q = 1 + (m * 7 + d + h) % 90;
        writeln!(
            f,
            "{day}T{:02}:00:00Z,{site},{q}.{},t,0.985,FM-{m:04}",
            2 * h,
            m % 10
        )
        .unwrap();
    }
}

/// One file's run: sinkbook's import into a new ledger, then the shell's `.import` of the same
/// CSV into a plain table; both rates, their ratio and both peaks. Returns the ledger.
fn measure(dir: &Path, tag: &str, name: &str, csv: &Path, rows: u64) -> PathBuf {
    let db = dir.join(format!("{tag}.db"));
    common::ledger(&db);
    let (ours, peak, out) = common::measured(&db, &["import", "TFS", csv.to_str().unwrap()]);
    let entries = String::from_utf8_lossy(&out.stdout)
        .lines()
        .next()
        .unwrap_or("")
        .rsplit("→ ")
        .next()
        .unwrap_or("")
        .to_string();
    println!(
        "{name}: {rows} rows ({:.1} MB) → {entries}",
        std::fs::metadata(csv).unwrap().len() as f64 / 1e6
    );
    let rate = |secs: f64| rows as f64 / secs;
    println!(
        "  sinkbook import   {ours:>8.3} s  {:>10.0} rows/s  peak {}",
        rate(ours),
        mb(peak)
    );
    let plain = dir.join(format!("{tag}-plain.db"));
    let import = format!(".import {} readings", csv.display());
    let shell = [
        plain.as_os_str(),
        OsStr::new(".mode csv"),
        OsStr::new(&import),
    ];
    let have_shell = std::process::Command::new("sqlite3")
        .arg("-version")
        .output()
        .is_ok();
    match have_shell.then(|| common::peak(OsStr::new("sqlite3"), &shell, Stdio::piped())) {
        Some((secs, base_peak, o)) if o.status.success() => {
            println!(
                "  sqlite3 .import   {secs:>8.3} s  {:>10.0} rows/s  peak {}  (baseline, same run)",
                rate(secs),
                mb(base_peak)
            );
            println!(
                "  ratio             {:>8.2}  (sinkbook rows/s ÷ sqlite3 .import rows/s)",
                secs / ours
            );
        }
        _ => println!("  sqlite3 .import   not measured: no sqlite3 shell on this machine"),
    }
    db
}

fn mb(m: Option<f64>) -> String {
    m.map_or("not measured (no /usr/bin/time)".into(), |m| {
        format!("{m:.1} MB")
    })
}

fn main() {
    let rows: u64 = std::env::var("SINKBOOK_BENCH_ROWS")
        .ok()
        .and_then(|r| r.parse().ok())
        .unwrap_or(1_000_000);
    println!("load average at the start: {}", common::load_average());
    let dir = tempfile::tempdir().unwrap();
    let many = dir.path().join("many-per-day.csv");
    many_per_day(&many, rows);
    let db = measure(
        dir.path(),
        "many",
        "many rows per meter-day (target ratio ≥ 1.5)",
        &many,
        rows,
    );
    let t = Instant::now();
    common::sinkbook(&db, &["balance", "TFS", "--by", "quarter"]);
    println!(
        "  balance --by quarter {:>7.3} s  (target < 0.1 s)",
        t.elapsed().as_secs_f64()
    );
    let ten = dir.path().join("ten-per-day.csv");
    ten_per_day(&ten, rows);
    measure(
        dir.path(),
        "ten",
        "ten rows per meter-day (target ratio ≥ 1.5)",
        &ten,
        rows,
    );
    let one = dir.path().join("one-per-day.csv");
    common::one_per_day(&one, rows);
    measure(
        dir.path(),
        "one",
        "one row per meter-day (target ratio ≥ 1)",
        &one,
        rows,
    );
    println!("load average at the end: {}", common::load_average());
}
