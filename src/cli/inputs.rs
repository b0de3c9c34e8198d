//! Turning option values into typed values, with errors that name the option and the value.

use crate::accounting::metering::MeterError;
use crate::accounting::restatement::Restated;
use crate::error::{Error, Result};
use crate::ledger::period::parse_date;
use crate::ledger::{Method, bounds};
use crate::quantity::{Mass, MassReading};
use chrono::NaiveDate;

pub fn mass(field: &str, text: &str) -> Result<(MassReading, Mass)> {
    let r = MassReading::parse(text).map_err(|e| Error::field(field, text, e))?;
    let m = r.to_mass().map_err(|e| Error::field(field, text, e))?;
    bounds::grams(m).map_err(|e| Error::field(field, text, e))?;
    Ok((r, m))
}

/// An option's value read by `read` where one is given, a refusal naming the option.
pub fn optional<T, E: std::fmt::Display>(
    field: &str,
    text: Option<&str>,
    read: impl FnOnce(&str) -> std::result::Result<T, E>,
) -> Result<Option<T>> {
    text.map(|t| read(t).map_err(|e| Error::field(field, t, e)))
        .transpose()
}

/// A mass where one is given (a permit's capacity), checked as [`mass`] checks it.
pub fn optional_mass(field: &str, text: Option<&str>) -> Result<Option<Mass>> {
    text.map(|t| mass(field, t).map(|(_, m)| m)).transpose()
}

/// A storage method by its name.
pub fn method(field: &str, text: &str) -> Result<Method> {
    Method::from_name(text).ok_or_else(|| {
        Error::field(
            field,
            text,
            format!("is not a method (use {})", Method::choices()),
        )
    })
}

pub fn date(field: &str, text: &str) -> Result<NaiveDate> {
    parse_date(text).map_err(|e| Error::field(field, text, e))
}

/// A date activity took place: from 1900 to `today`, the ledger's clock.
pub fn activity_date(field: &str, text: &str, today: NaiveDate) -> Result<NaiveDate> {
    let d = date(field, text)?;
    bounds::activity_date(d, today).map_err(|e| Error::field(field, text, e))?;
    Ok(d)
}

pub fn code(field: &str, text: &str) -> Result<()> {
    crate::ledger::project::check_code(text).map_err(|e| Error::field(field, text, e))
}

/// Free text that goes into the ledger: at most [`bounds::TEXT_MAX`] characters, no control
/// characters, which would garble reports.
pub fn text(field: &str, value: &str) -> Result<()> {
    text_of_at_most(field, value, bounds::TEXT_MAX)
}

/// Free text where it is given.
pub fn optional_text(field: &str, value: &Option<String>) -> Result<()> {
    value.as_deref().map_or(Ok(()), |t| text(field, t))
}

/// A signed statement: free text of at most [`bounds::STATEMENT_MAX`] characters.
pub fn statement(field: &str, value: &str) -> Result<()> {
    text_of_at_most(field, value, bounds::STATEMENT_MAX)
}

fn text_of_at_most(field: &str, value: &str, max: usize) -> Result<()> {
    bounds::free_text(value, max).map_err(|e| match e {
        bounds::TextRefusal::TooLong(why) => Error::field(field, &bounds::shown(value), why),
        e => Error::field(field, value, e),
    })
}

/// An entry's field out of bounds, named by the option it comes from (`period_from` →
/// `--from`, a reading's `pathway` → `--pathway`).
pub fn out_of_bounds(b: &bounds::OutOfBounds) -> Error {
    let option = match b.field.as_str() {
        "period_from" => "--from".to_string(),
        "period_to" => "--to".to_string(),
        name => format!("--{}", name.replace('_', "-")),
    };
    Error::field(&option, &bounds::shown(&b.value), &b.why)
}

/// How the command line names a value of a reading: a quantity, or one a correction restates.
pub fn restated_option(r: Restated) -> &'static str {
    match r {
        Restated::Mass => "--mass",
        Restated::Volume => "--volume",
        Restated::Co2Fraction => "--co2-fraction",
        Restated::Co2Basis => "--co2-basis",
        Restated::Density => "--density",
        Restated::Impurities => "--impurities",
        Restated::Uncertainty => "--uncertainty",
        Restated::Meter => "--meter",
    }
}

/// A meter reading's refusal in the options' words.
pub fn meter_error(e: MeterError) -> Error {
    match e {
        MeterError::Value { field, value, why } => {
            Error::field(restated_option(field.into()), &value, why)
        }
        MeterError::BothQuantities => Error::options("--mass", "give --mass or --volume, not both"),
        MeterError::NoQuantity => Error::options(
            "--mass",
            "a quantity is needed: --mass \"1250.5 t\" (mass meter) or --volume \"2.5 MMscf\" (volumetric meter)",
        ),
        MeterError::MolNeedsImpurities => Error::options(
            "--impurities",
            "--co2-basis mol with --mass needs the stream's other gases to convert to a mass fraction: --impurities N2=0.015,Ar=0.005 (mole fractions adding up to 1 with the CO2)",
        ),
        MeterError::RegulatoryConditions { value, why } => {
            Error::field("--volume", &value, format!("{why} (use --density eos)"))
        }
        MeterError::VolumeByMass => Error::field(
            "--co2-basis",
            "mass",
            "a volumetric meter's CO2 fraction is by volume: give it with --co2-basis mol",
        ),
    }
}
