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
    let mut cmd = vec![env!("CARGO_BIN_EXE_sinkbook").to_string(), "--db".into()];
    cmd.push(db.to_str().unwrap().into());
    cmd.extend(args.iter().map(|a| a.to_string()));
    let (secs, peak, o) = measured_command(&cmd);
    assert!(
        o.status.success(),
        "sinkbook {args:?}: {}",
        String::from_utf8_lossy(&o.stderr)
    );
    (secs, peak, o)
}

/// Runs `cmd` (program and arguments) under `/usr/bin/time` when it is there: seconds, peak
/// memory in MB (None without /usr/bin/time), and what it printed, whether it succeeded or not.
pub fn measured_command(cmd: &[String]) -> (f64, Option<f64>, std::process::Output) {
    let have_time = Path::new("/usr/bin/time").exists();
    let mut c = if have_time {
        let mut c = Command::new("/usr/bin/time");
        c.args(["-f", "%M"]).arg(&cmd[0]);
        c
    } else {
        Command::new(&cmd[0])
    };
    c.args(&cmd[1..]);
    let t = std::time::Instant::now();
    let o = c.output().unwrap();
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

/// The machine's load average over 1, 5 and 15 minutes, as the benchmarks print beside their
/// figures (the build machine is shared).
pub fn load_average() -> String {
    std::fs::read_to_string("/proc/loadavg")
        .map(|l| l.split_whitespace().take(3).collect::<Vec<_>>().join(" "))
        .unwrap_or_else(|_| "unknown".into())
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
