//! `totals`: the regulator's view across every project of the ledger — cumulative received,
//! injected, stored, conservative, durable, buffer, claimable, reversed and permit headroom —
//! as the ledger held it at the end of any date.

use super::Context;
use super::claims::{ProjectView, deduction_rule};
use crate::accounting::balance::{BalanceLine, BalanceMethod, Terms};
use crate::accounting::claims::{PoolEvent, buffer_pool, period_claim};
use crate::accounting::uncertainty::Estimate;
use crate::error::{Error, Result};
use crate::ledger::period::Bucket;
use crate::ledger::period::Grouping;
use crate::ledger::{EntryKind, Method};
use crate::quantity::Mass;
use crate::report::{Cell, Report, Table, columns};
use chrono::{DateTime, Datelike, NaiveDate, Utc};
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
    /// What the ledger held at the end of this date (UTC); entries recorded later are left out
    #[arg(long, value_name = "DATE")]
    pub as_of: Option<String>,
    /// Deduct only the share of the uncertainty above this threshold
    #[arg(long, value_name = "SHARE")]
    pub deduct_excess_over: Option<String>,
}

#[derive(Debug, Clone, Copy, clap::ValueEnum)]
pub enum TotalsBy {
    Year,
}

/// The end of a calendar day in UTC.
pub fn end_of(d: NaiveDate) -> DateTime<Utc> {
    d.and_hms_micro_opt(23, 59, 59, 999_999)
        .expect("valid time")
        .and_utc()
}

/// The figures of one line of the totals.
#[derive(Default, Clone, Copy)]
struct Figures {
    received: Mass,
    injected: Mass,
    stored: Mass,
    conservative: Mass,
    durable: Mass,
    buffer: Mass,
    claimable: Mass,
    reversed: Mass,
}

impl Figures {
    fn add(&mut self, o: &Figures) {
        self.received += o.received;
        self.injected += o.injected;
        self.stored += o.stored;
        self.conservative += o.conservative;
        self.durable += o.durable;
        self.buffer += o.buffer;
        self.claimable += o.claimable;
        self.reversed += o.reversed;
    }

    fn cells(&self) -> Vec<Cell> {
        [
            self.received,
            self.injected,
            self.stored,
            self.conservative,
            self.durable,
            self.buffer,
            self.claimable,
            self.reversed,
        ]
        .map(Cell::Tonnes)
        .to_vec()
    }
}

pub fn totals(ctx: &Context, a: TotalsArgs) -> Result<Report> {
    let as_of = a
        .as_of
        .as_deref()
        .map(|d| super::inputs::date("--as-of", d).map(end_of))
        .transpose()?;
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
    let views = ctx.open()?.read(|tx| {
        let mut views = Vec::new();
        for p in tx.projects()? {
            let wanted = as_of.is_none_or(|t| p.registered_at <= t)
                && a.operator.as_ref().is_none_or(|o| *o == p.operator)
                && a.method.as_ref().is_none_or(|m| m == p.method.name())
                && a.permit
                    .as_ref()
                    .is_none_or(|r| Some(r) == p.permit_ref.as_ref());
            if wanted {
                views.push(ProjectView::load(tx, &p.code, as_of)?);
            }
        }
        Ok(views)
    })?;
    let by_year = a.by.is_some();
    let mut t = Table::new(
        "totals",
        match as_of {
            Some(t) => format!(
                "Totals across projects, as the ledger held them at {}",
                t.format("%Y-%m-%d %H:%M:%S UTC")
            ),
            None => "Totals across projects".to_string(),
        },
        columns(&[
            ("Project", "project"),
            ("Year", "year"),
            ("Method", "method"),
            ("Operator", "operator"),
            ("Permit", "permit_ref"),
            ("Received (t)", "received_t"),
            ("Injected (t)", "injected_t"),
            ("Stored (t)", "stored_t"),
            ("Conservative (t)", "conservative_t"),
            ("Durable (t)", "durable_t"),
            ("Buffer (t)", "buffer_t"),
            ("Claimable (t)", "claimable_t"),
            ("Reversed (t)", "reversed_t"),
            ("Permit headroom (t)", "headroom_t"),
        ]),
    );
    let mut all = Figures::default();
    for v in &views {
        let rules = v.rules(deduction);
        let years = stored_by_period(ctx, v, Grouping::Year)?;
        let monthly: Vec<_> = stored_by_period(ctx, v, Grouping::Month)?
            .iter()
            .map(|(b, u, _)| (*b, period_claim(u, &rules)))
            .collect();
        let (pool, events) = buffer_pool(&monthly, v.effective());
        let mut project_total = Figures::default();
        for (bucket, u, terms) in &years {
            let c = period_claim(u, &rules);
            let reversed: Mass = v
                .effective()
                .filter(|e| e.kind == EntryKind::Reversal && e.period.from.year() == bucket.year)
                .map(|e| e.mass)
                .sum();
            let f = Figures {
                received: terms.received(),
                injected: terms.injected,
                stored: u.value(),
                conservative: c.conservative,
                durable: c.durable,
                buffer: c.buffer_withheld,
                claimable: c.claimable,
                reversed,
            };
            project_total.add(&f);
            if by_year {
                let mut row = project_cells(v, Some(bucket.year));
                row.extend(f.cells());
                row.push(Cell::Empty);
                t.push(row);
            }
        }
        // What reversals cancelled comes off the pool and the claimable tonnes.
        let cancelled_claimable: Mass = events
            .iter()
            .filter_map(|e| match e {
                PoolEvent::Reversal { reversal, .. } => Some(reversal.claimable_cancelled),
                PoolEvent::Claim { .. } => None,
            })
            .sum();
        project_total.buffer = project_total.buffer - pool.cancelled();
        project_total.claimable = project_total.claimable - cancelled_claimable;
        all.add(&project_total);
        if !by_year {
            let mut row = project_cells(v, None);
            row.extend(project_total.cells());
            let headroom = v.project.permit_capacity.map(|c| c - project_total.stored);
            row.push(headroom.map_or(Cell::Empty, Cell::Tonnes));
            t.push(row);
        }
    }
    let mut row = vec![
        Cell::text("all"),
        Cell::Empty,
        Cell::Empty,
        Cell::Empty,
        Cell::Empty,
    ];
    row.extend(all.cells());
    row.push(Cell::Empty);
    t.push(row);
    t.note("Stored: the 40 CFR 98.443 mass balance for injection projects (basalt mineralization counts the CO2 injected and kept, mineralized or not), the carbonation uptake for ex-situ projects, the weathering removal (gross − deductions, default settings) for enhanced weathering. Conservative, durable, buffer and claimable as each project's settings in force set them.");
    if !by_year {
        t.note("Per project, buffer and claimable are net of what reversals cancelled (buffer first, then claimable).");
    }
    Ok(Report::default().table(t))
}

/// Each period's stored figure with its uncertainty, and the mass-balance terms: the geological
/// mass balance, or for the rock routes their own figure — carbonation uptake, weathering removal
/// (gross − deductions, default settings) — which state no uncertainty.
fn stored_by_period(
    ctx: &Context,
    v: &ProjectView,
    g: Grouping,
) -> Result<Vec<(Bucket, Estimate, Terms)>> {
    let route = match v.project.method {
        Method::EnhancedWeathering => Some(
            super::weathering::removal_by_period(ctx, &v.project, &v.entries, g)?
                .into_iter()
                .map(|(b, removal, _)| (b, removal))
                .collect(),
        ),
        Method::ExSituMineralization => {
            Some(super::mineralization::uptake_by_period(&v.entries, g))
        }
        Method::SalineAquifer
        | Method::DepletedField
        | Method::Eor
        | Method::BasaltMineralization => None,
    };
    Ok(match route {
        Some(by) => by
            .into_iter()
            .map(|(b, m)| (b, Estimate::absolute(m, Mass::ZERO), Terms::default()))
            .collect(),
        None => v
            .balance(g, BalanceMethod::Rr)
            .into_iter()
            .map(|l: BalanceLine| (l.bucket, l.uncertainty, l.terms))
            .collect(),
    })
}

fn project_cells(v: &ProjectView, year: Option<i32>) -> Vec<Cell> {
    vec![
        Cell::text(&v.project.code),
        year.map_or(Cell::Empty, |y| Cell::text(y.to_string())),
        Cell::text(v.project.method.name()),
        Cell::text(&v.project.operator),
        Cell::opt_text(v.project.permit_ref.as_deref()),
    ]
}
