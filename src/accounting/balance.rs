//! The mass balance of geological storage by reporting period: 40 CFR Part 98 Subpart RR
//! (§98.443, RR-1 to RR-12) or ISO 27916 for CO2-EOR, every term its own figure.

use crate::accounting::uncertainty::{
    Estimate, MeteredMass as Reading, Term, TermSign, mass_balance, sum_readings,
};
use crate::ledger::period::{Bucket, Grouping, apportion};
use crate::ledger::reading_fields::{LeakSide, checked};
use crate::ledger::tally::entrained_fraction;
use crate::ledger::{Entry, EntryKind, Method, Project};
use crate::quantity::Mass;
use std::collections::BTreeMap;

/// Which published balance a table follows.
#[derive(Debug, Clone, Copy, PartialEq, Eq, clap::ValueEnum)]
pub enum BalanceMethod {
    /// 40 CFR 98.443: sequestered = injected − produced − surface leakage − leaks and vents.
    Rr,
    /// ISO 27916: stored = input − operational losses − losses from the EOR complex.
    Iso27916,
}

/// The terms of one period, each in whole grams.
#[derive(Debug, Clone, Copy, Default, PartialEq, Eq)]
pub struct Terms {
    pub receipts: Mass,
    pub redeliveries: Mass,
    pub injected: Mass,
    /// CO2 metered at the separators.
    pub separated: Mass,
    /// CO2 entrained in produced fluids: X × separated, per production entry.
    pub entrained: Mass,
    pub surface_leakage: Mass,
    pub leaks_injection_side: Mass,
    pub leaks_production_side: Mass,
    pub emissions: Mass,
}

impl Terms {
    /// RR-1 to RR-3: CO2 received, net of what was redelivered.
    pub fn received(&self) -> Mass {
        self.receipts - self.redeliveries
    }

    /// RR-9 form: CO2P = (1 + X)·ΣCO2w — separated plus entrained.
    pub fn produced(&self) -> Mass {
        self.separated + self.entrained
    }

    /// RR-11 when anything was produced, else RR-12. Returns the equation used.
    pub fn sequestered_rr(&self) -> (Mass, &'static str) {
        if self.produced() == Mass::ZERO && self.leaks_production_side == Mass::ZERO {
            (
                self.injected - self.surface_leakage - self.leaks_injection_side,
                "RR-12",
            )
        } else {
            (
                self.injected
                    - self.produced()
                    - self.surface_leakage
                    - self.leaks_injection_side
                    - self.leaks_production_side,
                "RR-11",
            )
        }
    }

    /// ISO 27916: operational losses are the leaks and vents on both sides.
    pub fn operational_losses(&self) -> Mass {
        self.leaks_injection_side + self.leaks_production_side
    }

    /// ISO 27916: losses from the EOR complex — surface leakage and CO2 leaving with produced
    /// fluids. CO2 separated and re-injected is recycled inside the complex and never counted.
    pub fn complex_losses(&self) -> Mass {
        self.surface_leakage + self.entrained
    }

    pub fn stored_iso(&self) -> Mass {
        self.received() - self.operational_losses() - self.complex_losses()
    }

    pub fn stored(&self, method: BalanceMethod) -> (Mass, &'static str) {
        match method {
            BalanceMethod::Rr => self.sequestered_rr(),
            BalanceMethod::Iso27916 => (self.stored_iso(), "ISO 27916"),
        }
    }

    fn add(&mut self, kind: EntryKind, side_production: bool, g: Mass) {
        let slot = match kind {
            EntryKind::Receipt => &mut self.receipts,
            EntryKind::Redelivery => &mut self.redeliveries,
            EntryKind::Injection => &mut self.injected,
            EntryKind::Production => &mut self.separated,
            EntryKind::Leakage => &mut self.surface_leakage,
            EntryKind::EquipmentLeak if side_production => &mut self.leaks_production_side,
            EntryKind::EquipmentLeak => &mut self.leaks_injection_side,
            EntryKind::Emission => &mut self.emissions,
            // Observations, and the routes and claims other modules account for.
            EntryKind::Survey
            | EntryKind::TracerSample
            | EntryKind::Carbonation
            | EntryKind::Application
            | EntryKind::SoilSample
            | EntryKind::Reversal
            | EntryKind::Calibration
            | EntryKind::Seal => return,
        };
        *slot += g;
    }
}

/// One reporting period's line.
#[derive(Debug, Clone, PartialEq)]
pub struct BalanceLine {
    pub bucket: Bucket,
    pub terms: Terms,
    pub stored: Mass,
    pub equation: &'static str,
    pub cumulative_injected: Mass,
    pub cumulative_stored: Mass,
    /// Cumulative stored as a share of permitted capacity, in %.
    pub permit_used_pct: Option<f64>,
    pub headroom: Option<Mass>,
    /// Stored with its uncertainty (95 %) for the period, and cumulative.
    pub uncertainty: Estimate,
    pub cumulative_uncertainty: Estimate,
}

/// The readings behind each term of the balance, for its uncertainty: readings of one meter add
/// their uncertainties linearly, different meters and terms combine in quadrature.
#[derive(Default, Clone)]
struct TermReadings {
    receipts: Vec<Reading>,
    redeliveries: Vec<Reading>,
    injected: Vec<Reading>,
    separated: Vec<Reading>,
    entrained: Vec<Reading>,
    surface_leakage: Vec<Reading>,
    leaks_injection_side: Vec<Reading>,
    leaks_production_side: Vec<Reading>,
}

impl TermReadings {
    fn slot(&mut self, kind: EntryKind, production_side: bool) -> Option<&mut Vec<Reading>> {
        Some(match kind {
            EntryKind::Receipt => &mut self.receipts,
            EntryKind::Redelivery => &mut self.redeliveries,
            EntryKind::Injection => &mut self.injected,
            EntryKind::Production => &mut self.separated,
            EntryKind::Leakage => &mut self.surface_leakage,
            EntryKind::EquipmentLeak if production_side => &mut self.leaks_production_side,
            EntryKind::EquipmentLeak => &mut self.leaks_injection_side,
            _ => return None,
        })
    }

    fn extend(&mut self, other: &TermReadings) {
        self.receipts.extend_from_slice(&other.receipts);
        self.redeliveries.extend_from_slice(&other.redeliveries);
        self.injected.extend_from_slice(&other.injected);
        self.separated.extend_from_slice(&other.separated);
        self.entrained.extend_from_slice(&other.entrained);
        self.surface_leakage
            .extend_from_slice(&other.surface_leakage);
        self.leaks_injection_side
            .extend_from_slice(&other.leaks_injection_side);
        self.leaks_production_side
            .extend_from_slice(&other.leaks_production_side);
    }

    /// The stored figure with its uncertainty, by the method's terms.
    fn estimate(&self, method: BalanceMethod) -> Estimate {
        use TermSign::{Adds, Deducts};
        // Produced CO2 is (1 + X)·S from the separator meter alone: the entrained part carries
        // the same meter's error, so U = (1 + X)·S·u, added linearly with the separated part.
        let produced: Vec<Reading> = self
            .separated
            .iter()
            .chain(&self.entrained)
            .cloned()
            .collect();
        let terms: Vec<(&str, TermSign, &Vec<Reading>)> = match method {
            BalanceMethod::Rr => vec![
                ("injected", Adds, &self.injected),
                ("produced", Deducts, &produced),
                ("surface leakage", Deducts, &self.surface_leakage),
                ("leaks injection side", Deducts, &self.leaks_injection_side),
                (
                    "leaks production side",
                    Deducts,
                    &self.leaks_production_side,
                ),
            ],
            BalanceMethod::Iso27916 => vec![
                ("receipts", Adds, &self.receipts),
                ("redeliveries", Deducts, &self.redeliveries),
                ("leaks injection side", Deducts, &self.leaks_injection_side),
                (
                    "leaks production side",
                    Deducts,
                    &self.leaks_production_side,
                ),
                ("surface leakage", Deducts, &self.surface_leakage),
                ("entrained", Deducts, &self.entrained),
            ],
        };
        let terms: Vec<Term> = terms
            .into_iter()
            .map(|(name, sign, readings)| Term {
                name: name.to_string(),
                sign,
                estimate: sum_readings(readings)
                    .map_or(Estimate::absolute(Mass::ZERO, Mass::ZERO), |s| s.total),
            })
            .collect();
        mass_balance(&terms).unwrap_or(Estimate::absolute(Mass::ZERO, Mass::ZERO))
    }
}

/// The meter a reading's systematic error belongs to: its meter, or its site's (a leak at no
/// site of the project: its pathway's).
fn meter_key(e: &Entry) -> String {
    e.meter.clone().unwrap_or_else(|| match e.site.as_str() {
        "" => format!("pathway {}", e.reading.pathway().unwrap_or("")),
        site => format!("site {site}"),
    })
}

/// Balances the effective entries of a project by period. Entries spanning periods are split by
/// days, exactly in whole grams; cumulative figures run from the first reporting period.
/// `rel_u` gives each entry's relative uncertainty (95 %); 0 where none is stated.
pub fn balance<'a>(
    project: &Project,
    entries: impl Iterator<Item = &'a Entry>,
    grouping: Grouping,
    method: BalanceMethod,
    rel_u: &dyn Fn(&Entry) -> f64,
) -> Vec<BalanceLine> {
    let mut by: BTreeMap<Bucket, (Terms, TermReadings)> = BTreeMap::new();
    for e in entries {
        let production_side = checked(e.reading.leak_side()) == Some(LeakSide::Production);
        let u = rel_u(e);
        let reading = |g: i64| Reading {
            meter: meter_key(e),
            mass: Mass::from_grams(g),
            rel_u: u,
        };
        for (b, g) in apportion(e.mass.grams(), e.period, grouping) {
            let (terms, readings) = by.entry(b).or_default();
            terms.add(e.kind, production_side, Mass::from_grams(g));
            if let Some(slot) = readings.slot(e.kind, production_side) {
                slot.push(reading(g));
            }
        }
        if e.kind == EntryKind::Production {
            let entrained = e.mass.scale(entrained_fraction(e));
            for (b, g) in apportion(entrained.grams(), e.period, grouping) {
                let (terms, readings) = by.entry(b).or_default();
                terms.entrained += Mass::from_grams(g);
                readings.entrained.push(reading(g));
            }
        }
    }
    let mut cum_injected = Mass::ZERO;
    let mut cum_stored = Mass::ZERO;
    let mut cum_readings = TermReadings::default();
    by.into_iter()
        .map(|(bucket, (terms, readings))| {
            let (stored, equation) = terms.stored(method);
            // A facility that produces fluids reports by RR-11 in every period, a quarter
            // without production included (the figure is the same: its produced terms are 0).
            let equation = match equation {
                "RR-12" if project.method == Method::Eor => "RR-11",
                e => e,
            };
            cum_injected += terms.injected;
            cum_stored += stored;
            let capacity = project.permit_capacity.filter(|c| c.is_positive());
            cum_readings.extend(&readings);
            BalanceLine {
                uncertainty: readings.estimate(method),
                cumulative_uncertainty: cum_readings.estimate(method),
                bucket,
                terms,
                stored,
                equation,
                cumulative_injected: cum_injected,
                cumulative_stored: cum_stored,
                permit_used_pct: capacity
                    .map(|c| 100.0 * cum_stored.grams() as f64 / c.grams() as f64),
                headroom: capacity.map(|c| c - cum_stored),
            }
        })
        .collect()
}

#[cfg(test)]
mod tests {
    use super::*;

    fn t(tonnes: i64) -> Mass {
        Mass::from_grams(tonnes * 1_000_000)
    }

    #[test]
    fn rr_11_with_production() {
        // RR-11 (computed, REFERENCES.md): injected 1 000 000, produced 408 000, surface leakage 150,
        // injection-side leaks/vents 50, production-side 80 → 591 720 t sequestered.
        let terms = Terms {
            injected: t(1_000_000),
            separated: t(408_000),
            surface_leakage: t(150),
            leaks_injection_side: t(50),
            leaks_production_side: t(80),
            ..Terms::default()
        };
        assert_eq!(terms.sequestered_rr(), (t(591_720), "RR-11"));
    }

    #[test]
    fn rr_12_without_production() {
        // RR-12 (computed, REFERENCES.md): injected 1 000 000, leakage 0, injection-side leaks 120 → 999 880 t.
        let terms = Terms {
            injected: t(1_000_000),
            leaks_injection_side: t(120),
            ..Terms::default()
        };
        assert_eq!(terms.sequestered_rr(), (t(999_880), "RR-12"));
    }

    #[test]
    fn rr_1_received_over_four_quarters() {
        // RR-4/RR-1 (computed, REFERENCES.md): Q = 250 000, 260 000, 255 000, 245 000 t; S = 0, 5 000,
        // 0, 0 t; CO2 fraction 0.98, 0.98, 0.97, 0.99 → 984 800 t received.
        let quarters = [
            (250_000, 0, 98),
            (260_000, 5_000, 98),
            (255_000, 0, 97),
            (245_000, 0, 99),
        ];
        let total: Mass = quarters
            .iter()
            .map(|&(q, s, c)| {
                let terms = Terms {
                    receipts: t(q * c / 100),
                    redeliveries: t(s * c / 100),
                    ..Terms::default()
                };
                terms.received()
            })
            .sum();
        assert_eq!(total, t(984_800));
    }

    #[test]
    fn iso_27916_counts_recycled_co2_once() {
        // 1 000 t bought in, 300 t separated and re-injected (recycled): injection meters read 1 300 t.
        // 2 % of the separated CO2 stays in the sold oil (X = 0.02), 1 t vented, 0.5 t leaked.
        let terms = Terms {
            receipts: t(1_000),
            injected: t(1_300),
            separated: t(300),
            entrained: t(6),
            leaks_production_side: t(1),
            surface_leakage: Mass::from_grams(500_000),
            ..Terms::default()
        };
        assert_eq!(terms.stored_iso(), Mass::from_grams(992_500_000));
        // RR counts the same CO2: injected 1 300 − produced 306 − 1 − 0.5 = 992.5 t.
        assert_eq!(terms.sequestered_rr().0, terms.stored_iso());
    }
}
