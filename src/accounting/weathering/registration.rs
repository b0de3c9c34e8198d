//! A feedstock's registration from the values given: the oxide and element analyses read as
//! exact decimals and checked as every later figure will read them, the density and particle
//! size as measures. A refusal names the value ([`Given`]), its text and why; the caller says
//! which option that is.

use super::composition::{CompositionError, FeedstockAnalysis, Unit};
use crate::ledger::feedstock::Feedstock;
use crate::quantity::Decimal;
use crate::quantity::measure::{DENSITY, SIZE, parse_measure};
use crate::quantity::share::pairs;
use chrono::{DateTime, Utc};

/// A value of a feedstock's registration.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Given {
    Oxides,
    Elements,
    Unit,
    ElementUnit,
    Density,
    D80,
}

/// A value that does not read, or breaks a rule.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct RegistrationError {
    pub given: Given,
    pub text: String,
    pub why: String,
}

type Result<T> = std::result::Result<T, RegistrationError>;

fn value(given: Given, text: &str, why: impl ToString) -> RegistrationError {
    RegistrationError {
        given,
        text: text.into(),
        why: why.to_string(),
    }
}

/// A feedstock as typed.
#[derive(Debug, Clone, Copy)]
pub struct FeedstockTexts<'a> {
    pub project: &'a str,
    pub code: &'a str,
    pub oxides: &'a str,
    pub elements: Option<&'a str>,
    pub unit: &'a str,
    /// The unit of the elements when not `unit`.
    pub element_unit: Option<&'a str>,
    pub density: &'a str,
    pub d80: Option<&'a str>,
}

/// Denser than any silicate rock spread on fields: a figure above it is a unit slip.
const MAX_DENSITY_KG_M3: f64 = 5000.0;

fn unit(given: Given, text: &str) -> Result<Unit> {
    Unit::from_name(text).ok_or_else(|| {
        value(
            given,
            text,
            "is not a concentration unit (use wt%, mg/kg or mol/kg)",
        )
    })
}

fn analysis(given: Given, text: &str) -> Result<Vec<(String, Decimal)>> {
    pairs(text).map_err(|why| value(given, text, why))
}

fn texts(pairs: &[(String, Decimal)]) -> Vec<(String, String)> {
    pairs
        .iter()
        .map(|(n, v)| (n.clone(), v.to_string()))
        .collect()
}

fn numbers(pairs: &[(String, Decimal)]) -> Vec<(String, f64)> {
    pairs.iter().map(|(n, v)| (n.clone(), v.to_f64())).collect()
}

/// The feedstock to register, its values checked in the order given.
pub fn registration(t: &FeedstockTexts<'_>, registered_at: DateTime<Utc>) -> Result<Feedstock> {
    let oxide_unit = unit(Given::Unit, t.unit)?;
    let element_unit = match t.element_unit {
        Some(u) => unit(Given::ElementUnit, u)?,
        None => oxide_unit,
    };
    let oxides = analysis(Given::Oxides, t.oxides)?;
    let elements = match t.elements {
        Some(e) => analysis(Given::Elements, e)?,
        None => Vec::new(),
    };
    FeedstockAnalysis::new(
        &numbers(&oxides),
        oxide_unit,
        &numbers(&elements),
        element_unit,
    )
    .map_err(|e| match e {
        CompositionError::Oxides(_) | CompositionError::NoMobile => {
            value(Given::Oxides, t.oxides, e)
        }
        _ => value(Given::Elements, t.elements.unwrap_or(""), e),
    })?;
    let density = parse_measure(t.density, DENSITY, true)
        .map_err(|why| value(Given::Density, t.density, why))?;
    if density.base > MAX_DENSITY_KG_M3 {
        return Err(value(
            Given::Density,
            t.density,
            "must be at most 5 t/m3, denser than any silicate rock: check the unit",
        ));
    }
    let d80 = t
        .d80
        .map(|d| parse_measure(d, SIZE, true).map_err(|why| value(Given::D80, d, why)))
        .transpose()?;
    Ok(Feedstock {
        project: t.project.into(),
        code: t.code.into(),
        oxides: texts(&oxides),
        oxide_unit: oxide_unit.name().into(),
        elements: texts(&elements),
        element_unit: element_unit.name().into(),
        density: density.to_string(),
        d80: d80.map(|d| d.to_string()),
        registered_at,
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    const BASALT: FeedstockTexts<'static> = FeedstockTexts {
        project: "EVW",
        code: "EVB-1",
        oxides: "CaO=9.40,MgO=7.8,TiO2=1.9",
        elements: None,
        unit: "wt%",
        element_unit: None,
        density: "2.9 t/m3",
        d80: Some("90µm"),
    };

    #[test]
    fn a_feedstock_keeps_its_values_as_exact_decimals() {
        let f = registration(&BASALT, DateTime::UNIX_EPOCH).unwrap();
        assert_eq!(f.oxides[0], ("CaO".into(), "9.4".into()));
        assert_eq!(
            (f.oxide_unit.as_str(), f.element_unit.as_str()),
            ("wt%", "wt%")
        );
        assert_eq!(f.density, "2.9 t/m3");
        assert_eq!(f.d80.as_deref(), Some("90 um"));
    }

    #[test]
    fn refusals_name_the_value_not_an_option() {
        const OX: &str = BASALT.oxides;
        let cases = [
            ("5.5 t/m3", None, OX, Given::Density),
            ("2.9", None, OX, Given::Density),
            ("2.9 t/m3", Some("ppm"), OX, Given::ElementUnit),
            ("2.9 t/m3", None, "CaO:9.4,TiO2=1.9", Given::Oxides),
        ];
        for (density, element_unit, oxides, given) in cases {
            let t = FeedstockTexts {
                density,
                element_unit,
                oxides,
                ..BASALT
            };
            let e = registration(&t, DateTime::UNIX_EPOCH).unwrap_err();
            assert_eq!(e.given, given, "{e:?}");
        }
        let fine = FeedstockTexts {
            d80: Some("0 um"),
            ..BASALT
        };
        let e = registration(&fine, DateTime::UNIX_EPOCH).unwrap_err();
        assert_eq!(e.given, Given::D80);
    }
}
