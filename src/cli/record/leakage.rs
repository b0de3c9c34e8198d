//! `record leakage`: a metered or rated leak, backdated to the last clean survey when its start
//! is unknown.

use super::{LeakageArgs, RecordArgs, commit_with, draft, required};
use crate::accounting::leak_start::{LeakBounds, StartError, Surveyed};
use crate::accounting::leakage;
use crate::cli::setup::known_project;
use crate::cli::{Context, inputs};
use crate::error::{Error, Result};
use crate::ledger::{EntryKind, Period, Reading};
use crate::quantity::Mass;
use crate::report::Report;
use crate::store::Tx;
use chrono::NaiveDate;

/// A leak event: a metered mass, or a rate over its days; with an unknown start, backdated to
/// the last survey of the site that found no leak (Regulation (EU) 2018/2066 Annex IV §23 B.3).
pub(super) fn leakage_record(ctx: &Context, a: LeakageArgs) -> Result<Report> {
    inputs::text("--pathway", &a.pathway)?;
    let b = &RecordArgs {
        project: a.project.clone(),
        site: a.site.clone().unwrap_or_default(),
        reading: a.reading.clone(),
    };
    let to = inputs::activity_date(
        "--to",
        required(&b.reading.to, "--to")?,
        ctx.now.date_naive(),
    )?;
    if a.rate.is_some() && b.reading.quantity.is_given() {
        return Err(Error::options(
            "--rate",
            "give --rate or a quantity (--mass/--volume), not both",
        ));
    }
    let given_from = match (&b.reading.from, a.since_last_survey) {
        (Some(_), true) => {
            return Err(Error::options(
                "--from",
                "give --from or --since-last-survey, not both",
            ));
        }
        (Some(f), false) => Some(inputs::activity_date("--from", f, ctx.now.date_naive())?),
        (None, true) => None,
        (None, false) => {
            return Err(Error::options(
                "--from",
                "--from is required (or --since-last-survey)",
            ));
        }
    };
    // The last survey is read in the transaction that appends, so the start it gives is the
    // one the ledger holds when the leak is written.
    commit_with(ctx, b.reading.key.clone(), false, |tx| {
        let mut extra: Vec<(&str, String)> = vec![("pathway", a.pathway.clone())];
        let from = match given_from {
            Some(from) => from,
            None => {
                let start = since_last_survey(tx, &a, to)?;
                extra.push((start.field(), start.day().to_string()));
                start.day()
            }
        };
        let period = Period::new(from, to).map_err(|e| Error::field("--to", &to.to_string(), e))?;
        let (mut reading, mass) = leak_quantity(&a, b, period)?;
        for (n, v) in extra {
            reading.push(n, v);
        }
        draft(EntryKind::Leakage, b, reading, mass, period, ctx)
    })
}

/// `--since-last-survey`: the day an unknown leak is taken to start from, read in `tx`.
fn since_last_survey(
    tx: &mut Tx<'_>,
    a: &LeakageArgs,
    to: NaiveDate,
) -> Result<leakage::LeakStart> {
    let surveyed = match &a.site {
        Some(site) => Surveyed::Site(site),
        None => Surveyed::Pathway(&a.pathway),
    };
    known_project(tx, &a.project)?;
    let mut bounds = LeakBounds::new(surveyed, to);
    tx.for_each_effective_entry(&a.project, None, |s| {
        bounds.add(&s.entry);
        Ok(())
    })?;
    bounds.start().map_err(|e| match e {
        StartError::Unbounded => Error::field(
            "--since-last-survey",
            surveyed.name(),
            format!(
                "no survey of this {} up to {to} found no leak and no injection is recorded: give --from",
                surveyed.what()
            ),
        ),
        StartError::AfterEnd { began } => Error::field(
            "--to",
            &to.to_string(),
            format!("injection began on {began}: a leak of what was stored cannot end before it"),
        ),
    })
}

/// A leak's reading and grams: from `--rate` over the period's days, or a measured quantity.
fn leak_quantity(a: &LeakageArgs, b: &RecordArgs, period: Period) -> Result<(Reading, Mass)> {
    let Some(rate) = &a.rate else {
        let m = b.reading.quantity.measure()?;
        return Ok((m.reading, m.mass));
    };
    leakage::rated(rate, period).map_err(|e| Error::field("--rate", rate, e))
}
