//! The geological mass balance of a project's metered entries, each reading carrying the
//! uncertainty its meter states (its own, its latest calibration's, or its site's).

use super::ProjectFigures;
use crate::accounting::balance::{BalanceLine, BalanceMethod};
use crate::accounting::claims::rel_uncertainty;
use crate::ledger::period::Grouping;
use crate::ledger::{Entry, EntryKind, Site};
use std::collections::HashMap;

/// The project's calibrations by site, read before the readings they apply to.
#[derive(Debug, Default)]
pub(super) struct Calibrations {
    by_site: HashMap<String, Vec<Entry>>,
}

impl Calibrations {
    pub(super) fn new(evidence: &[Entry]) -> Calibrations {
        let mut by_site: HashMap<String, Vec<Entry>> = HashMap::new();
        for e in evidence.iter().filter(|e| e.kind == EntryKind::Calibration) {
            by_site.entry(e.site.clone()).or_default().push(e.clone());
        }
        Calibrations { by_site }
    }

    /// An entry's relative uncertainty (see [`rel_uncertainty`]): a calibration counts only
    /// at its own site, so only that site's are looked at.
    pub(super) fn rel_uncertainty(&self, e: &Entry, sites: &[Site]) -> Option<f64> {
        let at_site = self.by_site.get(&e.site).map_or(&[][..], Vec::as_slice);
        rel_uncertainty(e, sites, at_site)
    }
}

impl ProjectFigures {
    /// The mass balance by period, by RR or ISO 27916, with its uncertainty.
    pub fn geological(&self, grouping: Grouping, method: BalanceMethod) -> Vec<BalanceLine> {
        self.view.balance.lines(self.project(), grouping, method)
    }

    /// How many metered entries state no uncertainty anywhere (and count as exact).
    pub fn unstated_uncertainties(&self) -> usize {
        self.view.unstated
    }
}
