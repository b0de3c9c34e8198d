//! Concentrations as laboratories report them (wt%, mg/kg, mol/kg), brought to mol/kg: the
//! feedstock's oxide analysis and its immobile element, and a soil core's elements. The soil
//! mass balance only ever compares an element with itself, so any unit works as long as every
//! material is brought to the same one; mol/kg lets the mobile cations be summed by charge.

use super::removal::{Cation, CationContent, cations_from_oxides};
use crate::chem::elements::element;
use crate::chem::oxides::{
    Constituent, OxideComposition, OxideError, RenforthParameters, renforth,
};
use std::fmt;

/// The unit a concentration is reported in.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Unit {
    /// Mass per cent (g per 100 g).
    WtPct,
    /// mg per kg (ppm by mass).
    MgPerKg,
    /// mol of the species per kg.
    MolPerKg,
}

impl Unit {
    pub const ALL: [Unit; 3] = [Unit::WtPct, Unit::MgPerKg, Unit::MolPerKg];

    pub fn name(self) -> &'static str {
        match self {
            Unit::WtPct => "wt%",
            Unit::MgPerKg => "mg/kg",
            Unit::MolPerKg => "mol/kg",
        }
    }

    pub fn from_name(s: &str) -> Option<Unit> {
        Self::ALL.into_iter().find(|u| u.name() == s)
    }

    /// g of the species per kg.
    fn g_per_kg(self, value: f64, molar_mass: f64) -> f64 {
        match self {
            Unit::WtPct => value * 10.0,
            Unit::MgPerKg => value / 1000.0,
            Unit::MolPerKg => value * molar_mass,
        }
    }

    fn mol_per_kg(self, value: f64, molar_mass: f64) -> f64 {
        self.g_per_kg(value, molar_mass) / molar_mass
    }
}

impl fmt::Display for Unit {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(self.name())
    }
}

/// An element that stays put while the rock weathers, the reference of the mass balance.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Immobile {
    Ti,
    Zr,
}

impl Immobile {
    pub const ALL: [Immobile; 2] = [Immobile::Ti, Immobile::Zr];

    pub fn symbol(self) -> &'static str {
        match self {
            Immobile::Ti => "Ti",
            Immobile::Zr => "Zr",
        }
    }

    pub fn from_symbol(s: &str) -> Option<Immobile> {
        Self::ALL.into_iter().find(|i| i.symbol() == s)
    }

    /// The oxide an analysis may report the element as.
    fn oxide(self) -> Option<Constituent> {
        match self {
            Immobile::Ti => Some(Constituent::TiO2),
            Immobile::Zr => None,
        }
    }
}

/// The elements a soil analysis gives: the four base cations and the immobile elements.
pub const SOIL_ELEMENTS: [&str; 6] = ["Ca", "Mg", "Na", "K", "Ti", "Zr"];

fn molar_mass(symbol: &str) -> f64 {
    element(symbol).map_or(f64::NAN, |e| e.atomic_weight)
}

/// Why an analysis was refused; each names the element or oxide as written.
#[derive(Debug, Clone, PartialEq)]
pub enum CompositionError {
    Oxides(OxideError),
    UnknownElement {
        name: String,
        allowed: &'static str,
    },
    Negative {
        name: String,
        value: f64,
    },
    Duplicate {
        name: String,
    },
    /// The elements given weigh more than the sample.
    TotalTooHigh {
        g_per_kg: f64,
    },
    NoImmobile,
    NoMobile,
}

impl fmt::Display for CompositionError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            CompositionError::Oxides(e) => write!(f, "{e}"),
            CompositionError::UnknownElement { name, allowed } => {
                write!(f, "{name} is not an element used here (give {allowed})")
            }
            CompositionError::Negative { name, value } => {
                write!(
                    f,
                    "{name} is {value}; a concentration must be a finite number of at least 0"
                )
            }
            CompositionError::Duplicate { name } => write!(f, "{name} is given more than once"),
            CompositionError::TotalTooHigh { g_per_kg } => write!(
                f,
                "the elements given add up to {g_per_kg:.1} g/kg, more than the sample (1000 g/kg): check the unit"
            ),
            CompositionError::NoImmobile => f.write_str(
                "no immobile element: give Ti or Zr (or TiO2 among a feedstock's oxides)",
            ),
            CompositionError::NoMobile => f.write_str("no base cation: give Ca, Mg, Na or K"),
        }
    }
}

impl std::error::Error for CompositionError {}

/// Element contents in mol/kg, checked: known symbols, each once, finite and ≥ 0, the total
/// mass at most the sample's.
fn element_contents(
    pairs: &[(String, f64)],
    unit: Unit,
    allowed: &[&'static str],
    allowed_text: &'static str,
) -> Result<Vec<(&'static str, f64)>, CompositionError> {
    let mut out: Vec<(&'static str, f64)> = Vec::with_capacity(pairs.len());
    let mut g_per_kg = 0.0;
    for (name, value) in pairs {
        let symbol = allowed.iter().copied().find(|s| s == name).ok_or_else(|| {
            CompositionError::UnknownElement {
                name: name.clone(),
                allowed: allowed_text,
            }
        })?;
        if !value.is_finite() || *value < 0.0 {
            return Err(CompositionError::Negative {
                name: name.clone(),
                value: *value,
            });
        }
        if out.iter().any(|(s, _)| *s == symbol) {
            return Err(CompositionError::Duplicate { name: name.clone() });
        }
        let m = molar_mass(symbol);
        g_per_kg += unit.g_per_kg(*value, m);
        out.push((symbol, unit.mol_per_kg(*value, m)));
    }
    if g_per_kg > 1000.0 {
        return Err(CompositionError::TotalTooHigh { g_per_kg });
    }
    Ok(out)
}

/// Σ z·[cation] over the given cations, mol of charge per kg; None names the first missing.
fn charge(contents: impl Fn(Cation) -> Option<f64>, cations: &[Cation]) -> Result<f64, Cation> {
    cations.iter().try_fold(0.0, |sum, &c| {
        contents(c)
            .map(|mol| sum + mol * f64::from(c.charge()))
            .ok_or(c)
    })
}

/// A feedstock's analysis, checked and in mol/kg.
#[derive(Debug, Clone, PartialEq)]
pub struct FeedstockAnalysis {
    /// The oxides in wt%.
    pub oxides: OxideComposition,
    /// Ca, Mg, Na, K from the oxides, mol per tonne.
    pub cations: Vec<CationContent>,
    /// Immobile elements given as elements, mol/kg.
    elements: Vec<(&'static str, f64)>,
}

impl FeedstockAnalysis {
    /// Oxides in `oxide_unit` (mol/kg meaning mol of the oxide), immobile elements in
    /// `element_unit`. Needs a base cation and an immobile element (Ti, Zr, or TiO2).
    pub fn new(
        oxides: &[(String, f64)],
        oxide_unit: Unit,
        elements: &[(String, f64)],
        element_unit: Unit,
    ) -> Result<FeedstockAnalysis, CompositionError> {
        let mut wt: Vec<(&str, f64)> = Vec::with_capacity(oxides.len());
        for (name, value) in oxides {
            let c = Constituent::from_name(name).ok_or_else(|| {
                CompositionError::Oxides(OxideError::UnknownConstituent { name: name.clone() })
            })?;
            wt.push((
                name.as_str(),
                oxide_unit.g_per_kg(*value, c.molar_mass()) / 10.0,
            ));
        }
        let oxides = OxideComposition::new(&wt).map_err(CompositionError::Oxides)?;
        let elements = element_contents(elements, element_unit, &["Ti", "Zr"], "Ti or Zr")?;
        let analysis = FeedstockAnalysis {
            cations: cations_from_oxides(&oxides),
            oxides,
            elements,
        };
        if analysis.cations.iter().all(|c| c.mol_per_t == 0.0) {
            return Err(CompositionError::NoMobile);
        }
        if Immobile::ALL
            .iter()
            .all(|&i| analysis.immobile(i).is_none())
        {
            return Err(CompositionError::NoImmobile);
        }
        Ok(analysis)
    }

    /// The immobile element in mol/kg: as an element if given, else from its oxide.
    pub fn immobile(&self, i: Immobile) -> Option<f64> {
        let given = self.elements.iter().find(|(s, _)| *s == i.symbol());
        let from_oxide = || {
            let oxide = i.oxide()?;
            let wt = self.oxides.wt_pct(oxide);
            (wt > 0.0).then(|| wt * 10.0 / oxide.molar_mass())
        };
        given.map(|&(_, v)| v).or_else(from_oxide)
    }

    /// What full dissolution could remove per tonne, kg CO2: the modified Steinour formula
    /// (Renforth 2019) on the bicarbonate route, η = 2.
    pub fn potential_kg_per_t(&self) -> f64 {
        let eta2 = RenforthParameters::new(2.0).expect("2 is a valid eta");
        renforth(&self.oxides, eta2).kg_co2_per_t
    }

    /// Σ z·[cation] of the given cations, mol of charge per kg.
    pub fn mobile_charge(&self, cations: &[Cation]) -> f64 {
        let content = |c: Cation| {
            self.cations
                .iter()
                .find(|x| x.cation == c)
                .map(|x| x.mol_per_t / 1000.0)
        };
        charge(content, cations).unwrap_or(f64::NAN)
    }
}

/// A soil core's elements in mol/kg.
#[derive(Debug, Clone, PartialEq)]
pub struct SoilAnalysis {
    contents: Vec<(&'static str, f64)>,
}

impl SoilAnalysis {
    /// Elements of [`SOIL_ELEMENTS`] in `unit`; needs a base cation and an immobile element.
    pub fn new(pairs: &[(String, f64)], unit: Unit) -> Result<SoilAnalysis, CompositionError> {
        let contents = element_contents(pairs, unit, &SOIL_ELEMENTS, "Ca, Mg, Na, K, Ti, Zr")?;
        let has = |names: &[&str]| contents.iter().any(|(s, _)| names.contains(s));
        if !has(&["Ca", "Mg", "Na", "K"]) {
            return Err(CompositionError::NoMobile);
        }
        if !has(&["Ti", "Zr"]) {
            return Err(CompositionError::NoImmobile);
        }
        Ok(SoilAnalysis { contents })
    }

    fn get(&self, symbol: &str) -> Option<f64> {
        self.contents
            .iter()
            .find(|(s, _)| *s == symbol)
            .map(|&(_, v)| v)
    }

    pub fn immobile(&self, i: Immobile) -> Option<f64> {
        self.get(i.symbol())
    }

    /// Σ z·[cation] of the given cations, mol of charge per kg, or the first cation missing.
    pub fn mobile_charge(&self, cations: &[Cation]) -> Result<f64, Cation> {
        charge(|c| self.get(c.symbol()), cations)
    }

    /// Several cores of one field and day as one composite: each element's mean, over the
    /// elements every core reports.
    pub fn composite(cores: &[SoilAnalysis]) -> Option<SoilAnalysis> {
        let first = cores.first()?;
        let n = cores.len() as f64;
        let contents = first
            .contents
            .iter()
            .filter_map(|&(s, _)| {
                let values: Option<Vec<f64>> = cores.iter().map(|c| c.get(s)).collect();
                values.map(|v| (s, v.iter().sum::<f64>() / n))
            })
            .collect();
        Some(SoilAnalysis { contents })
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn pairs(list: &[(&str, f64)]) -> Vec<(String, f64)> {
        list.iter().map(|&(n, v)| (n.to_string(), v)).collect()
    }

    /// 1.0 wt% TiO2 is 10 g/kg ÷ 79.865 g/mol = 0.12521 mol Ti/kg; 4793 mg/kg of Ti is
    /// 4.793 g/kg ÷ 47.867 = 0.10013 mol/kg (CIAAW 2021 weights, computed).
    #[test]
    fn units_to_mol_per_kg() {
        let f = FeedstockAnalysis::new(
            &pairs(&[("CaO", 9.0), ("MgO", 7.0), ("TiO2", 1.0)]),
            Unit::WtPct,
            &[],
            Unit::MgPerKg,
        )
        .unwrap_or_else(|e| panic!("{e}"));
        let ti = f.immobile(Immobile::Ti).unwrap_or(f64::NAN);
        assert!((ti - 10.0 / (47.867 + 2.0 * 15.999)).abs() < 1e-12);
        assert_eq!(f.immobile(Immobile::Zr), None);
        // Ca 9 wt% CaO → 1.6049 mol/kg, Mg 7 wt% MgO → 1.7367 mol/kg; charge 2·(sum).
        let ca = 90.0 / (40.078 + 15.999);
        let mg = 70.0 / (24.305 + 15.999);
        let z = f.mobile_charge(&[Cation::Ca, Cation::Mg]);
        assert!((z - 2.0 * (ca + mg)).abs() < 1e-9, "{z}");
        let soil = SoilAnalysis::new(&pairs(&[("Ca", 4008.0), ("Ti", 4793.0)]), Unit::MgPerKg)
            .unwrap_or_else(|e| panic!("{e}"));
        assert!((soil.immobile(Immobile::Ti).unwrap_or(0.0) - 4.793 / 47.867).abs() < 1e-12);
        assert_eq!(soil.mobile_charge(&[Cation::Ca, Cation::K]), Err(Cation::K));
        // The same oxide as mol/kg of oxide and as mg/kg gives the same wt%.
        let m = FeedstockAnalysis::new(
            &pairs(&[("CaO", 1.0), ("TiO2", 0.1)]),
            Unit::MolPerKg,
            &[],
            Unit::MolPerKg,
        )
        .unwrap_or_else(|e| panic!("{e}"));
        assert!((m.oxides.wt_pct(Constituent::CaO) - 5.6077).abs() < 1e-9);
    }

    #[test]
    fn refusals() {
        let soil = |list: &[(&str, f64)], unit| SoilAnalysis::new(&pairs(list), unit);
        assert_eq!(
            soil(&[("Ca", 0.1)], Unit::MolPerKg),
            Err(CompositionError::NoImmobile)
        );
        assert_eq!(
            soil(&[("Ti", 0.1)], Unit::MolPerKg),
            Err(CompositionError::NoMobile)
        );
        assert!(matches!(
            soil(&[("Ca", -0.1), ("Ti", 0.1)], Unit::MolPerKg),
            Err(CompositionError::Negative { .. })
        ));
        assert!(matches!(
            soil(&[("Fe", 1.0), ("Ti", 0.1)], Unit::MolPerKg),
            Err(CompositionError::UnknownElement { .. })
        ));
        // 30 mol Ca per kg would weigh 1.2 kg.
        assert!(matches!(
            soil(&[("Ca", 30.0), ("Ti", 0.1)], Unit::MolPerKg),
            Err(CompositionError::TotalTooHigh { .. })
        ));
        assert!(matches!(
            soil(&[("Ca", 2e6), ("Ti", 1.0)], Unit::MgPerKg),
            Err(CompositionError::TotalTooHigh { .. })
        ));
        let feed = |ox: &[(&str, f64)], el: &[(&str, f64)]| {
            FeedstockAnalysis::new(&pairs(ox), Unit::WtPct, &pairs(el), Unit::MgPerKg)
        };
        assert_eq!(
            feed(&[("CaO", 10.0)], &[]),
            Err(CompositionError::NoImmobile)
        );
        assert!(feed(&[("CaO", 10.0)], &[("Zr", 120.0)]).is_ok());
        assert_eq!(
            feed(&[("SiO2", 50.0)], &[("Zr", 120.0)]),
            Err(CompositionError::NoMobile)
        );
        assert!(matches!(
            feed(&[("CaO", 80.0), ("MgO", 30.0)], &[("Zr", 1.0)]),
            Err(CompositionError::Oxides(OxideError::TotalTooHigh { .. }))
        ));
    }

    #[test]
    fn composite_is_the_mean() {
        let a = SoilAnalysis::new(&pairs(&[("Ca", 0.1), ("Ti", 0.2)]), Unit::MolPerKg);
        let b = SoilAnalysis::new(
            &pairs(&[("Ca", 0.3), ("Ti", 0.4), ("Mg", 1.0)]),
            Unit::MolPerKg,
        );
        let c = SoilAnalysis::composite(&[a.unwrap(), b.unwrap()]).unwrap();
        assert!((c.get("Ca").unwrap() - 0.2).abs() < 1e-15);
        assert!((c.get("Ti").unwrap() - 0.3).abs() < 1e-15);
        assert_eq!(c.get("Mg"), None);
    }
}
