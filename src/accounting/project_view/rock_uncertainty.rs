//! The 95 % uncertainty of the rock routes' period figures, from their inputs: a carbonation
//! batch's stated uncertainty, the spread of a soil campaign's replicate cores. What has no way
//! to estimate one is listed, so that a report says so instead of counting it silently exact.
//! docs/uncertainty.md gives the formulas.

use super::ProjectFigures;
use crate::accounting::uncertainty::{MeteredMass as Reading, sum_readings};
use crate::ledger::Method;
use crate::ledger::period::{Bucket, Grouping, apportion};
use crate::quantity::Mass;
use std::collections::BTreeMap;

/// A period's carbonation uptake uncertainty: batches of one plant share its laboratory and
/// method, so their stated uncertainties add linearly, like one meter's readings; plants
/// combine in quadrature (IPCC 2006 Vol. 1 Ch. 3, Approach 1). A batch spanning periods
/// carries its uncertainty into each in proportion to its days.
#[derive(Debug, Clone, Copy, PartialEq, Default)]
pub struct UptakeU {
    pub abs_u_grams: f64,
    /// Batches in the period that state no uncertainty, and how many there are.
    pub unstated: usize,
    pub batches: usize,
}

/// A period whose figure rests (wholly or partly) on inputs with no uncertainty estimate, and
/// why; report/tables words it.
#[derive(Debug, Clone, PartialEq)]
pub enum Unestimated {
    /// Carbonation batches that state no uncertainty, of all the period's batches.
    UnstatedBatches {
        bucket: Bucket,
        unstated: usize,
        batches: usize,
    },
    /// A soil campaign with no replicate spread, in words.
    Campaign { bucket: Bucket, why: String },
}

impl ProjectFigures {
    /// The uptake uncertainty of each period with carbonation batches.
    pub fn carbonation_uncertainty(&self, grouping: Grouping) -> BTreeMap<Bucket, UptakeU> {
        let mut readings: BTreeMap<Bucket, (Vec<Reading>, UptakeU)> = BTreeMap::new();
        for (e, batch) in &self.view.batches {
            for (b, g) in apportion(e.mass.grams(), e.period, grouping) {
                let (list, u) = readings.entry(b).or_default();
                u.batches += 1;
                match batch.rel_u {
                    Some(rel_u) => list.push(Reading {
                        meter: e.site.clone(),
                        mass: Mass::from_grams(g),
                        rel_u,
                    }),
                    None => u.unstated += 1,
                }
            }
        }
        readings
            .into_iter()
            .map(|(b, (list, mut u))| {
                // Stated shares are checked on record, pieces are never negative: the sum
                // fails only beyond the ledger's range, and the figure then counts as unstated.
                match sum_readings(&list) {
                    Ok(s) => u.abs_u_grams = s.total.abs_u_grams(),
                    Err(_) => u.unstated = u.batches,
                }
                (b, u)
            })
            .collect()
    }

    /// Each period of `grouping` whose figure rests (wholly or partly) on inputs with no
    /// uncertainty estimate, and why: what reports print beside the figures.
    pub fn unestimated(&self, grouping: Grouping) -> Result<Vec<Unestimated>, super::ViewError> {
        Ok(match self.view.project.method {
            Method::ExSituMineralization => self
                .carbonation_uncertainty(grouping)
                .into_iter()
                .filter(|(_, u)| u.unstated > 0)
                .map(|(bucket, u)| Unestimated::UnstatedBatches {
                    bucket,
                    unstated: u.unstated,
                    batches: u.batches,
                })
                .collect(),
            Method::EnhancedWeathering => self
                .weathering_rollup(grouping)?
                .0
                .into_iter()
                .flat_map(|l| {
                    l.unestimated
                        .into_iter()
                        .map(move |why| Unestimated::Campaign {
                            bucket: l.bucket,
                            why,
                        })
                })
                .collect(),
            _ => Vec::new(),
        })
    }
}
