//! The mass balance of geological storage by reporting period: 40 CFR Part 98 Subpart RR
//! (§98.443, RR-1 to RR-12) or ISO 27916 for CO2-EOR, every term its own figure.

use crate::accounting::uncertainty::{Estimate, Term, TermSign, mass_balance, sum_meters};
use crate::ledger::period::{Bucket, Grouping, apportion};
use crate::ledger::reading_fields::{LeakSide, checked};
use crate::ledger::tally::entrained_fraction;
use crate::ledger::{Entry, EntryKind, Method, Period, Project};
use crate::quantity::Mass;
use std::borrow::Cow;
use std::collections::{BTreeMap, HashMap};

/// Which published balance a table follows.
#[derive(Debug, Clone, Copy, PartialEq, Eq, clap::ValueEnum)]
pub enum BalanceMethod {
    /// 40 CFR 98.443: sequestered = injected − produced − surface leakage − leaks and vents.
    Rr,
    /// ISO 27916: stored = input − operational losses − losses from the EOR complex.
    Iso27916,
}

impl BalanceMethod {
    /// The method's name as the command line and a recorded reconciliation give it.
    pub fn name(self) -> &'static str {
        match self {
            BalanceMethod::Rr => "rr",
            BalanceMethod::Iso27916 => "iso27916",
        }
    }
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

/// The terms whose readings carry an uncertainty, in [`PeriodSums::readings`] order.
const RECEIPTS: usize = 0;
const REDELIVERIES: usize = 1;
const INJECTED: usize = 2;
const SEPARATED: usize = 3;
const ENTRAINED: usize = 4;
const SURFACE_LEAKAGE: usize = 5;
const LEAKS_INJECTION: usize = 6;
const LEAKS_PRODUCTION: usize = 7;
const SLOTS: usize = 8;

fn slot(kind: EntryKind, production_side: bool) -> Option<usize> {
    Some(match kind {
        EntryKind::Receipt => RECEIPTS,
        EntryKind::Redelivery => REDELIVERIES,
        EntryKind::Injection => INJECTED,
        EntryKind::Production => SEPARATED,
        EntryKind::Leakage => SURFACE_LEAKAGE,
        EntryKind::EquipmentLeak if production_side => LEAKS_PRODUCTION,
        EntryKind::EquipmentLeak => LEAKS_INJECTION,
        _ => return None,
    })
}

/// One meter's readings in one term, added up: grams, and Σ rel_u·grams (a meter's readings
/// add their uncertainties linearly).
#[derive(Debug, Default, Clone, Copy)]
struct MeterSum {
    grams: i64,
    u: f64,
}

/// The readings of one term by meter (the meter's number in [`Meters`]). A reading
/// `sum_readings` would refuse (no meter, a negative piece, an uncertainty that is not a
/// number ≥ 0, a sum beyond i64 grams) makes the term count 0 ± 0, as it always has.
#[derive(Debug, Default, Clone)]
struct TermSum {
    meters: BTreeMap<u32, MeterSum>,
    refused: bool,
}

impl TermSum {
    fn add(&mut self, meter: Option<u32>, grams: i64, rel_u: f64) {
        let Some(meter) = meter.filter(|_| grams >= 0 && rel_u.is_finite() && rel_u >= 0.0) else {
            self.refused = true;
            return;
        };
        let m = self.meters.entry(meter).or_default();
        match m.grams.checked_add(grams) {
            Some(g) => m.grams = g,
            None => self.refused = true,
        }
        m.u += rel_u * grams as f64;
    }

    fn merge(&mut self, other: &TermSum) {
        self.refused |= other.refused;
        for (id, o) in &other.meters {
            let m = self.meters.entry(*id).or_default();
            match m.grams.checked_add(o.grams) {
                Some(g) => m.grams = g,
                None => self.refused = true,
            }
            m.u += o.u;
        }
    }

    /// The term with its uncertainty: meters in the order of their names, in quadrature.
    fn estimate(&self, meters: &Meters) -> Estimate {
        let zero = Estimate::absolute(Mass::ZERO, Mass::ZERO);
        if self.refused {
            return zero;
        }
        let mut by_name: Vec<(&str, MeterSum)> = self
            .meters
            .iter()
            .map(|(id, m)| (meters.name(*id), *m))
            .collect();
        by_name.sort_by(|a, b| a.0.cmp(b.0));
        sum_meters(
            by_name
                .into_iter()
                .map(|(_, m)| (Mass::from_grams(m.grams), m.u)),
        )
        .unwrap_or(zero)
    }
}

/// The meters readings are summed by, each name kept once.
#[derive(Debug, Default)]
pub struct Meters {
    names: Vec<String>,
    index: HashMap<String, u32>,
}

impl Meters {
    /// The number of the meter a reading's systematic error belongs to: its meter, or its
    /// site's (a leak at no site of the project: its pathway's); None for a blank meter name.
    fn of(&mut self, e: &Entry) -> Option<u32> {
        let key: Cow<'_, str> = match (&e.meter, e.site.as_str()) {
            (Some(m), _) => Cow::Borrowed(m.as_str()),
            (None, "") => Cow::Owned(format!("pathway {}", e.reading.pathway().unwrap_or(""))),
            (None, site) => Cow::Owned(format!("site {site}")),
        };
        if key.trim().is_empty() {
            return None;
        }
        if let Some(id) = self.index.get(key.as_ref()) {
            return Some(*id);
        }
        let id = u32::try_from(self.names.len()).ok()?;
        self.names.push(key.to_string());
        self.index.insert(key.into_owned(), id);
        Some(id)
    }

    fn name(&self, id: u32) -> &str {
        &self.names[id as usize]
    }
}

/// One period's terms and the sums of their readings.
#[derive(Debug, Default, Clone)]
struct PeriodSums {
    terms: Terms,
    readings: [TermSum; SLOTS],
}

impl PeriodSums {
    /// The stored figure with its uncertainty, by the method's terms.
    fn estimate(&self, method: BalanceMethod, meters: &Meters) -> Estimate {
        use TermSign::{Adds, Deducts};
        // Produced CO2 is (1 + X)·S from the separator meter alone: the entrained part carries
        // the same meter's error, so U = (1 + X)·S·u, added linearly with the separated part.
        let mut produced = self.readings[SEPARATED].clone();
        produced.merge(&self.readings[ENTRAINED]);
        let r = &self.readings;
        let terms: Vec<(&str, TermSign, &TermSum)> = match method {
            BalanceMethod::Rr => vec![
                ("injected", Adds, &r[INJECTED]),
                ("produced", Deducts, &produced),
                ("surface leakage", Deducts, &r[SURFACE_LEAKAGE]),
                ("leaks injection side", Deducts, &r[LEAKS_INJECTION]),
                ("leaks production side", Deducts, &r[LEAKS_PRODUCTION]),
            ],
            BalanceMethod::Iso27916 => vec![
                ("receipts", Adds, &r[RECEIPTS]),
                ("redeliveries", Deducts, &r[REDELIVERIES]),
                ("leaks injection side", Deducts, &r[LEAKS_INJECTION]),
                ("leaks production side", Deducts, &r[LEAKS_PRODUCTION]),
                ("surface leakage", Deducts, &r[SURFACE_LEAKAGE]),
                ("entrained", Deducts, &r[ENTRAINED]),
            ],
        };
        let terms: Vec<Term> = terms
            .into_iter()
            .map(|(name, sign, sum)| Term {
                name: name.to_string(),
                sign,
                estimate: sum.estimate(meters),
            })
            .collect();
        mass_balance(&terms).unwrap_or(Estimate::absolute(Mass::ZERO, Mass::ZERO))
    }

    fn merge(&mut self, other: &PeriodSums) {
        for (mine, theirs) in self.readings.iter_mut().zip(&other.readings) {
            mine.merge(theirs);
        }
    }
}

/// Calls `f` with each bucket of `grouping` a period touches and its grams, split by days as
/// [`apportion`] splits them (a period inside one bucket without splitting).
pub fn each_piece(grams: i64, period: Period, grouping: Grouping, mut f: impl FnMut(Bucket, i64)) {
    let first = grouping.bucket(period.from);
    if first == grouping.bucket(period.to) {
        return f(first, grams);
    }
    for (b, g) in apportion(grams, period, grouping) {
        f(b, g);
    }
}

/// The mass balance folded entry by entry, at every grouping a report may ask for: sums by
/// period, term and meter, never the readings, so it holds periods × meters whatever the
/// number of entries. Entries spanning periods are split by days, exactly in whole grams.
#[derive(Debug, Default)]
pub struct BalanceSums {
    meters: Meters,
    by: [BTreeMap<Bucket, PeriodSums>; 3],
}

fn rank(g: Grouping) -> usize {
    match g {
        Grouping::Month => 0,
        Grouping::Quarter => 1,
        Grouping::Year => 2,
    }
}

const GROUPINGS: [Grouping; 3] = [Grouping::Month, Grouping::Quarter, Grouping::Year];

impl BalanceSums {
    /// Takes one effective entry with its relative uncertainty (95 %; 0 where none is stated).
    /// Every entry opens the periods it covers, whatever its kind.
    pub fn add(&mut self, e: &Entry, rel_u: f64) {
        let production_side = checked(e.reading.leak_side()) == Some(LeakSide::Production);
        let slot = slot(e.kind, production_side);
        let meter = match slot {
            Some(_) => self.meters.of(e),
            None => None,
        };
        let entrained =
            (e.kind == EntryKind::Production).then(|| e.mass.scale(entrained_fraction(e)).grams());
        for g in GROUPINGS {
            let by = &mut self.by[rank(g)];
            each_piece(e.mass.grams(), e.period, g, |b, grams| {
                let p = by.entry(b).or_default();
                p.terms
                    .add(e.kind, production_side, Mass::from_grams(grams));
                if let Some(s) = slot {
                    p.readings[s].add(meter, grams, rel_u);
                }
            });
            if let Some(x) = entrained {
                each_piece(x, e.period, g, |b, grams| {
                    let p = by.entry(b).or_default();
                    p.terms.entrained += Mass::from_grams(grams);
                    p.readings[ENTRAINED].add(meter, grams, rel_u);
                });
            }
        }
    }

    /// The balance by period; cumulative figures run from the first reporting period.
    pub fn lines(
        &self,
        project: &Project,
        grouping: Grouping,
        method: BalanceMethod,
    ) -> Vec<BalanceLine> {
        let mut cum_injected = Mass::ZERO;
        let mut cum_stored = Mass::ZERO;
        let mut cum = PeriodSums::default();
        let capacity = project.permit_capacity.filter(|c| c.is_positive());
        self.by[rank(grouping)]
            .iter()
            .map(|(bucket, sums)| {
                let terms = sums.terms;
                let (stored, equation) = terms.stored(method);
                // A facility that produces fluids reports by RR-11 in every period, a quarter
                // without production included (the figure is the same: its produced terms are 0).
                let equation = match equation {
                    "RR-12" if project.method == Method::Eor => "RR-11",
                    e => e,
                };
                cum_injected += terms.injected;
                cum_stored += stored;
                cum.merge(sums);
                BalanceLine {
                    uncertainty: sums.estimate(method, &self.meters),
                    cumulative_uncertainty: cum.estimate(method, &self.meters),
                    bucket: *bucket,
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
}

/// Balances the effective entries of a project by period (see [`BalanceSums`]). `rel_u` gives
/// each entry's relative uncertainty (95 %); 0 where none is stated.
pub fn balance<'a>(
    project: &Project,
    entries: impl Iterator<Item = &'a Entry>,
    grouping: Grouping,
    method: BalanceMethod,
    rel_u: &dyn Fn(&Entry) -> f64,
) -> Vec<BalanceLine> {
    let mut sums = BalanceSums::default();
    for e in entries {
        sums.add(e, rel_u(e));
    }
    sums.lines(project, grouping, method)
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
