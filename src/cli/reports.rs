//! `entries` and `balance`: what the ledger holds, and what it adds up to.

use super::Context;
use super::claims::deduction_rule;
use super::dates::{DateArgs, Dates};
use super::setup::known_project;
use crate::accounting::balance::BalanceMethod;
use crate::accounting::project_view::ProjectFigures;
use crate::error::Result;
use crate::ledger::SealedEntry;
use crate::ledger::period::Grouping;
use crate::report::tables::balance::balance as route_balance;
use crate::report::tables::entries::Listing;
use crate::report::tables::late::late_of;
use crate::report::{Format, Report};
use clap::{Args, ValueEnum};

#[derive(Debug, Args)]
pub struct EntriesArgs {
    /// Project code (e.g. TFS)
    pub project: String,
    /// List from this seq on [default: 0]
    #[arg(long, value_name = "SEQ")]
    pub from_seq: Option<u64>,
    /// List at most this many entries [default: every one as JSON or CSV; a page of 10,000 in
    /// a table]
    #[arg(long, value_name = "N")]
    pub limit: Option<u64>,
}

/// Every entry of a project, each checked as it is read. JSON and CSV are written to standard
/// output row by row as the chain is read (memory stays flat); a table holds one page.
pub fn entries(ctx: &Context, a: EntriesArgs, format: Format) -> Result<Report> {
    let from = a.from_seq.unwrap_or(0);
    let mut listing = Listing::new(format, &a.project, from, a.limit);
    let total = walk_entries(ctx, &a.project, |s, by| listing.push(s, by))?;
    listing.finish(total)
}

/// Walks the project's chain, checking every entry, with a bar for a long one; hands `f` each
/// entry and the seq that corrects it. Returns the chain's length.
fn walk_entries(
    ctx: &Context,
    project: &str,
    mut f: impl FnMut(&SealedEntry, Option<u64>) -> Result<()>,
) -> Result<u64> {
    ctx.open()?.read(|tx| {
        known_project(tx, project)?;
        // The bar's length only: a tip that does not read back is the walk's to name.
        let length = tx.chain_tip(project).map_or(0, |(next, _)| next);
        let bar = super::progress::entries("listing entries", length);
        let c = tx.walk_chain(project, None, |row| {
            bar.inc(1);
            f(row.sealed, row.replaced_by)
        })?;
        bar.finish_and_clear();
        Ok(c.entries)
    })
}

/// Calendar grouping of `--by`.
#[derive(Debug, Clone, Copy, ValueEnum)]
pub enum By {
    Month,
    Quarter,
    Year,
}

#[derive(Debug, Args)]
pub struct BalanceArgs {
    /// Project code (e.g. TFS)
    pub project: String,
    /// Length of each period (one row each)
    #[arg(long, value_enum, default_value_t = By::Quarter)]
    pub by: By,
    /// rr: 40 CFR 98.443 (RR-11/RR-12); iso27916: the CO2-EOR form, recycled CO2 counted once
    #[arg(long, value_enum, default_value_t = BalanceMethod::Rr)]
    pub method: BalanceMethod,
    /// Deduct only the share of the uncertainty above this threshold (e.g. 5%) [default: deduct
    /// the whole uncertainty]
    #[arg(long, value_name = "SHARE")]
    pub deduct_excess_over: Option<String>,
    #[command(flatten)]
    pub dates: DateArgs,
}

pub fn balance(ctx: &Context, a: BalanceArgs) -> Result<Report> {
    let dates = a.dates.read()?;
    let figures = ctx.open()?.read(|tx| dates.load(tx, &a.project))?;
    balance_of(&figures, &a, &dates)
}

/// The balance report of figures already loaded at `dates`, by route.
pub fn balance_of(figures: &ProjectFigures, a: &BalanceArgs, dates: &Dates) -> Result<Report> {
    let deduction = || deduction_rule(a.deduct_excess_over.as_deref());
    let mut report = route_balance(figures, Grouping::from(a.by), a.method, deduction)?;
    if let Some(t) = report.tables.first_mut() {
        dates.mark(t, "it");
    }
    Ok(report.table_if(late_of([figures])))
}
