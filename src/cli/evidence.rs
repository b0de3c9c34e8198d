//! The evidence of imports, read again: `readings` shows the rows behind a meter-day, and
//! `reconcile --recompute` re-plans every file to check the entries it made (`verify`'s hash of
//! the kept bytes is `Tx::check_evidence`).

use super::Context;
use super::setup::known_project;
use crate::error::{Error, Result};
use crate::import::plan::Plan;
use crate::import::replan::{Kept, plan_totals, replan as replan_kept};
use crate::ledger::Site;
use crate::ledger::recompute::ReadingTotal;
use crate::report::Report;
use crate::report::tables::evidence::readings_table;
use crate::store::{StoredImport, Tx};
use chrono::NaiveDate;
use clap::Args;
use std::collections::HashMap;

#[derive(Debug, Args)]
pub struct ReadingsArgs {
    /// Project code (e.g. TFS)
    pub project: String,
    /// The meter whose readings to show
    #[arg(long)]
    pub meter: String,
    /// The meter's day (YYYY-MM-DD)
    #[arg(long)]
    pub day: String,
}

/// Re-reads import `i` of `project` from its kept bytes (`import::replan`).
fn replan(
    tx: &mut Tx<'_>,
    project: &str,
    sites: &HashMap<String, Site>,
    i: &StoredImport,
    watch: Option<(&str, NaiveDate)>,
) -> Result<Plan> {
    let kept = Kept {
        id: i.id,
        file_name: &i.file_name,
        sha256: &i.sha256,
        kind: &i.kind,
        columns: &i.columns,
        density: &i.density,
    };
    replan_kept(tx.evidence(i.id), project, sites, &kept, watch)
}

/// Every imported meter-day of `project`, recomputed from the kept files.
pub fn reading_totals(tx: &mut Tx<'_>, project: &str) -> Result<Vec<ReadingTotal>> {
    let sites = tx.sites_by_code(project)?;
    let mut out = Vec::new();
    for i in tx.imports(project)? {
        let p = replan(tx, project, &sites, &i, None)?;
        out.extend(plan_totals(&p, &i.sha256));
    }
    Ok(out)
}

/// `readings`: the rows behind one meter-day, re-read from every file imported into the project.
pub fn readings(ctx: &Context, a: ReadingsArgs) -> Result<Report> {
    let day = NaiveDate::parse_from_str(&a.day, "%Y-%m-%d")
        .map_err(|e| Error::field("--day", &a.day, e))?;
    let found = ctx.open()?.read(|tx| {
        known_project(tx, &a.project)?;
        let sites = tx.sites_by_code(&a.project)?;
        let mut found = Vec::new();
        for i in tx.imports(&a.project)? {
            let p = replan(tx, &a.project, &sites, &i, Some((&a.meter, day)))?;
            found.extend(
                p.watched
                    .into_iter()
                    .map(|w| (i.id, i.file_name.clone(), w)),
            );
        }
        Ok(found)
    })?;
    if found.is_empty() {
        return Err(Error::Refused(format!(
            "no imported readings of meter {} on {day} in project {}",
            a.meter, a.project
        )));
    }
    Ok(Report::default().table(readings_table(&a.project, &a.meter, day, found)))
}
