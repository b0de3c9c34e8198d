//! The running figures every entry row keeps for its project, through that entry: what an
//! append checks its limit and the permit against, read from the chain tip instead of summed
//! over the whole chain, so an append costs the same at 100 entries as at a million.

use super::entry::{Entry, EntryKind, Reading};
use super::period::{Grouping, Period, apportion};
use super::reading_fields::checked;
use crate::quantity::Mass;

/// A project's figures through one entry of its chain.
#[derive(Debug, Clone, Copy, Default, PartialEq, Eq)]
pub struct Tally {
    /// Σ |grams| over every entry, corrected or not: what [`super::append::within_limit`]
    /// bounds. Saturates at i64's range, far beyond the limit, so it never wraps.
    pub magnitude: i64,
    /// Cumulative stored by 40 CFR 98.443 (RR-11; RR-12 is the same sum when nothing is
    /// produced) over the entries no correction replaces: what the permitted capacity bounds.
    pub stored: i64,
}

impl Tally {
    /// The figures once `e` is appended; `replaced` is the entry `e` corrects (the latest of its
    /// line, so until now counted in `stored`).
    pub fn after(self, e: &Entry, replaced: Option<&Entry>) -> Tally {
        self.with(e, replaced.map_or(0, stored_share))
    }

    /// The figures once `e` is appended, the entry it corrects having counted `replaced` in
    /// `stored` (its [`stored_share`]).
    pub fn with(self, e: &Entry, replaced: i64) -> Tally {
        Tally {
            magnitude: self
                .magnitude
                .saturating_add(e.mass.grams().saturating_abs()),
            stored: self
                .stored
                .saturating_add(stored_share(e))
                .saturating_sub(replaced),
        }
    }
}

/// The entrained fraction X a production entry was recorded with (0 when none).
pub fn entrained_fraction(e: &Entry) -> f64 {
    entrained_in(&e.reading)
}

/// The entrained fraction X a reading states (0 when none).
pub fn entrained_in(reading: &Reading) -> f64 {
    checked(reading.entrained_fraction()).unwrap_or(0.0)
}

/// What one entry adds to the RR cumulative stored figure, in grams (see [`share`]).
pub fn stored_share(e: &Entry) -> i64 {
    share(e.kind, e.mass, &e.reading)
}

/// What an entry of `kind` and `mass` with `reading` adds to the RR cumulative stored figure, in
/// grams: injection adds, produced CO2 (separated, plus X × separated entrained, rounded once as
/// the balance does) deducts, and so do surface leakage and equipment leaks on either side;
/// other kinds are not in the sum.
pub fn share(kind: EntryKind, mass: Mass, reading: &Reading) -> i64 {
    let g = mass.grams();
    match kind {
        EntryKind::Injection => g,
        EntryKind::Production => {
            let entrained = mass.scale(entrained_in(reading)).grams();
            g.saturating_add(entrained).saturating_neg()
        }
        EntryKind::Leakage | EntryKind::EquipmentLeak => g.saturating_neg(),
        EntryKind::Receipt
        | EntryKind::Redelivery
        | EntryKind::Emission
        | EntryKind::Survey
        | EntryKind::TracerSample
        | EntryKind::Carbonation
        | EntryKind::Application
        | EntryKind::SoilSample
        | EntryKind::Reversal
        | EntryKind::Calibration
        | EntryKind::Seal => 0,
    }
}

/// The grams of an entry of `grams` over `period` that fall in `year`, split by days exactly as
/// the balance splits an entry spanning years.
pub fn in_year(grams: i64, period: Period, year: i32) -> Mass {
    apportion(grams, period, Grouping::Year)
        .into_iter()
        .filter(|(b, _)| b.year == year)
        .map(|(_, g)| Mass::from_grams(g))
        .sum()
}
