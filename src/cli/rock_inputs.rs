//! Option values of the rock routes that no pure module reads for the command — a share — and
//! the refusal of a pure check told with its own field, each naming the value.

use crate::accounting::input::InputError;
use crate::error::{Error, Result};
use crate::quantity::Decimal;

/// A share as `12.5%` or `0.125`, from 0 to 1.
pub fn share(option: &str, text: &str) -> Result<Decimal> {
    crate::quantity::share::share(text).map_err(|(value, why)| Error::field(option, &value, why))
}

/// A refusal by a pure check on a figure no single option holds, told by its field's name.
pub fn refused(e: &InputError) -> Error {
    Error::field(
        &e.field,
        &e.value.to_string(),
        format!("must be {}", e.rule),
    )
}
