//! The claim option commands share: how much of the uncertainty the conservative figure deducts.

use crate::accounting::conservative::DeductionRule;
use crate::error::{Error, Result};
use crate::quantity::fraction::parse_uncertainty;

/// `--deduct-excess-over 5%`, or the whole uncertainty.
pub fn deduction_rule(threshold: Option<&str>) -> Result<DeductionRule> {
    match threshold {
        None => Ok(DeductionRule::WholeUncertainty),
        Some(t) => parse_uncertainty(t)
            .map(|d| DeductionRule::AboveThreshold {
                threshold: d.to_f64(),
            })
            .map_err(|e| Error::field("--deduct-excess-over", t, e)),
    }
}
