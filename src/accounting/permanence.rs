//! From stored to claimable: the conservative figure, the share that lasts (retention over a
//! horizon, or tonne-years for temporary storage), and the buffer withheld against reversals.
//! Every step is a whole-gram line, and each discount is a line of its own, so a reader can
//! check the chain by subtraction. docs/permanence.md explains the models.

use super::conservative::{AppliedRule, ConservativeError, DeductionRule, conservative};
use super::uncertainty::Estimate;
use crate::quantity::Mass;
use std::fmt;

/// Why a permanence figure was refused; each names the parameter and its value.
#[derive(Debug, Clone, PartialEq)]
pub enum PermanenceError {
    LeakFraction(f64),
    Horizon(f64),
    YearsHeld(f64),
    EquivalenceYears(f64),
    BufferShare(f64),
    Conservative(ConservativeError),
}

impl fmt::Display for PermanenceError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            Self::LeakFraction(v) => {
                write!(f, "annual_leak_fraction is {v}: must be between 0 and 1")
            }
            Self::Horizon(v) => write!(f, "horizon_years is {v}: must be a finite number ≥ 0"),
            Self::YearsHeld(v) => write!(f, "years_held is {v}: must be a finite number ≥ 0"),
            Self::EquivalenceYears(v) => {
                write!(f, "equivalence_years is {v}: must be a finite number > 0")
            }
            Self::BufferShare(v) => write!(f, "buffer_share is {v}: must be between 0 and 1"),
            Self::Conservative(e) => write!(f, "{e}"),
        }
    }
}

fn unit_interval(v: f64) -> bool {
    (0.0..=1.0).contains(&v)
}

fn years(v: f64) -> bool {
    v.is_finite() && v >= 0.0
}

/// How much of the conservative figure counts as lasting.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum Durability {
    /// A constant fraction `r` of what remains leaks each year, so after `H` years the share
    /// (1 − r)^H is retained.
    Retention {
        annual_leak_fraction: f64,
        horizon_years: f64,
    },
    /// Temporary storage counted in tonne-years: storage held for the equivalence time counts in
    /// full, shorter storage pro rata (share = min(1, years held / equivalence time)).
    TonneYears {
        years_held: f64,
        equivalence_years: f64,
    },
}

impl Durability {
    /// The share of the conservative figure that counts, in [0, 1].
    pub fn share(self) -> Result<f64, PermanenceError> {
        match self {
            Self::Retention {
                annual_leak_fraction: r,
                horizon_years: h,
            } => {
                if !unit_interval(r) {
                    return Err(PermanenceError::LeakFraction(r));
                }
                if !years(h) {
                    return Err(PermanenceError::Horizon(h));
                }
                Ok((1.0 - r).powf(h))
            }
            Self::TonneYears {
                years_held,
                equivalence_years,
            } => {
                if !years(years_held) {
                    return Err(PermanenceError::YearsHeld(years_held));
                }
                if !(equivalence_years.is_finite() && equivalence_years > 0.0) {
                    return Err(PermanenceError::EquivalenceYears(equivalence_years));
                }
                Ok((years_held / equivalence_years).min(1.0))
            }
        }
    }

    /// The durable part of `mass`, rounded half to even to whole grams.
    pub fn durable(self, mass: Mass) -> Result<Mass, PermanenceError> {
        Ok(mass.scale(self.share()?))
    }
}

/// The programme's parameters for turning stored tonnes into claimable ones.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct ClaimRules {
    pub deduction: DeductionRule,
    pub durability: Durability,
    /// The share of the durable figure withheld into the buffer pool, in [0, 1].
    pub buffer_share: f64,
}

/// Every figure of the chain, with the rule that was applied and the shares used.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Claim {
    pub applied: AppliedRule,
    pub durable_share: f64,
    pub buffer_share: f64,
    pub stored: Mass,
    /// The project's own emissions in the period, where its stored figure is not already net
    /// of them (a geological project's: the mass balance reports them beside storage).
    pub project_emissions: Mass,
    /// Stored − project emissions: what the uncertainty deduction applies to.
    pub net_of_emissions: Mass,
    pub uncertainty_deduction: Mass,
    pub conservative: Mass,
    pub durability_discount: Mass,
    pub durable: Mass,
    pub buffer_withheld: Mass,
    pub claimable: Mass,
}

/// The steps of the chain, in order. A discount sits between the two figures it links.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum ClaimStep {
    Stored,
    ProjectEmissions,
    NetOfEmissions,
    UncertaintyDeduction,
    Conservative,
    DurabilityDiscount,
    Durable,
    BufferWithheld,
    Claimable,
}

impl ClaimStep {
    /// A stable name for programs (JSON and CSV field stems).
    pub fn key(self) -> &'static str {
        match self {
            Self::Stored => "stored",
            Self::ProjectEmissions => "project_emissions",
            Self::NetOfEmissions => "net_of_emissions",
            Self::UncertaintyDeduction => "uncertainty_deduction",
            Self::Conservative => "conservative",
            Self::DurabilityDiscount => "durability_discount",
            Self::Durable => "durable",
            Self::BufferWithheld => "buffer_withheld",
            Self::Claimable => "claimable",
        }
    }

    /// Whether the line is subtracted from the figure above it.
    pub fn is_discount(self) -> bool {
        matches!(
            self,
            Self::ProjectEmissions
                | Self::UncertaintyDeduction
                | Self::DurabilityDiscount
                | Self::BufferWithheld
        )
    }
}

/// One named line of the chain.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct ClaimLine {
    pub step: ClaimStep,
    pub mass: Mass,
}

impl Claim {
    /// The chain as ordered lines: stored, project emissions, net of them, deduction,
    /// conservative, discount, durable, buffer, claimable.
    pub fn lines(&self) -> [ClaimLine; 9] {
        use ClaimStep::*;
        [
            (Stored, self.stored),
            (ProjectEmissions, self.project_emissions),
            (NetOfEmissions, self.net_of_emissions),
            (UncertaintyDeduction, self.uncertainty_deduction),
            (Conservative, self.conservative),
            (DurabilityDiscount, self.durability_discount),
            (Durable, self.durable),
            (BufferWithheld, self.buffer_withheld),
            (Claimable, self.claimable),
        ]
        .map(|(step, mass)| ClaimLine { step, mass })
    }
}

/// Runs the chain stored → conservative → durable → claimable. Each figure is rounded to whole
/// grams once and each discount is the exact difference, so the lines always add up.
pub fn claim(stored: &Estimate, rules: &ClaimRules) -> Result<Claim, PermanenceError> {
    let c = conservative(stored, rules.deduction).map_err(PermanenceError::Conservative)?;
    let durable_share = rules.durability.share()?;
    if !unit_interval(rules.buffer_share) {
        return Err(PermanenceError::BufferShare(rules.buffer_share));
    }
    let durable = c.conservative.scale(durable_share);
    let buffer_withheld = durable.scale(rules.buffer_share);
    Ok(Claim {
        applied: c.applied,
        durable_share,
        buffer_share: rules.buffer_share,
        stored: c.stored,
        project_emissions: Mass::ZERO,
        net_of_emissions: c.stored,
        uncertainty_deduction: c.deduction,
        conservative: c.conservative,
        durability_discount: c.conservative - durable,
        durable,
        buffer_withheld,
        claimable: durable - buffer_withheld,
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    fn t(tonnes: i64) -> Mass {
        Mass::from_grams(tonnes * 1_000_000)
    }

    fn retention(r: f64, h: f64) -> Durability {
        Durability::Retention {
            annual_leak_fraction: r,
            horizon_years: h,
        }
    }

    /// Each figure equals the figure above it minus the discount between, in grams.
    fn assert_chain(c: &Claim) {
        let lines = c.lines();
        assert!(!lines[0].step.is_discount());
        for w in lines.windows(3).step_by(2) {
            assert!(w[1].step.is_discount() && !w[2].step.is_discount());
            assert_eq!(
                w[2].mass.grams(),
                w[0].mass.grams() - w[1].mass.grams(),
                "{:?}",
                w[2].step
            );
        }
    }

    #[test]
    fn retained_share_over_100_and_1000_years() {
        // Computed (REFERENCES.md, constant annual leak fraction; Alcalde et al. 2018, Nat.
        // Commun. 9:2201 state 0.01 %/yr ≈ 99 % after 100 years — read):
        // (1 − 0.0001)^100 → 0.99005, (1 − 0.0001)^1000 → 0.90483.
        let s100 = retention(0.0001, 100.0).share().unwrap();
        let s1000 = retention(0.0001, 1000.0).share().unwrap();
        assert!((s100 - 0.99005).abs() < 5e-6, "{s100}");
        assert!((s1000 - 0.90483).abs() < 5e-6, "{s1000}");
        // IPCC SRCCS (2005) SPM, read through quotations: likely to exceed 99 % over 1000 years
        // in well-selected reservoirs — a leak rate of 0.01 %/yr is thus a pessimistic case.
        assert!(s1000 < 0.99);
    }

    #[test]
    fn tonne_years() {
        // Computed (REFERENCES.md, tonne-year accounting, Moura-Costa & Wilson 2000; the 55-year
        // equivalence time for a 100-year horizon read through quotation):
        // 1000 t held 20 years → 363.64 t.
        let d = |held| Durability::TonneYears {
            years_held: held,
            equivalence_years: 55.0,
        };
        let eq = d(20.0).durable(t(1000)).unwrap();
        assert_eq!(eq.grams(), 363_636_364);
        assert!((eq.tonnes() - 363.64).abs() < 0.005);
        // Held for the equivalence time or longer, it counts in full.
        assert_eq!(d(55.0).durable(t(1000)).unwrap(), t(1000));
        assert_eq!(d(80.0).durable(t(1000)).unwrap(), t(1000));
    }

    #[test]
    fn chain_of_lines() {
        // Buffer withheld as a share of the durable figure (common practice; the share a
        // programme parameter, here 10 %).
        let stored = Estimate::relative(t(100_000), 0.08).unwrap();
        let rules = ClaimRules {
            deduction: DeductionRule::AboveThreshold { threshold: 0.05 },
            durability: retention(0.0001, 100.0),
            buffer_share: 0.10,
        };
        let c = claim(&stored, &rules).unwrap();
        assert_eq!(
            c.applied,
            AppliedRule::ShareAboveThreshold { threshold: 0.05 }
        );
        assert_eq!(c.uncertainty_deduction, t(3_000));
        assert_eq!(c.conservative, t(97_000));
        // 97 000 t × 0.9900498…: rounded once to whole grams.
        let durable = (97_000e6 * 0.9999f64.powf(100.0)).round_ties_even() as i64;
        assert_eq!(c.durable.grams(), durable);
        assert_eq!(
            c.buffer_withheld.grams(),
            (durable as f64 * 0.1).round_ties_even() as i64
        );
        assert_chain(&c);
        let keys: Vec<&str> = c.lines().iter().map(|l| l.step.key()).collect();
        assert_eq!(
            keys,
            [
                "stored",
                "project_emissions",
                "net_of_emissions",
                "uncertainty_deduction",
                "conservative",
                "durability_discount",
                "durable",
                "buffer_withheld",
                "claimable"
            ]
        );
    }

    #[test]
    fn refusals_name_the_parameter() {
        let stored = Estimate::relative(t(1), 0.01).unwrap();
        let rules = |durability, buffer_share| ClaimRules {
            deduction: DeductionRule::WholeUncertainty,
            durability,
            buffer_share,
        };
        let msg = |r| claim(&stored, &r).unwrap_err().to_string();
        assert_eq!(
            msg(rules(retention(1.5, 100.0), 0.1)),
            "annual_leak_fraction is 1.5: must be between 0 and 1"
        );
        assert_eq!(
            msg(rules(retention(0.01, -1.0), 0.1)),
            "horizon_years is -1: must be a finite number ≥ 0"
        );
        assert_eq!(
            msg(rules(retention(0.01, 100.0), f64::NAN)),
            "buffer_share is NaN: must be between 0 and 1"
        );
        let ty = |held, eq| Durability::TonneYears {
            years_held: held,
            equivalence_years: eq,
        };
        assert_eq!(
            msg(rules(ty(10.0, 0.0), 0.1)),
            "equivalence_years is 0: must be a finite number > 0"
        );
        assert_eq!(
            msg(rules(ty(f64::INFINITY, 55.0), 0.1)),
            "years_held is inf: must be a finite number ≥ 0"
        );
    }

    proptest::proptest! {
        #[test]
        fn lines_add_up_in_grams(
            g in 0i64..1_000_000_000_000_000,
            u in 0.0f64..1.5,
            threshold in proptest::option::of(0.0f64..1.0),
            r in 0.0f64..=1.0,
            h in 0.0f64..2000.0,
            held in proptest::option::of(0.0f64..200.0),
            b in 0.0f64..=1.0,
        ) {
            let rules = ClaimRules {
                deduction: threshold.map_or(DeductionRule::WholeUncertainty, |threshold| {
                    DeductionRule::AboveThreshold { threshold }
                }),
                durability: held.map_or(retention(r, h), |years_held| Durability::TonneYears {
                    years_held,
                    equivalence_years: 55.0,
                }),
                buffer_share: b,
            };
            let c = claim(&Estimate::relative(Mass::from_grams(g), u).unwrap(), &rules).unwrap();
            assert_chain(&c);
            for l in c.lines() {
                proptest::prop_assert!(l.mass.grams() >= 0, "{:?}", l);
            }
        }
    }
}
