//! The records that are not metered: a production's entrained fraction aside, a calibration,
//! a survey and a reversal are dated facts with their own options.

use super::{
    CalibrationArgs, ProductionArgs, ReadingArgs, RecordArgs, ReversalArgs, SurveyArgs,
    SurveyResult, commit, draft, metered_commit,
};
use crate::cli::{Context, inputs};
use crate::error::{Error, Result};
use crate::ledger::dated_fact;
use crate::ledger::{EntryKind, Period, Reading};
use crate::quantity::Mass;
use crate::quantity::fraction::parse_uncertainty;
use crate::report::Report;

/// A production, its entrained fraction checked to lie in [0, 1).
pub(super) fn production(ctx: &Context, a: &ProductionArgs) -> Result<Report> {
    let x = dated_fact::entrained_fraction(&a.entrained_fraction).ok_or_else(|| {
        Error::field(
            "--entrained-fraction",
            &a.entrained_fraction,
            "must be a number in [0, 1)",
        )
    })?;
    let extra = [("entrained_fraction", x.to_string())];
    metered_commit(ctx, EntryKind::Production, &a.base, &extra, false)
}

/// A dated fact's options as a record's: its key, meter and note; no quantity, no days.
fn options(
    project: String,
    site: String,
    key: Option<String>,
    meter: Option<String>,
    note: Option<String>,
) -> RecordArgs {
    let reading = ReadingArgs {
        key,
        meter,
        note,
        ..Default::default()
    };
    RecordArgs {
        project,
        site,
        reading,
    }
}

/// A dated fact of `kind` on `day`, appended under its key.
fn dated(
    ctx: &Context,
    kind: EntryKind,
    b: RecordArgs,
    (reading, mass): (Reading, Mass),
    day: chrono::NaiveDate,
    reason: Option<String>,
) -> Result<Report> {
    let mut e = draft(kind, &b, reading, mass, Period::day(day), ctx)?;
    e.reason = reason;
    commit(ctx, e, b.reading.key, false)
}

/// A meter's calibration on a day, with the uncertainty it was found to have.
pub(super) fn calibration(ctx: &Context, a: CalibrationArgs) -> Result<Report> {
    let d = inputs::activity_date("--date", &a.date, ctx.now.date_naive())?;
    let u = parse_uncertainty(&a.uncertainty)
        .map_err(|e| Error::field("--uncertainty", &a.uncertainty, e))?;
    let b = options(a.project, a.site, a.key, a.meter, a.note);
    let fact = (dated_fact::calibration(u), Mass::ZERO);
    dated(ctx, EntryKind::Calibration, b, fact, d, None)
}

/// CO2 lost after it was counted stored, where (a site, a pathway or both) and why.
pub(super) fn reversal(ctx: &Context, a: ReversalArgs) -> Result<Report> {
    let d = inputs::activity_date("--date", &a.date, ctx.now.date_naive())?;
    inputs::text("--reason", &a.reason)?;
    let (m, mass) = inputs::mass("--mass", &a.mass)?;
    inputs::optional_text("--pathway", &a.pathway)?;
    let reading = dated_fact::reversal(&m, a.site.as_deref(), a.pathway.as_deref()).map_err(
        |dated_fact::NoPlace| {
            Error::options(
                "--site",
                "say where the CO2 was lost: --site, --pathway or both",
            )
        },
    )?;
    let b = options(a.project, a.site.unwrap_or_default(), a.key, None, None);
    dated(
        ctx,
        EntryKind::Reversal,
        b,
        (reading, mass),
        d,
        Some(a.reason),
    )
}

/// A leak survey of a site on a day, and what it found.
pub(super) fn survey(ctx: &Context, a: SurveyArgs) -> Result<Report> {
    let d = inputs::activity_date("--date", &a.date, ctx.now.date_naive())?;
    inputs::optional_text("--pathway", &a.pathway)?;
    let no_leak = a.result == SurveyResult::NoLeak;
    let fact = (
        dated_fact::survey(no_leak, a.pathway.as_deref()),
        Mass::ZERO,
    );
    let b = options(a.project, a.site, a.key, None, a.note);
    dated(ctx, EntryKind::Survey, b, fact, d, None)
}
