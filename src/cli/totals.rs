//! `totals`: the regulator's view across every project of the ledger — cumulative received,
//! injected, stored and claimable by route (geological, mineralized, weathering), conservative,
//! durable, buffer, reversed and permit headroom —
//! for activity through any date, as the ledger held it at the end of any date.

use super::Context;
use super::claims::deduction_rule;
use super::dates::DateArgs;
use crate::accounting::project_view::{AcrossError, across};
use crate::error::{Error, Result};
use crate::ledger::project_filter::{NoMatch, ProjectFilter};
use crate::report::Report;
use crate::report::tables::late::late_of;
use crate::report::totals::table;
use clap::Args;

#[derive(Debug, Args)]
pub struct TotalsArgs {
    /// Only the projects of this operator
    #[arg(long)]
    pub operator: Option<String>,
    /// Only projects of this method
    #[arg(long)]
    pub method: Option<String>,
    /// Only the project(s) under this permit reference
    #[arg(long)]
    pub permit: Option<String>,
    /// One line per project and year instead of one per project
    #[arg(long, value_enum)]
    pub by: Option<TotalsBy>,
    #[command(flatten)]
    pub dates: DateArgs,
    /// Deduct only the share of the uncertainty above this threshold
    #[arg(long, value_name = "SHARE")]
    pub deduct_excess_over: Option<String>,
}

#[derive(Debug, Clone, Copy, clap::ValueEnum)]
pub enum TotalsBy {
    Year,
}

pub fn totals(ctx: &Context, a: TotalsArgs) -> Result<Report> {
    let dates = a.dates.read()?;
    if let Some(m) = &a.method {
        super::inputs::method("--method", m)?;
    }
    let deduction = deduction_rule(a.deduct_excess_over.as_deref())?;
    let filter = ProjectFilter {
        operator: a.operator.as_deref(),
        method: a.method.as_deref(),
        permit: a.permit.as_deref(),
    };
    let views: Vec<_> = ctx.open()?.read(|tx| {
        let chosen = filter
            .chosen(tx.projects()?, dates.as_of)
            .map_err(no_match)?;
        chosen.iter().map(|p| dates.load(tx, &p.code)).collect()
    })?;
    let across = across(&views, deduction).map_err(|e| match e {
        AcrossError::View(e) => e.into(),
        AcrossError::OutOfRange => Error::Refused(
            "the totals across these projects leave the range of whole grams the ledger counts in (9.2 million Mt); narrow them with --operator, --method or --permit".into(),
        ),
    })?;
    let mut t = table(&views, &across, a.by.is_some())?;
    dates.mark(&mut t, "them");
    Ok(Report::default().table(t).table_if(late_of(&views)))
}

/// A filter that matches no project is refused, listing the values the ledger knows.
fn no_match(n: NoMatch) -> Error {
    Error::field(
        &format!("--{}", n.filter),
        &n.given,
        if n.known.is_empty() {
            "matches no project (the ledger holds none with one)".to_string()
        } else {
            format!("matches no project (known: {})", n.known.join(", "))
        },
    )
}
