//! Exact decimal numbers as written by people: readings keep their digits, and products of a
//! reading with exact unit factors stay exact until the single rounding to grams.

use std::fmt;

/// A decimal number `mantissa × 10^-scale`, parsed from text without loss.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct Decimal {
    mantissa: i128,
    scale: u32,
}

/// Why a number's text was refused.
#[derive(Debug, Clone, PartialEq, Eq)]
pub enum DecimalError {
    /// Not a plain decimal number (digits, one optional point, optional sign).
    Malformed,
    /// A thousands separator or decimal comma, which would be misread.
    Comma,
    /// More digits than the ledger can carry exactly.
    TooLong,
}

impl fmt::Display for DecimalError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(match self {
            Self::Malformed => "not a decimal number",
            Self::Comma => {
                "commas are refused (write 1234.5, no thousands separator or decimal comma)"
            }
            Self::TooLong => "too many digits",
        })
    }
}

/// 10^n as i128, for n up to 38.
fn pow10(n: u32) -> Option<i128> {
    10i128.checked_pow(n)
}

impl Decimal {
    /// Largest scale kept; more digits after the point than this are refused.
    const MAX_SCALE: u32 = 18;

    /// Parses `123`, `-0.5`, `1.25e3` style text exactly.
    pub fn parse(text: &str) -> Result<Self, DecimalError> {
        let t = text.trim();
        if t.contains(',') {
            return Err(DecimalError::Comma);
        }
        let (num, exp) = match t.find(['e', 'E']) {
            Some(i) => {
                let e: i32 = t[i + 1..].parse().map_err(|_| DecimalError::Malformed)?;
                (&t[..i], e)
            }
            None => (t, 0),
        };
        let (neg, digits) = match num.strip_prefix('-') {
            Some(rest) => (true, rest),
            None => (false, num.strip_prefix('+').unwrap_or(num)),
        };
        let (int, frac) = digits.split_once('.').unwrap_or((digits, ""));
        let all_digits = |s: &str| s.bytes().all(|b| b.is_ascii_digit());
        if (int.is_empty() && frac.is_empty()) || !all_digits(int) || !all_digits(frac) {
            return Err(DecimalError::Malformed);
        }
        // Digits of int then frac, leading zeros skipped, without building a joined string. At
        // most 30 from the first digit that is not zero to the last; zeros after them only
        // scale (so `1e30` and the 31 digits it prints as read the same), as far as i128 goes.
        let mut mantissa: i128 = 0;
        let mut digits = 0usize;
        let mut significant = 0usize;
        for b in int.bytes().chain(frac.bytes()) {
            if digits == 0 && b == b'0' {
                continue;
            }
            digits += 1;
            if b != b'0' {
                significant = digits;
            }
            if significant > 30 {
                return Err(DecimalError::TooLong);
            }
            mantissa = mantissa
                .checked_mul(10)
                .and_then(|m| m.checked_add(i128::from(b - b'0')))
                .ok_or(DecimalError::TooLong)?;
        }
        let mut scale =
            i64::try_from(frac.len()).map_err(|_| DecimalError::TooLong)? - i64::from(exp);
        if scale < 0 {
            let up = u32::try_from(-scale).map_err(|_| DecimalError::TooLong)?;
            mantissa = pow10(up)
                .and_then(|p| mantissa.checked_mul(p))
                .ok_or(DecimalError::TooLong)?;
            scale = 0;
        }
        let scale = u32::try_from(scale).map_err(|_| DecimalError::TooLong)?;
        if scale > Self::MAX_SCALE + 20 {
            return Err(DecimalError::TooLong);
        }
        if neg {
            mantissa = -mantissa;
        }
        Ok(Self { mantissa, scale }.normalized())
    }

    /// An exact integer.
    pub const fn from_int(n: i64) -> Self {
        Self {
            mantissa: n as i128,
            scale: 0,
        }
    }

    /// Strips trailing zeros so equal values compare equal.
    fn normalized(mut self) -> Self {
        while self.scale > 0 && self.mantissa % 10 == 0 {
            self.mantissa /= 10;
            self.scale -= 1;
        }
        if self.mantissa == 0 {
            self.scale = 0;
        }
        self
    }

    /// The exact product, or None if it would not fit.
    pub fn checked_mul(self, other: Self) -> Option<Self> {
        let mantissa = self.mantissa.checked_mul(other.mantissa)?;
        let scale = self.scale + other.scale;
        let mut d = Self { mantissa, scale }.normalized();
        // Keep the scale within what pow10 can express; extra digits far below a gram round away.
        while d.scale > 36 {
            d = d.round_to_scale(d.scale - 1);
        }
        Some(d)
    }

    /// Rounds half to even at `scale` digits after the point.
    fn round_to_scale(self, scale: u32) -> Self {
        if self.scale <= scale {
            return self;
        }
        let Some(div) = pow10(self.scale - scale) else {
            return Self {
                mantissa: 0,
                scale: 0,
            };
        };
        let q = self.mantissa / div;
        let r = self.mantissa % div;
        let twice = r.abs() * 2;
        let bump = twice > div || (twice == div && q % 2 != 0);
        let q = if bump { q + self.mantissa.signum() } else { q };
        Self { mantissa: q, scale }.normalized()
    }

    /// Rounds half to even to a whole number; None if it does not fit an i64.
    pub fn round_half_even(self) -> Option<i64> {
        i64::try_from(self.round_to_scale(0).mantissa).ok()
    }

    /// Nearest f64, for the conversions that leave exact arithmetic (densities, ratios).
    pub fn to_f64(self) -> f64 {
        // The mantissa has at most ~38 digits; dividing by an exact power of ten rounds once more.
        self.mantissa as f64 / 10f64.powi(self.scale as i32)
    }

    pub fn is_positive(self) -> bool {
        self.mantissa > 0
    }

    pub fn is_zero(self) -> bool {
        self.mantissa == 0
    }

    /// Compares two decimals exactly.
    pub fn cmp_value(self, other: Self) -> std::cmp::Ordering {
        let s = self.scale.max(other.scale);
        let lift = |d: Self| pow10(s - d.scale).and_then(|p| d.mantissa.checked_mul(p));
        match (lift(self), lift(other)) {
            (Some(a), Some(b)) => a.cmp(&b),
            _ => self.to_f64().total_cmp(&other.to_f64()),
        }
    }
}

impl fmt::Display for Decimal {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        let digits = self.mantissa.unsigned_abs().to_string();
        let sign = if self.mantissa < 0 { "-" } else { "" };
        let scale = self.scale as usize;
        if scale == 0 {
            return write!(f, "{sign}{digits}");
        }
        let padded = format!("{digits:0>width$}", width = scale + 1);
        let (int, frac) = padded.split_at(padded.len() - scale);
        write!(f, "{sign}{int}.{frac}")
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn d(s: &str) -> Decimal {
        Decimal::parse(s).unwrap()
    }

    #[test]
    fn parses_and_displays_exactly() {
        assert_eq!(d("1250.50").to_string(), "1250.5");
        assert_eq!(d("-0.0025").to_string(), "-0.0025");
        assert_eq!(d("1.5e3").to_string(), "1500");
        assert_eq!(d("2E-3").to_string(), "0.002");
        assert_eq!(d(".5").to_string(), "0.5");
        assert_eq!(d("007").to_string(), "7");
    }

    #[test]
    fn refuses_commas_and_garbage() {
        assert_eq!(Decimal::parse("1,234.5"), Err(DecimalError::Comma));
        assert_eq!(Decimal::parse("12,5"), Err(DecimalError::Comma));
        for bad in [
            "", ".", "1.2.3", "abc", "1e", "--1", "1 2", "0x10", "NaN", "inf",
        ] {
            assert_eq!(Decimal::parse(bad), Err(DecimalError::Malformed), "{bad:?}");
        }
        assert_eq!(Decimal::parse("1e400"), Err(DecimalError::TooLong));
    }

    #[test]
    fn products_are_exact_and_round_half_even() {
        // 1 lb = 453.59237 g exactly (NIST SP 811, Appendix B — read).
        let g = d("3").checked_mul(d("453.59237")).unwrap();
        assert_eq!(g.to_string(), "1360.77711");
        assert_eq!(d("2.5").round_half_even(), Some(2));
        assert_eq!(d("3.5").round_half_even(), Some(4));
        assert_eq!(d("-2.5").round_half_even(), Some(-2));
        assert_eq!(d("2.5000001").round_half_even(), Some(3));
    }

    proptest::proptest! {
        #[test]
        fn parse_display_round_trip(m in -10_i64.pow(15)..10_i64.pow(15), s in 0u32..12) {
            let x = Decimal { mantissa: i128::from(m), scale: s }.normalized();
            proptest::prop_assert_eq!(Decimal::parse(&x.to_string()), Ok(x));
        }

        #[test]
        fn never_panics_on_any_text(s in "\\PC{0,40}") {
            let _ = Decimal::parse(&s);
        }
    }
}
