//! `meters`: for each meter and quarter of a year, the quantity read, its CO2 concentration,
//! the meter type and how it was converted — the per-meter figures a report files.

use super::Context;
use super::setup::known_project;
use crate::accounting::meter_quarters::{self, MeterQuarters};
use crate::error::{Error, Result};
use crate::import::overlap::HandCorrection;
use crate::ledger::Entry;
use crate::report::Report;
use crate::store::Tx;
use chrono::Datelike;
use clap::Args;

#[derive(Debug, Args)]
pub struct MetersArgs {
    /// Project code (e.g. TFS)
    pub project: String,
    /// The reporting year
    #[arg(long)]
    pub year: i32,
}

/// The effective entries that correct an imported meter-day by hand (`by_hand`: those
/// without a file that correct something), each line walked back by seq to the entry that
/// came from a file.
fn hand_corrections(
    tx: &mut Tx<'_>,
    project: &str,
    by_hand: Vec<Entry>,
) -> Result<Vec<HandCorrection>> {
    let mut found = Vec::new();
    for e in by_hand {
        let mut at = e.corrects;
        while let Some(seq) = at {
            let Some(t) = tx.entry_at(project, seq)? else {
                break;
            };
            if let Some(ev) = &t.entry.evidence {
                found.push(HandCorrection {
                    seq: e.seq,
                    meter: e.meter.clone().unwrap_or_default(),
                    day: e.period.from,
                    imported_seq: t.entry.seq,
                    file: ev.file_name.clone(),
                });
                break;
            }
            at = t.entry.corrects;
        }
    }
    Ok(found)
}

pub fn meters(ctx: &Context, a: MetersArgs) -> Result<Report> {
    if !(1900..=9999).contains(&a.year) {
        return Err(Error::field(
            "--year",
            &a.year.to_string(),
            "is not a plausible reporting year",
        ));
    }
    ctx.open()?.read(|tx| meters_in(tx, &a))
}

/// The meters table of a year, read inside the caller's transaction.
pub fn meters_in(tx: &mut Tx<'_>, a: &MetersArgs) -> Result<Report> {
    // A row is one meter's quarter in one unit and one basis, so no cell mixes unlike figures.
    let mut rows = MeterQuarters::new();
    known_project(tx, &a.project)?;
    let mut by_hand = Vec::new();
    tx.for_each_effective_entry(&a.project, None, |s| {
        let e = &s.entry;
        if e.evidence.is_none() && e.corrects.is_some() {
            by_hand.push(e.clone());
        }
        meter_quarters::add(&mut rows, e, a.year)?;
        Ok(())
    })?;
    let hand = hand_corrections(tx, &a.project, by_hand)?;
    let t = crate::report::meters::table(&a.project, a.year, &rows);
    let mut report = Report::default().table(t);
    report.warnings = hand
        .into_iter()
        .filter(|h| h.day.year() == a.year)
        .map(|h| h.to_string())
        .collect();
    Ok(report)
}
