//! Surface leakage events quantified as Regulation (EU) 2018/2066 Annex IV §23 B.3 sets out:
//! emitted = Σ over the days of the event of the average hourly leak rate × 24.

use crate::ledger::{Period, Reading};
use crate::quantity::mass::split_number_unit;
use crate::quantity::{Decimal, Mass, MassUnit};
use chrono::NaiveDate;
use std::fmt;

/// What the start of a leak whose start is unknown was taken from.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum LeakStart {
    /// The last survey of the site that found no leak.
    LastClearSurvey(NaiveDate),
    /// The first day of injection: nothing stored leaks before it.
    InjectionBegan(NaiveDate),
}

impl LeakStart {
    pub fn day(self) -> NaiveDate {
        match self {
            Self::LastClearSurvey(d) | Self::InjectionBegan(d) => d,
        }
    }

    /// The reading field that records it.
    pub fn field(self) -> &'static str {
        match self {
            Self::LastClearSurvey(_) => "backdated_to_survey",
            Self::InjectionBegan(_) => "backdated_to_injection_start",
        }
    }
}

/// The start of a leak whose start is unknown, as Regulation (EU) 2018/2066 Annex IV §23 B.3
/// sets it: the latest of the last survey without leakage and the start of injection (other
/// evidence is given as `--from`); None when neither is known. A survey day and the start of
/// injection on the same day are one start, taken as the survey's.
pub fn unknown_leak_start(
    last_clear_survey: Option<NaiveDate>,
    injection_began: Option<NaiveDate>,
) -> Option<LeakStart> {
    match (last_clear_survey, injection_began) {
        (Some(s), Some(i)) if i > s => Some(LeakStart::InjectionBegan(i)),
        (Some(s), _) => Some(LeakStart::LastClearSurvey(s)),
        (None, Some(i)) => Some(LeakStart::InjectionBegan(i)),
        (None, None) => None,
    }
}

/// An average leak rate: a mass per hour or per day.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct LeakRate {
    pub number: Decimal,
    pub unit: MassUnit,
    pub per_day: bool,
}

impl LeakRate {
    /// Parses `2.5 t/h`, `40 kg/d`, `0.3 t/day`.
    pub fn parse(text: &str) -> Result<LeakRate, String> {
        let (n, u) = split_number_unit(text);
        let (mass_unit, per) = u.split_once('/').ok_or_else(|| {
            "write a mass per hour or per day, e.g. 2.5 t/h or 40 kg/d".to_string()
        })?;
        let per_day = match per {
            "h" | "hr" | "hour" => false,
            "d" | "day" => true,
            other => return Err(format!("unknown time unit {other:?} (use h or d)")),
        };
        let unit = MassUnit::from_symbol(mass_unit)
            .ok_or_else(|| format!("unknown mass unit {mass_unit:?}"))?;
        let number = Decimal::parse(n).map_err(|e| e.to_string())?;
        if !number.is_positive() {
            return Err("must be greater than zero".into());
        }
        Ok(LeakRate {
            number,
            unit,
            per_day,
        })
    }

    /// The mass emitted over the days of `period`, both ends included, exactly.
    pub fn emitted(&self, period: Period) -> Result<Mass, String> {
        let per_day = if self.per_day {
            Decimal::from_int(1)
        } else {
            Decimal::from_int(24)
        };
        self.number
            .checked_mul(self.unit.grams_per_unit())
            .and_then(|g| g.checked_mul(per_day))
            .and_then(|g| g.checked_mul(Decimal::from_int(period.days())))
            .and_then(Decimal::round_half_even)
            .map(Mass::from_grams)
            .ok_or_else(|| "too large for the ledger".to_string())
    }
}

/// A leak given as a rate (`2.5 t/h`) over `period`: its reading (the rate, the days, the
/// method) and the grams emitted.
pub fn rated(rate: &str, period: Period) -> Result<(Reading, Mass), String> {
    let r = LeakRate::parse(rate)?;
    let mass = r.emitted(period)?;
    let mut reading = Reading::default();
    reading.push("rate", r.to_string());
    reading.push("days", period.days().to_string());
    reading.push(
        "method",
        "rate × 24 h × days (EU 2018/2066 Annex IV §23 B.3)",
    );
    Ok((reading, mass))
}

impl fmt::Display for LeakRate {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        write!(
            f,
            "{} {}/{}",
            self.number,
            self.unit.symbol(),
            if self.per_day { "d" } else { "h" }
        )
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn a_rated_leak_keeps_its_rate_and_days_beside_the_grams() {
        let d = |s: &str| s.parse::<NaiveDate>().unwrap();
        let period = Period::new(d("2026-09-18"), d("2026-09-20")).unwrap();
        let (reading, mass) = rated("0.015 t/h", period).unwrap();
        // 0.015 t/h × 24 h × 3 days = 1.08 t.
        assert_eq!(mass, Mass::from_grams(1_080_000));
        assert_eq!(reading.text("rate"), Some("0.015 t/h"));
        assert_eq!(reading.text("days"), Some("3"));
        assert!(rated("0.015 t", period).is_err());
    }

    #[test]
    fn an_unknown_start_is_the_later_of_the_clear_survey_and_injection() {
        let d = |s: &str| s.parse::<NaiveDate>().unwrap();
        // A survey before injection began bounds nothing: the leak starts with injection.
        assert_eq!(
            unknown_leak_start(Some(d("2025-11-02")), Some(d("2026-01-01"))),
            Some(LeakStart::InjectionBegan(d("2026-01-01")))
        );
        assert_eq!(
            unknown_leak_start(Some(d("2026-03-15")), Some(d("2026-01-01"))),
            Some(LeakStart::LastClearSurvey(d("2026-03-15")))
        );
        assert_eq!(
            unknown_leak_start(Some(d("2026-01-01")), Some(d("2026-01-01"))),
            Some(LeakStart::LastClearSurvey(d("2026-01-01")))
        );
        assert_eq!(
            unknown_leak_start(None, Some(d("2026-01-01"))),
            Some(LeakStart::InjectionBegan(d("2026-01-01")))
        );
        assert_eq!(
            unknown_leak_start(Some(d("2026-03-15")), None),
            Some(LeakStart::LastClearSurvey(d("2026-03-15")))
        );
        assert_eq!(unknown_leak_start(None, None), None);
    }
    use crate::ledger::period::parse_date;

    #[test]
    fn eu_2018_2066_example() {
        // 2.5 t/h for 10 days → 600 t — computed (REFERENCES.md, Regulation (EU) 2018/2066 Annex IV §23 B.3, read).
        let p = Period::new(
            parse_date("2026-05-01").unwrap(),
            parse_date("2026-05-10").unwrap(),
        )
        .unwrap();
        let m = LeakRate::parse("2.5 t/h").unwrap().emitted(p).unwrap();
        assert_eq!(m, Mass::from_grams(600_000_000));
        assert_eq!(
            LeakRate::parse("40 kg/d").unwrap().emitted(p).unwrap(),
            Mass::from_grams(400_000)
        );
    }

    #[test]
    fn refusals() {
        assert!(LeakRate::parse("2.5 t").is_err());
        assert!(LeakRate::parse("2.5 t/week").is_err());
        assert!(LeakRate::parse("2.5 st/h").is_err());
        assert!(LeakRate::parse("0 t/h").is_err());
        assert_eq!(LeakRate::parse("2.5t/h").unwrap().to_string(), "2.5 t/h");
    }

    proptest::proptest! {
        #[test]
        fn never_panics(s in "\\PC{0,30}", days in 0u64..100_000) {
            if let Ok(r) = LeakRate::parse(&s) {
                let from = parse_date("2026-01-01").unwrap();
                let _ = r.emitted(Period::new(from, from + chrono::Days::new(days)).unwrap());
            }
        }
    }
}
