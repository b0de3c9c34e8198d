//! Dimensionless fractions as written (`0.985` or `98.5%`), kept exactly.

use super::decimal::{Decimal, DecimalError};
use std::fmt;

/// A fraction in (0, 1], kept as its exact decimal value.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct Fraction(Decimal);

/// Why a fraction was refused.
#[derive(Debug, Clone, PartialEq, Eq)]
pub enum FractionError {
    Number(DecimalError),
    OutOfRange,
}

impl fmt::Display for FractionError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            Self::Number(e) => write!(f, "{e}"),
            Self::OutOfRange => f.write_str("must be greater than 0 and at most 1 (or 100%)"),
        }
    }
}

/// A share written as a plain decimal (`0.985`) or a percentage (`98.5%`), exactly.
fn share(text: &str) -> Result<Decimal, FractionError> {
    let t = text.trim();
    match t.strip_suffix('%') {
        Some(p) => Decimal::parse(p)
            .map_err(FractionError::Number)?
            .checked_mul(Decimal::parse("0.01").expect("valid"))
            .ok_or(FractionError::Number(DecimalError::TooLong)),
        None => Decimal::parse(t).map_err(FractionError::Number),
    }
}

impl Fraction {
    pub const ONE: Fraction = Fraction(Decimal::from_int(1));

    /// Parses `0.985` or `98.5%`; the value must lie in (0, 1].
    pub fn parse(text: &str) -> Result<Self, FractionError> {
        let value = share(text)?;
        if !value.is_positive() || value.cmp_value(Decimal::from_int(1)).is_gt() {
            return Err(FractionError::OutOfRange);
        }
        Ok(Self(value))
    }

    pub fn value(self) -> Decimal {
        self.0
    }

    pub fn to_f64(self) -> f64 {
        self.0.to_f64()
    }
}

/// Displays as the plain decimal (`0.985`), the form the ledger records.
impl fmt::Display for Fraction {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        write!(f, "{}", self.0)
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn parses_plain_and_percent() {
        assert_eq!(Fraction::parse("0.985").unwrap().to_string(), "0.985");
        assert_eq!(Fraction::parse("98.5%").unwrap().to_string(), "0.985");
        assert_eq!(Fraction::parse("1").unwrap(), Fraction::ONE);
        assert_eq!(Fraction::parse("100%").unwrap(), Fraction::ONE);
    }

    #[test]
    fn refuses_out_of_range() {
        for bad in ["0", "0%", "-0.1", "1.0001", "100.01%"] {
            assert_eq!(
                Fraction::parse(bad),
                Err(FractionError::OutOfRange),
                "{bad}"
            );
        }
        assert!(matches!(
            Fraction::parse("0,98"),
            Err(FractionError::Number(_))
        ));
    }
}

/// A relative uncertainty at 95 % as written (`0.5%` or `0.005`): at least 0, below 100 %.
pub fn parse_uncertainty(text: &str) -> Result<Decimal, FractionError> {
    let value = share(text)?;
    if value.to_f64() < 0.0 || value.cmp_value(Decimal::from_int(1)).is_ge() {
        return Err(FractionError::OutOfRange);
    }
    Ok(value)
}

#[cfg(test)]
mod uncertainty_tests {
    use super::*;

    #[test]
    fn uncertainties() {
        assert_eq!(parse_uncertainty("0.5%").unwrap().to_string(), "0.005");
        assert_eq!(parse_uncertainty("0").unwrap().to_string(), "0");
        assert!(parse_uncertainty("100%").is_err());
        assert!(parse_uncertainty("-1%").is_err());
    }
}
