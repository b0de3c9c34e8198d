//! The conservative figure: stored minus the part of its uncertainty the programme does not
//! accept, so that a claim errs low rather than high.

use super::uncertainty::Estimate;
use crate::quantity::Mass;
use crate::quantity::fraction::{FractionError, parse_uncertainty};
use crate::quantity::mass::round_half_even_f64;
use std::fmt;

/// How much of the uncertainty to deduct, as the programme's rules set it.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum DeductionRule {
    /// Deduct the whole expanded uncertainty: the figure becomes the lower end of the 95 %
    /// interval (one-sided: only the downward side matters to a claim).
    WholeUncertainty,
    /// Deduct only the share of uncertainty above `threshold` (a fraction, `0.05` for 5 %):
    /// deduction = max(0, U% − threshold) · stored.
    AboveThreshold { threshold: f64 },
}

impl DeductionRule {
    /// Deduct only the share above `threshold` (`5%`, `0.05`) where one is given, else the
    /// whole uncertainty.
    pub fn above(threshold: Option<&str>) -> Result<DeductionRule, FractionError> {
        threshold.map_or(Ok(DeductionRule::WholeUncertainty), |t| {
            parse_uncertainty(t).map(|d| DeductionRule::AboveThreshold {
                threshold: d.to_f64(),
            })
        })
    }
}

/// The rule as it turned out for this figure, so the output can say what was done.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum AppliedRule {
    WholeUncertainty,
    /// The uncertainty exceeded the threshold; the excess was deducted.
    ShareAboveThreshold {
        threshold: f64,
    },
    /// The uncertainty was within the threshold; nothing was deducted.
    WithinThreshold {
        threshold: f64,
    },
}

/// Why a conservative figure was refused.
#[derive(Debug, Clone, PartialEq)]
pub enum ConservativeError {
    /// A threshold outside [0, 1) or not a number.
    Threshold(f64),
    /// A net loss is a reversal to be cancelled, not a figure to be claimed.
    NegativeStored(Mass),
}

impl fmt::Display for ConservativeError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            Self::Threshold(v) => write!(f, "threshold is {v}: must be at least 0 and below 1"),
            Self::NegativeStored(m) => write!(
                f,
                "stored is {m}: a net loss is a reversal, not a figure to claim"
            ),
        }
    }
}

/// Stored, the deduction and what remains.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Conservative {
    pub stored: Mass,
    pub applied: AppliedRule,
    pub deduction: Mass,
    /// `stored − deduction`, exactly; never below zero.
    pub conservative: Mass,
}

/// Applies `rule` to a stored estimate. The deduction is rounded half to even to whole grams
/// once, and capped at the stored figure: an uncertainty beyond 100 % leaves nothing to claim,
/// not a negative claim.
pub fn conservative(
    stored: &Estimate,
    rule: DeductionRule,
) -> Result<Conservative, ConservativeError> {
    let value = stored.value();
    if value.grams() < 0 {
        return Err(ConservativeError::NegativeStored(value));
    }
    let u = stored.abs_u_grams();
    let (grams, applied) = match rule {
        DeductionRule::WholeUncertainty => (u, AppliedRule::WholeUncertainty),
        DeductionRule::AboveThreshold { threshold } => {
            if !(0.0..1.0).contains(&threshold) {
                return Err(ConservativeError::Threshold(threshold));
            }
            // max(0, U% − t)·stored written as max(0, U − t·stored): defined for stored = 0.
            let excess = u - threshold * value.grams() as f64;
            if excess > 0.0 {
                (excess, AppliedRule::ShareAboveThreshold { threshold })
            } else {
                (0.0, AppliedRule::WithinThreshold { threshold })
            }
        }
    };
    let deduction = Mass::from_grams(round_half_even_f64(grams).min(value.grams()));
    Ok(Conservative {
        stored: value,
        applied,
        deduction,
        conservative: value - deduction,
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    fn t(tonnes: i64) -> Mass {
        Mass::from_grams(tonnes * 1_000_000)
    }

    fn est(tonnes: i64, rel_u: f64) -> Estimate {
        Estimate::relative(t(tonnes), rel_u).unwrap()
    }

    #[test]
    fn a_threshold_given_deducts_only_above_it() {
        assert_eq!(
            DeductionRule::above(None),
            Ok(DeductionRule::WholeUncertainty)
        );
        assert_eq!(
            DeductionRule::above(Some("5%")),
            Ok(DeductionRule::AboveThreshold { threshold: 0.05 })
        );
        assert!(DeductionRule::above(Some("five")).is_err());
    }

    #[test]
    fn whole_uncertainty_is_the_lower_end() {
        let c = conservative(&est(100_000, 0.03), DeductionRule::WholeUncertainty).unwrap();
        assert_eq!(c.applied, AppliedRule::WholeUncertainty);
        assert_eq!(c.deduction, t(3_000));
        assert_eq!(c.conservative, t(97_000));
    }

    #[test]
    fn only_the_share_above_the_threshold() {
        // 8 % against a 5 % threshold: 3 % of stored is deducted.
        let rule = DeductionRule::AboveThreshold { threshold: 0.05 };
        let c = conservative(&est(100_000, 0.08), rule).unwrap();
        assert_eq!(
            c.applied,
            AppliedRule::ShareAboveThreshold { threshold: 0.05 }
        );
        assert_eq!(c.deduction, t(3_000));
        assert_eq!(c.conservative, t(97_000));
        // 4 % is within 5 %: nothing is deducted, and the result says so.
        let c = conservative(&est(100_000, 0.04), rule).unwrap();
        assert_eq!(c.applied, AppliedRule::WithinThreshold { threshold: 0.05 });
        assert_eq!(c.deduction, Mass::ZERO);
        assert_eq!(c.conservative, t(100_000));
    }

    #[test]
    fn edges() {
        // Nothing stored with some uncertainty: nothing to deduct from.
        let zero = Estimate::absolute(Mass::ZERO, t(5));
        let c = conservative(&zero, DeductionRule::WholeUncertainty).unwrap();
        assert_eq!((c.deduction, c.conservative), (Mass::ZERO, Mass::ZERO));
        // An uncertainty above 100 % is capped at the stored figure.
        let c = conservative(&est(10, 1.5), DeductionRule::WholeUncertainty).unwrap();
        assert_eq!((c.deduction, c.conservative), (t(10), Mass::ZERO));
    }

    #[test]
    fn refusals_name_the_value() {
        let rule = DeductionRule::AboveThreshold { threshold: 1.0 };
        let e = conservative(&est(1, 0.01), rule).unwrap_err();
        assert_eq!(
            e.to_string(),
            "threshold is 1: must be at least 0 and below 1"
        );
        let e = conservative(&est(-2, 0.01), DeductionRule::WholeUncertainty).unwrap_err();
        assert_eq!(
            e.to_string(),
            "stored is -2.000000 t: a net loss is a reversal, not a figure to claim"
        );
    }

    proptest::proptest! {
        #[test]
        fn exact_in_grams(
            g in 0i64..1_000_000_000_000_000,
            u in 0.0f64..2.0,
            threshold in proptest::option::of(0.0f64..1.0),
        ) {
            let rule = threshold.map_or(DeductionRule::WholeUncertainty, |threshold| {
                DeductionRule::AboveThreshold { threshold }
            });
            let c = conservative(&Estimate::relative(Mass::from_grams(g), u).unwrap(), rule)
                .unwrap();
            proptest::prop_assert_eq!(c.conservative, c.stored - c.deduction);
            proptest::prop_assert!(c.deduction.grams() >= 0);
            proptest::prop_assert!(c.conservative.grams() >= 0);
        }
    }
}
