//! How a meter reading becomes grams of CO2: a mass meter (mass × CO2 mass fraction) or a
//! volumetric meter (standard volume × CO2 density × CO2 volume fraction, the form of 40 CFR
//! 98.443). The reading is kept as given, with every factor used, so each gram can be traced.

use crate::chem::gas_mix::{Balance, StreamComposition};
use crate::ledger::reading_fields::checked;
use crate::ledger::{Reading, bounds};
use crate::quantity::mass::{MassError, grams_of_f64};
use crate::quantity::volume::{DensityMethod, StandardVolume, VolumeError};
use crate::quantity::{Decimal, Fraction, Mass, MassReading};

/// What a CO2 fraction is a fraction of.
#[derive(Debug, Clone, Copy, PartialEq, Eq, clap::ValueEnum)]
pub enum Basis {
    /// By mass (weight fraction).
    Mass,
    /// By amount of substance, i.e. by volume for ideal mixing.
    Mol,
}

impl Basis {
    fn name(self) -> &'static str {
        match self {
            Basis::Mass => "mass",
            Basis::Mol => "mol",
        }
    }
}

/// The quantity options of a record, as typed.
#[derive(Debug, Clone, Default)]
pub struct MeterInput<'a> {
    pub mass: Option<&'a str>,
    pub volume: Option<&'a str>,
    pub co2_fraction: Option<&'a str>,
    pub co2_basis: Option<Basis>,
    pub density: Option<DensityMethod>,
    pub impurities: Option<&'a str>,
    /// The reading's own uncertainty (95 %), when it has one.
    pub uncertainty: Option<&'a str>,
}

/// Which of a meter reading's quantities a `MeterError` is about.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum MeterField {
    Mass,
    Volume,
    Co2Fraction,
    Impurities,
    Uncertainty,
}

/// Why quantities do not make a meter reading; the command line names the options.
#[derive(Debug, Clone, PartialEq, Eq)]
pub enum MeterError {
    /// A value that is not acceptable.
    Value {
        field: MeterField,
        value: String,
        why: String,
    },
    /// Both a mass and a volume.
    BothQuantities,
    /// Neither a mass nor a volume.
    NoQuantity,
    /// A CO2 mole fraction below 1 on a mass meter, without the other gases to convert it.
    MolNeedsImpurities,
    /// A volumetric meter's CO2 fraction stated by mass.
    VolumeByMass,
    /// The regulatory density asked for a volume at other reference conditions than its own.
    RegulatoryConditions { value: String, why: String },
}

type Result<T> = std::result::Result<T, MeterError>;

fn bad(field: MeterField, value: &str, why: impl std::fmt::Display) -> MeterError {
    MeterError::Value {
        field,
        value: value.into(),
        why: why.to_string(),
    }
}

/// A reading and the grams of CO2 it comes to.
#[derive(Debug, Clone, PartialEq)]
pub struct Measured {
    pub reading: Reading,
    pub mass: Mass,
}

/// Version of the conversion rules, kept in every reading they produced.
pub const CONVERSIONS: &str = "sinkbook-conversions-1";

fn fraction(text: &str) -> Result<Fraction> {
    Fraction::parse(text).map_err(|e| bad(MeterField::Co2Fraction, text, e))
}

/// `N2=0.02,Ar=0.005` → mole fractions of the whole stream.
fn impurities(text: &str) -> Result<Vec<(String, f64)>> {
    text.split(',')
        .map(|part| {
            let (name, x) = part.split_once('=').ok_or_else(|| {
                bad(
                    MeterField::Impurities,
                    part,
                    "write GAS=mole fraction, e.g. N2=0.02",
                )
            })?;
            let x = crate::quantity::Decimal::parse(x.trim())
                .map_err(|e| bad(MeterField::Impurities, part, e))?;
            Ok((name.trim().to_string(), x.to_f64()))
        })
        .collect()
}

/// The CO2 mass fraction of a stream whose CO2 mole fraction is `x`, from its stated impurities.
fn mass_fraction_from_mol(x: Fraction, impurity_text: Option<&str>) -> Result<f64> {
    if x == Fraction::ONE {
        return Ok(1.0);
    }
    let text = impurity_text.ok_or(MeterError::MolNeedsImpurities)?;
    let list = impurities(text)?;
    let refs: Vec<(&str, f64)> = list.iter().map(|(n, v)| (n.as_str(), *v)).collect();
    StreamComposition::from_mole_fractions(x.to_f64(), &refs, Balance::Stated)
        .map(|s| s.co2_mass_fraction())
        .map_err(|e| bad(MeterField::Impurities, text, e))
}

/// Turns the typed quantity options into a reading and grams; a reading's own uncertainty is
/// kept beside it.
pub fn measure(input: &MeterInput<'_>) -> Result<Measured> {
    let mut m = measure_quantity(input)?;
    if let Some(u) = input.uncertainty {
        let d = crate::quantity::fraction::parse_uncertainty(u)
            .map_err(|e| bad(MeterField::Uncertainty, u, e))?;
        m.reading.push("uncertainty", d.to_string());
    }
    Ok(m)
}

fn measure_quantity(input: &MeterInput<'_>) -> Result<Measured> {
    let mut r = Reading::default();
    match (input.mass, input.volume) {
        (Some(_), Some(_)) => Err(MeterError::BothQuantities),
        (None, None) => Err(MeterError::NoQuantity),
        (Some(text), None) => {
            let m = MassReading::parse(text).map_err(|e| bad(MeterField::Mass, text, e))?;
            let basis = input.co2_basis.unwrap_or(Basis::Mass);
            let f = fraction(input.co2_fraction.unwrap_or("1"))?;
            r.push("meter_type", "mass");
            r.push("mass", m.to_string());
            r.push("co2_fraction", f.to_string());
            push_source(&mut r, input, f);
            r.push("co2_basis", basis.name());
            let exact = m
                .grams_exact()
                .map_err(|e| bad(MeterField::Mass, text, e))?;
            let grams = match basis {
                Basis::Mass => co2_of_stream_mass(exact, f).map(Mass::grams),
                Basis::Mol => {
                    let w = mass_fraction_from_mol(f, input.impurities)?;
                    if let Some(i) = input.impurities {
                        r.push("impurities_mol", i);
                    }
                    r.push("co2_mass_fraction", format!("{w:.9}"));
                    r.push("conversions", CONVERSIONS);
                    grams_of_f64(exact.to_f64() * w)
                }
            }
            .map(Mass::from_grams)
            .filter(|m| m.within_limit())
            .ok_or_else(|| bad(MeterField::Mass, text, MassError::TooLarge))?;
            bounds::grams(grams).map_err(|e| bad(MeterField::Mass, text, e))?;
            Ok(Measured {
                reading: r,
                mass: grams,
            })
        }
        (None, Some(text)) => {
            let v = StandardVolume::parse(text).map_err(|e| bad(MeterField::Volume, text, e))?;
            if input.co2_basis == Some(Basis::Mass) {
                return Err(MeterError::VolumeByMass);
            }
            let f = fraction(input.co2_fraction.unwrap_or("1"))?;
            let method = input.density.unwrap_or(DensityMethod::Eos);
            let vm = v.mass(method).map_err(|e| match e {
                VolumeError::RegulatoryNeedsStandard(_) => MeterError::RegulatoryConditions {
                    value: text.into(),
                    why: e.to_string(),
                },
                e => bad(MeterField::Volume, text, e),
            })?;
            r.push("meter_type", "volumetric");
            r.push("volume", v.to_string());
            r.push("reference_conditions", v.conditions.to_string());
            r.push("volume_m3", format!("{:.6}", vm.m3));
            r.push("density_method", method.name());
            r.push("co2_density_kg_m3", format!("{:.9}", vm.density_kg_per_m3));
            r.push("co2_fraction", f.to_string());
            push_source(&mut r, input, f);
            r.push("co2_basis", "mol");
            r.push("conversions", CONVERSIONS);
            let mass = co2_of_stream_kg(vm.kg, f)
                .ok_or_else(|| bad(MeterField::Volume, text, MassError::TooLarge))?;
            bounds::grams(mass).map_err(|e| bad(MeterField::Volume, text, e))?;
            Ok(Measured { reading: r, mass })
        }
    }
}

/// Where a CO2 fraction of 1 came from: `stated` (given as 1 or 100 %) or `assumed` (no
/// --co2-fraction: the default). A fraction other than 1 was always stated, so it carries no
/// source and the readings of metered streams keep the bytes they always had.
fn push_source(r: &mut Reading, input: &MeterInput<'_>, f: Fraction) {
    if f == Fraction::ONE {
        let source = match input.co2_fraction {
            Some(_) => "stated",
            None => "assumed",
        };
        r.push("co2_fraction_source", source);
    }
}

/// Whether a reading's grams rest on a CO2 fraction nobody stated: recorded with
/// `co2_fraction_source` = `assumed`, or — recorded before readings noted the source — a
/// fraction of exactly 1 (the default then as now, so it may have been assumed: counted as
/// assumed). Imported meter-days (`co2_fraction_mean`, from the file's required column) and
/// readings without a CO2 fraction (a leak rate, a rock route) rest on none.
pub fn assumed_fraction(r: &Reading) -> bool {
    match checked(r.co2_fraction_assumed()) {
        Some(assumed) => assumed,
        None => checked(r.co2_fraction()) == Some(Fraction::ONE),
    }
}

/// CO2 in a metered stream mass given exactly in grams, at a CO2 mass fraction: exact, rounded
/// half to even once. None when it leaves the ledger's range.
pub fn co2_of_stream_mass(stream_grams: Decimal, mass_fraction: Fraction) -> Option<Mass> {
    stream_grams
        .checked_mul(mass_fraction.value())
        .and_then(Decimal::round_half_even)
        .map(Mass::from_grams)
        .filter(|m| m.within_limit())
}

/// CO2 in a stream of `stream_kg` kilograms (a standard volume times its density) at a CO2
/// volume fraction, rounded half to even once. None when it leaves the ledger's range.
pub fn co2_of_stream_kg(stream_kg: f64, volume_fraction: Fraction) -> Option<Mass> {
    grams_of_f64(stream_kg * 1000.0 * volume_fraction.to_f64())
        .map(Mass::from_grams)
        .filter(|m| m.within_limit())
}

#[cfg(test)]
mod tests {
    use super::*;

    fn grams(i: MeterInput<'_>) -> i64 {
        measure(&i).unwrap().mass.grams()
    }

    #[test]
    fn mass_meter_is_exact() {
        let i = MeterInput {
            mass: Some("1250.5 t"),
            co2_fraction: Some("98.5%"),
            ..Default::default()
        };
        assert_eq!(grams(i), 1_231_742_500);
    }

    #[test]
    fn volumetric_meter_by_the_regulatory_density() {
        // 40 CFR 98.443 RR-2 form: Q (standard m³) × D × C; D = 0.0018682 t/m³ (read).
        let i = MeterInput {
            volume: Some("1000000 scf"),
            co2_fraction: Some("0.98"),
            density: Some(DensityMethod::Regulatory),
            ..Default::default()
        };
        let expected: f64 = 1e6 * 0.028316846592 * 1.8682 * 0.98 * 1000.0;
        assert_eq!(grams(i), expected.round_ties_even() as i64);
    }

    #[test]
    fn mole_fraction_with_a_mass_meter_needs_the_impurities() {
        let base = MeterInput {
            mass: Some("100 t"),
            co2_fraction: Some("0.95"),
            co2_basis: Some(Basis::Mol),
            ..Default::default()
        };
        assert!(measure(&base).is_err());
        let with = MeterInput {
            impurities: Some("N2=0.05"),
            ..base
        };
        // w = 0.95·44.009 / (0.95·44.009 + 0.05·28.014) = 0.967583 — computed (CIAAW 2021 weights).
        let g = grams(with);
        assert!((g as f64 / 1e8 - 0.967_583).abs() < 1e-6, "{g}");
    }

    #[test]
    fn an_unstated_fraction_is_recorded_as_assumed() {
        let at = |f: Option<&'static str>| {
            measure(&MeterInput {
                mass: Some("10 t"),
                co2_fraction: f,
                ..Default::default()
            })
            .unwrap()
            .reading
        };
        assert_eq!(at(None).get("co2_fraction_source"), Some("assumed"));
        assert!(assumed_fraction(&at(None)));
        assert_eq!(at(Some("100%")).get("co2_fraction_source"), Some("stated"));
        assert!(!assumed_fraction(&at(Some("1"))));
        // A stated fraction below 1 keeps the reading's fields as they always were.
        assert_eq!(at(Some("0.98")).get("co2_fraction_source"), None);
        assert!(!assumed_fraction(&at(Some("0.98"))));
        // Written before the source was noted: a fraction of 1 may have been the default.
        let mut old = Reading::default();
        old.push("co2_fraction", "1");
        assert!(assumed_fraction(&old));
    }

    #[test]
    fn refusals() {
        assert!(measure(&MeterInput::default()).is_err());
        assert!(
            measure(&MeterInput {
                mass: Some("1 t"),
                volume: Some("1 scf"),
                ..Default::default()
            })
            .is_err()
        );
        let v = MeterInput {
            volume: Some("1 scf"),
            co2_basis: Some(Basis::Mass),
            ..Default::default()
        };
        assert_eq!(measure(&v).unwrap_err(), MeterError::VolumeByMass);
    }
}
