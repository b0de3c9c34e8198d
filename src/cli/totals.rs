//! `totals`: the regulator's view across every project of the ledger — cumulative received,
//! injected, stored and claimable by route (geological, mineralized, weathering), conservative,
//! durable, buffer, reversed and permit headroom —
//! for activity through any date, as the ledger held it at the end of any date.

use super::Context;
use super::claims::deduction_rule;
use super::dates::DateArgs;
use crate::accounting::project_view::TotalsLine;
use crate::error::{Error, Result};
use crate::ledger::Method;
use crate::ledger::project_filter::{NoMatch, ProjectFilter};
use crate::report::Report;
use crate::report::tables::claims::backdated_notes;
use crate::report::totals as table;
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
        Method::from_name(m).ok_or_else(|| {
            Error::field(
                "--method",
                m,
                format!("is not a method (use {})", Method::choices()),
            )
        })?;
    }
    let deduction = deduction_rule(a.deduct_excess_over.as_deref())?;
    let filter = ProjectFilter {
        operator: a.operator.as_deref(),
        method: a.method.as_deref(),
        permit: a.permit.as_deref(),
    };
    let views = ctx.open()?.read(|tx| {
        let projects = tx.projects()?;
        if let Some(n) = filter.unmatched(&projects) {
            return Err(no_match(n));
        }
        let mut views = Vec::new();
        for p in projects {
            if dates.as_of.is_none_or(|t| p.registered_at <= t) && filter.admits(&p) {
                views.push(dates.load(tx, &p.code)?);
            }
        }
        Ok(views)
    })?;
    let by_year = a.by.is_some();
    let mut t = table::empty();
    let mut all = TotalsLine::default();
    let mut backdated = Vec::new();
    for v in &views {
        let totals = v.totals(deduction)?;
        for note in backdated_notes(v, &v.periods(v.claim_period())?) {
            backdated.push(format!("{}: {note}", v.project().code));
        }
        if by_year {
            for (year, line) in &totals.years {
                table::project_row(&mut t, v.project(), Some(*year), line, None);
            }
        } else {
            table::project_row(&mut t, v.project(), None, &totals.total, totals.headroom);
        }
        all = all.checked_add(&totals.total).ok_or_else(|| {
            Error::Refused(
                "the totals across these projects leave the range of whole grams the ledger counts in (9.2 million Mt); narrow them with --operator, --method or --permit".into(),
            )
        })?;
    }
    table::all_row(&mut t, &all);
    table::notes(&mut t, backdated, by_year);
    dates.mark(&mut t, "them");
    let late = super::late::late_table(
        views
            .iter()
            .flat_map(|v| v.listed().map(move |e| (v.project().code.as_str(), e))),
    );
    let mut report = Report::default().table(t);
    if let Some(l) = late {
        report = report.table(l);
    }
    Ok(report)
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
