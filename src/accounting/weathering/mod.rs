//! Enhanced weathering: how much of the crushed rock spread on a field has dissolved, and the
//! CO2 that dissolution removes.
//!
//! Two ways to the dissolved fraction from soil analyses, both using an immobile element i
//! (Ti, Zr) to see past dilution: the classic mass transfer coefficient τ ([`tau`]), and the
//! three-end-member mass balance of soil, feedstock and sample ([`three_end_member`]), which
//! separates the feedstock from the soil it is mixed into. [`removal`] turns a dissolved
//! fraction into gross CO2 and its deductions. Background: docs/weathering.md.

pub mod campaign;
pub mod choice;
pub mod composition;
pub mod registration;
pub mod removal;
pub mod tau;
pub mod three_end_member;

use super::input::{InputError, Rule, check};
use std::fmt;

/// One material's concentrations of a mobile element j (Ca, Mg, Na, K) and an immobile element
/// i (Ti, Zr). Any unit that is the same for that element in every material compared (mol/kg,
/// mg/kg, wt%); None where the analysis did not report the element.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Analysis {
    pub mobile: Option<f64>,
    pub immobile: Option<f64>,
}

impl Analysis {
    /// An analysis that reports both elements.
    pub fn new(mobile: f64, immobile: f64) -> Self {
        Self {
            mobile: Some(mobile),
            immobile: Some(immobile),
        }
    }

    /// Both concentrations, checked: mobile ≥ 0, immobile > 0 (an immobile element that is not
    /// there cannot serve as the reference).
    fn checked(&self, material: Material) -> Result<(f64, f64), WeatheringError> {
        let missing = |element| WeatheringError::Missing { material, element };
        let j = self.mobile.ok_or(missing(Role::Mobile))?;
        let i = self.immobile.ok_or(missing(Role::Immobile))?;
        let j = check(&format!("{}.mobile", material.key()), j, Rule::NonNegative)?;
        let i = check(&format!("{}.immobile", material.key()), i, Rule::Positive)?;
        Ok((j, i))
    }
}

/// Which material an analysis belongs to.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Material {
    /// The field's soil before any feedstock (the baseline).
    Soil,
    Feedstock,
    /// A soil sample after application: soil and feedstock mixed.
    Sample,
    /// τ's parent material.
    Parent,
    /// τ's weathered material.
    Weathered,
}

impl Material {
    /// The name used in field paths (`soil.immobile`).
    fn key(self) -> &'static str {
        match self {
            Material::Soil => "soil",
            Material::Feedstock => "feedstock",
            Material::Sample => "sample",
            Material::Parent => "parent",
            Material::Weathered => "weathered",
        }
    }
}

/// The element's part in the method.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Role {
    Mobile,
    Immobile,
}

/// Why soil figures were refused.
#[derive(Debug, Clone, PartialEq)]
pub enum WeatheringError {
    Input(InputError),
    /// The analysis of this material does not report this element.
    Missing {
        material: Material,
        element: Role,
    },
    /// A sample without a baseline soil to compare it with.
    NoBaseline,
}

impl fmt::Display for WeatheringError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            WeatheringError::Input(e) => write!(f, "{e}"),
            WeatheringError::Missing { material, element } => {
                let role = match element {
                    Role::Mobile => "mobile",
                    Role::Immobile => "immobile",
                };
                write!(
                    f,
                    "{}.{role} is missing; the {role} element must be analysed in the {}",
                    material.key(),
                    material.key()
                )
            }
            WeatheringError::NoBaseline => f.write_str(
                "soil is missing; a sample needs the baseline soil analysis of its field",
            ),
        }
    }
}

impl std::error::Error for WeatheringError {}

impl From<InputError> for WeatheringError {
    fn from(e: InputError) -> Self {
        WeatheringError::Input(e)
    }
}
