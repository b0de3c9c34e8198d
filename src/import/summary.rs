//! An import summed up by meter as its entries are sealed: days, readings, CO2 and the seqs
//! they took.

use crate::import::meter_day::MeterDay;
use crate::ledger::SealedEntry;
use crate::quantity::Mass;
use chrono::NaiveDate;
use std::collections::BTreeMap;
use std::sync::Arc;

/// One meter's share of an import.
pub struct MeterSummary {
    pub days: u64,
    pub readings: u64,
    pub mass: Mass,
    pub first: NaiveDate,
    pub last: NaiveDate,
    pub seqs: (u64, u64),
}

/// Per meter: days, readings and CO2 of the import, added up as its entries are sealed.
#[derive(Default)]
pub struct Summary {
    pub by: BTreeMap<(Arc<str>, Arc<str>), MeterSummary>,
    pub entries: usize,
    pub replaced: usize,
}

impl Summary {
    /// Counts one sealed entry of meter-day `d`.
    pub fn add(&mut self, d: &MeterDay, s: &SealedEntry) {
        self.entries += 1;
        self.replaced += usize::from(s.entry.corrects.is_some());
        let seq = s.entry.seq;
        let v = self
            .by
            .entry((Arc::clone(&d.meter), Arc::clone(&d.site)))
            .or_insert(MeterSummary {
                days: 0,
                readings: 0,
                mass: Mass::ZERO,
                first: d.day,
                last: d.day,
                seqs: (seq, seq),
            });
        v.days += 1;
        v.readings += d.rows;
        v.mass += d.co2;
        v.first = v.first.min(d.day);
        v.last = v.last.max(d.day);
        v.seqs = (v.seqs.0.min(seq), v.seqs.1.max(seq));
    }
}
