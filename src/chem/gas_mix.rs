//! CO2 fraction of a gas stream: mole (volume) fraction ↔ mass fraction, given what else the
//! stream holds.
//!
//! w_CO2 = x_CO2·M_CO2 / Σ x_i·M_i. The impurities (N2, O2, Ar, CH4, H2, H2O, H2S, CO, or
//! any other formula) are given as mole fractions and their molar masses come from the
//! formula parser.
//!
//! There is no default for unstated impurities. A conservative default would have to give
//! the lowest CO2 mass fraction, that is assume the heaviest impurity, and there is no upper
//! bound on that (SO2 is 64 g/mol, heavier than CO2). "The balance is N2" is a common
//! assumption but not a conservative one: N2 (28 g/mol) is lighter than Ar or H2S and yields a
//! higher mass fraction. So the caller must state the stream or name a balance gas.

use std::fmt;

use crate::chem::M_CO2;
use crate::chem::formula::{Formula, FormulaError};

/// How far stated fractions may add up away from 1 (rounding in a lab report).
pub const SUM_TOLERANCE: f64 = 1e-6;

/// What makes up whatever the listed fractions leave.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Balance<'a> {
    /// The listed fractions are the whole stream: they must add up to 1.
    Stated,
    /// This gas (a formula, e.g. "N2") takes the remainder; if it is also listed, the
    /// remainder is added to it.
    Gas(&'a str),
}

/// One impurity of the stream.
#[derive(Debug, Clone, PartialEq)]
pub struct GasComponent {
    pub formula: Formula,
    pub mole_fraction: f64,
    pub mass_fraction: f64,
    /// True for the balance gas, whose fraction was assumed, not measured.
    pub balance: bool,
}

/// A whole stream: CO2 and its impurities, each by mole and by mass.
#[derive(Debug, Clone, PartialEq)]
pub struct StreamComposition {
    co2_mole_fraction: f64,
    co2_mass_fraction: f64,
    impurities: Vec<GasComponent>,
    mean_molar_mass: f64,
}

/// An impurity before mass fractions are known.
struct Part {
    formula: Formula,
    mole_fraction: f64,
    balance: bool,
}

impl StreamComposition {
    /// From the CO2 mole fraction and the impurities' mole fractions of the whole stream.
    pub fn from_mole_fractions(
        co2_mole_fraction: f64,
        impurities: &[(&str, f64)],
        balance: Balance,
    ) -> Result<StreamComposition, GasMixError> {
        let x = fraction("CO2 mole fraction", co2_mole_fraction)?;
        let parts = complete(impurities, x, balance)?;
        Ok(build(x, parts))
    }

    /// From the CO2 mass fraction and the make-up of the rest of the stream, given as mole
    /// fractions of the impurities alone (they add up to 1 among themselves). A pure stream
    /// (mass fraction 1) needs no impurities.
    pub fn from_co2_mass_fraction(
        co2_mass_fraction: f64,
        impurity_shares: &[(&str, f64)],
        balance: Balance,
    ) -> Result<StreamComposition, GasMixError> {
        let w = fraction("CO2 mass fraction", co2_mass_fraction)?;
        if w == 1.0 && impurity_shares.is_empty() && balance == Balance::Stated {
            return Ok(build(1.0, Vec::new()));
        }
        let mut parts = complete(impurity_shares, 0.0, balance)?;
        let impurity_molar_mass: f64 = parts
            .iter()
            .map(|p| p.mole_fraction * p.formula.molar_mass())
            .sum();
        // Moles in one gram of stream: w/M_CO2 of CO2 and (1 − w)/M_imp of the rest.
        let co2_mol = w / M_CO2;
        let impurity_mol = (1.0 - w) / impurity_molar_mass;
        let x = co2_mol / (co2_mol + impurity_mol);
        for p in &mut parts {
            p.mole_fraction *= 1.0 - x;
        }
        Ok(build(x, parts))
    }

    pub fn co2_mole_fraction(&self) -> f64 {
        self.co2_mole_fraction
    }

    pub fn co2_mass_fraction(&self) -> f64 {
        self.co2_mass_fraction
    }

    /// The impurities in the order given, the balance gas last unless it was listed.
    pub fn impurities(&self) -> &[GasComponent] {
        &self.impurities
    }

    /// Mole-weighted mean molar mass of the stream, g/mol.
    pub fn mean_molar_mass(&self) -> f64 {
        self.mean_molar_mass
    }
}

fn fraction(what: &str, value: f64) -> Result<f64, GasMixError> {
    if (0.0..=1.0).contains(&value) {
        Ok(value)
    } else {
        Err(GasMixError::FractionOutOfRange {
            what: what.to_string(),
            value,
        })
    }
}

fn gas(text: &str) -> Result<Formula, GasMixError> {
    let formula = Formula::parse(text).map_err(|source| GasMixError::Formula {
        text: text.to_string(),
        source,
    })?;
    let is_co2 =
        formula.counts().len() == 2 && formula.count("C") == 1.0 && formula.count("O") == 2.0;
    if is_co2 {
        return Err(GasMixError::Co2Listed);
    }
    Ok(formula)
}

/// Parses and checks the listed gases and completes them so that, with `taken` (the CO2
/// already accounted for), they add up to 1.
fn complete(
    listed: &[(&str, f64)],
    taken: f64,
    balance: Balance,
) -> Result<Vec<Part>, GasMixError> {
    let mut parts: Vec<Part> = Vec::with_capacity(listed.len() + 1);
    for &(text, value) in listed {
        let mole_fraction = fraction(&format!("{text} mole fraction"), value)?;
        let formula = gas(text)?;
        if parts.iter().any(|p| p.formula == formula) {
            return Err(GasMixError::Duplicate {
                text: text.to_string(),
            });
        }
        parts.push(Part {
            formula,
            mole_fraction,
            balance: false,
        });
    }
    let sum = taken + parts.iter().map(|p| p.mole_fraction).sum::<f64>();
    match balance {
        Balance::Stated if (sum - 1.0).abs() > SUM_TOLERANCE => Err(GasMixError::SumNotOne { sum }),
        Balance::Stated => Ok(parts),
        Balance::Gas(text) if sum - 1.0 > SUM_TOLERANCE => Err(GasMixError::SumExceedsOne {
            sum,
            balance: text.to_string(),
        }),
        Balance::Gas(text) => {
            let formula = gas(text)?;
            let remainder = (1.0 - sum).max(0.0);
            match parts.iter_mut().find(|p| p.formula == formula) {
                Some(p) => {
                    p.mole_fraction += remainder;
                    p.balance = true;
                }
                None => parts.push(Part {
                    formula,
                    mole_fraction: remainder,
                    balance: true,
                }),
            }
            Ok(parts)
        }
    }
}

fn build(co2_mole_fraction: f64, parts: Vec<Part>) -> StreamComposition {
    let co2_mass = co2_mole_fraction * M_CO2;
    let mean_molar_mass = co2_mass
        + parts
            .iter()
            .map(|p| p.mole_fraction * p.formula.molar_mass())
            .sum::<f64>();
    let impurities = parts
        .into_iter()
        .map(|p| GasComponent {
            mass_fraction: p.mole_fraction * p.formula.molar_mass() / mean_molar_mass,
            formula: p.formula,
            mole_fraction: p.mole_fraction,
            balance: p.balance,
        })
        .collect();
    StreamComposition {
        co2_mole_fraction,
        co2_mass_fraction: co2_mass / mean_molar_mass,
        impurities,
        mean_molar_mass,
    }
}

/// Why a stream composition was refused.
#[derive(Debug, Clone, PartialEq)]
pub enum GasMixError {
    FractionOutOfRange { what: String, value: f64 },
    SumNotOne { sum: f64 },
    SumExceedsOne { sum: f64, balance: String },
    Formula { text: String, source: FormulaError },
    Co2Listed,
    Duplicate { text: String },
}

impl fmt::Display for GasMixError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            GasMixError::FractionOutOfRange { what, value } => {
                write!(f, "{what} is {value}; it must lie from 0 to 1")
            }
            GasMixError::SumNotOne { sum } => write!(
                f,
                "fractions add up to {sum:.7}, not 1 (within {SUM_TOLERANCE:e}): state the rest of \
                 the stream or name a balance gas"
            ),
            GasMixError::SumExceedsOne { sum, balance } => write!(
                f,
                "fractions add up to {sum:.7}, more than 1, leaving nothing for the balance gas {balance}"
            ),
            GasMixError::Formula { text, source } => write!(f, "gas '{text}': {source}"),
            GasMixError::Co2Listed => {
                write!(
                    f,
                    "CO2 is given on its own; do not list it among the impurities"
                )
            }
            GasMixError::Duplicate { text } => write!(f, "gas '{text}' is listed twice"),
        }
    }
}

impl std::error::Error for GasMixError {
    fn source(&self) -> Option<&(dyn std::error::Error + 'static)> {
        match self {
            GasMixError::Formula { source, .. } => Some(source),
            _ => None,
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use proptest::prelude::*;

    fn stream(x: f64, impurities: &[(&str, f64)], balance: Balance) -> StreamComposition {
        StreamComposition::from_mole_fractions(x, impurities, balance)
            .unwrap_or_else(|e| panic!("{e}"))
    }

    /// Computed here from the CIAAW 2021 weights (no outside source): 95 mol% CO2, 5 mol% N2 →
    /// w = 0.95·44.009 / (0.95·44.009 + 0.05·28.014) = 0.967583.
    #[test]
    fn mole_to_mass_with_nitrogen() {
        let s = stream(0.95, &[("N2", 0.05)], Balance::Stated);
        assert!(
            (s.co2_mass_fraction() - 0.967583).abs() < 5e-7,
            "{}",
            s.co2_mass_fraction()
        );
        assert!((s.mean_molar_mass() - 43.20925).abs() < 1e-9);
        let n2 = &s.impurities()[0];
        assert!((n2.mass_fraction + s.co2_mass_fraction() - 1.0).abs() < 1e-15);
        assert!(!n2.balance);
    }

    #[test]
    fn heavier_impurities_lower_the_mass_fraction() {
        let w = |gas: &str| stream(0.95, &[(gas, 0.05)], Balance::Stated).co2_mass_fraction();
        assert!(w("H2") > w("CH4"));
        assert!(w("CH4") > w("H2O"));
        assert!(w("H2O") > w("N2"));
        assert!(w("N2") > w("O2"));
        assert!(w("O2") > w("H2S"));
        assert!(w("H2S") > w("Ar"));
        assert!((w("CO") - w("N2")).abs() < 1e-4);
        assert_eq!(stream(1.0, &[], Balance::Stated).co2_mass_fraction(), 1.0);
    }

    #[test]
    fn balance_gas_takes_the_remainder() {
        let s = stream(0.96, &[("O2", 0.01), ("Ar", 0.005)], Balance::Gas("N2"));
        let n2 = &s.impurities()[2];
        assert_eq!(n2.formula.to_string(), "N2");
        assert!((n2.mole_fraction - 0.025).abs() < 1e-12);
        assert!(n2.balance);
        // Listed and balance: the remainder is added to it.
        let t = stream(0.96, &[("N2", 0.02), ("O2", 0.01)], Balance::Gas("N2"));
        assert_eq!(t.impurities().len(), 2);
        assert!((t.impurities()[0].mole_fraction - 0.03).abs() < 1e-12);
        assert!(t.impurities()[0].balance);
    }

    #[test]
    fn mass_to_mole_inverts() {
        let forward = stream(
            0.95,
            &[("N2", 0.03), ("Ar", 0.01), ("H2O", 0.01)],
            Balance::Stated,
        );
        // The impurities' own make-up: 3 : 1 : 1.
        let shares = [("N2", 0.6), ("Ar", 0.2), ("H2O", 0.2)];
        let back = StreamComposition::from_co2_mass_fraction(
            forward.co2_mass_fraction(),
            &shares,
            Balance::Stated,
        )
        .unwrap_or_else(|e| panic!("{e}"));
        assert!((back.co2_mole_fraction() - 0.95).abs() < 1e-12);
        assert!((back.impurities()[1].mole_fraction - 0.01).abs() < 1e-12);
        let pure = StreamComposition::from_co2_mass_fraction(1.0, &[], Balance::Stated);
        assert_eq!(pure.map(|p| p.co2_mole_fraction()), Ok(1.0));
    }

    #[test]
    fn refusals() {
        let e = |x: f64, list: &[(&str, f64)], b: Balance| {
            StreamComposition::from_mole_fractions(x, list, b).err()
        };
        assert!(matches!(
            e(1.2, &[], Balance::Stated),
            Some(GasMixError::FractionOutOfRange { .. })
        ));
        assert!(matches!(
            e(f64::NAN, &[], Balance::Stated),
            Some(GasMixError::FractionOutOfRange { .. })
        ));
        assert!(matches!(
            e(0.9, &[("N2", -0.1)], Balance::Stated),
            Some(GasMixError::FractionOutOfRange { .. })
        ));
        assert!(matches!(
            e(0.95, &[("N2", 0.04)], Balance::Stated),
            Some(GasMixError::SumNotOne { .. })
        ));
        // Within the tolerance is accepted.
        assert!(e(0.95, &[("N2", 0.0499995)], Balance::Stated).is_none());
        assert!(matches!(
            e(0.95, &[("N2", 0.06)], Balance::Gas("Ar")),
            Some(GasMixError::SumExceedsOne { .. })
        ));
        assert_eq!(
            e(0.95, &[("CO2", 0.05)], Balance::Stated),
            Some(GasMixError::Co2Listed)
        );
        assert_eq!(
            e(0.95, &[("OC", 0.05)], Balance::Gas("O2C")),
            Some(GasMixError::Co2Listed)
        );
        assert_eq!(
            e(0.9, &[("N2", 0.05), ("NN", 0.05)], Balance::Stated),
            Some(GasMixError::Duplicate { text: "NN".into() })
        );
        let bad = e(0.9, &[("Xx", 0.1)], Balance::Stated);
        assert!(matches!(bad, Some(GasMixError::Formula { .. })));
        let message = bad.map(|b| b.to_string()).unwrap_or_default();
        assert_eq!(
            message,
            "gas 'Xx': unknown element symbol 'Xx' at character 0 (0-based)"
        );
        assert!(matches!(
            StreamComposition::from_co2_mass_fraction(0.97, &[], Balance::Stated),
            Err(GasMixError::SumNotOne { .. })
        ));
    }

    proptest! {
        #![proptest_config(ProptestConfig::with_cases(128))]

        #[test]
        fn mole_mass_round_trip(x in 0.0f64..=1.0, a in 0.0f64..1.0, b in 0.0f64..1.0) {
            let rest = 1.0 - x;
            let list = [("H2S", rest * a), ("CH4", rest * (1.0 - a) * b)];
            let forward = StreamComposition::from_mole_fractions(x, &list, Balance::Gas("N2"));
            prop_assert!(forward.is_ok());
            let forward = forward.unwrap_or_else(|e| panic!("{e}"));
            let w = forward.co2_mass_fraction();
            prop_assert!((0.0..=1.0).contains(&w));
            let shares: Vec<(String, f64)> = forward
                .impurities()
                .iter()
                .map(|c| (c.formula.to_string(), if rest > 0.0 { c.mole_fraction / rest } else { 0.0 }))
                .collect();
            let shares: Vec<(&str, f64)> = shares.iter().map(|(t, v)| (t.as_str(), *v)).collect();
            if rest > 1e-9 {
                let back = StreamComposition::from_co2_mass_fraction(w, &shares, Balance::Stated);
                let back = back.map(|s| s.co2_mole_fraction());
                prop_assert!(back.as_ref().is_ok_and(|b| (b - x).abs() < 1e-9), "{:?} vs {}", back, x);
            }
        }
    }
}
