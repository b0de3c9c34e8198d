//! Option values of the rock routes — shares, concentrations, densities, depths, sizes,
//! distances and emission factors — turned into numbers, each refusal naming the option and
//! the value. Numbers are kept as their exact decimals so a reading records what was typed.

use crate::accounting::input::InputError;
use crate::accounting::weathering::campaign::Depth;
use crate::error::{Error, Result};
use crate::quantity::Decimal;
use crate::quantity::mass::split_number_unit;
use std::fmt;

/// A number with its unit: the decimal and unit as recorded, and the value in the base unit of
/// its [`Units`] table.
#[derive(Debug, Clone, PartialEq)]
pub struct Measure {
    pub number: Decimal,
    pub unit: &'static str,
    pub base: f64,
}

impl fmt::Display for Measure {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        write!(f, "{} {}", self.number, self.unit)
    }
}

/// Accepted spellings, the unit recorded for each, and its factor to the table's base unit.
pub type Units = &'static [(&'static str, &'static str, f64)];

/// Base kg/m³.
pub const DENSITY: Units = &[
    ("t/m3", "t/m3", 1000.0),
    ("t/m³", "t/m3", 1000.0),
    ("kg/m3", "kg/m3", 1.0),
    ("kg/m³", "kg/m3", 1.0),
    ("g/cm3", "g/cm3", 1000.0),
    ("g/cm³", "g/cm3", 1000.0),
];
/// Particle sizes, base µm.
pub const SIZE: Units = &[("um", "um", 1.0), ("µm", "um", 1.0), ("mm", "mm", 1000.0)];
/// Distances, base km; the international mile is exactly 1.609344 km.
pub const DISTANCE: Units = &[("km", "km", 1.0), ("m", "m", 1e-3), ("mi", "mi", 1.609344)];
/// Electricity, base kg CO2 per kWh (1 GJ = 1000/3.6 kWh exactly).
pub const GRID: Units = &[
    ("kg/kWh", "kg/kWh", 1.0),
    ("g/kWh", "g/kWh", 1e-3),
    ("kg/MWh", "kg/MWh", 1e-3),
    ("kg/GJ", "kg/GJ", 3.6e-3),
];
/// Fuel burnt per area, base L/ha.
pub const FUEL_RATE: Units = &[("L/ha", "L/ha", 1.0), ("l/ha", "L/ha", 1.0)];
/// CO2 per litre of fuel, base kg/L.
pub const FUEL_FACTOR: Units = &[("kg/L", "kg/L", 1.0), ("kg/l", "kg/L", 1.0)];
/// CO2 or energy per tonne of rock: base kg/t, or kWh/t for a work index.
pub const PER_TONNE: Units = &[("kg/t", "kg/t", 1.0), ("g/t", "g/t", 1e-3)];
pub const WORK_INDEX: Units = &[("kWh/t", "kWh/t", 1.0)];
/// Transport, base kg CO2 per tonne-km.
pub const PER_TONNE_KM: Units = &[
    ("kg/tkm", "kg/tkm", 1.0),
    ("kg/t.km", "kg/tkm", 1.0),
    ("kg/t·km", "kg/tkm", 1.0),
    ("g/tkm", "g/tkm", 1e-3),
];

/// An exact decimal.
pub fn number(option: &str, text: &str) -> Result<Decimal> {
    Decimal::parse(text.trim()).map_err(|e| Error::field(option, text, e))
}

/// A number with one of `units`, at least 0 (`positive` demands more than 0).
pub fn measure(option: &str, text: &str, units: Units, positive: bool) -> Result<Measure> {
    let (n, u) = split_number_unit(text);
    let choices = || {
        let mut names: Vec<&str> = units.iter().map(|u| u.1).collect();
        names.dedup();
        names.join(", ")
    };
    if u.is_empty() {
        return Err(Error::field(
            option,
            text,
            format!("a unit is needed ({})", choices()),
        ));
    }
    let &(_, unit, factor) = units.iter().find(|(s, ..)| *s == u).ok_or_else(|| {
        Error::field(
            option,
            text,
            format!("unknown unit {u:?} (use {})", choices()),
        )
    })?;
    let number = number(option, n)?;
    let v = number.to_f64();
    if v < 0.0 || (positive && !number.is_positive()) {
        let bound = if positive { "greater than" } else { "at least" };
        return Err(Error::field(option, text, format!("must be {bound} zero")));
    }
    Ok(Measure {
        number,
        unit,
        base: v * factor,
    })
}

/// A share as `12.5%` or `0.125`, from 0 to 1.
pub fn share(option: &str, text: &str) -> Result<Decimal> {
    let t = text.trim();
    let value = match t.strip_suffix('%') {
        Some(p) => number(option, p.trim())?
            .checked_mul(Decimal::parse("0.01").expect("valid"))
            .ok_or_else(|| Error::field(option, text, "has too many digits"))?,
        None => number(option, t)?,
    };
    let v = value.to_f64();
    if !(0.0..=1.0).contains(&v) {
        return Err(Error::field(
            option,
            text,
            "must be from 0 to 1 (or 0% to 100%)",
        ));
    }
    Ok(value)
}

/// `NAME=VALUE,…` as names and exact decimals, in the order given.
pub fn pairs(option: &str, text: &str) -> Result<Vec<(String, Decimal)>> {
    text.split(',')
        .map(|part| {
            let (name, value) = part.split_once('=').ok_or_else(|| {
                Error::field(
                    option,
                    text,
                    format!("write NAME=VALUE, e.g. Ca=0.12 (at {part:?})"),
                )
            })?;
            let v = Decimal::parse(value.trim())
                .map_err(|e| Error::field(option, text, format!("{}: {e}", name.trim())))?;
            Ok((name.trim().to_string(), v))
        })
        .collect()
}

/// Pairs as the reading records them.
pub fn pair_texts(pairs: &[(String, Decimal)]) -> Vec<(String, String)> {
    pairs
        .iter()
        .map(|(n, v)| (n.clone(), v.to_string()))
        .collect()
}

/// Pairs as numbers for the pure checks.
pub fn pair_numbers(pairs: &[(String, Decimal)]) -> Vec<(String, f64)> {
    pairs.iter().map(|(n, v)| (n.clone(), v.to_f64())).collect()
}

/// A depth interval below the surface, `0-30 cm` or `0-0.3 m`, as recorded and in metres.
pub fn depth(option: &str, text: &str) -> Result<(String, Depth)> {
    let (range, unit) = split_number_unit(text);
    let factor = match unit {
        "cm" => 0.01,
        "m" => 1.0,
        _ => {
            return Err(Error::field(
                option,
                text,
                "write TOP-BOTTOM cm (or m), e.g. 0-30 cm",
            ));
        }
    };
    let (top, bottom) = range
        .split_once(['-', '–'])
        .ok_or_else(|| Error::field(option, text, "write TOP-BOTTOM cm (or m), e.g. 0-30 cm"))?;
    let top = number(option, top)?;
    let bottom = number(option, bottom)?;
    if top.to_f64() < 0.0 || bottom.cmp_value(top).is_le() {
        return Err(Error::field(
            option,
            text,
            "the bottom must lie below the top, both at or below the surface",
        ));
    }
    let depth = Depth {
        top_m: top.to_f64() * factor,
        bottom_m: bottom.to_f64() * factor,
    };
    Ok((format!("{top}-{bottom} {unit}"), depth))
}

/// A refusal by a pure check, told in the option's words: `options` maps the check's field
/// names to the option and the text given.
pub fn refused(e: &InputError, options: &[(&str, &str, &str)]) -> Error {
    match options.iter().find(|(field, ..)| *field == e.field) {
        Some((_, option, text)) => Error::field(option, text, format!("must be {}", e.rule)),
        None => Error::Refused(e.to_string()),
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn measures_and_shares() {
        let d = measure("--density", "2.9 t/m3", DENSITY, true).unwrap();
        assert_eq!((d.to_string(), d.base), ("2.9 t/m3".into(), 2900.0));
        assert_eq!(
            measure("--d80", "90µm", SIZE, true).unwrap().to_string(),
            "90 um"
        );
        assert_eq!(
            measure("--distance", "10 mi", DISTANCE, true).unwrap().base,
            16.09344
        );
        assert!(measure("--density", "2.9", DENSITY, true).is_err());
        assert!(measure("--density", "0 t/m3", DENSITY, true).is_err());
        assert!(measure("--grid-factor", "0 kg/kWh", GRID, false).is_ok());
        assert_eq!(share("--x", "12.5%").unwrap().to_string(), "0.125");
        assert!(share("--x", "101%").is_err());
        assert!(share("--x", "-0.1").is_err());
        let (text, d) = depth("--depth", "0-30 cm").unwrap();
        assert_eq!(text, "0-30 cm");
        assert!((d.thickness_m() - 0.3).abs() < 1e-15);
        assert!(depth("--depth", "30-10 cm").is_err());
        assert!(depth("--depth", "0-30").is_err());
        let p = pairs("--conc", "Ca=0.10, Mg=1e-2").unwrap();
        assert_eq!(pair_texts(&p)[1], ("Mg".into(), "0.01".into()));
        assert!(pairs("--conc", "Ca:0.1").is_err());
    }
}
