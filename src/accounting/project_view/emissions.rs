//! The project's emission entries folded as they are fed, for the rock routes, whose net
//! deducts them: by period at every grouping (split by days), and by site and last day (what a
//! soil campaign dated after it deducts). Held by sites × days and periods, not by entries.

use crate::accounting::balance::each_piece;
use crate::accounting::weathering::campaign::Emission;
use crate::ledger::period::{Bucket, Grouping};
use crate::ledger::{Entry, Period};
use crate::quantity::Mass;
use std::collections::BTreeMap;

#[derive(Debug, Default)]
pub(super) struct EmissionSums {
    /// By period at each grouping (month, quarter, year): every period an emission touches.
    by: [BTreeMap<Bucket, Mass>; 3],
    /// By site and the last day the emission covers.
    by_site_end: BTreeMap<(String, chrono::NaiveDate), Mass>,
}

fn rank(g: Grouping) -> usize {
    match g {
        Grouping::Month => 0,
        Grouping::Quarter => 1,
        Grouping::Year => 2,
    }
}

impl EmissionSums {
    pub(super) fn add(&mut self, e: &Entry) {
        for g in [Grouping::Month, Grouping::Quarter, Grouping::Year] {
            let by = &mut self.by[rank(g)];
            each_piece(e.mass.grams(), e.period, g, |b, grams| {
                *by.entry(b).or_insert(Mass::ZERO) += Mass::from_grams(grams);
            });
        }
        *self
            .by_site_end
            .entry((e.site.clone(), e.period.to))
            .or_insert(Mass::ZERO) += e.mass;
    }

    /// The emissions of each period an emission touches.
    pub(super) fn by_period(&self, grouping: Grouping) -> &BTreeMap<Bucket, Mass> {
        &self.by[rank(grouping)]
    }

    /// Each period's emissions as one emission on the period's first day, so that a rollup
    /// splitting emissions by days between periods of `grouping` counts each period's sum.
    pub(super) fn per_period(&self, grouping: Grouping) -> Vec<Emission<'_>> {
        self.by_period(grouping)
            .iter()
            .map(|(b, m)| Emission {
                site: "",
                period: Period::day(b.first_day()),
                mass: *m,
            })
            .collect()
    }

    /// The emissions of each site by the last day they cover (what a campaign reads: the
    /// emissions at its field that ended by its date).
    pub(super) fn per_site_end(&self) -> Vec<Emission<'_>> {
        self.by_site_end
            .iter()
            .map(|((site, end), m)| Emission {
                site,
                period: Period::day(*end),
                mass: *m,
            })
            .collect()
    }

    /// The emissions at sites `keep` accepts.
    pub(super) fn at_sites(&self, keep: &dyn Fn(&str) -> bool) -> Mass {
        self.by_site_end
            .iter()
            .filter(|((site, _), _)| keep(site))
            .map(|(_, m)| *m)
            .sum()
    }
}
