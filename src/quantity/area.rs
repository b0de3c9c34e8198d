//! Field areas as written (`12.5 ha`, `30 acre`), with exact factors to square metres.

use super::decimal::Decimal;
use super::mass::split_number_unit;

/// 1 international acre = 4046.8564224 m², exact (NIST SP 811, Appendix B).
const M2_PER_ACRE: &str = "4046.8564224";

/// An area as given, and its exact size.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct Area {
    pub number: Decimal,
    pub unit: &'static str,
}

impl Area {
    /// Parses `12.5 ha`, `125000 m2`, `0.125 km2`, `30 acre`; must be positive.
    pub fn parse(text: &str) -> Result<Area, String> {
        let (n, u) = split_number_unit(text);
        let unit = match u {
            "ha" => "ha",
            "m2" | "m²" => "m2",
            "km2" | "km²" => "km2",
            "acre" | "acres" | "ac" => "acre",
            "" => return Err("a unit is needed (ha, m2, km2, acre)".into()),
            other => {
                return Err(format!(
                    "unknown area unit {other:?} (use ha, m2, km2, acre)"
                ));
            }
        };
        let number = Decimal::parse(n).map_err(|e| e.to_string())?;
        if !number.is_positive() {
            return Err("must be greater than zero".into());
        }
        Ok(Area { number, unit })
    }

    pub fn m2(&self) -> f64 {
        let per = match self.unit {
            "ha" => "10000",
            "km2" => "1000000",
            "acre" => M2_PER_ACRE,
            _ => "1",
        };
        self.number
            .checked_mul(Decimal::parse(per).expect("valid factor"))
            .map_or(f64::INFINITY, Decimal::to_f64)
    }
}

impl std::fmt::Display for Area {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        write!(f, "{} {}", self.number, self.unit)
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn areas() {
        assert_eq!(Area::parse("12.5 ha").unwrap().m2(), 125_000.0);
        // 1 acre = 4046.8564224 m² — read: NIST SP 811, Appendix B.
        assert_eq!(Area::parse("10 acre").unwrap().m2(), 40_468.564224);
        assert_eq!(Area::parse("12.5ha").unwrap().to_string(), "12.5 ha");
        assert!(Area::parse("0 ha").is_err());
        assert!(Area::parse("12 furlong").is_err());
        assert!(Area::parse("12").is_err());
    }

    proptest::proptest! {
        #[test]
        fn never_panics(s in "\\PC{0,30}") {
            if let Ok(a) = Area::parse(&s) {
                let _ = a.m2();
            }
        }
    }
}
