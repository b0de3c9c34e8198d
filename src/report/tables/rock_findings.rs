//! The rock routes' findings and refusals in words: the pure modules say what is missing as
//! typed values, and here they are told with the command and option that supplies it.

use crate::accounting::project_view::Unestimated;
use crate::accounting::tracer::Mineralized;
use crate::accounting::weathering::campaign::{CampaignError, Finding};
use crate::quantity::Mass;
use crate::report::Report;
use crate::report::render::tonnes_text;
use std::fmt;

impl fmt::Display for CampaignError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            CampaignError::NoBaseline { field, date } => write!(
                f,
                "field {field} has no baseline soil sample (record soil-sample … --baseline) on or before its sample of {date}"
            ),
            CampaignError::MissingImmobile { material, element } => write!(
                f,
                "{material} has no {} analysed; choose an immobile element every analysis reports",
                element.symbol()
            ),
            CampaignError::MissingMobile { material, cation } => write!(
                f,
                "{material} has no {} analysed; leave it out of the mobile cations or record it",
                cation.symbol()
            ),
            CampaignError::UnknownFeedstock { code } => {
                write!(f, "feedstock {code} is applied but not registered")
            }
        }
    }
}

impl fmt::Display for Finding {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            Finding::NoFieldArea => f.write_str("the field has no area: register it with --area"),
            Finding::Reading(why) => f.write_str(why),
        }
    }
}

impl fmt::Display for Unestimated {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            Unestimated::UnstatedBatches {
                bucket,
                unstated,
                batches,
            } => write!(
                f,
                "{bucket}: {unstated} of {batches} carbonation batches state no uncertainty (record carbonation --uncertainty) and count as exact"
            ),
            Unestimated::Campaign { bucket, why } => write!(f, "{bucket}: {why}; counted as exact"),
        }
    }
}

/// A tracer sample's mineralized fraction as its record tells it: a line when it lies in
/// [0, 1], else a warning that it is kept as measured and reported as a finding.
pub fn mineralized(mut report: Report, found: &Mineralized) -> Report {
    match found {
        Mineralized::Fraction { f, .. } => {
            report.lines.push(format!("mineralized fraction {f:.4}"));
        }
        Mineralized::OutOfRange { f, why } => report.warnings.push(format!(
            "mineralized fraction {f:.4} is outside [0, 1]: {why}; recorded as measured, reported as a finding"
        )),
    }
    report
}

/// The finding a carbonation batch that took up no CO2 keeps in its reading.
pub fn no_uptake(released: Mass) -> String {
    format!(
        "no uptake: the solid lost {} t CO2, counted as an emission of this batch; nothing counted as stored",
        tonnes_text(released)
    )
}
