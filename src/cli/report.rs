//! `report`: a project's year as one printable HTML page, put together from the tables the
//! other commands print (project, balance, leakage, claims, buffer pool, meters, recorded
//! reconciliations) — the page states no figure of its own. Every section is read in the
//! command's one transaction, so the page shows one state of the ledger.

use super::Context;
use super::dates::Dates;
use super::meters::{MetersArgs, meters_in};
use super::reports::{BalanceArgs, By, balance_of};
use super::view::load;
use crate::accounting::balance::BalanceMethod;
use crate::accounting::project_view::ProjectFigures;
use crate::error::{Error, Result};
use crate::ledger::Method;
use crate::ledger::bounds::reporting_year;
use crate::report::Report;
use crate::report::html::{Section, page};
use crate::report::tables::annual::{Parts, Sealed, annual_page, annual_sections, written_table};
use crate::store::Tx;
use clap::Args;
use std::path::PathBuf;

#[derive(Debug, Args)]
pub struct ReportArgs {
    /// Project code (e.g. TFS)
    pub project: String,
    /// The reporting year
    #[arg(long)]
    pub year: i32,
    /// The HTML file to write
    #[arg(long)]
    pub out: PathBuf,
}

/// The balance by quarter, as `balance CODE --method M` prints it now.
fn balance_report(view: &ProjectFigures, method: BalanceMethod) -> Result<Report> {
    let args = BalanceArgs {
        project: view.project().code.clone(),
        by: By::Quarter,
        method,
        deduct_excess_over: None,
        dates: Default::default(),
    };
    let now = Dates {
        as_of: None,
        through: None,
    };
    balance_of(view, &args, &now)
}

/// The sections of the page, in reading order, read inside the command's transaction.
fn sections(
    tx: &mut Tx<'_>,
    ctx: &Context,
    a: &ReportArgs,
    view: &ProjectFigures,
) -> Result<Vec<Section>> {
    let code = &view.project().code;
    let sealed = Sealed {
        seals: tx.seals_with_entries(code)?,
        statements: tx.judged_statements(code)?,
    };
    let recorded = tx.reconciliations(code)?;
    let (sites, settings) = (tx.sites(code)?, tx.settings(code)?);
    let mut balances = vec![balance_report(view, BalanceMethod::Rr)?];
    if view.project().method == Method::Eor {
        balances.push(balance_report(view, BalanceMethod::Iso27916)?);
    }
    let meters = MetersArgs {
        project: code.clone(),
        year: a.year,
    };
    let parts = Parts {
        view,
        sites,
        settings,
        balances,
        meters: meters_in(tx, &meters)?,
        recorded,
        sealed,
    };
    annual_sections(parts, a.year, ctx.now)
}

pub fn report(ctx: &Context, a: ReportArgs) -> Result<Report> {
    reporting_year(a.year).map_err(|e| Error::field("--year", &a.year.to_string(), e))?;
    let (project, tip, sections) = ctx.open()?.read(|tx| {
        let view = load(tx, &a.project, None)?;
        let tip = tx.chain_tip(&a.project)?;
        let sections = sections(tx, ctx, &a, &view)?;
        Ok((view.project().clone(), tip, sections))
    })?;
    let page_doc = annual_page(&project, a.year, ctx.now, tip, sections);
    let html = page(&page_doc);
    let out = a.out.display().to_string();
    std::fs::write(&a.out, &html).map_err(|e| Error::field("--out", &out, e))?;
    Ok(Report::default().table(written_table(&out, &page_doc, html.len())))
}
