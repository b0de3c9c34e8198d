//! The evidence of imports, read again: `readings` shows the rows behind a meter-day, and
//! `reconcile --recompute` re-plans every file to check the entries it made (`verify`'s hash of
//! the kept bytes is `Tx::check_evidence`).

use super::Context;
use super::setup::known_project;
use crate::error::{Error, Result};
use crate::import::plan::Plan;
use crate::import::replan::{plan_totals, replan};
use crate::ledger::recompute::Recompute;
use crate::report::tables::evidence::{no_readings_line, readings_table};
use crate::report::tables::reconcile::RecomputeTable;
use crate::report::{Report, Table};
use crate::store::{StoredImport, Tx};
use chrono::NaiveDate;
use clap::Args;

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

/// Every import of `project` re-read from its kept bytes (`import::replan`), in the order
/// made, each handed to `f` with its plan.
fn replan_all(
    tx: &mut Tx<'_>,
    project: &str,
    watch: Option<(&str, NaiveDate)>,
    mut f: impl FnMut(StoredImport, Plan),
) -> Result<()> {
    let sites = tx.sites_by_code(project)?;
    for i in tx.imports(project)? {
        let p = replan(tx.evidence(i.id), project, &sites, &i, watch)?;
        f(i, p);
    }
    Ok(())
}

/// Every imported meter-day of `project` recomputed from its kept file's raw readings, the
/// chain read row by row.
pub fn recompute_table(tx: &mut Tx<'_>, project: &str) -> Result<Table> {
    let mut totals = Vec::new();
    replan_all(tx, project, None, |i, p| {
        totals.extend(plan_totals(&p, &i.sha256))
    })?;
    let recompute = Recompute::new(&totals);
    let mut t = RecomputeTable::new(project);
    tx.for_each_entry(project, None, |s| {
        if let Some(r) = recompute.entry(&s.entry) {
            t.meter_day(&s.entry, r.meter, &r.day, r.found);
        }
        Ok(())
    })?;
    Ok(t.finish())
}

/// `readings`: the rows behind one meter-day, re-read from every file imported into the project.
pub fn readings(ctx: &Context, a: ReadingsArgs) -> Result<Report> {
    let day = NaiveDate::parse_from_str(&a.day, "%Y-%m-%d")
        .map_err(|e| Error::field("--day", &a.day, e))?;
    let found = ctx.open()?.read(|tx| {
        known_project(tx, &a.project)?;
        let mut found = Vec::new();
        replan_all(tx, &a.project, Some((&a.meter, day)), |i, p| {
            let file = &i.file_name;
            found.extend(p.watched.into_iter().map(|w| (i.id, file.clone(), w)))
        })?;
        Ok(found)
    })?;
    if found.is_empty() {
        return Err(Error::Refused(no_readings_line(&a.project, &a.meter, day)));
    }
    Ok(Report::default().table(readings_table(&a.project, &a.meter, day, found)))
}
