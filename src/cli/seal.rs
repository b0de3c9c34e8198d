//! `seal`: close a reporting period with the RFC 6962 tree head over every entry of the project
//! before it, and the period's stored, conservative and claimable figures as reported.

use super::Context;
use super::view::load_seeing;
use crate::error::{Error, Result};
use crate::ledger::merkle::TreeBuilder;
use crate::ledger::seal::{Seal, check_new, parse_period};
use crate::ledger::{Period, SealedEntry};
use crate::report::Report;
use crate::report::tables::seal::{seal_table, sealed_line};
use crate::store::Tx;
use clap::Args;

#[derive(Debug, Args)]
pub struct SealArgs {
    /// Project code (e.g. TFS)
    pub project: String,
    /// The reporting period to close: a year (2026), a quarter (2026-Q1) or a month (2026-03)
    #[arg(long, value_name = "PERIOD")]
    pub period: String,
}

pub fn seal(ctx: &Context, a: SealArgs) -> Result<Report> {
    let (label, period) =
        parse_period(&a.period).map_err(|e| Error::field("--period", &a.period, e))?;
    let (seal, entry) = ctx
        .open()?
        .write(|tx| record_seal(tx, ctx, &a.project, &label, period))?;
    Ok(Report::default()
        .line(sealed_line(&a.project, &seal))
        .table(seal_table(&a.project, &[(seal, entry)])))
}

/// Appends the seal of `period` to the project's chain, inside the caller's write transaction.
pub fn record_seal(
    tx: &mut Tx<'_>,
    ctx: &Context,
    project: &str,
    label: &str,
    period: Period,
) -> Result<(Seal, SealedEntry)> {
    let seals = tx.seals(project)?;
    check_new(&seals, period).map_err(|e| Error::field("--period", label, e))?;
    // One walk of the chain gives the figures and the tree over every leaf.
    let mut tree = TreeBuilder::default();
    let view = load_seeing(tx, project, None, None, |s| tree.push(s.leaf))?;
    tx.append_seal(project, |seq| {
        Ok(Seal {
            seq,
            label: label.to_string(),
            period,
            tree_size: tree.size(),
            root: tree.root(),
            figures: view.seal_figures(label, period)?,
            recorded_at: ctx.now,
        })
    })
}
