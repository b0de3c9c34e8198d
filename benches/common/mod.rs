//! Meter files the benchmarks import (generated, so every run measures the same rows), the
//! commands they time, and how they print the figures. Each bench uses part of it.
#![allow(dead_code)]

use std::ffi::OsStr;
use std::io::Write;
use std::path::Path;
use std::process::{Command, Stdio};

/// 1,000 mass meters on two wells, one daily total each from 2023-04-01, for `rows` / 1,000
/// days: one entry per row.
pub fn one_per_day(path: &Path, rows: u64) {
    let mut f = std::io::BufWriter::new(std::fs::File::create(path).unwrap());
    writeln!(f, "timestamp,site,quantity,unit,co2_fraction,meter").unwrap();
    let start = chrono::NaiveDate::from_ymd_opt(2023, 4, 1).unwrap();
    for d in 0..rows.div_ceil(1_000) {
        let day = start + chrono::Duration::days(d as i64);
        for m in 0..1_000u64.min(rows - d * 1_000) {
            let site = if m % 2 == 0 { "TF-I1" } else { "TF-I2" };
            writeln!(
                f,
                "{day},{site},{}.{},t,0.985,FM-{m:04}",
                10 + (m * 7 + d) % 90,
                m % 10
            )
            .unwrap();
        }
    }
}

/// Runs sinkbook on the ledger at `db` (a file, or a `postgres://` URL), insisting on success.
pub fn sinkbook(db: &Path, args: &[&str]) -> std::process::Output {
    let o = Command::new(env!("CARGO_BIN_EXE_sinkbook"))
        .arg("--db")
        .arg(db)
        .args(args)
        .output()
        .unwrap();
    assert!(
        o.status.success(),
        "sinkbook {args:?}: {}",
        String::from_utf8_lossy(&o.stderr)
    );
    o
}

/// Runs sinkbook on `db` under `/usr/bin/time` when it is there, insisting on success: seconds,
/// peak memory in MB (None without /usr/bin/time), and what it printed.
pub fn measured(db: &Path, args: &[&str]) -> (f64, Option<f64>, std::process::Output) {
    let mut words = vec![OsStr::new("--db"), db.as_os_str()];
    words.extend(args.iter().map(OsStr::new));
    let (secs, peak, o) = peak(
        OsStr::new(env!("CARGO_BIN_EXE_sinkbook")),
        &words,
        Stdio::piped(),
    );
    assert!(
        o.status.success(),
        "sinkbook {args:?}: {}",
        String::from_utf8_lossy(&o.stderr)
    );
    (secs, peak, o)
}

/// Runs `program` under `/usr/bin/time` when it is there, its standard output to `stdout`:
/// seconds, peak memory in MB (None without /usr/bin/time), and what it printed (its own
/// standard error, then time's line).
pub fn peak(
    program: &OsStr,
    args: &[&OsStr],
    stdout: Stdio,
) -> (f64, Option<f64>, std::process::Output) {
    let have_time = Path::new("/usr/bin/time").exists();
    let mut cmd = if have_time {
        let mut c = Command::new("/usr/bin/time");
        c.args(["-f", "%M"]).arg(program);
        c
    } else {
        Command::new(program)
    };
    cmd.args(args).stdout(stdout).stderr(Stdio::piped());
    let t = std::time::Instant::now();
    let o = cmd.output().unwrap();
    let secs = t.elapsed().as_secs_f64();
    let peak = have_time
        .then(|| {
            String::from_utf8_lossy(&o.stderr)
                .lines()
                .last()
                .and_then(|l| l.trim().parse::<f64>().ok())
                .map(|kb| kb / 1024.0)
        })
        .flatten();
    (secs, peak, o)
}

/// The sizes to run, from `SINKBOOK_BENCH_ROWS` (comma-separated rows), else `default`.
pub fn sizes(default: &str) -> Vec<u64> {
    std::env::var("SINKBOOK_BENCH_ROWS")
        .unwrap_or_else(|_| default.into())
        .split(',')
        .map(|r| {
            r.trim()
                .parse()
                .expect("SINKBOOK_BENCH_ROWS is whole numbers of rows, comma-separated")
        })
        .collect()
}

/// The machine's load average over 1, 5 and 15 minutes (it is shared and noisy).
pub fn load_average() -> String {
    std::fs::read_to_string("/proc/loadavg")
        .map(|l| l.split_whitespace().take(3).collect::<Vec<_>>().join(" "))
        .unwrap_or_else(|_| "unknown".into())
}

/// Peak memory for a table cell.
pub fn mb(m: Option<f64>) -> String {
    m.map_or("—".into(), |m| format!("{m:.0}"))
}

/// The median of several timed runs, by time.
pub fn median(mut v: Vec<(f64, Option<f64>)>) -> (f64, Option<f64>) {
    v.sort_by(|a, b| a.0.total_cmp(&b.0));
    v[v.len() / 2]
}

/// The arguments of the `i`-th timed record: an injection on a day of June 2026 from `day0`.
pub fn record_args(day0: usize, i: usize) -> Vec<String> {
    [
        "record",
        "injection",
        "TFS",
        "--site",
        "TF-I1",
        "--mass",
        &format!("10.{i} t"),
        "--co2-fraction",
        "0.985",
        "--from",
        &format!("2026-06-{:02}", day0 + i),
        "--to",
        &format!("2026-06-{:02}", day0 + i),
    ]
    .map(String::from)
    .to_vec()
}

/// The median of `n` records into each ledger, taken in turns so both see the same load:
/// `(into big, into small)`, each with its peak memory.
pub fn records(
    big: &Path,
    small: &Path,
    day0: usize,
    n: usize,
) -> ((f64, Option<f64>), (f64, Option<f64>)) {
    let at = |db: &Path, i: usize| {
        let args = record_args(day0, i);
        let words: Vec<&str> = args.iter().map(String::as_str).collect();
        let (secs, peak, _) = measured(db, &words);
        (secs, peak)
    };
    let (mut b, mut s) = (Vec::new(), Vec::new());
    for i in 0..n {
        b.push(at(big, i));
        s.push(at(small, i));
    }
    (median(b), median(s))
}

/// A new ledger at `db` with project TFS and its two injection wells.
pub fn ledger(db: &Path) {
    sinkbook(db, &["init"]);
    sinkbook(
        db,
        &[
            "project",
            "add",
            "TFS",
            "--name",
            "Tamsin Flats Storage",
            "--method",
            "saline-aquifer",
            "--operator",
            "Northdeep Storage Cooperative",
        ],
    );
    for well in ["TF-I1", "TF-I2"] {
        sinkbook(
            db,
            &["site", "add", "TFS", well, "--kind", "injection-well"],
        );
    }
}
