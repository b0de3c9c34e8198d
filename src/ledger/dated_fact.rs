//! The readings of dated facts that no meter gives: a meter's calibration, a leak survey and a
//! reversal, built from the values given; and a production's entrained fraction checked.

use super::entry::Reading;
use crate::quantity::{Decimal, MassReading};

/// A calibration's reading: the uncertainty the meter was found to have.
pub fn calibration(uncertainty: Decimal) -> Reading {
    let mut reading = Reading::default();
    reading.push("uncertainty", uncertainty.to_string());
    reading
}

/// A survey's reading: what it found, and the pathway it looked at when it names one.
pub fn survey(no_leak: bool, pathway: Option<&str>) -> Reading {
    let mut reading = Reading::default();
    reading.push("result", if no_leak { "no-leak" } else { "leak-found" });
    if let Some(p) = pathway {
        reading.push("pathway", p);
    }
    reading
}

/// A reversal names no site and no pathway: where the CO2 was lost is not said.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct NoPlace;

/// A reversal's reading: the mass lost, and the pathway it was lost by when it names one.
pub fn reversal(
    mass: &MassReading,
    site: Option<&str>,
    pathway: Option<&str>,
) -> Result<Reading, NoPlace> {
    let mut reading = Reading::default();
    reading.push("mass", mass.to_string());
    match (site, pathway) {
        (None, None) => return Err(NoPlace),
        (_, Some(p)) => reading.push("pathway", p),
        (Some(_), None) => {}
    }
    Ok(reading)
}

/// A production's entrained fraction: a number in [0, 1).
pub fn entrained_fraction(text: &str) -> Option<Decimal> {
    Decimal::parse(text)
        .ok()
        .filter(|x| !x.to_f64().is_sign_negative() && x.to_f64() < 1.0)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn a_reversal_says_where_and_a_fraction_lies_in_zero_to_one() {
        let m = MassReading::parse("2 t").unwrap();
        assert_eq!(reversal(&m, None, None), Err(NoPlace));
        let r = reversal(&m, None, Some("fault F2")).unwrap();
        assert_eq!(r.text("pathway"), Some("fault F2"));
        assert!(entrained_fraction("0.02").is_some());
        assert!(entrained_fraction("1").is_none());
        assert!(entrained_fraction("-0.1").is_none());
        assert_eq!(survey(false, None).text("result"), Some("leak-found"));
    }
}
