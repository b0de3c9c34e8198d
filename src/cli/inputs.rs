//! Turning option values into typed values, with errors that name the option and the value.

use crate::error::{Error, Result};
use crate::ledger::period::parse_date;
use crate::quantity::{Mass, MassReading};
use chrono::NaiveDate;

pub fn mass(field: &str, text: &str) -> Result<(MassReading, Mass)> {
    let r = MassReading::parse(text).map_err(|e| Error::field(field, text, e))?;
    let m = r.to_mass().map_err(|e| Error::field(field, text, e))?;
    Ok((r, m))
}

pub fn date(field: &str, text: &str) -> Result<NaiveDate> {
    parse_date(text).map_err(|e| Error::field(field, text, e))
}

pub fn code(field: &str, text: &str) -> Result<()> {
    crate::ledger::project::check_code(text).map_err(|e| Error::field(field, text, e))
}

/// Free text that goes into the ledger: no control characters, which would garble reports.
pub fn text(field: &str, value: &str) -> Result<()> {
    if value.trim().is_empty() {
        return Err(Error::field(field, value, "must not be empty"));
    }
    if value.chars().any(char::is_control) {
        return Err(Error::field(
            field,
            value,
            "must not contain control characters",
        ));
    }
    Ok(())
}
