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

fn optional_text(field: &str, v: &Option<String>) -> Result<()> {
    v.as_deref().map_or(Ok(()), |t| inputs::text(field, t))
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
    optional_text("--key", &b.reading.key)?;
    optional_text("--meter", &b.reading.meter)?;
    optional_text("--note", &b.reading.note)?;
    Ok(Entry {
        project: b.project.clone(),
        seq: 0,
        kind,
        site: b.site.clone(),
        period,
        reading,
        mass,
        sign: kind.sign(),
        recorded_at: ctx.now,
        key: String::new(),
        meter: b.reading.meter.clone(),
        note: b.reading.note.clone(),
        corrects: None,
        reason: None,
        evidence: None,
        recorded_by: None,
    })
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
    let (entry, key, over_permit) = match c {
        RecordCommand::Receipt(b) => (
            metered(EntryKind::Receipt, &b, &[], ctx)?,
            b.reading.key,
            false,
        ),
        RecordCommand::Redelivery(b) => (
            metered(EntryKind::Redelivery, &b, &[], ctx)?,
            b.reading.key,
            false,
        ),
        RecordCommand::Injection(a) => (
            metered(EntryKind::Injection, &a.base, &[], ctx)?,
            a.base.reading.key,
            a.over_permit,
        ),
        RecordCommand::Production(a) => (production(&a, ctx)?, a.base.reading.key, false),
        RecordCommand::EquipmentLeak(a) => {
            let side = match a.side {
                Side::Injection => "injection",
                Side::Production => "production",
            };
            (
                metered(
                    EntryKind::EquipmentLeak,
                    &a.base,
                    &[("side", side.into())],
                    ctx,
                )?,
                a.base.reading.key,
                false,
            )
        }
        RecordCommand::Emission(a) if a.inventory.is_given() => {
            return super::emission_inventory::emission(ctx, a);
        }
        RecordCommand::Emission(a) => {
            let cat = format!("{:?}", a.category.unwrap_or(Category::Energy)).to_lowercase();
            (
                metered(EntryKind::Emission, &a.base, &[("category", cat)], ctx)?,
                a.base.reading.key,
                false,
            )
        }
        RecordCommand::Leakage(a) => return leakage_record(ctx, a),
        RecordCommand::Calibration(a) => {
            let key = a.key.clone();
            (calibration(a, ctx)?, key, false)
        }
        RecordCommand::Reversal(a) => {
            let key = a.key.clone();
            (reversal(a, ctx)?, key, false)
        }
        RecordCommand::Survey(a) => {
            let key = a.key.clone();
            (survey(a, ctx)?, key, false)
        }
        RecordCommand::TracerSample(a) => return super::record_rock::tracer_sample(ctx, a),
        RecordCommand::Carbonation(a) => return super::record_rock::carbonation(ctx, a),
        RecordCommand::Application(a) => return super::record_rock::application(ctx, a),
        RecordCommand::SoilSample(a) => return super::record_rock::soil_sample(ctx, a),
    };
    commit(ctx, entry, key, over_permit)
}
