//! `demo`: a fresh ledger built from the embedded sample projects, and its tables.

use super::run_line;
use crate::error::{Error, Result};
use crate::report::Report;
use crate::store::Store;
use chrono::{DateTime, Utc};
use std::path::Path;

/// The sample scripts, embedded so the demo runs from any directory.
const SAMPLES: &[(&str, &str)] = &[(
    "tfs.sinkbook",
    include_str!("../../sample-projects/tfs.sinkbook"),
)];

/// Splits a script into command lines: blank lines and `#` comments skipped.
fn script_lines(text: &str) -> impl Iterator<Item = (usize, &str)> {
    text.lines()
        .enumerate()
        .map(|(i, l)| (i + 1, l.trim()))
        .filter(|(_, l)| !l.is_empty() && !l.starts_with('#'))
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
    for (name, text) in SAMPLES {
        for (n, line) in script_lines(text) {
            let words = shlex::split(line)
                .ok_or_else(|| Error::Refused(format!("{name} line {n}: unbalanced quotes")))?;
            run_line(&words, db, now)
                .map_err(|e| Error::Refused(format!("{name} line {n}: {e}")))?;
        }
    }
    let mut report = Report::default().line(format!(
        "Demo ledger {} built from the sample projects (invented data, see sample-projects/README.md).",
        db.display()
    ));
    for words in [
        &["project", "list"][..],
        &["entries", "TFS"],
        &["balance", "TFS", "--by", "quarter"],
        &["verify"],
    ] {
        let words: Vec<String> = words.iter().map(|w| w.to_string()).collect();
        report.extend(run_line(&words, db, now)?);
    }
    Ok(report)
}

pub fn demo(db: Option<&Path>, now: DateTime<Utc>) -> Result<Report> {
    match db {
        Some(path) => build_and_report(path, now),
        None => {
            let dir = tempfile::tempdir().map_err(|e| {
                Error::Store(format!("could not create a temporary directory: {e}"))
            })?;
            let mut r = build_and_report(&dir.path().join("demo.db"), now)?;
            r.lines[0] = "Demo ledger built in a temporary file from the sample projects (invented data, see sample-projects/README.md); it is removed on exit.".into();
            Ok(r)
        }
    }
}
