//! The storage balance by reporting period: what went in, what is counted as stored, and how
//! much of the permit that uses.

use crate::ledger::period::{Bucket, Grouping, apportion};
use crate::ledger::{Entry, EntryKind, Project};
use crate::quantity::Mass;
use std::collections::BTreeMap;

/// One reporting period's line.
#[derive(Debug, Clone, PartialEq)]
pub struct BalanceLine {
    pub bucket: Bucket,
    pub injected: Mass,
    pub stored: Mass,
    pub cumulative_injected: Mass,
    pub cumulative_stored: Mass,
    /// Cumulative stored as a share of permitted capacity, in %.
    pub permit_used_pct: Option<f64>,
}

/// Balances the effective entries of a project by period. Entries spanning periods are split by
/// days (exactly, in whole grams). Stored equals injected until losses are recorded.
pub fn balance<'a>(
    project: &Project,
    entries: impl Iterator<Item = &'a Entry>,
    grouping: Grouping,
) -> Vec<BalanceLine> {
    let mut by: BTreeMap<Bucket, Mass> = BTreeMap::new();
    for e in entries.filter(|e| e.kind == EntryKind::Injection) {
        for (b, g) in apportion(e.signed_mass().grams(), e.period, grouping) {
            *by.entry(b).or_default() += Mass::from_grams(g);
        }
    }
    let mut cum = Mass::ZERO;
    by.into_iter()
        .map(|(bucket, injected)| {
            cum += injected;
            BalanceLine {
                bucket,
                injected,
                stored: injected,
                cumulative_injected: cum,
                cumulative_stored: cum,
                permit_used_pct: project
                    .permit_capacity
                    .filter(|c| c.is_positive())
                    .map(|c| 100.0 * cum.grams() as f64 / c.grams() as f64),
            }
        })
        .collect()
}
