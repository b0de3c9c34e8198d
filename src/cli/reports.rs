//! `entries` and `balance`: what the ledger holds, and what it adds up to.

use super::Context;
use super::claims::{
    claims_table, deduction_rule, pool_table, rock_uncertainty_notes, uncertainty_note,
};
use super::dates::DateArgs;
use super::setup::known_project;
use crate::accounting::balance::BalanceMethod;
use crate::accounting::claims::PoolEvent;
use crate::accounting::project_view::ProjectFigures;
use crate::error::Result;
use crate::ledger::Method;
use crate::ledger::period::Grouping;
use crate::report::balance as tables;
use crate::report::names;
use crate::report::{Cell, Report, Table, columns};
use clap::{Args, ValueEnum};

#[derive(Debug, Args)]
pub struct EntriesArgs {
    /// Project code (e.g. TFS)
    pub project: String,
}

pub fn entries(ctx: &Context, a: EntriesArgs) -> Result<Report> {
    let mut t = Table::new(
        "entries",
        format!("Entries, project {}", a.project),
        columns(&[
            names::SEQ,
            names::KIND,
            names::SITE,
            names::PERIOD,
            names::PERIOD_FROM.programs(),
            names::PERIOD_TO.programs(),
            names::READING,
            names::CO2_T,
            names::CO2_G.programs(),
            names::SIGN,
            names::CORRECTS,
            names::CORRECTED_BY,
            names::REASON.programs(),
            names::KEY.programs(),
            names::METER.programs(),
            names::NOTE.programs(),
            names::RECORDED_AT.programs(),
            names::EVIDENCE_NAME.programs(),
            names::EVIDENCE_SHA256.programs(),
            names::RECORDED_BY.programs(),
            names::LEAF_HASH.programs(),
            names::CHAIN_HEAD,
            names::CHAIN_HASH.programs(),
        ]),
    );
    let mut any_replaced = false;
    ctx.open()?.read(|tx| {
        known_project(tx, &a.project)?;
        tx.walk_chain(&a.project, None, |row| {
            let (s, by) = (row.sealed, row.replaced_by);
            any_replaced |= by.is_some();
            let e = &s.entry;
            t.push(vec![
                Cell::Int(e.seq as i64),
                Cell::text(e.kind.name()),
                Cell::text(&e.site),
                Cell::text(e.period.to_string()),
                Cell::text(e.period.from.to_string()),
                Cell::text(e.period.to.to_string()),
                Cell::Pairs(e.reading.0.clone()),
                Cell::Tonnes(e.mass),
                Cell::Int(e.mass.grams()),
                Cell::text(e.sign.name()),
                e.corrects.map_or(Cell::Empty, |c| Cell::Int(c as i64)),
                by.map_or(Cell::Empty, |c| Cell::Int(c as i64)),
                Cell::opt_text(e.reason.as_deref()),
                Cell::text(&e.key),
                Cell::opt_text(e.meter.as_deref()),
                Cell::opt_text(e.note.as_deref()),
                Cell::text(e.recorded_at.format("%Y-%m-%dT%H:%M:%S%.6fZ").to_string()),
                Cell::opt_text(e.evidence.as_ref().map(|v| v.file_name.clone())),
                Cell::opt_text(e.evidence.as_ref().map(|v| v.sha256.to_hex())),
                Cell::opt_text(e.recorded_by.as_deref()),
                Cell::text(s.leaf.to_hex()),
                Cell::text(s.chain.head()),
                Cell::text(s.chain.to_hex()),
            ]);
            Ok(())
        })
    })?;
    if any_replaced {
        t.note("Entries with a \"Corrected by\" seq are kept for the record; reports count the entry that corrects them.");
    }
    Ok(Report::default().table(t))
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
    let grouping = Grouping::from(a.by);
    let mut report = match figures.project().method {
        Method::BasaltMineralization => super::mineralization::balance(&figures, grouping)?,
        Method::ExSituMineralization => {
            super::mineralization::carbonation_balance(&figures, grouping)?
        }
        Method::EnhancedWeathering => super::weathering::balance(&figures, grouping)?,
        Method::SalineAquifer | Method::DepletedField | Method::Eor => {
            geological_balance(&figures, grouping, &a)?
        }
    };
    if matches!(
        figures.project().method,
        Method::ExSituMineralization | Method::EnhancedWeathering
    ) {
        let deduction = deduction_rule(a.deduct_excess_over.as_deref())?;
        report = claims_tables(&figures, BalanceMethod::Rr, deduction, report)?;
    }
    if let Some(t) = report.tables.first_mut() {
        dates.mark(t, "it");
    }
    if let Some(t) = super::late::late_table(figures.listed().map(|e| (a.project.as_str(), e))) {
        report = report.table(t);
    }
    Ok(report)
}

/// The mass balance of an injection project, its leakage, claims and buffer pool.
fn geological_balance(
    figures: &ProjectFigures,
    grouping: Grouping,
    a: &BalanceArgs,
) -> Result<Report> {
    let deduction = deduction_rule(a.deduct_excess_over.as_deref())?;
    let project = figures.project();
    let lines = figures.geological(grouping, a.method);
    let by = format!("{:?}", a.by).to_lowercase();
    let mut t = match a.method {
        BalanceMethod::Rr => tables::rr_table(project, &lines, &by),
        BalanceMethod::Iso27916 => tables::iso_table(project, &lines, &by),
    };
    tables::permit_notes(&mut t, project, &lines, figures.over_permit());
    t.note("Entries spanning periods are split by days. Project emissions are reported beside storage, not deducted from it; the claims deduct them.");
    t.note(uncertainty_note(figures));
    let (assumed, n) = figures.on_assumed_fraction();
    if assumed.is_positive() {
        t.note(crate::report::meters::assumed_note(
            assumed,
            match n {
                1 => "1 entry of the mass balance".to_string(),
                n => format!("{n} entries of the mass balance"),
            },
        ));
    }
    let mut report = Report::default().table(t);
    if let Some(l) = tables::leakage_table(project, figures.listed()) {
        report = report.table(l);
    }
    if let Some(r) = tables::reversals_table(project, figures.listed()) {
        report = report.table(r);
    }
    claims_tables(figures, a.method, deduction, report)
}

/// The claims of each claim period (whatever --by shows the balance by) and, where a buffer is
/// set or a loss drawn, the buffer pool.
fn claims_tables(
    figures: &ProjectFigures,
    method: BalanceMethod,
    deduction: crate::accounting::conservative::DeductionRule,
    mut report: Report,
) -> Result<Report> {
    let (period_claims, pool, events) = figures.claim_pool(method, deduction)?;
    let mut claims = claims_table(figures, &period_claims, deduction);
    if figures.project().method == Method::EnhancedWeathering {
        let periods: Vec<_> = period_claims.iter().map(|(b, _)| *b).collect();
        super::weathering::parameter_notes(&mut claims, &figures.deductions_used(&periods)?);
    }
    for note in rock_uncertainty_notes(figures, figures.claim_period())? {
        claims.note(note);
    }
    report = report.table(claims);
    let buffered = period_claims
        .iter()
        .any(|(b, _)| figures.rules(*b, deduction).buffer_share > 0.0);
    if buffered || !events.iter().all(|e| matches!(e, PoolEvent::Claim { .. })) {
        report = report.table(pool_table(figures, &pool, &events));
    }
    Ok(report)
}
