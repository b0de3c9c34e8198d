//! A project's entries fed to the pure view inside the command's transaction: the one place a
//! command turns stored rows into the figures every report reads. The rows stream: each is
//! decoded and checked as the walk reads it, folded, and dropped.

use super::setup::known_project;
use crate::accounting::project_view::{ProjectFigures, ProjectView, Registrations};
use crate::error::Result;
use crate::ledger::SealedEntry;
use crate::store::Tx;
use chrono::{DateTime, NaiveDate, Utc};

/// A project as the ledger holds it, or held it at `as_of`: with a date, later entries,
/// corrections, sites, settings and feedstocks are left out, so a past report can be
/// reproduced exactly. Without one, everything recorded counts, whatever the clock says.
pub fn load(tx: &mut Tx<'_>, code: &str, as_of: Option<DateTime<Utc>>) -> Result<ProjectFigures> {
    load_through(tx, code, as_of, None)
}

/// [`load`], counting activity only up to and including `through` (the view splits entries
/// spanning it by days).
pub fn load_through(
    tx: &mut Tx<'_>,
    code: &str,
    as_of: Option<DateTime<Utc>>,
    through: Option<NaiveDate>,
) -> Result<ProjectFigures> {
    load_seeing(tx, code, as_of, through, |_| {})
}

/// [`load_through`], handing `each` every row the walk reads (those that are replaced too),
/// for a command that needs the chain itself as well as the figures in one pass.
pub fn load_seeing(
    tx: &mut Tx<'_>,
    code: &str,
    as_of: Option<DateTime<Utc>>,
    through: Option<NaiveDate>,
    mut each: impl FnMut(&SealedEntry),
) -> Result<ProjectFigures> {
    let registrations = Registrations {
        project: known_project(tx, code)?,
        sites: tx.sites(code)?,
        settings: tx.settings(code)?,
        feedstocks: tx.feedstocks(code)?,
        evidence: (tx.effective_evidence(code, as_of)?.into_iter())
            .map(|s| s.entry)
            .collect(),
    };
    let mut view = ProjectView::new(registrations.held_at(as_of), through)?;
    tx.walk_chain(code, as_of, |row| {
        each(row.sealed);
        if row.replaced_by.is_none() {
            view.add(&row.sealed.entry)?;
        }
        Ok(())
    })?;
    Ok(view.finish()?)
}
