//! What `chart` plots: cumulative stored, conservative and durable tonnes of one project, or
//! every project's cumulative stored tonnes, aligned to one list of periods.

use super::{ProjectFigures, ViewError};
use crate::accounting::conservative::DeductionRule;
use crate::ledger::period::{Bucket, Grouping};
use crate::quantity::Mass;

/// A named line of running sums, one per period.
pub type Series = (String, Vec<Mass>);

/// Running sums of a series, aligned to `periods` (a period a project lacks keeps its sum).
pub fn cumulative(periods: &[Bucket], values: &[(Bucket, Mass)]) -> Vec<Mass> {
    let mut sum = Mass::ZERO;
    periods
        .iter()
        .map(|p| {
            sum += values.iter().filter(|(b, _)| b == p).map(|(_, m)| *m).sum();
            sum
        })
        .collect()
}

impl ProjectFigures {
    /// The periods the project has figures for.
    pub fn periods(&self, grouping: Grouping) -> Result<Vec<Bucket>, ViewError> {
        Ok(self.stored(grouping)?.into_iter().map(|(b, _)| b).collect())
    }

    /// Cumulative stored tonnes over `periods`.
    pub fn stored_series(
        &self,
        grouping: Grouping,
        periods: &[Bucket],
    ) -> Result<Series, ViewError> {
        let stored: Vec<(Bucket, Mass)> = self
            .stored(grouping)?
            .into_iter()
            .map(|(b, u)| (b, u.value()))
            .collect();
        Ok((self.project().code.clone(), cumulative(periods, &stored)))
    }

    /// Cumulative stored, conservative and durable tonnes over `periods`.
    pub fn claim_series(
        &self,
        grouping: Grouping,
        periods: &[Bucket],
        deduction: DeductionRule,
    ) -> Result<Vec<Series>, ViewError> {
        let c = self.claims(grouping, deduction)?;
        let pick = |f: &dyn Fn(&crate::accounting::permanence::Claim) -> Mass| -> Vec<Mass> {
            let v: Vec<(Bucket, Mass)> = c.iter().map(|(b, cl)| (*b, f(cl))).collect();
            cumulative(periods, &v)
        };
        Ok(vec![
            ("stored".into(), pick(&|c| c.stored)),
            ("conservative".into(), pick(&|c| c.conservative)),
            ("durable".into(), pick(&|c| c.durable)),
        ])
    }
}
