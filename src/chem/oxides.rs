//! CO2 potential of a rock or an alkaline material from its oxide composition (wt%).
//!
//! Two published forms, both returning each term so a table can show them:
//! - the Steinour formula as used by Huntzinger et al. (2009, Environ. Sci. Technol.
//!   43:1986), in wt% CO2, with every coefficient derived from molar masses;
//! - the modified form of Renforth (2019, Nat. Commun. 10:1401), in kg CO2 per t, with the
//!   pathway factor η from 1 (carbonate) to 2 (bicarbonate).
//!
//! Both treat each oxide per mole of oxide. CaO, MgO, Na2O and K2O each carry two units of
//! positive charge per mole (one Ca²⁺, or two Na⁺), so one mole of any of them balances one
//! CO3²⁻ (η = 1) or two HCO3⁻ (η = 2): for Na2O and K2O that is 0.5 and 1 CO2 per alkali
//! cation, the same as the carbonate and bicarbonate routes of [`crate::chem::mineral`]. A unit
//! coefficient for Na2O (ε = 1) is therefore not a double count of its two cations.

use std::fmt;

use crate::chem::elements::weight;
use crate::chem::{M_C, M_CO2};

/// Largest accepted total of an analysis, wt%. Good analyses close to 100 ± 0.5 wt%
/// (common practice); more than that means a unit or transcription error, which would
/// inflate the potential.
pub const MAX_TOTAL_WT_PCT: f64 = 100.5;

/// A constituent of a rock analysis. `CaCO3` and `Tic` (total inorganic carbon, wt% C) are
/// not oxides but measurements of the carbonate already in the rock; `CO2` is the oxide
/// column in which analyses report that same carbonate.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Constituent {
    CaO,
    MgO,
    Na2O,
    K2O,
    SO3,
    P2O5,
    FeO,
    Fe2O3,
    SiO2,
    Al2O3,
    TiO2,
    MnO,
    /// Reported for ultramafic rocks, the main mineralization feedstock.
    Cr2O3,
    /// Reported for ultramafic rocks, the main mineralization feedstock.
    NiO,
    CO2,
    CaCO3,
    Tic,
}

impl Constituent {
    pub const ALL: [Constituent; 17] = [
        Constituent::CaO,
        Constituent::MgO,
        Constituent::Na2O,
        Constituent::K2O,
        Constituent::SO3,
        Constituent::P2O5,
        Constituent::FeO,
        Constituent::Fe2O3,
        Constituent::SiO2,
        Constituent::Al2O3,
        Constituent::TiO2,
        Constituent::MnO,
        Constituent::Cr2O3,
        Constituent::NiO,
        Constituent::CO2,
        Constituent::CaCO3,
        Constituent::Tic,
    ];

    /// The name as written in an analysis: the formula, or `TIC`.
    pub fn name(self) -> &'static str {
        match self {
            Constituent::CaO => "CaO",
            Constituent::MgO => "MgO",
            Constituent::Na2O => "Na2O",
            Constituent::K2O => "K2O",
            Constituent::SO3 => "SO3",
            Constituent::P2O5 => "P2O5",
            Constituent::FeO => "FeO",
            Constituent::Fe2O3 => "Fe2O3",
            Constituent::SiO2 => "SiO2",
            Constituent::Al2O3 => "Al2O3",
            Constituent::TiO2 => "TiO2",
            Constituent::MnO => "MnO",
            Constituent::Cr2O3 => "Cr2O3",
            Constituent::NiO => "NiO",
            Constituent::CO2 => "CO2",
            Constituent::CaCO3 => "CaCO3",
            Constituent::Tic => "TIC",
        }
    }

    /// The constituent with this name, ignoring ASCII case (`cao`, `TIC`, `tic`).
    pub fn from_name(name: &str) -> Option<Constituent> {
        Constituent::ALL
            .into_iter()
            .find(|c| c.name().eq_ignore_ascii_case(name))
    }

    /// g/mol; for TIC that of carbon, since TIC is given as wt% C.
    pub const fn molar_mass(self) -> f64 {
        let o = weight("O");
        match self {
            Constituent::CaO => weight("Ca") + o,
            Constituent::MgO => weight("Mg") + o,
            Constituent::Na2O => 2.0 * weight("Na") + o,
            Constituent::K2O => 2.0 * weight("K") + o,
            Constituent::SO3 => weight("S") + 3.0 * o,
            Constituent::P2O5 => 2.0 * weight("P") + 5.0 * o,
            Constituent::FeO => weight("Fe") + o,
            Constituent::Fe2O3 => 2.0 * weight("Fe") + 3.0 * o,
            Constituent::SiO2 => weight("Si") + 2.0 * o,
            Constituent::Al2O3 => 2.0 * weight("Al") + 3.0 * o,
            Constituent::TiO2 => weight("Ti") + 2.0 * o,
            Constituent::MnO => weight("Mn") + o,
            Constituent::Cr2O3 => 2.0 * weight("Cr") + 3.0 * o,
            Constituent::NiO => weight("Ni") + o,
            Constituent::CO2 => M_CO2,
            Constituent::CaCO3 => weight("Ca") + weight("C") + 3.0 * o,
            Constituent::Tic => M_C,
        }
    }

    /// CaCO3 and TIC are separate measurements of carbonate whose CaO and CO2 are already in
    /// the oxide columns, so they stay out of the analysis total.
    fn in_total(self) -> bool {
        !matches!(self, Constituent::CaCO3 | Constituent::Tic)
    }

    fn is_carbonate(self) -> bool {
        matches!(
            self,
            Constituent::CaCO3 | Constituent::Tic | Constituent::CO2
        )
    }
}

impl fmt::Display for Constituent {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(self.name())
    }
}

/// Why an oxide composition or a parameter was refused.
#[derive(Debug, Clone, PartialEq)]
pub enum OxideError {
    UnknownConstituent {
        name: String,
    },
    NotFinite {
        constituent: Constituent,
    },
    Negative {
        constituent: Constituent,
        wt_pct: f64,
    },
    Duplicate {
        constituent: Constituent,
    },
    /// Two measures of the same carbonate (CaCO3, TIC, CO2): using both would count it twice.
    ConflictingCarbonate {
        first: Constituent,
        second: Constituent,
    },
    TotalTooHigh {
        total_wt_pct: f64,
    },
    EtaOutOfRange {
        eta: f64,
    },
    DeltaNotFinite {
        delta: f64,
    },
}

impl fmt::Display for OxideError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            OxideError::UnknownConstituent { name } => {
                let known: Vec<&str> = Constituent::ALL.iter().map(|c| c.name()).collect();
                write!(
                    f,
                    "unknown oxide '{name}': expected one of {}",
                    known.join(", ")
                )
            }
            OxideError::NotFinite { constituent } => {
                write!(f, "{constituent} is not a finite number of wt%")
            }
            OxideError::Negative {
                constituent,
                wt_pct,
            } => write!(f, "{constituent} is {wt_pct} wt%; it cannot be negative"),
            OxideError::Duplicate { constituent } => {
                write!(f, "{constituent} is given more than once")
            }
            OxideError::ConflictingCarbonate { first, second } => write!(
                f,
                "{first} and {second} both measure the carbonate already in the rock; give one"
            ),
            OxideError::TotalTooHigh { total_wt_pct } => write!(
                f,
                "oxides total {total_wt_pct:.3} wt%, more than {MAX_TOTAL_WT_PCT} wt%"
            ),
            OxideError::EtaOutOfRange { eta } => write!(
                f,
                "pathway factor eta is {eta}; it must lie from 1 (carbonate) to 2 (bicarbonate)"
            ),
            OxideError::DeltaNotFinite { delta } => {
                write!(
                    f,
                    "phosphate coefficient delta is {delta}; it must be a finite number"
                )
            }
        }
    }
}

impl std::error::Error for OxideError {}

/// A checked oxide composition in wt%, in the order given.
#[derive(Debug, Clone, PartialEq)]
pub struct OxideComposition {
    entries: Vec<(Constituent, f64)>,
}

impl OxideComposition {
    /// Checks names, values and the total; constituents not given are 0 wt%.
    pub fn new(entries: &[(&str, f64)]) -> Result<OxideComposition, OxideError> {
        let mut checked: Vec<(Constituent, f64)> = Vec::with_capacity(entries.len());
        for &(name, wt_pct) in entries {
            let constituent =
                Constituent::from_name(name).ok_or_else(|| OxideError::UnknownConstituent {
                    name: name.to_string(),
                })?;
            if !wt_pct.is_finite() {
                return Err(OxideError::NotFinite { constituent });
            }
            if wt_pct < 0.0 {
                return Err(OxideError::Negative {
                    constituent,
                    wt_pct,
                });
            }
            if checked.iter().any(|&(c, _)| c == constituent) {
                return Err(OxideError::Duplicate { constituent });
            }
            if let Some(&(first, _)) = checked
                .iter()
                .find(|(c, _)| c.is_carbonate() && constituent.is_carbonate())
            {
                return Err(OxideError::ConflictingCarbonate {
                    first,
                    second: constituent,
                });
            }
            checked.push((constituent, wt_pct));
        }
        let composition = OxideComposition { entries: checked };
        let total_wt_pct = composition.total_wt_pct();
        if total_wt_pct > MAX_TOTAL_WT_PCT {
            return Err(OxideError::TotalTooHigh { total_wt_pct });
        }
        Ok(composition)
    }

    /// wt% of a constituent, 0 when not given.
    pub fn wt_pct(&self, constituent: Constituent) -> f64 {
        self.entries
            .iter()
            .find(|(c, _)| *c == constituent)
            .map_or(0.0, |&(_, w)| w)
    }

    /// Sum of the oxide columns (CaCO3 and TIC excluded, see [`Constituent`]).
    pub fn total_wt_pct(&self) -> f64 {
        self.entries
            .iter()
            .filter(|(c, _)| c.in_total())
            .map(|&(_, w)| w)
            .sum()
    }

    /// The pre-existing carbonate as given (CaCO3, TIC or CO2), if any.
    pub fn carbonate(&self) -> Option<(Constituent, f64)> {
        self.entries.iter().copied().find(|(c, _)| c.is_carbonate())
    }
}

/// One term of a potential: `value` is that constituent's contribution.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Term {
    pub constituent: Constituent,
    pub wt_pct: f64,
    /// The formula's coefficient for this term (see [`steinour`] and [`renforth`]).
    pub coefficient: f64,
    pub value: f64,
}

/// Steinour coefficients, each a ratio of molar masses:
/// CO2 wt% = a(CaO − b·CaCO3 − c·SO3) + d·MgO + e·Na2O + f·K2O.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct SteinourCoefficients {
    /// M_CO2 / M_CaO: CO2 per CaO.
    pub a: f64,
    /// M_CaO / M_CaCO3: CaO bound in the carbonate already present.
    pub b: f64,
    /// M_CaO / M_SO3: CaO bound as sulfate.
    pub c: f64,
    /// M_CO2 / M_MgO.
    pub d: f64,
    /// M_CO2 / M_Na2O.
    pub e: f64,
    /// M_CO2 / M_K2O.
    pub f: f64,
}

const M_CAO: f64 = Constituent::CaO.molar_mass();
const M_CACO3: f64 = Constituent::CaCO3.molar_mass();

/// The Steinour coefficients derived from the CIAAW 2021 weights.
pub const STEINOUR: SteinourCoefficients = SteinourCoefficients {
    a: M_CO2 / M_CAO,
    b: M_CAO / M_CACO3,
    c: M_CAO / Constituent::SO3.molar_mass(),
    d: M_CO2 / Constituent::MgO.molar_mass(),
    e: M_CO2 / Constituent::Na2O.molar_mass(),
    f: M_CO2 / Constituent::K2O.molar_mass(),
};

/// CO2 potential by the Steinour formula, in wt% CO2 (kg CO2 per 100 kg of rock).
#[derive(Debug, Clone, PartialEq)]
pub struct SteinourPotential {
    /// CaO, pre-existing carbonate, SO3, MgO, Na2O, K2O, in that order.
    pub terms: Vec<Term>,
    pub co2_wt_pct: f64,
}

impl SteinourPotential {
    pub fn kg_co2_per_t(&self) -> f64 {
        self.co2_wt_pct * 10.0
    }
}

/// The Steinour formula. Each term's value is `coefficient × wt_pct` in wt% CO2. The CaO,
/// carbonate and SO3 terms are a, −a·b and −a·c; carbonate given as TIC or CO2 is first
/// turned into CaCO3 by molar masses, so its coefficient is −M_CO2/M_C or exactly −1.
/// Terms are not clamped: the calcium part goes negative when carbonate and sulfate bind more
/// than the CaO present, and the table should show that rather than hide it.
pub fn steinour(rock: &OxideComposition) -> SteinourPotential {
    let k = STEINOUR;
    let (carbonate, carbonate_wt_pct) = rock.carbonate().unwrap_or((Constituent::CaCO3, 0.0));
    let as_caco3 = M_CACO3 / carbonate.molar_mass();
    let coefficients = [
        (Constituent::CaO, k.a),
        (carbonate, -k.a * k.b * as_caco3),
        (Constituent::SO3, -k.a * k.c),
        (Constituent::MgO, k.d),
        (Constituent::Na2O, k.e),
        (Constituent::K2O, k.f),
    ];
    let terms: Vec<Term> = coefficients
        .into_iter()
        .map(|(constituent, coefficient)| {
            let wt_pct = if constituent == carbonate {
                carbonate_wt_pct
            } else {
                rock.wt_pct(constituent)
            };
            Term {
                constituent,
                wt_pct,
                coefficient,
                value: coefficient * wt_pct,
            }
        })
        .collect();
    SteinourPotential {
        co2_wt_pct: terms.iter().map(|t| t.value).sum(),
        terms,
    }
}

/// Parameters of the Renforth (2019) form that are not fixed at ±1.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct RenforthParameters {
    eta: f64,
    delta: f64,
}

impl RenforthParameters {
    /// δ, the phosphate coefficient, unless the caller sets another. P2O5 gives two phosphate
    /// ions that bind cation charge as HPO4²⁻ (2 divalent equivalents per P2O5, δ = −2) or
    /// PO4³⁻ (3, δ = −3); REFERENCES.md records δ as uncertain between −2 and −3 (from memory).
    pub const DEFAULT_DELTA: f64 = -2.0;

    /// η: 1 for carbonate, 2 for bicarbonate; any value in between is accepted for mixed or
    /// partly re-equilibrated pathways. δ starts at [`Self::DEFAULT_DELTA`].
    pub fn new(eta: f64) -> Result<RenforthParameters, OxideError> {
        if !(1.0..=2.0).contains(&eta) {
            return Err(OxideError::EtaOutOfRange { eta });
        }
        Ok(RenforthParameters {
            eta,
            delta: Self::DEFAULT_DELTA,
        })
    }

    /// The same parameters with another δ (−2, −3, or any finite value the caller argues).
    pub fn with_delta(self, delta: f64) -> Result<RenforthParameters, OxideError> {
        if !delta.is_finite() {
            return Err(OxideError::DeltaNotFinite { delta });
        }
        Ok(RenforthParameters { delta, ..self })
    }

    pub fn eta(&self) -> f64 {
        self.eta
    }

    pub fn delta(&self) -> f64 {
        self.delta
    }
}

/// CO2 potential by the modified form of Renforth (2019), in kg CO2 per t of material.
#[derive(Debug, Clone, PartialEq)]
pub struct RenforthPotential {
    pub parameters: RenforthParameters,
    /// CaO, MgO, Na2O, K2O, SO3, P2O5, in that order.
    pub terms: Vec<Term>,
    pub kg_co2_per_t: f64,
}

/// The modified Steinour form of Renforth (2019):
/// E_pot = (M_CO2/100)·(α CaO/M_CaO + β MgO/M_MgO + ε Na2O/M_Na2O + θ K2O/M_K2O
///         + γ SO3/M_SO3 + δ P2O5/M_P2O5)·10³·η, in kg CO2/t,
/// with α = β = ε = θ = 1 and γ = −1. Each term's `coefficient` is its α…δ and its value the
/// term's share of E_pot. This form has no carbonate term: for a rock that already holds
/// carbonate give CaO net of it, or use [`steinour`], which deducts it.
pub fn renforth(rock: &OxideComposition, parameters: RenforthParameters) -> RenforthPotential {
    let coefficients = [
        (Constituent::CaO, 1.0),
        (Constituent::MgO, 1.0),
        (Constituent::Na2O, 1.0),
        (Constituent::K2O, 1.0),
        (Constituent::SO3, -1.0),
        (Constituent::P2O5, parameters.delta),
    ];
    let terms: Vec<Term> = coefficients
        .into_iter()
        .map(|(constituent, coefficient)| {
            let wt_pct = rock.wt_pct(constituent);
            let mol_per_100_g = coefficient * wt_pct / constituent.molar_mass();
            Term {
                constituent,
                wt_pct,
                coefficient,
                value: M_CO2 / 100.0 * mol_per_100_g * 1e3 * parameters.eta,
            }
        })
        .collect();
    RenforthPotential {
        parameters,
        kg_co2_per_t: terms.iter().map(|t| t.value).sum(),
        terms,
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::chem::formula::Formula;
    use crate::chem::mineral::{Redox, Route, uptake};

    fn rock(entries: &[(&str, f64)]) -> OxideComposition {
        match OxideComposition::new(entries) {
            Ok(r) => r,
            Err(e) => panic!("{e}"),
        }
    }

    fn err(entries: &[(&str, f64)]) -> OxideError {
        match OxideComposition::new(entries) {
            Ok(r) => panic!("accepted {r:?}"),
            Err(e) => e,
        }
    }

    #[test]
    fn molar_masses_match_the_parser() {
        for c in Constituent::ALL {
            let formula = if c == Constituent::Tic { "C" } else { c.name() };
            let parsed = Formula::parse(formula).map(|f| f.molar_mass());
            let m = parsed.unwrap_or(f64::NAN);
            assert!((m - c.molar_mass()).abs() < 1e-12, "{c}");
            assert_eq!(Constituent::from_name(&c.name().to_lowercase()), Some(c));
        }
    }

    /// REFERENCES.md: the Steinour formula as used by Huntzinger et al. (2009) — from memory —
    /// prints 0.785, 0.56, 0.7, 1.091, 0.71, 0.468. Derived here from molar masses. a, b, c and
    /// e round to the printed digits; d (1.0919) and f (0.4672) do not (1.092, 0.467), and no
    /// set of atomic weights gives 0.468 for CO2/K2O, so the printed d and f look truncated or
    /// taken from older weights. The check is therefore to one unit of the last printed digit.
    #[test]
    fn steinour_coefficients_match_the_printed_ones() {
        let k = STEINOUR;
        for (derived, printed, unit) in [
            (k.a, 0.785, 0.001),
            (k.b, 0.56, 0.01),
            (k.c, 0.7, 0.1),
            (k.d, 1.091, 0.001),
            (k.e, 0.71, 0.01),
            (k.f, 0.468, 0.001),
        ] {
            assert!((derived - printed).abs() <= unit, "{derived} vs {printed}");
        }
        for (derived, printed, half_unit) in [
            (k.a, 0.785, 0.0005),
            (k.b, 0.56, 0.005),
            (k.c, 0.7, 0.05),
            (k.e, 0.71, 0.005),
        ] {
            assert!(
                (derived - printed).abs() <= half_unit,
                "{derived} vs {printed}"
            );
        }
    }

    /// REFERENCES.md example (computed): CaO 10, MgO 7, Na2O 2.5, K2O 1.5 wt% → 17.96 wt% CO2.
    /// That value comes from the printed coefficients (17.964); the derived ones give 17.967,
    /// so the check allows 0.01 wt%, and the printed-coefficient sum is recomputed to show it.
    #[test]
    fn references_md_steinour_example() {
        let r = rock(&[("CaO", 10.0), ("MgO", 7.0), ("Na2O", 2.5), ("K2O", 1.5)]);
        let s = steinour(&r);
        assert!((s.co2_wt_pct - 17.96).abs() <= 0.01, "{}", s.co2_wt_pct);
        let printed: f64 = 0.785 * 10.0 + 1.091 * 7.0 + 0.71 * 2.5 + 0.468 * 1.5;
        assert!((printed - 17.96).abs() < 0.005, "{printed}");
        assert_eq!(s.terms.len(), 6);
        assert_eq!(s.terms[0].constituent, Constituent::CaO);
        assert_eq!(s.terms[0].value, STEINOUR.a * 10.0);
        assert_eq!(s.terms[1].wt_pct, 0.0);
        assert_eq!(s.terms.iter().map(|t| t.value).sum::<f64>(), s.co2_wt_pct);
        assert_eq!(s.kg_co2_per_t(), s.co2_wt_pct * 10.0);
    }

    /// Pre-existing carbonate: 10 wt% CaCO3, the same carbonate as 1.2011 wt% TIC, or as
    /// 4.4009 wt% CO2 (computed here from molar masses), takes off the same CO2: exactly what
    /// the carbonate already holds (M_CO2/M_CaCO3 × 10 = 4.3971 wt%).
    #[test]
    fn carbonate_as_caco3_tic_or_co2() {
        let base = [("CaO", 20.0), ("SO3", 1.0)];
        let plain = steinour(&rock(&base)).co2_wt_pct;
        let held = 10.0 * M_CO2 / M_CACO3;
        for (name, wt) in [
            ("CaCO3", 10.0),
            ("TIC", 10.0 * M_C / M_CACO3),
            ("CO2", 10.0 * M_CO2 / M_CACO3),
        ] {
            let r = rock(&[base[0], base[1], (name, wt)]);
            let s = steinour(&r);
            assert!((plain - s.co2_wt_pct - held).abs() < 1e-12, "{name}");
            assert_eq!(s.terms[1].constituent.name(), name);
        }
        let co2 = steinour(&rock(&[("CO2", 3.0)]));
        assert!((co2.terms[1].coefficient + 1.0).abs() < 1e-15);
        // SO3 takes its CaO: −a·c per wt%.
        let s = steinour(&rock(&base));
        assert_eq!(s.terms[2].coefficient, -STEINOUR.a * STEINOUR.c);
    }

    /// REFERENCES.md example (computed): CaO 10, MgO 7 only, η = 2 → 309.8 kg CO2/t; η = 1 →
    /// 154.9. Printed to 0.1, checked to half of that.
    #[test]
    fn references_md_renforth_example() {
        let r = rock(&[("CaO", 10.0), ("MgO", 7.0)]);
        for (eta, printed) in [(2.0, 309.8), (1.0, 154.9)] {
            let p = renforth(
                &r,
                RenforthParameters::new(eta).unwrap_or_else(|e| panic!("{e}")),
            );
            assert!(
                (p.kg_co2_per_t - printed).abs() <= 0.05,
                "{}",
                p.kg_co2_per_t
            );
            assert_eq!(p.terms.len(), 6);
            assert_eq!(p.terms[4].coefficient, -1.0);
            assert_eq!(p.terms[5].coefficient, -2.0);
        }
    }

    /// Per mole of oxide, η = 1 and η = 2 agree with the carbonate and bicarbonate routes of
    /// the mineral module (0.5 and 1 CO2 per Na⁺), and the Steinour form agrees with η = 1.
    #[test]
    fn oxide_forms_agree_with_the_cation_routes() {
        for name in ["CaO", "MgO", "Na2O", "K2O"] {
            let oxide = Formula::parse(name).unwrap_or_else(|e| panic!("{e}"));
            let r = rock(&[(name, 100.0)]);
            for (eta, route) in [(1.0, Route::Carbonate), (2.0, Route::Bicarbonate)] {
                let params = RenforthParameters::new(eta).unwrap_or_else(|e| panic!("{e}"));
                let kg_per_t = renforth(&r, params).kg_co2_per_t;
                let per_t = uptake(&oxide, route, Redox::Oxidizing).t_co2_per_t;
                assert!((kg_per_t - 1e3 * per_t).abs() < 1e-9, "{name} eta {eta}");
            }
            let s = steinour(&r).kg_co2_per_t();
            let carbonate = uptake(&oxide, Route::Carbonate, Redox::Oxidizing).t_co2_per_t;
            assert!((s - 1e3 * carbonate).abs() < 1e-9, "{name}");
        }
    }

    #[test]
    fn renforth_delta_and_eta() {
        let r = rock(&[("CaO", 10.0), ("P2O5", 1.0)]);
        let base = RenforthParameters::new(1.5).unwrap_or_else(|e| panic!("{e}"));
        let minus3 = base.with_delta(-3.0).unwrap_or_else(|e| panic!("{e}"));
        assert_eq!(base.delta(), -2.0);
        assert_eq!(minus3.eta(), 1.5);
        let p2 = renforth(&r, base);
        let p3 = renforth(&r, minus3);
        assert!(p3.kg_co2_per_t < p2.kg_co2_per_t);
        assert!((p3.terms[5].value / p2.terms[5].value - 1.5).abs() < 1e-12);
        assert_eq!(
            RenforthParameters::new(2.5),
            Err(OxideError::EtaOutOfRange { eta: 2.5 })
        );
        assert!(RenforthParameters::new(0.99).is_err());
        assert!(RenforthParameters::new(f64::NAN).is_err());
        assert!(base.with_delta(f64::INFINITY).is_err());
    }

    #[test]
    fn input_checks() {
        assert_eq!(
            err(&[("CaX", 1.0)]),
            OxideError::UnknownConstituent { name: "CaX".into() }
        );
        assert_eq!(
            err(&[("MgO", -0.1)]),
            OxideError::Negative {
                constituent: Constituent::MgO,
                wt_pct: -0.1
            }
        );
        assert_eq!(
            err(&[("MgO", f64::NAN)]),
            OxideError::NotFinite {
                constituent: Constituent::MgO
            }
        );
        assert_eq!(
            err(&[("MgO", 1.0), ("mgo", 2.0)]),
            OxideError::Duplicate {
                constituent: Constituent::MgO
            }
        );
        assert_eq!(
            err(&[("CaCO3", 1.0), ("TIC", 0.1)]),
            OxideError::ConflictingCarbonate {
                first: Constituent::CaCO3,
                second: Constituent::Tic
            }
        );
        assert!(matches!(
            err(&[("SiO2", 60.0), ("Al2O3", 40.6)]),
            OxideError::TotalTooHigh { total_wt_pct } if (total_wt_pct - 100.6).abs() < 1e-9
        ));
        assert!(OxideComposition::new(&[("SiO2", 60.0), ("Al2O3", 40.5)]).is_ok());
        // Oxides the formulas do not use still count toward the total; CaCO3 does not.
        let r = rock(&[
            ("SiO2", 50.0),
            ("FeO", 10.0),
            ("CaO", 40.0),
            ("CaCO3", 50.0),
        ]);
        assert_eq!(r.total_wt_pct(), 100.0);
        assert_eq!(steinour(&rock(&[("SiO2", 100.0)])).co2_wt_pct, 0.0);
        let message = err(&[("CaX", 1.0)]).to_string();
        assert!(message.contains("CaX") && message.contains("TIC") && !message.contains('\n'));
    }
}
