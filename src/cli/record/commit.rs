//! The append every record makes: the entry drafted and appended in one write transaction by
//! the ledger's admission rules, their refusals said in the options' words, and the table of
//! what was recorded.

use crate::accounting::permit;
use crate::cli::setup::unknown_project;
use crate::cli::{Context, inputs};
use crate::error::{Error, Result};
use crate::ledger::admission::{AdmitError, TargetError, admit};
use crate::ledger::append::{AppendError, Appended, content_key};
use crate::ledger::seal::{Replaced, Seal};
use crate::ledger::tally::Tally;
use crate::ledger::{Entry, Project};
use crate::quantity::Mass;
use crate::report::Report;
use crate::report::tables::record::appended_report;
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
        let refused = |e| admit_refusal(&entry, e);
        let reads = tx.append_reads(&entry)?.map_err(refused)?;
        let outcome =
            admit(entry.clone(), &reads, ctx.late, ctx.now.date_naive()).map_err(refused)?;
        let mut warnings = Vec::new();
        if let Appended::New(s) = &outcome {
            if permit::bears_on(s.entry.kind) {
                let new = std::slice::from_ref(&s.entry);
                let standing = standing(tx, &reads.project, reads.tally, new)?;
                let gone = reads.replaced_for(&s.entry);
                warnings =
                    crate::cli::permit_check(&reads.project, &standing, new, &gone, over_permit)?;
            }
            tx.append(std::slice::from_ref(s))?;
        }
        Ok((outcome, warnings))
    })?;
    let mut report = appended_report(&outcome);
    report.warnings = warnings;
    Ok(report)
}

/// An admission's refusal of `entry`, named by the option the refused value came from.
fn admit_refusal(entry: &Entry, e: AdmitError) -> Error {
    match e {
        AdmitError::NoProject(code) => unknown_project(&code),
        AdmitError::NoSuchSite { project, site } => Error::field(
            "--site",
            &site,
            format!("is not a site of project {project}"),
        ),
        AdmitError::Target(e) => target_refusal(e),
        AdmitError::Limit(e) => {
            let mass = entry.mass.to_string();
            Error::field("--mass", entry.reading.text("mass").unwrap_or(&mass), e)
        }
        AdmitError::Append(e) => match e {
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
        },
    }
}

/// A correction's target refused, named by its seq.
fn target_refusal(e: TargetError) -> Error {
    match e {
        TargetError::Uncorrectable { seq, why } => Error::field("seq", &seq.to_string(), why),
        TargetError::LateDifference { seq, first } => Error::field(
            "seq",
            &seq.to_string(),
            format!(
                "is a late difference against seq {first}; correct seq {first} again with --late"
            ),
        ),
    }
}

/// What a correction of `target` replaces (see [`Tx::replaced`]), with the entry it names.
pub(in crate::cli) fn replaced(
    tx: &mut Tx<'_>,
    project: &str,
    target: u64,
    seals: &[Seal],
) -> Result<(Replaced, Entry)> {
    tx.replaced(project, target, seals)?.map_err(target_refusal)
}

/// Where the project stands for its permit before `new`: cumulative stored from the chain tip's
/// running figures and, under an annual maximum, each year's injection summed in SQL.
pub(in crate::cli) fn standing(
    tx: &mut Tx<'_>,
    project: &Project,
    tally: Tally,
    new: &[Entry],
) -> Result<permit::Standing> {
    let years = match project.permit_annual {
        Some(_) => permit::years(new),
        None => Default::default(),
    };
    Ok(permit::Standing {
        stored: Mass::from_grams(tally.stored),
        injected: tx.injected_in_years(&project.code, years)?,
    })
}
