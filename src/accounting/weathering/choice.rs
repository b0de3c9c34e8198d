//! How the campaigns are read, from the values given: the immobile element, the base cations
//! credited and the contrast below which a mass balance is inconclusive. A refusal names the
//! value ([`Given`]), its text and why; the caller says which option that is.

use super::campaign::{DissolutionMethod, Settings};
use super::composition::Immobile;
use super::removal::{Cation, Deductions};
use super::three_end_member::Resolution;
use crate::quantity::Decimal;

/// A value of the reading's settings.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Given {
    Immobile,
    Mobile,
    MinImmobileContrast,
}

/// A value that does not read, its text and why.
#[derive(Debug, Clone, PartialEq)]
pub struct ChoiceError {
    pub given: Given,
    pub text: String,
    pub why: String,
}

fn refuse(given: Given, text: &str, why: impl ToString) -> ChoiceError {
    ChoiceError {
        given,
        text: text.into(),
        why: why.to_string(),
    }
}

/// The settings of `method` with the element, cations (`Ca,Mg,…`) and contrast given, and the
/// default deductions.
pub fn settings(
    method: DissolutionMethod,
    immobile: &str,
    mobile: &str,
    min_immobile_contrast: &str,
) -> Result<Settings, ChoiceError> {
    let element = Immobile::from_symbol(immobile)
        .ok_or_else(|| refuse(Given::Immobile, immobile, "use Ti or Zr"))?;
    let mut cations = Vec::new();
    for part in mobile.split(',').map(str::trim) {
        let c = Cation::ALL
            .into_iter()
            .find(|c| c.symbol() == part)
            .ok_or_else(|| {
                refuse(
                    Given::Mobile,
                    mobile,
                    format!("{part:?} is not Ca, Mg, Na or K"),
                )
            })?;
        if cations.contains(&c) {
            return Err(refuse(
                Given::Mobile,
                mobile,
                format!("{part} is given twice"),
            ));
        }
        cations.push(c);
    }
    let text = min_immobile_contrast;
    let contrast = Decimal::parse(text.trim())
        .map_err(|e| refuse(Given::MinImmobileContrast, text, e))?
        .to_f64();
    if contrast < 0.0 {
        return Err(refuse(
            Given::MinImmobileContrast,
            text,
            "must be at least 0",
        ));
    }
    Ok(Settings {
        method,
        immobile: element,
        mobile: cations,
        resolution: Resolution {
            min_immobile_contrast: contrast,
            ..Resolution::DEFAULT
        },
        deductions: Deductions::default(),
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn reads_and_refuses_by_value() {
        let s = settings(DissolutionMethod::Tau, "Zr", "Ca, Mg", "0.1").unwrap();
        assert_eq!(s.mobile, vec![Cation::Ca, Cation::Mg]);
        let e = settings(DissolutionMethod::Tau, "Ti", "Ca,Ca", "0.1").unwrap_err();
        assert_eq!(
            (e.given, e.why.as_str()),
            (Given::Mobile, "Ca is given twice")
        );
        let e = settings(DissolutionMethod::Tau, "Ti", "Ca", "-1").unwrap_err();
        assert_eq!(e.given, Given::MinImmobileContrast);
    }
}
