//! `record` and `correct`: readings become entries, sealed onto the project's chain.

mod args;
mod commit;
mod correct;
mod events;
mod leakage;

pub use args::*;
pub(super) use commit::{commit, commit_with, replaced, standing};
pub use correct::{CorrectArgs, correct};

use super::{Context, inputs};
use crate::error::{Error, Result};
use crate::ledger::{Entry, EntryKind, Period, Reading};
use crate::quantity::Mass;
use crate::report::Report;
use chrono::NaiveDate;
use events::{calibration, production, reversal, survey};
use leakage::leakage_record;

/// The period of an activity, both ends within the window of activity dates (up to `today`).
pub(super) fn period(from: &str, to: &str, today: NaiveDate) -> Result<Period> {
    let f = inputs::activity_date("--from", from, today)?;
    let t = inputs::activity_date("--to", to, today)?;
    Period::new(f, t).map_err(|e| Error::field("--to", to, e))
}

pub(super) fn required<'a>(v: &'a Option<String>, field: &str) -> Result<&'a str> {
    v.as_deref()
        .ok_or_else(|| Error::options(field, format!("{field} is required (ISO 8601 date)")))
}

/// An entry before its seq, key and time are set.
pub(super) fn draft(
    kind: EntryKind,
    b: &RecordArgs,
    reading: Reading,
    mass: Mass,
    period: Period,
    ctx: &Context,
) -> Result<Entry> {
    inputs::optional_text("--key", &b.reading.key)?;
    inputs::optional_text("--meter", &b.reading.meter)?;
    inputs::optional_text("--note", &b.reading.note)?;
    let (project, site) = (b.project.clone(), b.site.clone());
    let mut e = Entry::draft(kind, project, site, period, reading, mass, ctx.now);
    e.meter = b.reading.meter.clone();
    e.note = b.reading.note.clone();
    Ok(e)
}

pub(super) fn metered(
    kind: EntryKind,
    b: &RecordArgs,
    extra: &[(&str, String)],
    ctx: &Context,
) -> Result<Entry> {
    let m = b.reading.quantity.measure()?;
    let mut reading = m.reading;
    for (n, v) in extra {
        reading.push(n, v.clone());
    }
    let p = period(
        required(&b.reading.from, "--from")?,
        required(&b.reading.to, "--to")?,
        ctx.now.date_naive(),
    )?;
    draft(kind, b, reading, m.mass, p, ctx)
}

pub fn record(ctx: &Context, c: RecordCommand) -> Result<Report> {
    match c {
        RecordCommand::Receipt(b) => metered_commit(ctx, EntryKind::Receipt, &b, &[], false),
        RecordCommand::Redelivery(b) => metered_commit(ctx, EntryKind::Redelivery, &b, &[], false),
        RecordCommand::Injection(a) => {
            metered_commit(ctx, EntryKind::Injection, &a.base, &[], a.over_permit)
        }
        RecordCommand::Production(a) => production(ctx, &a),
        RecordCommand::EquipmentLeak(a) => {
            let side = [("side", value_name(&a.side))];
            metered_commit(ctx, EntryKind::EquipmentLeak, &a.base, &side, false)
        }
        RecordCommand::Emission(a) if a.inventory.is_given() => {
            super::emission_inventory::emission(ctx, a)
        }
        RecordCommand::Emission(a) => {
            let category = [(
                "category",
                value_name(&a.category.unwrap_or(Category::Energy)),
            )];
            metered_commit(ctx, EntryKind::Emission, &a.base, &category, false)
        }
        RecordCommand::Leakage(a) => leakage_record(ctx, a),
        RecordCommand::Calibration(a) => calibration(ctx, a),
        RecordCommand::Reversal(a) => reversal(ctx, a),
        RecordCommand::Survey(a) => survey(ctx, a),
        RecordCommand::TracerSample(a) => super::record_rock::tracer_sample(ctx, a),
        RecordCommand::Carbonation(a) => super::record_rock::carbonation(ctx, a),
        RecordCommand::Application(a) => super::record_rock::application(ctx, a),
        RecordCommand::SoilSample(a) => super::record_rock::soil_sample(ctx, a),
    }
}

/// A metered record appended under its own key.
fn metered_commit(
    ctx: &Context,
    kind: EntryKind,
    b: &RecordArgs,
    extra: &[(&str, String)],
    over_permit: bool,
) -> Result<Report> {
    let entry = metered(kind, b, extra, ctx)?;
    commit(ctx, entry, b.reading.key.clone(), over_permit)
}

/// How a value of an enumerated option is spelled on the command line (and in the reading).
fn value_name(v: &impl clap::ValueEnum) -> String {
    v.to_possible_value()
        .map_or_else(String::new, |p| p.get_name().to_string())
}
