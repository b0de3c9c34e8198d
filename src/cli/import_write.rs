//! Writing an import's plan: each meter-day checked against what the ledger counts already
//! (a meter-day counts once) and against the permit, then sealed onto the project's chain and
//! written a chunk at a time, so memory holds one chunk of entries beside the plan.

use super::Context;
use crate::accounting::permit;
use crate::error::{Error, Result};
use crate::import::meter_day::{MeterDay, Source, permit_entries};
use crate::import::overlap::{self, Covered};
use crate::import::summary::Summary;
use crate::ledger::append::{AppendError, SealRule, append};
use crate::ledger::{Project, Site};
use crate::report::tables::import::counted_why;
use crate::store::Tx;
use std::collections::HashMap;

/// Entries sealed and written at a time.
const ENTRY_CHUNK: usize = 10_000;

/// Where the plan goes and what the user allowed.
pub(super) struct Target<'a> {
    pub project: &'a Project,
    pub sites: &'a HashMap<String, Site>,
    pub replace: bool,
    pub over_permit: bool,
}

/// Writes `days` as entries of `source`, each added to `summary` as it is sealed; returns the
/// permit's warnings. Nothing is written when it fails (the command's transaction).
pub(super) fn write(
    tx: &mut Tx<'_>,
    ctx: &Context,
    to: &Target<'_>,
    source: &Source<'_>,
    days: &[MeterDay],
    summary: &mut Summary,
) -> Result<Vec<String>> {
    let code = source.project;
    let span = overlap::span(days);
    let covered: Covered = tx
        .counted_days(code, source.kind.name(), span)?
        .into_iter()
        .collect();
    let corrects = overlap::corrections(days, &covered, to.replace)
        .map_err(|o| Error::Refused(counted_why(source.file_name, &o)))?;
    let warnings = permit_warnings(tx, to, source, days, &corrects)?;
    let mut tip = tx.chain_tip(code)?;
    let seals = tx.seals(code)?;
    for (days, corrects) in days.chunks(ENTRY_CHUNK).zip(corrects.chunks(ENTRY_CHUNK)) {
        let mut chunk = Vec::with_capacity(days.len());
        for (d, c) in days.iter().zip(corrects) {
            let replaced = c.filter(|_| !seals.is_empty());
            let replaced = replaced.map(|t| super::record::replaced(tx, code, t, &seals));
            let replaced = replaced.transpose()?.map(|(r, _)| r);
            let rule = SealRule {
                seals: &seals,
                late: ctx.late,
                today: ctx.now.date_naive(),
                replaced,
            };
            let site = to.sites.get(&*d.site);
            let s = append(d.entry(source, *c), site, tip, None, rule)
                .map_err(|e| refused_row(source.file_name, e))?
                .into_sealed();
            tip = (tip.0 + 1, s.chain);
            summary.add(d, &s);
            chunk.push(s);
        }
        tx.append(&chunk)?;
    }
    Ok(warnings)
}

/// The permit's check of the import, for the kinds that move the stored figure: the new
/// entries summed by day (what the check reads of them: kind, day and grams), and the entries
/// the corrections replace.
fn permit_warnings(
    tx: &mut Tx<'_>,
    to: &Target<'_>,
    source: &Source<'_>,
    days: &[MeterDay],
    corrects: &[Option<u64>],
) -> Result<Vec<String>> {
    if !permit::bears_on(source.kind) {
        return Ok(Vec::new());
    }
    let code = source.project;
    let new = permit_entries(days, source)
        .ok_or_else(|| Error::field("FILE", source.file_name, "totals too large for the ledger"))?;
    let gone = tx.replaced_entries(code, corrects.iter().flatten().copied())?;
    let tally = tx.tally(code)?;
    let standing = super::record::standing(tx, to.project, tally, &new)?;
    super::permit_check(to.project, &standing, &new, &gone, to.over_permit)
}

/// An append refused for one of the file's meter-days; a day out of the window is named as
/// the file's day, not as an option the file does not have.
fn refused_row(file_name: &str, e: AppendError) -> Error {
    match e {
        AppendError::OutOfBounds(b) if b.field == "period_from" || b.field == "period_to" => {
            Error::input(file_name, format!("meter-day {}: {}", b.value, b.why))
        }
        AppendError::Sealed(s) => Error::field("FILE", file_name, super::sealed(&s)),
        e => Error::field("FILE", file_name, e),
    }
}
