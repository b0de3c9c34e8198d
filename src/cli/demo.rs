//! `demo`: a fresh ledger built from the embedded sample projects, and its tables.

use super::run_line;
use crate::error::{Error, Result};
use crate::report::Report;
use crate::store::Store;
use chrono::{DateTime, Utc};
use std::path::Path;

/// The sample files, embedded so the demo runs from any directory. Scripts (`.sinkbook`) run in
/// this order; data files are written beside them and named in the scripts as `$SAMPLES/…`.
const SAMPLES: &[(&str, &str)] = &[
    (
        "tfs.sinkbook",
        include_str!("../../sample-projects/tfs.sinkbook"),
    ),
    (
        "tfs-meters-2026.csv",
        include_str!("../../sample-projects/tfs-meters-2026.csv"),
    ),
    (
        "kre.sinkbook",
        include_str!("../../sample-projects/kre.sinkbook"),
    ),
    (
        "tfs-monitoring-report-2026.csv",
        include_str!("../../sample-projects/tfs-monitoring-report-2026.csv"),
    ),
    (
        "kre-monitoring-report-2026.csv",
        include_str!("../../sample-projects/kre-monitoring-report-2026.csv"),
    ),
    (
        "crb.sinkbook",
        include_str!("../../sample-projects/crb.sinkbook"),
    ),
    (
        "evw.sinkbook",
        include_str!("../../sample-projects/evw.sinkbook"),
    ),
];

/// What the demo prints once the ledger is built.
const TOUR: &[&[&str]] = &[
    &["project", "list"],
    &["balance", "TFS", "--by", "quarter"],
    &["meters", "TFS", "--year", "2026"],
    &["balance", "KRE", "--by", "quarter"],
    &["balance", "KRE", "--by", "year", "--method", "iso27916"],
    &[
        "reconcile",
        "TFS",
        "$SAMPLES/tfs-monitoring-report-2026.csv",
    ],
    &[
        "reconcile",
        "KRE",
        "$SAMPLES/kre-monitoring-report-2026.csv",
    ],
    &["mineralization", "CRB", "--by", "year"],
    &["feedstock", "list", "EVW"],
    &["weathering", "EVW"],
    &["balance", "EVW", "--by", "year"],
    &["verify"],
    &["totals"],
];

/// Splits a script into command lines: blank lines and `#` comments skipped.
fn script_lines(text: &str) -> impl Iterator<Item = (usize, &str)> {
    text.lines()
        .enumerate()
        .map(|(i, l)| (i + 1, l.trim()))
        .filter(|(_, l)| !l.is_empty() && !l.starts_with('#'))
}

fn io(e: std::io::Error) -> Error {
    Error::Store(format!("demo: could not write the sample files: {e}"))
}

/// Runs every sample script into a ledger at `db`, then reports on it.
fn build_and_report(db: &Path, now: DateTime<Utc>) -> Result<Report> {
    let (_, created) = Store::init(db)?;
    if !created {
        return Err(Error::field(
            "--db",
            &db.display().to_string(),
            "already exists; the demo builds a fresh ledger",
        ));
    }
    let samples = tempfile::tempdir().map_err(io)?;
    for (name, text) in SAMPLES {
        std::fs::write(samples.path().join(name), text).map_err(io)?;
    }
    let dir = samples.path().display().to_string();
    for (name, text) in SAMPLES.iter().filter(|(n, _)| n.ends_with(".sinkbook")) {
        for (n, line) in script_lines(text) {
            let words = shlex::split(&line.replace("$SAMPLES", &dir))
                .ok_or_else(|| Error::Refused(format!("{name} line {n}: unbalanced quotes")))?;
            run_line(&words, db, now)
                .map_err(|e| Error::Refused(format!("{name} line {n}: {e}")))?;
        }
    }
    let mut report = Report::default();
    for words in TOUR {
        let words: Vec<String> = words.iter().map(|w| w.replace("$SAMPLES", &dir)).collect();
        report.extend(run_line(&words, db, now)?);
    }
    Ok(report)
}

pub fn demo(db: Option<&Path>, now: DateTime<Utc>) -> Result<Report> {
    let (mut report, place) = match db {
        Some(path) => (
            build_and_report(path, now)?,
            format!("in {}", path.display()),
        ),
        None => {
            let dir = tempfile::tempdir().map_err(io)?;
            (
                build_and_report(&dir.path().join("demo.db"), now)?,
                "in a temporary file, removed on exit,".to_string(),
            )
        }
    };
    report.lines.insert(
        0,
        format!("Demo ledger built {place} from the sample projects (invented data, see sample-projects/README.md)."),
    );
    Ok(report)
}
