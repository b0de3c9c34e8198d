//! The report `balance` prints: each route's own tables (an injection project's balance, leakage
//! and reversals), and the claims and buffer pool every route's balance ends with.

use super::claims::{claims_table, pool_table, rock_uncertainty_notes, uncertainty_note};
use super::weathering::parameter_notes;
use crate::accounting::balance::BalanceMethod;
use crate::accounting::claims::PoolEvent;
use crate::accounting::conservative::DeductionRule;
use crate::accounting::project_view::ProjectFigures;
use crate::error::Result;
use crate::ledger::Method;
use crate::ledger::period::Grouping;
use crate::report::Report;
use crate::report::balance as tables;
use crate::report::tables::{mineralization, weathering};

/// A project's balance by its route. `deduction` is read only where the route deducts
/// uncertainty: a basalt project's balance takes none.
pub fn balance(
    figures: &ProjectFigures,
    grouping: Grouping,
    method: BalanceMethod,
    deduction: impl Fn() -> Result<DeductionRule>,
) -> Result<Report> {
    let rock = match figures.project().method {
        Method::BasaltMineralization => return mineralization::balance(figures, grouping),
        Method::ExSituMineralization => mineralization::carbonation_balance(figures, grouping)?,
        Method::EnhancedWeathering => weathering::balance(figures, grouping)?,
        Method::SalineAquifer | Method::DepletedField | Method::Eor => {
            return geological_balance(figures, grouping, method, deduction()?);
        }
    };
    claims_tables(figures, BalanceMethod::Rr, deduction()?, rock)
}

/// The mass balance of an injection project, its leakage, claims and buffer pool.
pub fn geological_balance(
    figures: &ProjectFigures,
    grouping: Grouping,
    method: BalanceMethod,
    deduction: DeductionRule,
) -> Result<Report> {
    let project = figures.project();
    let lines = figures.geological(grouping, method);
    let by = format!("{grouping:?}").to_lowercase();
    let mut t = match method {
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
    claims_tables(figures, method, deduction, report)
}

/// The claims of each claim period (whatever --by shows the balance by) and, where a buffer is
/// set or a loss drawn, the buffer pool.
pub fn claims_tables(
    figures: &ProjectFigures,
    method: BalanceMethod,
    deduction: DeductionRule,
    mut report: Report,
) -> Result<Report> {
    let (period_claims, pool, events) = figures.claim_pool(method, deduction)?;
    let mut claims = claims_table(figures, &period_claims, deduction);
    if figures.project().method == Method::EnhancedWeathering {
        let periods: Vec<_> = period_claims.iter().map(|(b, _)| *b).collect();
        parameter_notes(&mut claims, &figures.deductions_used(&periods)?);
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
