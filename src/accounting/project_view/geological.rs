//! The geological mass balance of a project's metered entries, each reading carrying the
//! uncertainty its meter states (its own, its latest calibration's, or its site's).

use super::ProjectFigures;
use crate::accounting::balance::{BalanceLine, BalanceMethod, balance};
use crate::accounting::claims::rel_uncertainty;
use crate::ledger::period::Grouping;
use crate::ledger::{Entry, EntryKind};

impl ProjectFigures {
    fn calibrations(&self) -> Vec<&Entry> {
        self.entries()
            .filter(|e| e.kind == EntryKind::Calibration)
            .collect()
    }

    /// The mass balance by period, by RR or ISO 27916, with its uncertainty.
    pub fn geological(&self, grouping: Grouping, method: BalanceMethod) -> Vec<BalanceLine> {
        let cals = self.calibrations();
        let sites = self.sites();
        let rel_u = |e: &Entry| rel_uncertainty(e, sites, &cals).unwrap_or(0.0);
        balance(self.project(), self.entries(), grouping, method, &rel_u)
    }

    /// How many metered entries state no uncertainty anywhere (and count as exact).
    pub fn unstated_uncertainties(&self) -> usize {
        let cals = self.calibrations();
        self.entries()
            .filter(|e| e.kind.is_balance_term())
            .filter(|e| rel_uncertainty(e, self.sites(), &cals).is_none())
            .count()
    }
}
