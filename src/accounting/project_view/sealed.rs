//! The figures a seal fixes of its period, as the reports state them.

use super::{ProjectFigures, ViewError};
use crate::accounting::conservative::DeductionRule;
use crate::ledger::Period;
use crate::ledger::period::Grouping;
use crate::ledger::seal::Figures;

/// How a period label groups: a year (2026), a quarter (2026-Q1) or a month (2026-03).
fn grouping(label: &str) -> Grouping {
    match label.len() {
        4 => Grouping::Year,
        7 if label.as_bytes()[5] == b'Q' => Grouping::Quarter,
        _ => Grouping::Month,
    }
}

impl ProjectFigures {
    /// The period's figures as the reports state them: the project's stored figure for the
    /// period (by its method) and the claim the settings in force make of it.
    pub fn seal_figures(&self, label: &str, period: Period) -> Result<Figures, ViewError> {
        let found = self
            .claims(grouping(label), DeductionRule::WholeUncertainty)?
            .into_iter()
            .find(|(b, _)| b.first_day() == period.from);
        Ok(found.map_or(Figures::default(), |(_, c)| Figures {
            stored: c.stored,
            conservative: c.conservative,
            claimable: c.claimable,
        }))
    }
}
