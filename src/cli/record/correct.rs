//! `correct`: a new entry that replaces one, restating its quantity or period and keeping what
//! belongs to its kind.

use super::{QuantityArgs, commit_with, period, value_name};
use crate::accounting::restatement::{Given, RestateError, Restated, restate};
use crate::cli::Context;
use crate::cli::inputs::{self, restated_option};
use crate::cli::setup::known_project;
use crate::error::{Error, Result};
use crate::ledger::Entry;
use crate::ledger::correction::{Restating, correction};
use crate::report::Report;
use clap::Args;

#[derive(Debug, Clone, Args)]
pub struct CorrectArgs {
    /// Project code (e.g. TFS)
    pub project: String,
    /// The seq of the entry to replace
    pub seq: u64,
    /// Why the entry is corrected
    #[arg(long)]
    pub reason: String,
    /// Any option left out keeps the corrected entry's value
    #[command(flatten)]
    pub quantity: QuantityArgs,
    /// The site, when the corrected entry named the wrong one
    #[arg(long)]
    pub site: Option<String>,
    /// First day the corrected reading covers (ISO 8601 date)
    #[arg(long, value_name = "DATE")]
    pub from: Option<String>,
    /// Last day the corrected reading covers, included
    #[arg(long, value_name = "DATE")]
    pub to: Option<String>,
    /// Idempotency key of the correction [default: derived from the content]
    #[arg(long)]
    pub key: Option<String>,
    /// The meter's identifier, when the corrected entry named the wrong one
    #[arg(long, value_name = "ID")]
    pub meter: Option<String>,
    /// A note kept with the correction (free text)
    #[arg(long, value_name = "TEXT")]
    pub note: Option<String>,
    /// Record even though the correction takes the project past its permit
    #[arg(long)]
    pub over_permit: bool,
}

pub fn correct(ctx: &Context, a: CorrectArgs) -> Result<Report> {
    inputs::text("--reason", &a.reason)?;
    inputs::optional_text("--key", &a.key)?;
    inputs::optional_text("--meter", &a.meter)?;
    inputs::optional_text("--note", &a.note)?;
    let (key, over_permit) = (a.key.clone(), a.over_permit);
    commit_with(ctx, key, over_permit, |tx| {
        known_project(tx, &a.project)?;
        let target = tx
            .correction_target(&a.project, a.seq)?
            .map_err(|e| Error::field("seq", &a.seq.to_string(), e))?;
        corrected(ctx, a.clone(), target)
    })
}

/// The value given for `r`, as spelled on the command line.
fn given_text(a: &CorrectArgs, r: Restated) -> String {
    let q = &a.quantity;
    let text = match r {
        Restated::Mass => q.mass.clone(),
        Restated::Volume => q.volume.clone(),
        Restated::Co2Fraction => q.co2_fraction.clone(),
        Restated::Co2Basis => q.co2_basis.map(|b| value_name(&b)),
        Restated::Density => q.density.map(|d| value_name(&d)),
        Restated::Impurities => q.impurities.clone(),
        Restated::Uncertainty => q.uncertainty.clone(),
        Restated::Meter => a.meter.clone(),
    };
    text.unwrap_or_default()
}

/// A restatement's refusal, named by the option (or the seq) it is about.
fn refusal(a: &CorrectArgs, e: RestateError) -> Error {
    match e {
        RestateError::Foreign {
            given,
            kind,
            seq,
            allowed,
        } => Error::field(
            restated_option(given),
            &given_text(a, given),
            format!(
                "does not belong to a {kind} entry (seq {seq}); a {kind} correction takes {}",
                if allowed.is_empty() {
                    "none of the quantity options".to_string()
                } else {
                    allowed
                        .iter()
                        .map(|r| restated_option(*r))
                        .collect::<Vec<_>>()
                        .join(", ")
                }
            ),
        ),
        RestateError::NotMetered { kind, seq } => Error::field(
            "seq",
            &seq.to_string(),
            format!(
                "is a {kind} entry, not a metered quantity: record it again with --corrects {seq} --reason …"
            ),
        ),
        RestateError::NoQuantity => Error::field(
            "--co2-fraction",
            a.quantity.co2_fraction.as_deref().unwrap_or(""),
            "the corrected entry has no metered quantity to apply it to: give --mass or --volume",
        ),
        RestateError::Value { given, value, why } => {
            Error::field(restated_option(given), &value, why)
        }
        RestateError::Meter(e) => inputs::meter_error(e),
    }
}

/// The correction of `target` the options describe.
fn corrected(ctx: &Context, a: CorrectArgs, target: Entry) -> Result<Entry> {
    let given = Given {
        quantity: a.quantity.input(),
        meter: a.meter.as_deref(),
    };
    let (reading, mass) = restate(&target, &given).map_err(|e| refusal(&a, e))?;
    let from = a.from.unwrap_or_else(|| target.period.from.to_string());
    let to = a.to.unwrap_or_else(|| target.period.to.to_string());
    let period = period(&from, &to, ctx.now.date_naive())?;
    let r = Restating {
        site: a.site,
        meter: a.meter,
        note: a.note,
        reason: a.reason,
    };
    Ok(correction(target, period, (reading, mass), r, ctx.now))
}
