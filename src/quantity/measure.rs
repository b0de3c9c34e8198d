//! Numbers with units of the rock routes — densities, depths, particle sizes, distances and
//! emission factors — read from text as recorded, each refusal saying why (the caller names the
//! option or the stored field). Numbers keep their exact decimals.

use super::Decimal;
use super::mass::split_number_unit;
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

/// The depth interval a core was taken over, metres below the surface.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Depth {
    pub top_m: f64,
    pub bottom_m: f64,
}

impl Depth {
    pub fn thickness_m(self) -> f64 {
        self.bottom_m - self.top_m
    }
}

fn decimal(text: &str) -> Result<Decimal, String> {
    Decimal::parse(text.trim()).map_err(|e| format!("{:?}: {e}", text.trim()))
}

/// A number with one of `units`, at least 0 (`positive` demands more than 0).
pub fn parse_measure(text: &str, units: Units, positive: bool) -> Result<Measure, String> {
    let (n, u) = split_number_unit(text);
    let choices = || {
        let mut names: Vec<&str> = units.iter().map(|u| u.1).collect();
        names.dedup();
        names.join(", ")
    };
    if u.is_empty() {
        return Err(format!("a unit is needed ({})", choices()));
    }
    let &(_, unit, factor) = units
        .iter()
        .find(|(s, ..)| *s == u)
        .ok_or_else(|| format!("unknown unit {u:?} (use {})", choices()))?;
    let number = decimal(n)?;
    let v = number.to_f64();
    if v < 0.0 || (positive && !number.is_positive()) {
        let bound = if positive { "greater than" } else { "at least" };
        return Err(format!("must be {bound} zero"));
    }
    Ok(Measure {
        number,
        unit,
        base: v * factor,
    })
}

/// A depth interval below the surface, `0-30 cm` or `0-0.3 m`, as recorded and in metres.
pub fn parse_depth(text: &str) -> Result<(String, Depth), String> {
    let how = "write TOP-BOTTOM cm (or m), e.g. 0-30 cm";
    let (range, unit) = split_number_unit(text);
    let factor = match unit {
        "cm" => 0.01,
        "m" => 1.0,
        _ => return Err(how.into()),
    };
    let (top, bottom) = range
        .split_once(['-', '–'])
        .ok_or_else(|| how.to_string())?;
    let top = decimal(top)?;
    let bottom = decimal(bottom)?;
    if top.to_f64() < 0.0 || bottom.cmp_value(top).is_le() {
        return Err("the bottom must lie below the top, both at or below the surface".into());
    }
    let depth = Depth {
        top_m: top.to_f64() * factor,
        bottom_m: bottom.to_f64() * factor,
    };
    Ok((format!("{top}-{bottom} {unit}"), depth))
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn measures_keep_their_unit_and_refuse_a_bare_number() {
        let d = parse_measure("2.9 t/m3", DENSITY, true).unwrap();
        assert_eq!((d.to_string(), d.base), ("2.9 t/m3".into(), 2900.0));
        assert_eq!(
            parse_measure("90µm", SIZE, true).unwrap().to_string(),
            "90 um"
        );
        assert_eq!(
            parse_measure("10 mi", DISTANCE, true).unwrap().base,
            16.09344
        );
        assert!(parse_measure("2.9", DENSITY, true).is_err());
        assert!(parse_measure("0 t/m3", DENSITY, true).is_err());
        assert!(parse_measure("0 kg/kWh", GRID, false).is_ok());
    }
}
