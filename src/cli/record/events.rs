//! The records that are not metered: a production's entrained fraction aside, a calibration,
//! a survey and a reversal are dated facts with their own options.

use super::{
    CalibrationArgs, ProductionArgs, ReadingArgs, RecordArgs, ReversalArgs, SurveyArgs,
    SurveyResult, draft, metered,
};
use crate::cli::{Context, inputs};
use crate::error::{Error, Result};
use crate::ledger::dated_fact;
use crate::ledger::{Entry, EntryKind, Period};
use crate::quantity::Mass;
use crate::quantity::fraction::parse_uncertainty;

/// A production, its entrained fraction checked to lie in [0, 1).
pub(super) fn production(a: &ProductionArgs, ctx: &Context) -> Result<Entry> {
    let x = dated_fact::entrained_fraction(&a.entrained_fraction).ok_or_else(|| {
        Error::field(
            "--entrained-fraction",
            &a.entrained_fraction,
            "must be a number in [0, 1)",
        )
    })?;
    let extra = [("entrained_fraction", x.to_string())];
    metered(EntryKind::Production, &a.base, &extra, ctx)
}

/// A meter's calibration on a day, with the uncertainty it was found to have.
pub(super) fn calibration(a: CalibrationArgs, ctx: &Context) -> Result<Entry> {
    let d = inputs::activity_date("--date", &a.date, ctx.now.date_naive())?;
    let u = parse_uncertainty(&a.uncertainty)
        .map_err(|e| Error::field("--uncertainty", &a.uncertainty, e))?;
    let reading = dated_fact::calibration(u);
    let b = RecordArgs {
        project: a.project,
        site: a.site,
        reading: ReadingArgs {
            key: a.key.clone(),
            meter: a.meter,
            note: a.note,
            ..Default::default()
        },
    };
    draft(
        EntryKind::Calibration,
        &b,
        reading,
        Mass::ZERO,
        Period::day(d),
        ctx,
    )
}

/// CO2 lost after it was counted stored, where (a site, a pathway or both) and why.
pub(super) fn reversal(a: ReversalArgs, ctx: &Context) -> Result<Entry> {
    let d = inputs::activity_date("--date", &a.date, ctx.now.date_naive())?;
    inputs::text("--reason", &a.reason)?;
    let (m, mass) = inputs::mass("--mass", &a.mass)?;
    if let Some(p) = &a.pathway {
        inputs::text("--pathway", p)?;
    }
    let reading = dated_fact::reversal(&m, a.site.as_deref(), a.pathway.as_deref()).map_err(
        |dated_fact::NoPlace| {
            Error::options(
                "--site",
                "say where the CO2 was lost: --site, --pathway or both",
            )
        },
    )?;
    let b = RecordArgs {
        project: a.project,
        site: a.site.unwrap_or_default(),
        reading: ReadingArgs {
            key: a.key.clone(),
            ..Default::default()
        },
    };
    let mut e = draft(EntryKind::Reversal, &b, reading, mass, Period::day(d), ctx)?;
    e.reason = Some(a.reason);
    Ok(e)
}

/// A leak survey of a site on a day, and what it found.
pub(super) fn survey(a: SurveyArgs, ctx: &Context) -> Result<Entry> {
    let d = inputs::activity_date("--date", &a.date, ctx.now.date_naive())?;
    if let Some(p) = &a.pathway {
        inputs::text("--pathway", p)?;
    }
    let no_leak = a.result == SurveyResult::NoLeak;
    let reading = dated_fact::survey(no_leak, a.pathway.as_deref());
    let b = RecordArgs {
        project: a.project,
        site: a.site,
        reading: ReadingArgs {
            key: a.key.clone(),
            note: a.note,
            ..Default::default()
        },
    };
    draft(
        EntryKind::Survey,
        &b,
        reading,
        Mass::ZERO,
        Period::day(d),
        ctx,
    )
}
