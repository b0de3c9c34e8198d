//! The reports on a large ledger: `balance --by quarter`, `totals`, `meters`, `reconcile` and
//! `chart` on a SQLite file of 1,000,000 entries (one row per meter-day, imported), each timed
//! with its peak memory beside the sqlite3 shell's plain `SELECT kind, sum(grams) … GROUP BY
//! kind` on the same file, measured in turns in the same run (the median of `ROUNDS` each).
//! Targets: peak memory under 100 MB, time within 3× the `GROUP BY`. `SINKBOOK_BENCH_ROWS`
//! sets the size. Run with `cargo bench --bench reports` (needs `sqlite3`; `/usr/bin/time` for
//! the memory figures).

mod common;

use std::path::Path;
use std::process::Command;
use std::time::Instant;

const ROUNDS: usize = 3;

fn load_average() -> String {
    std::fs::read_to_string("/proc/loadavg")
        .map(|l| l.split_whitespace().take(3).collect::<Vec<_>>().join(" "))
        .unwrap_or_else(|_| "unknown".into())
}

/// The sqlite3 shell's plain sum over the file's entries, in seconds.
fn group_by(db: &Path) -> f64 {
    let t = Instant::now();
    let o = Command::new("sqlite3")
        .arg(db)
        .arg("SELECT kind, sum(grams) FROM entries GROUP BY kind")
        .output()
        .expect("sqlite3 runs");
    assert!(
        o.status.success(),
        "sqlite3: {}",
        String::from_utf8_lossy(&o.stderr)
    );
    t.elapsed().as_secs_f64()
}

/// A monitoring report that agrees with the ledger (its yearly injected and stored tonnes, as
/// `balance --by year` gives them), so `reconcile` compares every line and exits 0.
fn agreeing_report(db: &Path, path: &Path) {
    let o = common::sinkbook(db, &["--format", "json", "balance", "TFS", "--by", "year"]);
    let v: serde_json::Value = serde_json::from_slice(&o.stdout).unwrap();
    let mut csv = String::from("period,quantity,value,unit\n");
    for line in v["balance"].as_array().unwrap() {
        let period = line["period"].as_str().unwrap();
        csv += &format!("{period},injected,{},t\n", line["injected_t"]);
        csv += &format!("{period},stored,{},t\n", line["sequestered_t"]);
    }
    std::fs::write(path, csv).unwrap();
}

fn median(mut v: Vec<f64>) -> f64 {
    v.sort_by(f64::total_cmp);
    v[v.len() / 2]
}

fn main() {
    let rows: u64 = std::env::var("SINKBOOK_BENCH_ROWS")
        .map(|r| {
            r.trim()
                .parse()
                .expect("SINKBOOK_BENCH_ROWS is a whole number of rows")
        })
        .unwrap_or(1_000_000);
    let dir = tempfile::tempdir().unwrap();
    let (csv, db) = (dir.path().join("meters.csv"), dir.path().join("bench.db"));
    common::one_per_day(&csv, rows);
    common::ledger(&db);
    common::sinkbook(&db, &["import", "TFS", csv.to_str().unwrap()]);
    let report = dir.path().join("report.csv");
    agreeing_report(&db, &report);
    let svg = dir.path().join("chart.svg");
    let steps: [(&str, Vec<&str>); 5] = [
        (
            "balance TFS --by quarter",
            vec!["balance", "TFS", "--by", "quarter"],
        ),
        ("totals", vec!["totals"]),
        (
            "meters TFS --year 2024",
            vec!["meters", "TFS", "--year", "2024"],
        ),
        (
            "reconcile TFS REPORT",
            vec!["reconcile", "TFS", report.to_str().unwrap()],
        ),
        (
            "chart TFS",
            vec!["chart", "TFS", "--out", svg.to_str().unwrap()],
        ),
    ];
    println!(
        "{rows} entries; load average at the start: {}",
        load_average()
    );
    println!("| report | sinkbook (s) | GROUP BY (s) | ÷ GROUP BY | peak MB |");
    println!("|---|---|---|---|---|");
    for (name, args) in &steps {
        let (mut ours, mut base, mut peak) = (Vec::new(), Vec::new(), None::<f64>);
        for _ in 0..ROUNDS {
            base.push(group_by(&db));
            let (secs, mb, _) = common::measured(&db, args);
            ours.push(secs);
            peak = match (peak, mb) {
                (Some(p), Some(m)) => Some(p.max(m)),
                (p, m) => p.or(m),
            };
        }
        let (ours, base) = (median(ours), median(base));
        println!(
            "| {name} | {ours:.2} | {base:.2} | {:.1} | {} |",
            ours / base,
            peak.map_or("—".into(), |m| format!("{m:.0}"))
        );
    }
    println!("load average at the end: {}", load_average());
}
