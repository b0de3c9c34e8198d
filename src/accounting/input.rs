//! Checks on the numbers a method is given, shared so that every refusal reads the same way:
//! the field, the value, and what the value must be.

use crate::quantity::Mass;
use std::fmt;

/// What a number must be. Every rule also demands a finite number (no NaN, no infinity).
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Rule {
    Finite,
    NonNegative,
    Positive,
    /// [0, 1]: a share or a fraction.
    Fraction,
    /// [0, 1): a mass fraction of a solid that is not all CO2.
    BelowOne,
    /// (0, 1]: a mixing ratio that must include some of the end-member.
    MixingRatio,
    /// Rounds to a whole number of grams inside the ledger's i64 range.
    FitsLedger,
}

impl Rule {
    fn holds(self, v: f64) -> bool {
        v.is_finite()
            && match self {
                Rule::Finite => true,
                Rule::NonNegative => v >= 0.0,
                Rule::Positive => v > 0.0,
                Rule::Fraction => (0.0..=1.0).contains(&v),
                Rule::BelowOne => (0.0..1.0).contains(&v),
                Rule::MixingRatio => v > 0.0 && v <= 1.0,
                // 2^63 is the first f64 past i64::MAX; below it the cast cannot saturate.
                Rule::FitsLedger => v.abs() < 9_223_372_036_854_775_808.0,
            }
    }
}

impl fmt::Display for Rule {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(match self {
            Rule::Finite => "a finite number",
            Rule::NonNegative => "a finite number of at least 0",
            Rule::Positive => "a finite number greater than 0",
            Rule::Fraction => "from 0 to 1",
            Rule::BelowOne => "at least 0 and less than 1",
            Rule::MixingRatio => "greater than 0 and at most 1",
            Rule::FitsLedger => "a number of grams the ledger can hold (below 2^63)",
        })
    }
}

/// A number refused: which field, its value, and the rule it broke.
#[derive(Debug, Clone, PartialEq)]
pub struct InputError {
    pub field: String,
    pub value: f64,
    pub rule: Rule,
}

impl fmt::Display for InputError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        write!(
            f,
            "{} is {}; it must be {}",
            self.field, self.value, self.rule
        )
    }
}

impl std::error::Error for InputError {}

/// The value if it keeps the rule; the field name is only copied when it does not.
pub(crate) fn check(field: &str, value: f64, rule: Rule) -> Result<f64, InputError> {
    if rule.holds(value) {
        Ok(value)
    } else {
        Err(InputError {
            field: field.to_string(),
            value,
            rule,
        })
    }
}

/// Rounds grams half to even once, where a computed figure becomes a ledger mass.
pub(crate) fn grams(field: &str, g: f64) -> Result<Mass, InputError> {
    let g = check(field, g.round_ties_even(), Rule::FitsLedger)?;
    Ok(Mass::from_grams(g as i64))
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn rules_and_messages() {
        assert_eq!(check("x", 0.0, Rule::NonNegative), Ok(0.0));
        assert!(check("x", 0.0, Rule::Positive).is_err());
        assert!(check("x", 1.0, Rule::BelowOne).is_err());
        assert!(check("x", 0.0, Rule::MixingRatio).is_err());
        assert_eq!(check("x", 1.0, Rule::MixingRatio), Ok(1.0));
        for rule in [Rule::Finite, Rule::NonNegative, Rule::Fraction] {
            assert!(check("x", f64::NAN, rule).is_err());
            assert!(check("x", f64::INFINITY, rule).is_err());
        }
        let e = check("dic_injectate", -2.0, Rule::Positive).unwrap_err();
        assert_eq!(
            e.to_string(),
            "dic_injectate is -2; it must be a finite number greater than 0"
        );
    }

    #[test]
    fn grams_round_half_even_and_stay_in_range() {
        assert_eq!(grams("g", 2.5), Ok(Mass::from_grams(2)));
        assert_eq!(grams("g", -3.5), Ok(Mass::from_grams(-4)));
        assert!(grams("g", 9.3e18).is_err());
        assert_eq!(
            grams("g", 9.2e18).map(Mass::grams),
            Ok(9_200_000_000_000_000_000)
        );
    }
}
