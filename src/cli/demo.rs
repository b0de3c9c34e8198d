//! `demo`: a fresh ledger built from the embedded sample projects, and its tables.

use super::run_line;
use crate::error::{Error, Result, StoreKind};
use crate::import::script::{SAMPLES, script_lines};
use crate::report::Report;
use crate::report::tables::demo::{OVERVIEW, TOUR, tour_table};
use crate::store::Store;
use chrono::{DateTime, Utc};
use std::path::Path;

fn io(e: std::io::Error) -> Error {
    Error::store(
        StoreKind::System,
        format!("demo: could not write the sample files: {e}"),
    )
}

/// The folders the scripts name besides `$SAMPLES`: `$KEYS`, for the key files the demo makes
/// (private to the user, removed when the demo ends), and `$REPORTS`, where the report pages go
/// (kept, so they can be opened after the demo).
struct Folders {
    samples: tempfile::TempDir,
    keys: tempfile::TempDir,
    reports: tempfile::TempDir,
}

impl Folders {
    fn new() -> Result<Folders> {
        let dir = |prefix: &str, private: bool| {
            let mut b = tempfile::Builder::new();
            b.prefix(prefix);
            #[cfg(unix)]
            if private {
                use std::os::unix::fs::PermissionsExt;
                b.permissions(std::fs::Permissions::from_mode(0o700));
            }
            #[cfg(not(unix))]
            let _ = private;
            b.tempdir().map_err(io)
        };
        Ok(Folders {
            samples: dir("sinkbook-demo-samples-", false)?,
            keys: dir("sinkbook-demo-keys-", true)?,
            reports: dir("sinkbook-demo-reports-", false)?,
        })
    }

    /// A script's word with the folders in place of their names.
    fn substitute(&self, word: &str) -> String {
        let shown = |d: &tempfile::TempDir| d.path().display().to_string();
        word.replace("$SAMPLES", &shown(&self.samples))
            .replace("$KEYS", &shown(&self.keys))
            .replace("$REPORTS", &shown(&self.reports))
    }

    /// Keeps the report folder and names the pages in it.
    fn keep_reports(self) -> Result<Vec<String>> {
        let dir = self.reports.keep();
        let mut pages: Vec<String> = std::fs::read_dir(&dir)
            .map_err(io)?
            .map(|e| e.map(|e| e.path().display().to_string()).map_err(io))
            .collect::<Result<_>>()?;
        pages.sort();
        Ok(pages)
    }
}

/// Runs every sample script into a ledger at `db`, then reports on it: an overview, or with
/// `full` every table of the tour. `db_shown` is how the commands listed name the ledger.
fn build_and_report(db: &Path, db_shown: &str, full: bool, now: DateTime<Utc>) -> Result<Report> {
    let (_, created) = Store::init(db, crate::store::Wait::default())?;
    if !created {
        return Err(Error::field(
            "--db",
            &db.display().to_string(),
            "already exists; the demo builds a fresh ledger",
        ));
    }
    let folders = Folders::new()?;
    for (name, text) in SAMPLES {
        std::fs::write(folders.samples.path().join(name), text).map_err(io)?;
    }
    for (name, text) in SAMPLES.iter().filter(|(n, _)| n.ends_with(".sinkbook")) {
        for (n, line) in script_lines(text) {
            let words = shlex::split(&folders.substitute(line))
                .ok_or_else(|| Error::Usage(format!("{name} line {n}: unbalanced quotes")))?;
            run_line(&words, db, now).map_err(|e| e.at(&format!("{name} line {n}")))?;
        }
    }
    let run = |words: &[&str]| {
        let words: Vec<String> = words.iter().map(|w| folders.substitute(w)).collect();
        run_line(&words, db, now)
    };
    let mut report = Report::default();
    if full {
        for (words, _) in TOUR {
            report.extend(run(words)?);
        }
    } else {
        for (words, keep) in OVERVIEW {
            let mut part = run(words)?;
            part.tables.truncate(*keep);
            report.extend(part);
        }
        report = report.table(tour_table(db_shown));
    }
    for page in folders.keep_reports()? {
        report = report.line(format!(
            "Annual report page written to {page} (kept; open it in a browser, or print it)."
        ));
    }
    Ok(report)
}

#[derive(Debug, clap::Args)]
#[command(after_help = "Example: sinkbook demo --db demo.db --full")]
pub struct DemoArgs {
    /// Print every table of the tour, not just the overview
    #[arg(long)]
    full: bool,
}

/// The sample projects play the year 2026 to its end (entries dated in December, the year sealed),
/// so the demo records them as of this time, or at the real clock once it is later.
const DEMO_CLOCK: &str = "2027-01-15T09:00:00Z";

pub fn demo(db: Option<&Path>, args: DemoArgs, now: DateTime<Utc>) -> Result<Report> {
    let now = now.max(DateTime::parse_from_rfc3339(DEMO_CLOCK).map_or(now, |t| t.to_utc()));
    let (mut report, place) = match db {
        Some(path) => {
            let shown = path.display().to_string();
            (
                build_and_report(path, &shown, args.full, now)?,
                format!("in {shown}"),
            )
        }
        None => {
            let dir = tempfile::tempdir().map_err(io)?;
            (
                build_and_report(&dir.path().join("demo.db"), "demo.db", args.full, now)?,
                "in a temporary file, removed on exit (give --db demo.db to keep it),".to_string(),
            )
        }
    };
    report.lines.insert(
        0,
        format!(
            "Demo ledger built {place} from the sample projects (invented data, see sample-projects/README.md), recorded as of {}.",
            now.format("%Y-%m-%d %H:%M UTC")
        ),
    );
    Ok(report)
}
