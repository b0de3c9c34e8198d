//! Temperatures and pressures as people write them (`40C`, `60F`, `10MPa`, `14.73psia`,
//! `1200 psig`), converted with exact factors into uom quantities.

use super::mass::split_number_unit;
use std::fmt;
use uom::si::f64::{Pressure, ThermodynamicTemperature};
use uom::si::pressure::pascal;
use uom::si::thermodynamic_temperature::kelvin;

/// 1 psi in pascals, exact (NIST SP 811, Appendix B).
pub const PA_PER_PSI: f64 = 6894.757293168;
/// One standard atmosphere, exact.
pub const ATM_PA: f64 = 101_325.0;

/// Why a temperature or pressure was refused.
#[derive(Debug, Clone, PartialEq, Eq)]
pub enum ConditionError {
    Number(String),
    UnknownUnit(String),
    NotPositive,
}

impl fmt::Display for ConditionError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            Self::Number(n) => write!(f, "{n:?} is not a number"),
            Self::UnknownUnit(u) => write!(f, "unknown unit {u:?}"),
            Self::NotPositive => f.write_str("must be above absolute zero / above 0 Pa"),
        }
    }
}

fn number(text: &str) -> Result<f64, ConditionError> {
    let d = super::Decimal::parse(text).map_err(|_| ConditionError::Number(text.into()))?;
    Ok(d.to_f64())
}

/// Parses `313.15K`, `40C`, `40 °C`, `60F`; the result must be above 0 K.
pub fn parse_temperature(text: &str) -> Result<ThermodynamicTemperature, ConditionError> {
    let (n, u) = split_number_unit(text);
    let x = number(n)?;
    let k = match u.trim_start_matches('°') {
        "K" => x,
        "C" => x + 273.15,
        "F" => (x - 32.0) * 5.0 / 9.0 + 273.15,
        other => return Err(ConditionError::UnknownUnit(other.into())),
    };
    if k.is_nan() || k <= 0.0 {
        return Err(ConditionError::NotPositive);
    }
    Ok(ThermodynamicTemperature::new::<kelvin>(k))
}

/// The temperature units accepted, for help and errors.
pub const TEMPERATURE_UNITS: &str = "K, C, F";
/// The pressure units accepted.
pub const PRESSURE_UNITS: &str =
    "Pa, kPa, MPa, bar, atm, psia, psig (gauge: plus the atmospheric pressure)";

/// Parses `10MPa`, `101.325 kPa`, `14.73psia`, `1 atm`, `1200 psig`; gauge pressures add
/// `atmospheric`. The absolute result must be above 0.
pub fn parse_pressure(text: &str, atmospheric: Pressure) -> Result<Pressure, ConditionError> {
    let (n, u) = split_number_unit(text);
    let x = number(n)?;
    let pa = match u {
        "Pa" => x,
        "kPa" => x * 1e3,
        "MPa" => x * 1e6,
        "bar" | "bara" => x * 1e5,
        "atm" => x * ATM_PA,
        "psia" | "psi" => x * PA_PER_PSI,
        "psig" => x * PA_PER_PSI + atmospheric.get::<pascal>(),
        "barg" => x * 1e5 + atmospheric.get::<pascal>(),
        other => return Err(ConditionError::UnknownUnit(other.into())),
    };
    if pa.is_nan() || pa <= 0.0 {
        return Err(ConditionError::NotPositive);
    }
    Ok(Pressure::new::<pascal>(pa))
}

/// Standard atmosphere as a uom pressure.
pub fn atmosphere() -> Pressure {
    Pressure::new::<pascal>(ATM_PA)
}

#[cfg(test)]
mod tests {
    use super::*;

    fn k(s: &str) -> f64 {
        parse_temperature(s).unwrap().get::<kelvin>()
    }

    fn pa(s: &str) -> f64 {
        parse_pressure(s, atmosphere()).unwrap().get::<pascal>()
    }

    #[test]
    fn temperatures() {
        assert_eq!(k("300K"), 300.0);
        assert!((k("40C") - 313.15).abs() < 1e-12);
        assert!((k("15 °C") - 288.15).abs() < 1e-12);
        // 60 °F = 288.705556 K — read: NIST SP 811 (REFERENCES.md units table).
        assert!((k("60F") - 288.705_556).abs() < 1e-6);
        assert_eq!(
            parse_temperature("-273.15C"),
            Err(ConditionError::NotPositive)
        );
        assert_eq!(parse_temperature("0K"), Err(ConditionError::NotPositive));
        assert_eq!(
            parse_temperature("40 R"),
            Err(ConditionError::UnknownUnit("R".into()))
        );
    }

    #[test]
    fn pressures() {
        // 1 psi = 6894.757293168 Pa, 1 atm = 101325 Pa — read: NIST SP 811 (REFERENCES.md).
        assert!((pa("1psia") - 6894.757293168).abs() < 1e-9);
        assert_eq!(pa("1 atm"), 101_325.0);
        assert_eq!(pa("10MPa"), 1e7);
        assert_eq!(pa("101.325kPa"), 101_325.0);
        assert!((pa("0 psig") - 101_325.0).abs() < 1e-9);
        assert_eq!(pa("2 bar"), 2e5);
        assert_eq!(
            parse_pressure("0 Pa", atmosphere()),
            Err(ConditionError::NotPositive)
        );
        assert_eq!(
            parse_pressure("-20 psig", atmosphere()),
            Err(ConditionError::NotPositive)
        );
        assert!(matches!(
            parse_pressure("5 torr", atmosphere()),
            Err(ConditionError::UnknownUnit(_))
        ));
    }

    proptest::proptest! {
        #[test]
        fn never_panics(s in "\\PC{0,30}") {
            let _ = parse_temperature(&s);
            let _ = parse_pressure(&s, atmosphere());
        }
    }
}
