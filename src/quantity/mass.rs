//! Mass of CO2 in whole grams — the ledger's one canonical quantity — and mass readings as
//! people write them (`1250.5 t`, `3 short_ton`), converted with exact factors.

use super::decimal::Decimal;
use serde::Serialize;
use std::fmt;
use std::iter::Sum;
use std::ops::{Add, AddAssign, Neg, Sub};

/// An exact number of grams of CO2. Sums are exact and order-independent.
#[derive(Debug, Clone, Copy, PartialEq, Eq, PartialOrd, Ord, Hash, Default, Serialize)]
pub struct Mass(i64);

impl Mass {
    pub const ZERO: Mass = Mass(0);

    /// The largest magnitude the ledger keeps for a reading or for a project's entries summed:
    /// 10^18 g, a million megatonnes — far beyond any storage site, and nine times inside the
    /// i64 range, so every sum a report forms over one project, and over several, stays exact.
    pub const LIMIT: Mass = Mass(1_000_000_000_000_000_000);

    pub const fn from_grams(g: i64) -> Self {
        Self(g)
    }

    pub const fn grams(self) -> i64 {
        self.0
    }

    /// Tonnes as f64, for display and ratios only — never summed.
    pub fn tonnes(self) -> f64 {
        self.0 as f64 / 1e6
    }

    pub fn is_positive(self) -> bool {
        self.0 > 0
    }

    /// Multiplies by a dimensionless ratio and rounds half to even, for derived figures
    /// (a share withheld, a fraction mineralized) that must land back on whole grams.
    pub fn scale(self, ratio: f64) -> Self {
        Self(round_half_even_f64(self.0 as f64 * ratio))
    }

    pub fn checked_add(self, other: Self) -> Option<Self> {
        self.0.checked_add(other.0).map(Self)
    }

    pub fn checked_sub(self, other: Self) -> Option<Self> {
        self.0.checked_sub(other.0).map(Self)
    }

    /// [`Mass::scale`], or None when the result would not be a whole number of grams in range.
    pub fn checked_scale(self, ratio: f64) -> Option<Self> {
        grams_of_f64(self.0 as f64 * ratio).map(Self)
    }

    /// Whether the magnitude is within [`Mass::LIMIT`].
    pub fn within_limit(self) -> bool {
        self.0.unsigned_abs() <= Self::LIMIT.0.unsigned_abs()
    }
}

/// Whole grams from an f64, half to even, or None when it is not finite or leaves the i64
/// range (no silent saturation).
pub fn grams_of_f64(x: f64) -> Option<i64> {
    let r = x.round_ties_even();
    (r.is_finite() && r.abs() < 9_223_372_036_854_775_808.0).then_some(r as i64)
}

/// Rounds an f64 to the nearest integer, ties to even; saturates at the i64 range (for
/// figures already bounded by the ledger's limit: a share of a mass, a metered reading).
pub fn round_half_even_f64(x: f64) -> i64 {
    x.round_ties_even() as i64
}

impl Add for Mass {
    type Output = Mass;
    fn add(self, o: Mass) -> Mass {
        Mass(self.0 + o.0)
    }
}

impl AddAssign for Mass {
    fn add_assign(&mut self, o: Mass) {
        self.0 += o.0;
    }
}

impl Sub for Mass {
    type Output = Mass;
    fn sub(self, o: Mass) -> Mass {
        Mass(self.0 - o.0)
    }
}

impl Neg for Mass {
    type Output = Mass;
    fn neg(self) -> Mass {
        Mass(-self.0)
    }
}

impl Sum for Mass {
    fn sum<I: Iterator<Item = Mass>>(iter: I) -> Mass {
        iter.fold(Mass::ZERO, Add::add)
    }
}

/// Displays as tonnes with all six decimals, so that display then parse gives the same grams.
impl fmt::Display for Mass {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        let sign = if self.0 < 0 { "-" } else { "" };
        let g = self.0.unsigned_abs();
        write!(f, "{sign}{}.{:06} t", g / 1_000_000, g % 1_000_000)
    }
}

/// The mass units a reading may be given in, each with its exact factor to grams.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum MassUnit {
    Gram,
    Kilogram,
    Tonne,
    Kilotonne,
    Megatonne,
    Pound,
    ShortTon,
    LongTon,
}

impl MassUnit {
    pub const ALL: [MassUnit; 8] = [
        Self::Gram,
        Self::Kilogram,
        Self::Tonne,
        Self::Kilotonne,
        Self::Megatonne,
        Self::Pound,
        Self::ShortTon,
        Self::LongTon,
    ];

    /// The spelling the ledger records.
    pub fn symbol(self) -> &'static str {
        match self {
            Self::Gram => "g",
            Self::Kilogram => "kg",
            Self::Tonne => "t",
            Self::Kilotonne => "kt",
            Self::Megatonne => "Mt",
            Self::Pound => "lb",
            Self::ShortTon => "short_ton",
            Self::LongTon => "long_ton",
        }
    }

    /// Other accepted spellings.
    fn aliases(self) -> &'static [&'static str] {
        match self {
            Self::Tonne => &["tonne", "tonnes"],
            Self::Pound => &["lbs"],
            Self::ShortTon => &["short-ton", "ton_us"],
            Self::LongTon => &["long-ton", "ton_uk"],
            _ => &[],
        }
    }

    pub fn from_symbol(s: &str) -> Option<Self> {
        Self::ALL
            .into_iter()
            .find(|u| u.symbol() == s || u.aliases().contains(&s))
    }

    /// Grams per unit, exact by definition (NIST SP 811 Appendix B for the avoirdupois units).
    pub fn grams_per_unit(self) -> Decimal {
        let text = match self {
            Self::Gram => "1",
            Self::Kilogram => "1000",
            Self::Tonne => "1e6",
            Self::Kilotonne => "1e9",
            Self::Megatonne => "1e12",
            Self::Pound => "453.59237",
            Self::ShortTon => "907184.74",
            Self::LongTon => "1016046.9088",
        };
        Decimal::parse(text).expect("unit factors are valid decimals")
    }
}

/// The spellings `--help` lists.
pub const MASS_UNITS_HELP: &str = "g, kg, t (tonne), kt, Mt, lb, short_ton, long_ton";

/// Why a mass text was refused.
#[derive(Debug, Clone, PartialEq, Eq)]
pub enum MassError {
    Number(super::decimal::DecimalError),
    NoUnit,
    UnknownUnit(String),
    NotPositive,
    TooLarge,
}

impl fmt::Display for MassError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            Self::Number(e) => write!(f, "{e}"),
            Self::NoUnit => write!(f, "a unit is needed ({MASS_UNITS_HELP})"),
            Self::UnknownUnit(u) => write!(f, "unknown unit {u:?} (use {MASS_UNITS_HELP})"),
            Self::NotPositive => f.write_str("must be greater than zero"),
            Self::TooLarge => {
                f.write_str("is above the largest mass the ledger keeps (1,000,000 Mt, 10^18 g)")
            }
        }
    }
}

/// A mass as written: the number's text and its unit, kept so every gram can be traced back.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct MassReading {
    pub number: Decimal,
    pub unit: MassUnit,
}

impl MassReading {
    /// Parses `NUMBER UNIT` or `NUMBERUNIT`; the mass must be positive.
    pub fn parse(text: &str) -> Result<Self, MassError> {
        let (number, unit) = split_number_unit(text);
        if unit.is_empty() {
            return Err(MassError::NoUnit);
        }
        let number = Decimal::parse(number).map_err(MassError::Number)?;
        let unit =
            MassUnit::from_symbol(unit).ok_or_else(|| MassError::UnknownUnit(unit.into()))?;
        if !number.is_positive() {
            return Err(MassError::NotPositive);
        }
        Ok(Self { number, unit })
    }

    /// The exact value in grams as a decimal (before rounding).
    pub fn grams_exact(&self) -> Result<Decimal, MassError> {
        self.number
            .checked_mul(self.unit.grams_per_unit())
            .ok_or(MassError::TooLarge)
    }

    /// Rounds to whole grams, half to even.
    pub fn to_mass(&self) -> Result<Mass, MassError> {
        self.grams_exact()?
            .round_half_even()
            .map(Mass::from_grams)
            .filter(|m| m.within_limit())
            .ok_or(MassError::TooLarge)
    }
}

impl fmt::Display for MassReading {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        write!(f, "{} {}", self.number, self.unit.symbol())
    }
}

/// Splits `1250.5 t`, `1250.5t` or `1.2e3 kg` into number text and unit text.
pub fn split_number_unit(text: &str) -> (&str, &str) {
    let t = text.trim();
    if let Some((n, u)) = t.split_once(char::is_whitespace) {
        return (n.trim(), u.trim());
    }
    // No space: the number ends where a character that cannot continue it begins. An `e`
    // followed by a digit or sign is an exponent, otherwise the start of a unit.
    let b = t.as_bytes();
    let mut i = 0;
    while i < b.len() {
        let c = b[i];
        let exp = (c == b'e' || c == b'E')
            && i > 0
            && b.get(i + 1)
                .is_some_and(|n| n.is_ascii_digit() || *n == b'-' || *n == b'+');
        if c.is_ascii_digit()
            || c == b'.'
            || c == b','
            || exp
            || ((c == b'-' || c == b'+') && (i == 0 || b[i - 1] == b'e' || b[i - 1] == b'E'))
        {
            i += 1;
        } else {
            break;
        }
    }
    (&t[..i], &t[i..])
}

#[cfg(test)]
mod tests {
    use super::*;

    fn grams(s: &str) -> i64 {
        MassReading::parse(s).unwrap().to_mass().unwrap().grams()
    }

    #[test]
    fn exact_factors() {
        // Exact by definition — read: NIST SP 811, Appendix B (REFERENCES.md units table).
        assert_eq!(grams("1 lb"), 454); // 453.59237 g
        assert_eq!(grams("1000 lb"), 453_592); // 453 592.37 g
        assert_eq!(grams("1000000 lb"), 453_592_370);
        assert_eq!(grams("1 short_ton"), 907_185); // 907 184.74 g
        assert_eq!(grams("100 short_ton"), 90_718_474);
        assert_eq!(grams("1 long_ton"), 1_016_047); // 1 016 046.9088 g
        assert_eq!(grams("10000 long_ton"), 10_160_469_088);
        assert_eq!(grams("1 t"), 1_000_000);
        assert_eq!(grams("2.5 kt"), 2_500_000_000);
        assert_eq!(grams("0.001 Mt"), 1_000_000_000);
        assert_eq!(grams("1250.5t"), 1_250_500_000);
        assert_eq!(grams("12 tonnes"), 12_000_000);
        assert_eq!(grams("0.5 g"), 0); // half to even
        assert_eq!(grams("1.5 g"), 2);
    }

    #[test]
    fn refusals() {
        assert_eq!(MassReading::parse("12"), Err(MassError::NoUnit));
        assert_eq!(
            MassReading::parse("12 stone"),
            Err(MassError::UnknownUnit("stone".into()))
        );
        assert_eq!(MassReading::parse("0 t"), Err(MassError::NotPositive));
        assert_eq!(MassReading::parse("-3 t"), Err(MassError::NotPositive));
        assert!(matches!(
            MassReading::parse("1,000 t"),
            Err(MassError::Number(_))
        ));
        assert_eq!(
            MassReading::parse("1e30 Mt").unwrap().to_mass(),
            Err(MassError::TooLarge)
        );
    }

    #[test]
    fn display_is_tonnes_with_grams() {
        assert_eq!(Mass::from_grams(1_234_567_891).to_string(), "1234.567891 t");
        assert_eq!(Mass::from_grams(-5).to_string(), "-0.000005 t");
    }

    proptest::proptest! {
        #[test]
        fn parse_display_round_trip(g in 1i64..=Mass::LIMIT.grams()) {
            let m = Mass::from_grams(g);
            let back = MassReading::parse(&m.to_string()).unwrap().to_mass().unwrap();
            proptest::prop_assert_eq!(back, m);
        }

        #[test]
        fn beyond_the_limit_is_refused(g in Mass::LIMIT.grams() + 1..i64::MAX) {
            let m = Mass::from_grams(g);
            let r = MassReading::parse(&m.to_string()).unwrap().to_mass();
            proptest::prop_assert_eq!(r, Err(MassError::TooLarge));
        }

        #[test]
        fn never_panics(s in "\\PC{0,30}") {
            if let Ok(r) = MassReading::parse(&s) {
                let _ = r.to_mass();
            }
        }
    }
}
