//! `demo`: a fresh ledger built from the embedded sample projects, and its tables.

use super::run_line;
use crate::error::{Error, Result};
use crate::export::sample_folders::{Folders, passing_folder};
use crate::import::script::demo_clock;
use crate::report::Report;
use crate::report::tables::demo::{OVERVIEW, TOUR, built_line, page_line, tour_table};
use crate::store::Store;
use chrono::{DateTime, Utc};
use std::path::Path;

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
    folders.run_scripts(|words| run_line(words, db, now).map(drop))?;
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
        report = report.line(page_line(&page));
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

pub fn demo(db: Option<&Path>, args: DemoArgs, now: DateTime<Utc>) -> Result<Report> {
    let now = demo_clock(now);
    let (mut report, place) = match db {
        Some(path) => {
            let shown = path.display().to_string();
            (
                build_and_report(path, &shown, args.full, now)?,
                format!("in {shown}"),
            )
        }
        None => {
            let dir = passing_folder()?;
            (
                build_and_report(&dir.path().join("demo.db"), "demo.db", args.full, now)?,
                "in a temporary file, removed on exit (give --db demo.db to keep it),".to_string(),
            )
        }
    };
    report.lines.insert(0, built_line(&place, now));
    Ok(report)
}
