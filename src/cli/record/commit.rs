//! The append every record makes: project and site checked, key resolved, the entry sealed in
//! one write transaction, and the table of what was recorded.

use crate::accounting::permit;
use crate::cli::setup::known_project;
use crate::cli::{Context, inputs};
use crate::error::{Error, Result};
use crate::ledger::append::{AppendError, Appended, SealRule, append, content_key, within_limit};
use crate::ledger::seal::{Replaced, Seal, late_replaces};
use crate::ledger::tally::Tally;
use crate::ledger::{Entry, EntryKind, Project};
use crate::quantity::Mass;
use crate::report::Report;
use crate::report::tables::record::recorded_table;
use crate::store::Tx;

/// Appends in one immediate transaction: project and site checked, key resolved, entry sealed.
pub(in crate::cli) fn commit(
    ctx: &Context,
    entry: Entry,
    key: Option<String>,
    over_permit: bool,
) -> Result<Report> {
    commit_with(ctx, key, over_permit, |_| Ok(entry.clone()))
}

/// Drafts the entry with `make` and appends it in one write transaction, so whatever `make`
/// reads (the entry a correction replaces, a field's area, a baseline) is what the append sees.
pub(in crate::cli) fn commit_with(
    ctx: &Context,
    key: Option<String>,
    over_permit: bool,
    mut make: impl FnMut(&mut Tx<'_>) -> Result<Entry>,
) -> Result<Report> {
    let (outcome, warnings) = ctx.open()?.write(|tx| {
        let mut entry = make(tx)?;
        entry.recorded_by = tx.recorded_by()?;
        if over_permit {
            entry.reading.push("over_permit", "acknowledged");
        }
        entry.key = key.clone().unwrap_or_else(|| content_key(&entry));
        let project = known_project(tx, &entry.project)?;
        let site = match entry.site.as_str() {
            "" => None,
            code => Some(tx.site(&entry.project, code)?.ok_or_else(|| {
                Error::field(
                    "--site",
                    code,
                    format!("is not a site of project {}", entry.project),
                )
            })?),
        };
        let tally = tx.tally(&entry.project)?;
        let seals = tx.seals(&entry.project)?;
        let (replaced, target) = match entry.corrects {
            // Re-checked inside the write transaction, so a concurrent correction cannot slip in.
            Some(target) => {
                let (r, t) = replaced(tx, &entry.project, target, &seals)?;
                (Some(r), Some(t))
            }
            None => (None, None),
        };
        let rule = SealRule {
            seals: &seals,
            late: ctx.late,
            today: ctx.now.date_naive(),
            replaced,
        };
        within_limit(tally.magnitude, std::slice::from_ref(&entry)).map_err(|e| {
            let mass = entry.mass.to_string();
            Error::field("--mass", entry.reading.text("mass").unwrap_or(&mass), e)
        })?;
        let holder = tx.entry_by_key(&entry.project, &entry.key)?;
        let tip = tx.chain_tip(&entry.project)?;
        let outcome =
            append(entry.clone(), site.as_ref(), tip, holder, rule).map_err(|e| match e {
                AppendError::KeyTaken { .. } => Error::field("--key", &entry.key, e),
                AppendError::NoSite { .. } => Error::options("--site", format!("{e}: give --site")),
                AppendError::WrongSiteKind { .. } => Error::field("--site", &entry.site, e),
                AppendError::BeyondLimit { .. } => Error::Refused(e.to_string()),
                AppendError::Sealed(s) => Error::field(
                    "--from/--to",
                    &entry.period.to_string(),
                    crate::cli::sealed(&s),
                ),
                AppendError::OutOfBounds(b) => inputs::out_of_bounds(&b),
            })?;
        let mut warnings = Vec::new();
        if let Appended::New(s) = &outcome {
            if matches!(
                s.entry.kind,
                EntryKind::Injection
                    | EntryKind::Production
                    | EntryKind::Leakage
                    | EntryKind::EquipmentLeak
            ) {
                let new = std::slice::from_ref(&s.entry);
                let standing = standing(tx, &project, tally, new)?;
                // A late correction is a difference of its own, replacing nothing it counts.
                let gone: Vec<Entry> = target
                    .iter()
                    .filter(|_| s.entry.corrects.is_some())
                    .cloned()
                    .collect();
                warnings = crate::cli::permit_check(&project, &standing, new, &gone, over_permit)?;
            }
            tx.append(std::slice::from_ref(s))?;
        }
        Ok((outcome, warnings))
    })?;
    let mut report = match outcome {
        Appended::New(s) => Report::default()
            .line(format!("recorded {} seq {}", s.entry.project, s.entry.seq))
            .table(recorded_table(&s)),
        Appended::Existing(s) => Report::default()
            .line(format!(
                "already recorded as {} seq {} (key {}); nothing written",
                s.entry.project, s.entry.seq, s.entry.key
            ))
            .table(recorded_table(&s)),
    };
    report.warnings = warnings;
    Ok(report)
}

/// What a correction of `target` replaces, looked up by its seq: the latest entry of its line,
/// and what it counts for now — its grams plus the late differences recorded against it since
/// its period was sealed (read only when the project has seals, since only a sealed period
/// takes late differences). Returns the replaced entry with it.
pub(in crate::cli) fn replaced(
    tx: &mut Tx<'_>,
    project: &str,
    target: u64,
    seals: &[Seal],
) -> Result<(Replaced, Entry)> {
    let t = tx
        .correction_target(project, target)?
        .map_err(|e| Error::field("seq", &target.to_string(), e))?;
    if let Some(first) = late_replaces(&t) {
        return Err(Error::field(
            "seq",
            &target.to_string(),
            format!(
                "is a late difference against seq {first}; correct seq {first} again with --late"
            ),
        ));
    }
    let counted = if seals.is_empty() {
        t.mass
    } else {
        tx.late_counted(&t)?
    };
    Ok((
        Replaced {
            seq: target,
            period: t.period,
            counted,
        },
        t,
    ))
}

/// Where the project stands for its permit before `new`: cumulative stored from the chain tip's
/// running figures and, under an annual maximum, each year's injection summed in SQL.
pub(in crate::cli) fn standing(
    tx: &mut Tx<'_>,
    project: &Project,
    tally: Tally,
    new: &[Entry],
) -> Result<permit::Standing> {
    let mut injected = std::collections::BTreeMap::new();
    if project.permit_annual.is_some() {
        for year in permit::years(new) {
            injected.insert(year, tx.injected_in_year(&project.code, year)?);
        }
    }
    Ok(permit::Standing {
        stored: Mass::from_grams(tally.stored),
        injected,
    })
}
