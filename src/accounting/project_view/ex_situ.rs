//! Ex-situ mineralization: each carbonation batch's uptake is stored; the project's emissions,
//! and the CO2 a batch released when its solid's CO2 content fell, are netted from it, period
//! by period.

use super::ProjectFigures;
use crate::ledger::Entry;
use crate::ledger::period::{Bucket, Grouping, apportion};
use crate::quantity::Mass;
use std::collections::BTreeMap;

/// One period of an ex-situ project.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct CarbonationLine {
    pub bucket: Bucket,
    pub fed_g: i64,
    pub product_g: i64,
    pub stored: Mass,
    pub cumulative_stored: Mass,
    pub emissions: Mass,
    /// Stored − emissions.
    pub net: Mass,
    pub cumulative_net: Mass,
}

fn line(by: &mut BTreeMap<Bucket, CarbonationLine>, b: Bucket) -> &mut CarbonationLine {
    by.entry(b).or_insert(CarbonationLine {
        bucket: b,
        fed_g: 0,
        product_g: 0,
        stored: Mass::ZERO,
        cumulative_stored: Mass::ZERO,
        emissions: Mass::ZERO,
        net: Mass::ZERO,
        cumulative_net: Mass::ZERO,
    })
}

impl ProjectFigures {
    /// Dry feed, product, uptake and emissions by period; batches spanning periods are split by
    /// days.
    pub fn carbonation(&self, grouping: Grouping) -> Vec<CarbonationLine> {
        let mut by: BTreeMap<Bucket, CarbonationLine> = BTreeMap::new();
        for (e, batch) in &self.view.batches {
            for (b, g) in apportion(batch.fed_g, e.period, grouping) {
                line(&mut by, b).fed_g += g;
            }
            for (b, g) in apportion(batch.product_g, e.period, grouping) {
                line(&mut by, b).product_g += g;
            }
            for (b, g) in apportion(e.mass.grams(), e.period, grouping) {
                line(&mut by, b).stored += Mass::from_grams(g);
            }
            // A solid that lost CO2 released it: the batch's emission, netted like the rest.
            for (b, g) in apportion(batch.released_g, e.period, grouping) {
                line(&mut by, b).emissions += Mass::from_grams(g);
            }
        }
        for (b, m) in self.view.emissions.by_period(grouping) {
            line(&mut by, *b).emissions += *m;
        }
        let (mut stored, mut net) = (Mass::ZERO, Mass::ZERO);
        by.into_values()
            .map(|mut l| {
                l.net = l.stored - l.emissions;
                stored += l.stored;
                net += l.net;
                l.cumulative_stored = stored;
                l.cumulative_net = net;
                l
            })
            .collect()
    }

    /// Batches whose solid lost CO2, with what the record found.
    pub fn carbonation_findings(&self) -> impl Iterator<Item = (&Entry, &str)> {
        self.view
            .batches
            .iter()
            .filter_map(|(e, _)| e.reading.text("finding").map(|f| (e, f)))
    }
}
