//! Gross CO2 from dissolved feedstock and the deductions that lead to net removal, every term a
//! line of its own so that nothing is hidden.
//!
//! Gross = dissolved fraction × applied mass × Σ (mol cation per t × z) × M_CO2: the bicarbonate
//! route, one CO2 per unit of cation charge. Deductions follow the path of the cations:
//! weathered by strong acid (no CO2 at all) → retained on exchange sites or in new clays →
//! precipitated as carbonate in the soil (keeps half) → the rest reaches the ocean, which keeps
//! a share per mol of alkalinity. Each share applies to what reaches its step.

use crate::accounting::input::{InputError, Rule, check, grams};
use crate::chem::M_CO2;
use crate::chem::mineral::Route;
use crate::chem::oxides::{Constituent, OxideComposition};
use crate::quantity::Mass;
use chrono::NaiveDate;
use std::fmt;

/// The base cations that carry CO2 away as bicarbonate.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Cation {
    Ca,
    Mg,
    Na,
    K,
}

impl Cation {
    pub const ALL: [Cation; 4] = [Cation::Ca, Cation::Mg, Cation::Na, Cation::K];

    pub fn symbol(self) -> &'static str {
        match self {
            Cation::Ca => "Ca",
            Cation::Mg => "Mg",
            Cation::Na => "Na",
            Cation::K => "K",
        }
    }

    /// z: Ca²⁺ and Mg²⁺ balance two bicarbonates, Na⁺ and K⁺ one.
    pub fn charge(self) -> u8 {
        match self {
            Cation::Ca | Cation::Mg => 2,
            Cation::Na | Cation::K => 1,
        }
    }

    /// The oxide an analysis reports it as, and how many cations one oxide holds.
    pub fn oxide(self) -> (Constituent, f64) {
        match self {
            Cation::Ca => (Constituent::CaO, 1.0),
            Cation::Mg => (Constituent::MgO, 1.0),
            Cation::Na => (Constituent::Na2O, 2.0),
            Cation::K => (Constituent::K2O, 2.0),
        }
    }
}

/// A cation's content of the feedstock, mol per tonne.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct CationContent {
    pub cation: Cation,
    pub mol_per_t: f64,
}

/// The four cations' contents from an oxide analysis: wt%/100 · 10⁶ / M_oxide × cations per
/// oxide. All four are listed, zeros included, so a report shows what was counted.
pub fn cations_from_oxides(rock: &OxideComposition) -> Vec<CationContent> {
    Cation::ALL
        .into_iter()
        .map(|cation| {
            let (oxide, per_oxide) = cation.oxide();
            CationContent {
                cation,
                mol_per_t: rock.wt_pct(oxide) / 100.0 * 1e6 / oxide.molar_mass() * per_oxide,
            }
        })
        .collect()
}

/// One cation's line of the gross CO2.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct CationCo2 {
    pub cation: Cation,
    pub mol_per_t: f64,
    pub co2: Mass,
}

/// Gross CO2, by cation; `total` is exactly the sum of the lines.
#[derive(Debug, Clone, PartialEq)]
pub struct Gross {
    pub per_cation: Vec<CationCo2>,
    pub total: Mass,
}

/// Why removal figures were refused.
#[derive(Debug, Clone, PartialEq)]
pub enum RemovalError {
    Input(InputError),
    /// A cation given twice would be counted twice.
    DuplicateCation {
        cation: Cation,
    },
}

impl fmt::Display for RemovalError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            RemovalError::Input(e) => write!(f, "{e}"),
            RemovalError::DuplicateCation { cation } => write!(
                f,
                "cations lists {} more than once; give each cation once",
                cation.symbol()
            ),
        }
    }
}

impl std::error::Error for RemovalError {}

impl From<InputError> for RemovalError {
    fn from(e: InputError) -> Self {
        RemovalError::Input(e)
    }
}

/// Gross CO2 removed by `dissolved_fraction` of `applied_t` tonnes of feedstock.
pub fn gross_co2(
    dissolved_fraction: f64,
    applied_t: f64,
    cations: &[CationContent],
) -> Result<Gross, RemovalError> {
    let f = check("dissolved_fraction", dissolved_fraction, Rule::Fraction)?;
    let applied_t = check("applied_t", applied_t, Rule::NonNegative)?;
    let mut per_cation: Vec<CationCo2> = Vec::with_capacity(cations.len());
    let mut total = Mass::ZERO;
    for c in cations {
        if per_cation.iter().any(|p| p.cation == c.cation) {
            return Err(RemovalError::DuplicateCation { cation: c.cation });
        }
        let field = format!("{}.mol_per_t", c.cation.symbol());
        let mol_per_t = check(&field, c.mol_per_t, Rule::NonNegative)?;
        let co2_mol_per_t = mol_per_t * f64::from(c.cation.charge()) * route_co2_per_charge();
        let co2 = grams("gross_g", f * applied_t * co2_mol_per_t * M_CO2)?;
        total = total.checked_add(co2).ok_or_else(|| InputError {
            field: "gross_g".into(),
            value: total.grams() as f64 + co2.grams() as f64,
            rule: Rule::FitsLedger,
        })?;
        per_cation.push(CationCo2 {
            cation: c.cation,
            mol_per_t,
            co2,
        });
    }
    Ok(Gross { per_cation, total })
}

/// Mol CO2 per mol of charge on the route that gross CO2 assumes.
fn route_co2_per_charge() -> f64 {
    Route::Bicarbonate.co2_per_charge()
}

/// The deductions, in the order the cations meet them.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Deduction {
    /// Share of the cations released by strong acids (sulfuric, nitric) instead of carbonic
    /// acid: they carry no CO2.
    StrongAcid,
    /// Share of the rest held on exchange sites or built into new clays: no bicarbonate.
    CationRetention,
    /// Share of the rest precipitated as carbonate in the soil: carbonate keeps one CO2 per
    /// divalent cation instead of two, so half of that share's CO2 is lost.
    SecondaryCarbonate,
    /// Mol CO2 the ocean keeps per mol of alkalinity it receives; 1 minus it is lost.
    OceanReequilibration,
}

impl Deduction {
    pub const ALL: [Deduction; 4] = [
        Deduction::StrongAcid,
        Deduction::CationRetention,
        Deduction::SecondaryCarbonate,
        Deduction::OceanReequilibration,
    ];

    pub fn name(self) -> &'static str {
        match self {
            Deduction::StrongAcid => "strong-acid weathering share",
            Deduction::CationRetention => "cation retention share",
            Deduction::SecondaryCarbonate => "secondary carbonate share",
            Deduction::OceanReequilibration => "ocean re-equilibration efficiency",
        }
    }

    pub fn default_value(self) -> f64 {
        match self {
            Deduction::OceanReequilibration => 0.8,
            _ => 0.0,
        }
    }

    fn default_source(self) -> &'static str {
        match self {
            Deduction::OceanReequilibration => {
                "Renforth & Henderson 2017, Rev. Geophys. 55:636 (from memory); tank experiments \
                 0.7–0.9, Ringham et al. 2024, Biogeosciences 21:3551 (read)"
            }
            _ => {
                "site-specific, no published default: none assumed until the monitoring plan sets it"
            }
        }
    }
}

/// One deduction's value, where it comes from, and the day it took effect where it is a
/// project's dated setting (none for a default or a what-if).
#[derive(Debug, Clone, PartialEq)]
pub struct Parameter {
    pub deduction: Deduction,
    pub value: f64,
    pub source: String,
    pub from: Option<NaiveDate>,
}

/// The four deduction parameters, each in [0, 1], in [`Deduction::ALL`] order.
#[derive(Debug, Clone, PartialEq)]
pub struct Deductions {
    parameters: [Parameter; 4],
}

impl Default for Deductions {
    fn default() -> Self {
        Self {
            parameters: Deduction::ALL.map(|deduction| Parameter {
                deduction,
                value: deduction.default_value(),
                source: deduction.default_source().into(),
                from: None,
            }),
        }
    }
}

impl Deductions {
    /// The same set with each of `given` replacing its parameter, with the source shown
    /// beside it.
    pub fn overridden(self, given: &[(Deduction, f64, String)]) -> Result<Self, RemovalError> {
        given
            .iter()
            .try_fold(self, |d, (k, v, source)| d.set(*k, *v, source.clone()))
    }

    /// The same set with one parameter replaced, and the source that justifies it.
    pub fn set(
        self,
        deduction: Deduction,
        value: f64,
        source: impl Into<String>,
    ) -> Result<Self, RemovalError> {
        self.set_from(deduction, value, source, None)
    }

    /// [`Self::set`] for a parameter in force from a day (a project's dated setting).
    pub fn set_from(
        mut self,
        deduction: Deduction,
        value: f64,
        source: impl Into<String>,
        from: Option<NaiveDate>,
    ) -> Result<Self, RemovalError> {
        check(deduction.name(), value, Rule::Fraction)?;
        self.parameters[deduction as usize] = Parameter {
            deduction,
            value,
            source: source.into(),
            from,
        };
        Ok(self)
    }

    pub fn get(&self, deduction: Deduction) -> &Parameter {
        &self.parameters[deduction as usize]
    }

    pub fn parameters(&self) -> &[Parameter; 4] {
        &self.parameters
    }
}

/// One parameter a line: `name = value (source)`, with `in force from DATE` for a dated one.
impl fmt::Display for Deductions {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        for p in &self.parameters {
            match p.from {
                Some(d) => writeln!(
                    f,
                    "{} = {}, in force from {d} ({})",
                    p.deduction.name(),
                    p.value,
                    p.source
                )?,
                None => writeln!(f, "{} = {} ({})", p.deduction.name(), p.value, p.source)?,
            }
        }
        Ok(())
    }
}

/// Gross, what each deduction took, and net: gross − Σ deducted = net exactly, in grams.
#[derive(Debug, Clone, PartialEq)]
pub struct Removal {
    pub gross: Mass,
    pub deducted: [(Deduction, Mass); 4],
    pub net: Mass,
}

/// One line of a removal, in the order a report lists them.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum RemovalLine {
    Gross(Mass),
    Deducted(Deduction, Mass),
    Net(Mass),
}

impl RemovalLine {
    pub fn label(&self) -> &'static str {
        match self {
            RemovalLine::Gross(_) => "gross CO2",
            RemovalLine::Deducted(d, _) => d.name(),
            RemovalLine::Net(_) => "net CO2",
        }
    }

    pub fn mass(&self) -> Mass {
        match *self {
            RemovalLine::Gross(m) | RemovalLine::Deducted(_, m) | RemovalLine::Net(m) => m,
        }
    }
}

impl Removal {
    /// Gross, the four deductions, net.
    pub fn lines(&self) -> Vec<RemovalLine> {
        let deducted = self.deducted.map(|(d, m)| RemovalLine::Deducted(d, m));
        let mut lines = vec![RemovalLine::Gross(self.gross)];
        lines.extend(deducted);
        lines.push(RemovalLine::Net(self.net));
        lines
    }
}

/// Applies the deductions to a gross mass (≥ 0). Each step rounds once to whole grams and
/// the deduction is what the step did not keep, so the lines add up exactly.
pub fn removal(gross: Mass, deductions: &Deductions) -> Result<Removal, RemovalError> {
    check("gross_g", gross.grams() as f64, Rule::NonNegative)?;
    let value = |d| deductions.get(d).value;
    let after_acid = gross.scale(1.0 - value(Deduction::StrongAcid));
    let reacting = after_acid.scale(1.0 - value(Deduction::CationRetention));
    let precipitated = reacting.scale(value(Deduction::SecondaryCarbonate));
    let carbonate_per_bicarbonate = Route::Carbonate.co2_per_charge() / route_co2_per_charge();
    let kept_as_carbonate = precipitated.scale(carbonate_per_bicarbonate);
    let to_ocean = reacting - precipitated;
    let kept_in_ocean = to_ocean.scale(value(Deduction::OceanReequilibration));
    Ok(Removal {
        gross,
        deducted: [
            (Deduction::StrongAcid, gross - after_acid),
            (Deduction::CationRetention, after_acid - reacting),
            (
                Deduction::SecondaryCarbonate,
                precipitated - kept_as_carbonate,
            ),
            (Deduction::OceanReequilibration, to_ocean - kept_in_ocean),
        ],
        net: kept_as_carbonate + kept_in_ocean,
    })
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::chem::formula::Formula;
    use crate::chem::oxides::{RenforthParameters, renforth};
    use proptest::prelude::*;

    fn rock(entries: &[(&str, f64)]) -> OxideComposition {
        OxideComposition::new(entries).unwrap_or_else(|e| panic!("{e}"))
    }

    fn gross(f: f64, t: f64, c: &[CationContent]) -> Gross {
        gross_co2(f, t, c).unwrap_or_else(|e| panic!("{e}"))
    }

    #[test]
    fn given_parameters_replace_the_projects() {
        let given = [(Deduction::StrongAcid, 0.2, "plan".to_string())];
        let d = Deductions::default().overridden(&given).unwrap();
        assert_eq!(
            d,
            Deductions::default()
                .set(Deduction::StrongAcid, 0.2, "plan")
                .unwrap()
        );
        let bad = [(Deduction::StrongAcid, 1.5, String::new())];
        assert!(Deductions::default().overridden(&bad).is_err());
    }

    #[test]
    fn cations_per_oxide_match_the_formulas() {
        for c in Cation::ALL {
            let (oxide, per_oxide) = c.oxide();
            let count = Formula::parse(oxide.name()).map_or(f64::NAN, |f| f.count(c.symbol()));
            assert_eq!(count, per_oxide, "{}", c.symbol());
        }
    }

    /// mol/t = wt%/100 · 10⁶ / M_oxide × cations per oxide, with the CIAAW 2021 weights
    /// (REFERENCES.md, read): 10 wt% CaO → 1783.3 mol Ca/t; 2.5 wt% Na2O → 806.7 mol Na/t
    /// (computed).
    #[test]
    fn cation_contents_from_oxides() {
        let c = cations_from_oxides(&rock(&[("CaO", 10.0), ("Na2O", 2.5)]));
        let m_cao = 40.078 + 15.999;
        let m_na2o = 2.0 * 22.990 + 15.999;
        assert!((c[0].mol_per_t - 1e5 / m_cao).abs() < 1e-9);
        assert!((c[0].mol_per_t - 1783.3).abs() < 0.05);
        assert_eq!(c[1].mol_per_t, 0.0);
        assert!((c[2].mol_per_t - 2.0 * 2.5e4 / m_na2o).abs() < 1e-9);
        assert!((c[2].mol_per_t - 806.7).abs() < 0.05);
        assert_eq!(c.len(), 4);
    }

    /// Cross-check with REFERENCES.md's modified Steinour example (Renforth 2019, structure
    /// from memory): CaO 10, MgO 7 wt%, η = 2 → 309.8 kg CO2/t (computed). All of one tonne
    /// dissolved by the bicarbonate route gives the same.
    #[test]
    fn gross_agrees_with_the_bicarbonate_potential() {
        let r = rock(&[("CaO", 10.0), ("MgO", 7.0)]);
        let g = gross(1.0, 1.0, &cations_from_oxides(&r));
        let kg = g.total.grams() as f64 / 1e3;
        assert!((kg - 309.8).abs() <= 0.05, "{kg}");
        let params = RenforthParameters::new(2.0).unwrap_or_else(|e| panic!("{e}"));
        assert!((kg - renforth(&r, params).kg_co2_per_t).abs() < 1e-3);
        assert_eq!(g.per_cation.iter().map(|c| c.co2).sum::<Mass>(), g.total);
    }

    #[test]
    fn gross_terms_by_charge() {
        let one = |cation| CationContent {
            cation,
            mol_per_t: 1000.0,
        };
        // 40 % of 50 t with 1000 mol/t: 20 000 mol of cation.
        let g = gross(0.4, 50.0, &[one(Cation::Mg), one(Cation::K)]);
        let mg = (0.4 * 50.0 * 1000.0 * 2.0 * M_CO2).round_ties_even() as i64;
        let k = (0.4 * 50.0 * 1000.0 * M_CO2).round_ties_even() as i64;
        assert_eq!(g.per_cation[0].co2.grams(), mg);
        assert_eq!(g.per_cation[1].co2.grams(), k);
        assert_eq!(g.total.grams(), mg + k);
        assert_eq!(
            gross_co2(1.0, 1.0, &[one(Cation::Ca), one(Cation::Ca)]),
            Err(RemovalError::DuplicateCation { cation: Cation::Ca })
        );
        let bad = CationContent {
            cation: Cation::Na,
            mol_per_t: -1.0,
        };
        match gross_co2(1.0, 1.0, &[bad]) {
            Err(RemovalError::Input(e)) => assert_eq!(e.field, "Na.mol_per_t"),
            other => panic!("{other:?}"),
        }
        assert!(gross_co2(1.1, 1.0, &[]).is_err());
        let huge = CationContent {
            cation: Cation::Ca,
            mol_per_t: 1e300,
        };
        assert!(gross_co2(1.0, 1.0, &[huge]).is_err());
    }

    /// Term by term: 1 000 001 g gross; strong acid 0.1, retention 0.2, carbonate 0.3, ocean
    /// 0.8 (the default, Renforth & Henderson 2017, from memory).
    #[test]
    fn deductions_term_by_term() {
        let d = Deductions::default()
            .set(Deduction::StrongAcid, 0.1, "test")
            .and_then(|d| d.set(Deduction::CationRetention, 0.2, "test"))
            .and_then(|d| d.set(Deduction::SecondaryCarbonate, 0.3, "test"))
            .unwrap_or_else(|e| panic!("{e}"));
        let r = removal(Mass::from_grams(1_000_001), &d).unwrap_or_else(|e| panic!("{e}"));
        // after acid 900 000.9 → 900 001; reacting 720 000.8 → 720 001;
        // precipitated 216 000.3 → 216 000, keeps 108 000; to ocean 504 001, keeps
        // 403 200.8 → 403 201.
        let expected = [100_000, 180_000, 108_000, 100_800];
        for ((_, m), g) in r.deducted.iter().zip(expected) {
            assert_eq!(m.grams(), g);
        }
        assert_eq!(r.net.grams(), 108_000 + 403_201);
        let deducted: Mass = r.deducted.iter().map(|&(_, m)| m).sum();
        assert_eq!(r.gross - deducted, r.net);
        let lines = r.lines();
        assert_eq!(lines.len(), 6);
        assert_eq!(lines[0].label(), "gross CO2");
        assert_eq!(lines[4].label(), "ocean re-equilibration efficiency");
        assert_eq!(lines[5].mass(), r.net);
    }

    #[test]
    fn defaults_print_line_by_line() {
        let d = Deductions::default();
        // 0.8: Renforth & Henderson 2017 (from memory), inside the 0.7–0.9 of the tank
        // experiments of Ringham et al. 2024 (read).
        let ocean = d.get(Deduction::OceanReequilibration).value;
        assert_eq!(ocean, 0.8);
        assert!((0.7..=0.9).contains(&ocean));
        let text = d.to_string();
        assert_eq!(text.lines().count(), 4);
        assert!(
            text.contains("ocean re-equilibration efficiency = 0.8 (Renforth & Henderson 2017")
        );
        assert!(text.contains("strong-acid weathering share = 0 (site-specific"));
        // Default: only the ocean takes its 20 %.
        let r = removal(Mass::from_grams(1_000_000), &d).unwrap_or_else(|e| panic!("{e}"));
        assert_eq!(r.net, Mass::from_grams(800_000));
        match Deductions::default().set(Deduction::CationRetention, 1.5, "x") {
            Err(RemovalError::Input(e)) => assert_eq!(e.field, "cation retention share"),
            other => panic!("{other:?}"),
        }
        assert!(removal(Mass::from_grams(-1), &d).is_err());
    }

    proptest! {
        #[test]
        fn lines_always_add_up(
            g in 0i64..=i64::MAX,
            v in proptest::array::uniform4(0.0..=1.0f64),
        ) {
            let mut d = Deductions::default();
            for (k, x) in Deduction::ALL.into_iter().zip(v) {
                d = d.set(k, x, "p").unwrap_or_default();
            }
            let r = removal(Mass::from_grams(g), &d);
            prop_assert!(r.is_ok());
            if let Ok(r) = r {
                let deducted: Mass = r.deducted.iter().map(|&(_, m)| m).sum();
                prop_assert_eq!(r.gross - deducted, r.net);
                prop_assert!(r.deducted.iter().all(|&(_, m)| m.grams() >= 0));
            }
        }

        #[test]
        fn never_panics(
            v in proptest::array::uniform8(proptest::num::f64::ANY),
            g in any::<i64>(),
        ) {
            let cations: Vec<_> = Cation::ALL.into_iter().zip(v).map(|(cation, mol_per_t)| CationContent { cation, mol_per_t }).collect();
            let _ = gross_co2(v[4], v[5], &cations);
            if let Ok(d) = Deductions::default().set(Deduction::StrongAcid, v[6], "p") {
                let _ = removal(Mass::from_grams(g), &d);
            }
            if let Ok(r) = OxideComposition::new(&[("CaO", v[0]), ("MgO", v[1]), ("Na2O", v[2]), ("K2O", v[3])]) {
                let _ = cations_from_oxides(&r);
            }
        }
    }
}
