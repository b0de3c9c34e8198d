//! Meter files the benchmarks import: generated, so every run measures the same rows.

use std::io::Write;
use std::path::Path;
use std::process::Command;

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
    let have_time = Path::new("/usr/bin/time").exists();
    let mut cmd = if have_time {
        let mut c = Command::new("/usr/bin/time");
        c.args(["-f", "%M"]).arg(env!("CARGO_BIN_EXE_sinkbook"));
        c
    } else {
        Command::new(env!("CARGO_BIN_EXE_sinkbook"))
    };
    cmd.arg("--db").arg(db).args(args);
    let t = std::time::Instant::now();
    let o = cmd.output().unwrap();
    let secs = t.elapsed().as_secs_f64();
    assert!(
        o.status.success(),
        "sinkbook {args:?}: {}",
        String::from_utf8_lossy(&o.stderr)
    );
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
