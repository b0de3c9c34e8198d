//! `meters`: for each meter and quarter of a year, the quantity read, its CO2 concentration,
//! the meter type and how it was converted — the per-meter figures a report files.

use super::Context;
use super::setup::known_project;
use crate::accounting::meter_quarters::{self, MeterQuarters};
use crate::error::{Error, Result};
use crate::import::overlap::HandCorrection;
use crate::ledger::bounds::reporting_year;
use crate::report::Report;
use crate::store::Tx;
use clap::Args;

#[derive(Debug, Args)]
pub struct MetersArgs {
    /// Project code (e.g. TFS)
    pub project: String,
    /// The reporting year
    #[arg(long)]
    pub year: i32,
}

pub fn meters(ctx: &Context, a: MetersArgs) -> Result<Report> {
    reporting_year(a.year).map_err(|e| Error::field("--year", &a.year.to_string(), e))?;
    ctx.open()?.read(|tx| meters_in(tx, &a))
}

/// The meters table of a year, read inside the caller's transaction.
pub fn meters_in(tx: &mut Tx<'_>, a: &MetersArgs) -> Result<Report> {
    // A row is one meter's quarter in one unit and one basis, so no cell mixes unlike figures.
    let mut rows = MeterQuarters::new();
    known_project(tx, &a.project)?;
    let mut by_hand = Vec::new();
    tx.for_each_effective_entry(&a.project, None, |s| {
        if HandCorrection::candidate(&s.entry) {
            by_hand.push(s.entry.clone());
        }
        meter_quarters::add(&mut rows, &s.entry, a.year)?;
        Ok(())
    })?;
    let mut hand = Vec::new();
    for e in by_hand {
        if let Some(imported) = tx.imported_origin(&a.project, &e)? {
            hand.push(HandCorrection::of(&e, &imported));
        }
    }
    Ok(crate::report::meters::report(
        &a.project, a.year, &rows, &hand,
    ))
}
