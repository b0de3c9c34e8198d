//! Writing an import's plan: each meter-day checked against what the ledger counts already
//! (a meter-day counts once) and against the permit, then sealed onto the project's chain and
//! written a chunk at a time, so memory holds one chunk of entries beside the plan.

use super::Context;
use super::import::listed;
use crate::error::{Error, Result};
use crate::import::meter_day::{MeterDay, Source, permit_entries};
use crate::import::overlap::{self, Covered};
use crate::ledger::append::{AppendError, Appended, SealRule, append};
use crate::ledger::{EntryKind, Project, SealedEntry, Site};
use crate::store::Tx;
use chrono::NaiveDate;
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

/// Writes `days` as entries of `source`, calling `sealed` with each as it is sealed; returns
/// the permit's warnings. Nothing is written when it fails (the command's transaction).
pub(super) fn write(
    tx: &mut Tx<'_>,
    ctx: &Context,
    to: &Target<'_>,
    source: &Source<'_>,
    days: &[MeterDay],
    mut sealed: impl FnMut(&MeterDay, &SealedEntry),
) -> Result<Vec<String>> {
    let code = source.project;
    let covered = covered_days(tx, code, source.kind, days)?;
    let corrects = overlap::corrections(days, &covered, to.replace).map_err(|o| {
        Error::Refused(format!(
            "{}: {} meter-day{} already counted in the ledger, nothing written (a meter-day counts once: if this file replaces the earlier export, import it with --replace): {}",
            source.file_name,
            o.len(),
            if o.len() == 1 { " is" } else { "s are" },
            listed(&o)
        ))
    })?;
    let warnings = permit_warnings(tx, to, source, days, &corrects)?;
    let mut tip = tx.chain_tip(code)?;
    let seals = tx.seals(code)?;
    for (days, corrects) in days.chunks(ENTRY_CHUNK).zip(corrects.chunks(ENTRY_CHUNK)) {
        let mut chunk = Vec::with_capacity(days.len());
        for (d, c) in days.iter().zip(corrects) {
            let replaced = match c.filter(|_| !seals.is_empty()) {
                Some(t) => Some(super::record::replaced(tx, code, t, &seals)?.0),
                None => None,
            };
            let rule = SealRule {
                seals: &seals,
                late: ctx.late,
                today: ctx.now.date_naive(),
                replaced,
            };
            let site = to.sites.get(&*d.site);
            match append(d.entry(source, *c), site, tip, None, rule)
                .map_err(|e| refused_row(source.file_name, e))?
            {
                Appended::New(s) | Appended::Existing(s) => {
                    tip = (tip.0 + 1, s.chain);
                    sealed(d, &s);
                    chunk.push(s);
                }
            }
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
    if !matches!(
        source.kind,
        EntryKind::Injection | EntryKind::Production | EntryKind::EquipmentLeak
    ) {
        return Ok(Vec::new());
    }
    let code = source.project;
    let new = permit_entries(days, source)
        .ok_or_else(|| Error::field("FILE", source.file_name, "totals too large for the ledger"))?;
    let mut gone = Vec::new();
    for t in corrects.iter().flatten() {
        let replaced = tx.entry_at(code, *t)?.ok_or_else(|| {
            Error::ledger(format!(
                "project {code} has no seq {t}, which an effective meter-day named"
            ))
        })?;
        gone.push(replaced.entry);
    }
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

/// The meter-days of the plan's span that the ledger already counts, for this kind of entry.
fn covered_days(
    tx: &mut Tx<'_>,
    project: &str,
    kind: EntryKind,
    days: &[MeterDay],
) -> Result<Covered> {
    let (Some(first), Some(last)) = (
        days.iter().map(|d| d.day).min(),
        days.iter().map(|d| d.day).max(),
    ) else {
        return Ok(Covered::new());
    };
    let mut covered = Covered::new();
    for c in tx.covered_days(project, kind.name(), first, last)? {
        let day = NaiveDate::parse_from_str(&c.day, "%Y-%m-%d").map_err(|_| {
            Error::ledger(format!(
                "project {project} seq {}: period_from {:?} is not a date",
                c.seq, c.day
            ))
        })?;
        covered.insert((c.meter, day), (c.seq as u64, c.evidence_name));
    }
    Ok(covered)
}
