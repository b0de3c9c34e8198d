//! A quantity of CO2, C, a carbonate or a mineral converted into CO2 and back: masses, standard
//! gas volumes and species, each step with its working. A refusal names the value
//! ([`Given`]), its text and why; the caller says which option that is.

use crate::chem::formula::Formula;
use crate::chem::mineral::{CO2_PER_C, Redox, Route, co2_content, uptake};
use crate::quantity::volume::{DensityMethod, StandardVolume, VolumeError, VolumeMass};
use crate::quantity::{MassReading, MassUnit};

/// A value of a conversion.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Given {
    Quantity,
    Species,
    To,
}

/// Why a quantity does not convert.
#[derive(Debug, Clone, PartialEq)]
pub enum ConvertError {
    /// A value does not read, or does not convert.
    Value {
        given: Given,
        text: String,
        why: String,
    },
    /// A gas volume the regulatory density cannot weigh: it holds only at standard conditions.
    NeedsStandard {
        given: Given,
        text: String,
        why: String,
    },
}

fn value(given: Given, text: &str, why: impl ToString) -> ConvertError {
    ConvertError::Value {
        given,
        text: text.into(),
        why: why.to_string(),
    }
}

/// How a conversion is taken.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct Options {
    pub density: DensityMethod,
    pub route: Route,
    pub redox: Redox,
}

/// What a conversion gave, and how.
#[derive(Debug, Clone, PartialEq)]
pub struct Conversion {
    pub result: f64,
    pub unit: String,
    pub how: String,
}

type Result<T> = std::result::Result<T, ConvertError>;

/// `quantity` (a mass or a gas volume) of `species` in `to`.
pub fn convert(quantity: &str, species: &str, to: &str, o: &Options) -> Result<Conversion> {
    match MassReading::parse(quantity) {
        Ok(m) => from_mass(&m, quantity, species, to, o),
        Err(mass_err) => {
            let v = StandardVolume::parse(quantity).map_err(|e| match e {
                // Neither unit: say both readings. A volume unit: the volume's own error.
                VolumeError::UnknownUnit(_) => value(
                    Given::Quantity,
                    quantity,
                    format!("not a mass ({mass_err}) nor a gas volume ({e})"),
                ),
                e => value(Given::Quantity, quantity, e),
            })?;
            if species != "CO2" {
                return Err(value(
                    Given::Species,
                    species,
                    "a gas volume converts as CO2 only",
                ));
            }
            from_volume(&v, quantity, to, o)
        }
    }
}

fn volume_mass(v: &StandardVolume, o: &Options, given: Given, text: &str) -> Result<VolumeMass> {
    v.mass(o.density).map_err(|e| match e {
        VolumeError::RegulatoryNeedsStandard(_) => ConvertError::NeedsStandard {
            given,
            text: text.into(),
            why: e.to_string(),
        },
        e => value(given, text, e),
    })
}

fn from_mass(
    m: &MassReading,
    quantity: &str,
    species: &str,
    to: &str,
    o: &Options,
) -> Result<Conversion> {
    let number = m.number.to_f64();
    let unit = m.unit.symbol().to_string();
    let kg = m
        .grams_exact()
        .map_err(|e| value(Given::Quantity, quantity, e))?
        .to_f64()
        / 1e3;
    match (species, to) {
        ("C", "CO2") => Ok(Conversion {
            result: number * CO2_PER_C,
            unit,
            how: format!("× M(CO2)/M(C) = {CO2_PER_C:.5}"),
        }),
        ("CO2", "C") => Ok(Conversion {
            result: number / CO2_PER_C,
            unit,
            how: format!("÷ M(CO2)/M(C) = {CO2_PER_C:.5}"),
        }),
        ("CO2", target) => co2_mass_to(kg, target, o),
        (s, "CO2") => {
            let f = Formula::parse(s).map_err(|e| value(Given::Species, s, e))?;
            if f.carbon_count() > 0.0 {
                let k = co2_content(&f);
                return Ok(Conversion {
                    result: number * k,
                    unit,
                    how: format!("CO2 held: {k:.5} t CO2 per t {s} (C atoms × M(CO2)/M)"),
                });
            }
            let u = uptake(&f, o.route, o.redox);
            let iron = if u.excluded_t_co2_per_t() > 0.0 {
                "; Fe²⁺/Mn²⁺ not counted (oxic)"
            } else {
                ""
            };
            let route_name = if o.route == Route::Carbonate {
                "carbonate"
            } else {
                "bicarbonate"
            };
            Ok(Conversion {
                result: number * u.t_co2_per_t,
                unit,
                how: format!(
                    "uptake, {route_name} route: {:.4} t CO2 per t{iron}",
                    u.t_co2_per_t
                ),
            })
        }
        (s, t) => Err(value(Given::To, t, format!("{s} converts to CO2 only"))),
    }
}

/// CO2 mass in kg to a mass unit or a gas volume.
fn co2_mass_to(kg: f64, target: &str, o: &Options) -> Result<Conversion> {
    if let Some(u) = MassUnit::from_symbol(target) {
        let per = u.grams_per_unit().to_f64() / 1e3;
        return Ok(Conversion {
            result: kg / per,
            unit: u.symbol().into(),
            how: format!("exact factor: 1 {} = {per} kg", u.symbol()),
        });
    }
    let probe = StandardVolume::parse(&format!("1 {target}")).map_err(|e| {
        value(
            Given::To,
            target,
            format!("not CO2, C, a mass unit nor a volume unit ({e})"),
        )
    })?;
    let vm = volume_mass(&probe, o, Given::To, target)?;
    Ok(Conversion {
        result: kg / vm.kg,
        unit: target.into(),
        how: format!(
            "÷ {:.5} kg/m³ at {} ({})",
            vm.density_kg_per_m3,
            probe.conditions,
            o.density.source()
        ),
    })
}

fn from_volume(v: &StandardVolume, quantity: &str, to: &str, o: &Options) -> Result<Conversion> {
    let vm = volume_mass(v, o, Given::Quantity, quantity)?;
    let mut step = co2_mass_to(vm.kg, to, o)?;
    step.how = format!(
        "{:.3} m³ × {:.5} kg/m³ at {} ({}); {}",
        vm.m3,
        vm.density_kg_per_m3,
        v.conditions,
        o.density.source(),
        step.how
    );
    Ok(step)
}

#[cfg(test)]
mod tests {
    use super::*;

    const O: Options = Options {
        density: DensityMethod::Eos,
        route: Route::Carbonate,
        redox: Redox::Oxidizing,
    };

    #[test]
    fn carbon_to_co2_and_refusals_by_value() {
        let c = convert("1 t", "C", "CO2", &O).unwrap();
        assert!((c.result - CO2_PER_C).abs() < 1e-12, "{c:?}");
        assert!(matches!(
            convert("2.5 MMscf", "C", "CO2", &O),
            Err(ConvertError::Value {
                given: Given::Species,
                ..
            })
        ));
        assert!(matches!(
            convert("1 t", "C", "kg", &O),
            Err(ConvertError::Value {
                given: Given::To,
                ..
            })
        ));
    }
}
