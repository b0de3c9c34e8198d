//! The ledger against a monitoring report's figures: the view's figures chosen at the periods
//! the report gives each quantity by, judged year by year against materiality.

use super::{ProjectFigures, ViewError, bearing};
use crate::accounting::balance::BalanceMethod;
use crate::accounting::materiality::{
    Figure, Granularity, MaterialityError, MaterialityPolicy, Reconciliation, ReportedQuantity,
    ReportingPeriod, reconcile,
};
use crate::ledger::period::Grouping;
use std::collections::BTreeSet;

/// Why the ledger could not be reconciled: its figures do not read, or the report's do not
/// reconcile.
#[derive(Debug)]
pub enum ReconcileError {
    View(ViewError),
    Materiality(MaterialityError),
}

impl From<ViewError> for ReconcileError {
    fn from(e: ViewError) -> Self {
        ReconcileError::View(e)
    }
}

impl ProjectFigures {
    /// The report's `figures` reconciled against the ledger's, by the balance `method`.
    pub fn reconcile_report(
        &self,
        figures: &[Figure],
        method: BalanceMethod,
        policy: &MaterialityPolicy,
    ) -> Result<Reconciliation, ReconcileError> {
        // The ledger's figures for each quantity at each granularity the report gives it by,
        // over the report's years, so a period the report leaves out shows as not reported.
        let years: BTreeSet<i32> = figures.iter().map(|f| f.period.year()).collect();
        let quantities: BTreeSet<ReportedQuantity> = figures.iter().map(|f| f.quantity).collect();
        let granularities: BTreeSet<Grouping> = figures
            .iter()
            .map(|f| match f.period {
                ReportingPeriod::Year(_) => Grouping::Year,
                ReportingPeriod::Quarter(..) => Grouping::Quarter,
                ReportingPeriod::Month(..) => Grouping::Month,
            })
            .collect();
        let mut ledger = Vec::new();
        for g in granularities {
            ledger.extend(self.reported(g, method, &quantities, &years)?);
        }
        // Only at the periods the report gives each quantity by: a report of quarterly stored
        // and yearly injected is compared on those, not on yearly stored and quarterly injected
        // too.
        let given: BTreeSet<(ReportedQuantity, Granularity)> = figures
            .iter()
            .map(|f| (f.quantity, f.period.granularity()))
            .collect();
        ledger.retain(|f| given.contains(&(f.quantity, f.period.granularity())));
        // Each year's headline figures, the base of its threshold, whatever the report gives.
        let headlines: BTreeSet<ReportedQuantity> = [
            ReportedQuantity::Stored,
            ReportedQuantity::Mineralized,
            ReportedQuantity::WeatheringNet,
        ]
        .into();
        let totals = self.reported(Grouping::Year, method, &headlines, &years)?;
        let route = self.project().method;
        reconcile(
            &ledger,
            figures,
            &totals,
            |q| bearing(q, route, method),
            policy,
        )
        .map_err(ReconcileError::Materiality)
    }
}
