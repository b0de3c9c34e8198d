//! Option values of the rock routes — shares, concentrations, densities, depths, sizes,
//! distances and emission factors — turned into numbers, each refusal naming the option and
//! the value. Numbers are kept as their exact decimals so a reading records what was typed.

use crate::accounting::input::InputError;
use crate::error::{Error, Result};
use crate::quantity::Decimal;
use crate::quantity::measure::parse_measure;
pub use crate::quantity::measure::{DENSITY, Measure, SIZE, Units};

/// A number with one of `units`, at least 0 (`positive` demands more than 0).
pub fn measure(option: &str, text: &str, units: Units, positive: bool) -> Result<Measure> {
    parse_measure(text, units, positive).map_err(|why| Error::field(option, text, why))
}

/// A share as `12.5%` or `0.125`, from 0 to 1.
pub fn share(option: &str, text: &str) -> Result<Decimal> {
    crate::quantity::share::share(text).map_err(|(value, why)| Error::field(option, &value, why))
}

/// `NAME=VALUE,…` as names and exact decimals, in the order given.
pub fn pairs(option: &str, text: &str) -> Result<Vec<(String, Decimal)>> {
    crate::quantity::share::pairs(text).map_err(|why| Error::field(option, text, why))
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

/// A refusal by a pure check, told in the option's words: `options` maps the check's field
/// names to the option and the text given.
pub fn refused(e: &InputError, options: &[(&str, &str, &str)]) -> Error {
    match options.iter().find(|(field, ..)| *field == e.field) {
        Some((_, option, text)) => Error::field(option, text, format!("must be {}", e.rule)),
        None => Error::field(
            &e.field,
            &e.value.to_string(),
            format!("must be {}", e.rule),
        ),
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::quantity::measure::{DISTANCE, GRID};

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
        let p = pairs("--conc", "Ca=0.10, Mg=1e-2").unwrap();
        assert_eq!(pair_texts(&p)[1], ("Mg".into(), "0.01".into()));
        assert!(pairs("--conc", "Ca:0.1").is_err());
    }
}
