//! The claim option commands share: how much of the uncertainty the conservative figure deducts.

use crate::accounting::conservative::DeductionRule;
use crate::error::{Error, Result};

/// `--deduct-excess-over 5%`, or the whole uncertainty.
pub fn deduction_rule(threshold: Option<&str>) -> Result<DeductionRule> {
    DeductionRule::above(threshold)
        .map_err(|e| Error::field("--deduct-excess-over", threshold.unwrap_or_default(), e))
}
