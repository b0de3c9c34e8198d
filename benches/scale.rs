//! Every long command at scale, in one run, each beside the nearest plain equivalent on the
//! same ledger file measured in the same run: a generated meter file (one row per meter-day,
//! so as many entries as rows) imported by `sinkbook import` (beside the sqlite3 shell's
//! `.import` of the same CSV into a plain table), then `balance --by quarter`, `totals`,
//! `meters`, `reconcile`, `chart` (beside plain `GROUP BY` sums), `verify` (beside `sha256sum` over the
//! bytes verify hashes), `entries --format json` (beside `sqlite3 -json`) and `record
//! injection` (beside the same record into a 100-entry ledger). Time and peak memory
//! (`/usr/bin/time`) of each, and their ratios, as a markdown table per size.
//! `SINKBOOK_BENCH_ROWS` sets the sizes, comma-separated (default 10,000, 100,000 and
//! 1,000,000). Run with `cargo bench --bench scale` (needs `sqlite3` and `sha256sum`).

mod common;

use sinkbook::ledger::Hash;
use sinkbook::ledger::canonical::encode;
use sinkbook::store::{Store, Wait};
use std::ffi::OsStr;
use std::io::Write;
use std::path::Path;
use std::process::Stdio;

/// Records timed per ledger; the median is reported.
const RECORDS: usize = 5;

/// Entries in the small ledger the record's baseline appends to.
const SMALL: u64 = 100;

/// Seconds and peak memory (MB) of one run.
type Run = (f64, Option<f64>);

/// A command to time: its name, its baseline's, sinkbook's words, and the sqlite3 shell's
/// options, file and SQL.
type Planned<'a> = (
    &'static str,
    &'static str,
    &'a [&'a str],
    &'a [&'a str],
    &'a Path,
    &'a str,
);

/// One command beside its baseline.
struct Step {
    name: &'static str,
    baseline: &'static str,
    ours: Run,
    base: Run,
}

/// A command's time and peak memory, its output thrown away; it must exit with one of `ok`.
fn run(program: &str, args: &[&OsStr], ok: &[i32]) -> Run {
    let (secs, peak, o) = common::peak(OsStr::new(program), args, Stdio::null());
    assert!(
        o.status.code().is_some_and(|c| ok.contains(&c)),
        "{program} {args:?}: {}",
        String::from_utf8_lossy(&o.stderr)
    );
    (secs, peak)
}

/// sinkbook on `db`; reconcile exits 4 for a material misstatement, which is a result.
fn sinkbook(db: &Path, args: &[&str]) -> Run {
    let mut words = vec![OsStr::new("--db"), db.as_os_str()];
    words.extend(args.iter().map(OsStr::new));
    run(env!("CARGO_BIN_EXE_sinkbook"), &words, &[0, 4])
}

/// The sqlite3 shell: `options`, the file, then the SQL or dot-command.
fn sqlite3(options: &[&str], db: &Path, sql: &str) -> Run {
    let mut words: Vec<&OsStr> = options.iter().map(OsStr::new).collect();
    words.extend([db.as_os_str(), OsStr::new(sql)]);
    run("sqlite3", &words, &[0])
}

/// Writes to `out` exactly the bytes verify hashes, in its order: for each entry the leaf's
/// input (0x00, then the entry's canonical bytes) and the chain link's (the previous chain
/// hash, then the leaf), then the imported file's bytes as kept. Returns their count.
fn hashed_bytes(db: &Path, csv: &Path, out: &Path) -> u64 {
    let mut w = std::io::BufWriter::new(std::fs::File::create(out).unwrap());
    let mut store = Store::open(db, Wait::default()).unwrap();
    let mut prev = Hash::GENESIS;
    store
        .read(|tx| {
            tx.for_each_entry("TFS", None, |s| {
                w.write_all(&[0]).unwrap();
                w.write_all(&encode(&s.entry)).unwrap();
                w.write_all(&prev.0).unwrap();
                w.write_all(&s.leaf.0).unwrap();
                prev = s.chain;
                Ok(())
            })
        })
        .unwrap();
    w.write_all(&std::fs::read(csv).unwrap()).unwrap();
    w.flush().unwrap();
    std::fs::metadata(out).unwrap().len()
}

/// A monitoring report for `reconcile`: one quarter's figures (invented).
fn monitoring_report(path: &Path) {
    std::fs::write(
        path,
        "period,quantity,value,unit\n2023-Q2,injected,1000.0,t\n2023-Q2,stored,1000.0,t\n",
    )
    .unwrap();
}

/// Every step on a new ledger of `rows` entries; `round` counts the sizes before, so each
/// size's records into the small ledger are new entries (other days), not repeats of a key.
/// Returns the steps and the bytes verify hashes.
fn measure(rows: u64, small: &Path, round: usize) -> (Vec<Step>, u64) {
    let dir = tempfile::tempdir().unwrap();
    let (csv, db) = (dir.path().join("meters.csv"), dir.path().join("bench.db"));
    common::one_per_day(&csv, rows);
    let report = dir.path().join("report.csv");
    monitoring_report(&report);
    let plain = dir.path().join("plain.db");
    let bytes = dir.path().join("hashed.bin");
    common::ledger(&db);
    let csv_text = csv.to_str().unwrap();
    let report_text = report.to_str().unwrap();
    let by_kind = "SELECT kind, sum(grams) FROM entries GROUP BY kind";
    let by_quarter = "SELECT substr(period_from, 1, 4), \
        (CAST(substr(period_from, 6, 2) AS INTEGER) + 2) / 3, kind, sum(grams) \
        FROM entries GROUP BY 1, 2, 3";
    let by_meter = "SELECT meter, count(*), sum(grams) FROM entries \
        WHERE period_from LIKE '2023-%' GROUP BY meter";
    let import = format!(".import --csv {csv_text} readings");
    let svg = dir.path().join("chart.svg");
    let svg_text = svg.to_str().unwrap();
    let plan: [Planned<'_>; 7] = [
        (
            "import",
            "sqlite3 `.import` of the CSV",
            &["import", "TFS", csv_text],
            &[],
            &plain,
            &import,
        ),
        (
            "balance --by quarter",
            "`GROUP BY` quarter, kind",
            &["balance", "TFS", "--by", "quarter"],
            &[],
            &db,
            by_quarter,
        ),
        ("totals", "`GROUP BY kind`", &["totals"], &[], &db, by_kind),
        (
            "meters --year 2023",
            "`GROUP BY meter`",
            &["meters", "TFS", "--year", "2023"],
            &[],
            &db,
            by_meter,
        ),
        (
            "reconcile",
            "`GROUP BY kind`",
            &["reconcile", "TFS", report_text],
            &[],
            &db,
            by_kind,
        ),
        (
            "chart",
            "`GROUP BY` quarter, kind",
            &["chart", "TFS", "--out", svg_text],
            &[],
            &db,
            by_quarter,
        ),
        (
            "entries --format json",
            "`sqlite3 -json` of every entry",
            &["--format", "json", "entries", "TFS"],
            &["-json"],
            &db,
            "SELECT * FROM entries",
        ),
    ];
    let mut steps: Vec<Step> = plan
        .into_iter()
        .map(|(name, baseline, ours, options, file, sql)| Step {
            name,
            baseline,
            ours: sinkbook(&db, ours),
            base: sqlite3(options, file, sql),
        })
        .collect();
    let hashed = hashed_bytes(&db, &csv, &bytes);
    steps.push(Step {
        name: "verify",
        baseline: "`sha256sum` over the bytes verify hashes",
        ours: sinkbook(&db, &["verify"]),
        base: run("sha256sum", &[bytes.as_os_str()], &[0]),
    });
    let (ours, base) = common::records(&db, small, 1 + round * RECORDS, RECORDS);
    steps.push(Step {
        name: "record injection",
        baseline: "the same record at 100 entries",
        ours,
        base,
    });
    (steps, hashed)
}

fn print(rows: u64, steps: &[Step], hashed: u64) {
    println!(
        "\n{rows} entries; load average now {}",
        common::load_average()
    );
    println!(
        "| command | baseline | sinkbook (s) | baseline (s) | ÷ baseline | sinkbook peak MB | baseline peak MB |"
    );
    println!("|---|---|---|---|---|---|---|");
    for s in steps {
        println!(
            "| {} | {} | {:.3} | {:.3} | {:.2} | {} | {} |",
            s.name,
            s.baseline,
            s.ours.0,
            s.base.0,
            s.ours.0 / s.base.0,
            common::mb(s.ours.1),
            common::mb(s.base.1)
        );
    }
    if let Some(v) = steps.iter().find(|s| s.name == "verify") {
        let rate = |secs: f64| hashed as f64 / 1e6 / secs;
        println!(
            "\nverify hashes {:.1} MB (every entry's leaf and chain-link input, then the imported file): \
             sinkbook verify {:.0} MB/s, sha256sum {:.0} MB/s over the same bytes, {:.2}× (target ≥ 0.5×)",
            hashed as f64 / 1e6,
            rate(v.ours.0),
            rate(v.base.0),
            v.base.0 / v.ours.0
        );
    }
}

fn main() {
    let sizes = common::sizes("10000,100000,1000000");
    let dir = tempfile::tempdir().unwrap();
    let (small_csv, small) = (dir.path().join("small.csv"), dir.path().join("small.db"));
    common::one_per_day(&small_csv, SMALL);
    common::ledger(&small);
    common::sinkbook(&small, &["import", "TFS", small_csv.to_str().unwrap()]);
    let commit = std::process::Command::new("git")
        .args(["rev-parse", "--short", "HEAD"])
        .output()
        .ok()
        .map(|o| String::from_utf8_lossy(&o.stdout).trim().to_string())
        .unwrap_or_default();
    println!(
        "sinkbook at commit {commit}; load average at the start: {}",
        common::load_average()
    );
    for (round, &rows) in sizes.iter().enumerate() {
        let (steps, hashed) = measure(rows, &small, round);
        print(rows, &steps, hashed);
    }
}
