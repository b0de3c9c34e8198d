//! From the mass balance to what may be claimed: each period's stored figure with its
//! uncertainty runs through the chain stored → conservative → durable → buffer withheld →
//! claimable, and reversals draw on the buffer pool in date order.

use super::buffer_pool::{BufferPool, Reversal};
use super::conservative::DeductionRule;
use super::permanence::{Claim, ClaimRules, Durability, claim};
use super::uncertainty::Estimate;
use crate::ledger::period::Bucket;
use crate::ledger::reading_fields::checked;
use crate::ledger::setting::{Setting, SettingName, value_on};
use crate::ledger::{Entry, Site};
use crate::quantity::Mass;
use chrono::NaiveDate;

/// Tonne-year equivalence time when a project does not set one: 55 years for a 100-year
/// horizon (Moura-Costa & Wilson 2000, read through quotation).
pub const DEFAULT_EQUIVALENCE_YEARS: f64 = 55.0;
/// Retention horizon when a project sets a leak fraction but no horizon.
pub const DEFAULT_HORIZON_YEARS: f64 = 100.0;

/// The relative uncertainty (95 %) of an entry: its own, else the latest calibration of its site
/// (and meter) on or before the period's start, else the site's; None where nothing is stated.
pub fn rel_uncertainty(e: &Entry, sites: &[Site], calibrations: &[Entry]) -> Option<f64> {
    if let Some(u) = checked(e.reading.uncertainty()) {
        return Some(u);
    }
    let calibrated = calibrations
        .iter()
        .filter(|c| {
            c.site == e.site
                && (c.meter.is_none() || c.meter == e.meter)
                && c.period.to <= e.period.from
        })
        .max_by_key(|c| (c.period.to, c.seq))
        .and_then(|c| checked(c.reading.uncertainty()));
    calibrated.or_else(|| {
        sites
            .iter()
            .find(|s| s.code == e.site)
            .and_then(|s| s.uncertainty.as_deref())
            .and_then(|u| crate::quantity::fraction::parse_uncertainty(u).ok())
            .map(|d| d.to_f64())
    })
}

/// The claim rules in force on `day` (a claim period's last day), from the project's settings.
pub fn rules(settings: &[Setting], day: NaiveDate, deduction: DeductionRule) -> ClaimRules {
    let num = |name| value_on(settings, name, day).and_then(|v| v.parse::<f64>().ok());
    let durability = match num(SettingName::YearsHeld) {
        Some(years_held) => Durability::TonneYears {
            years_held,
            equivalence_years: num(SettingName::EquivalenceYears)
                .unwrap_or(DEFAULT_EQUIVALENCE_YEARS),
        },
        None => Durability::Retention {
            annual_leak_fraction: num(SettingName::AnnualLeak).unwrap_or(0.0),
            horizon_years: num(SettingName::Horizon).unwrap_or(DEFAULT_HORIZON_YEARS),
        },
    };
    ClaimRules {
        deduction,
        durability,
        buffer_share: num(SettingName::Buffer).unwrap_or(0.0),
    }
}

/// One period's chain. A period that stores nothing, or loses more than it stores, claims
/// nothing: its whole figure stays as stored and every later line is zero.
pub fn period_claim(stored: &Estimate, rules: &ClaimRules) -> Claim {
    let zero = Mass::ZERO;
    claim(stored, rules).unwrap_or(Claim {
        applied: super::conservative::AppliedRule::WholeUncertainty,
        durable_share: 0.0,
        buffer_share: rules.buffer_share,
        stored: stored.value(),
        project_emissions: zero,
        net_of_emissions: stored.value(),
        uncertainty_deduction: stored.value(),
        conservative: zero,
        durability_discount: zero,
        durable: zero,
        buffer_withheld: zero,
        claimable: zero,
    })
}

/// One period's chain from a stored figure that is not net of the project's `emissions` (a
/// geological project's): the emissions are deducted first, as a line of their own, and the
/// uncertainty deduction applies to what is left.
pub fn period_claim_net_of(stored: &Estimate, emissions: Mass, rules: &ClaimRules) -> Claim {
    let net = Estimate::absolute(stored.value() - emissions, stored.abs_u());
    Claim {
        stored: stored.value(),
        project_emissions: emissions,
        net_of_emissions: net.value(),
        ..period_claim(&net, rules)
    }
}

/// One event of the buffer pool: a claim period that stores tonnes contributes its buffer; one
/// that loses them (its stored tonnes, less the reversals dated in it and its project
/// emissions, are negative) draws the loss on the pool like a reversal.
#[derive(Debug, Clone, PartialEq)]
pub enum PoolEvent {
    Claim {
        bucket: Bucket,
        buffer_withheld: Mass,
        claimable: Mass,
    },
    Loss {
        bucket: Bucket,
        /// The reversals dated in the period, with their seqs.
        reversals: Vec<u64>,
        reversal: Reversal,
    },
}

/// A claim period's figure: what it stored, and the reversals dated in it.
#[derive(Debug, Clone, PartialEq)]
pub struct ClaimBasis {
    pub bucket: Bucket,
    /// Stored with its uncertainty, before reversals.
    pub stored: Estimate,
    pub reversed: Mass,
    pub reversals: Vec<u64>,
    /// The project's emissions in the period where `stored` is not net of them (geological
    /// projects), else zero.
    pub emissions: Mass,
}

impl ClaimBasis {
    /// Stored net of the period's reversals, the uncertainty unchanged.
    pub fn net(&self) -> Estimate {
        Estimate::absolute(self.stored.value() - self.reversed, self.stored.abs_u())
    }
}

/// Each claim period's claim under the rules in force on its last day, and the pool after them
/// in date order: a reversal reduces the stored tonnes of the claim period it is dated in; a
/// period left negative claims nothing and its loss cancels buffer contributed by earlier
/// periods first, then claimable tonnes already counted; what neither covers is a shortfall.
/// A later period's settings never reach back: what an earlier period withheld stays withheld.
pub fn claim_pool(
    periods: &[ClaimBasis],
    rules: impl Fn(Bucket) -> ClaimRules,
) -> (Vec<(Bucket, Claim)>, BufferPool, Vec<PoolEvent>) {
    let mut pool = BufferPool::new();
    let mut claims = Vec::with_capacity(periods.len());
    let mut events = Vec::with_capacity(periods.len());
    for p in periods {
        let c = period_claim_net_of(&p.net(), p.emissions, &rules(p.bucket));
        if c.net_of_emissions.grams() < 0 {
            if let Ok(r) = pool.reverse(-c.net_of_emissions) {
                events.push(PoolEvent::Loss {
                    bucket: p.bucket,
                    reversals: p.reversals.clone(),
                    reversal: r,
                });
            }
        } else {
            // Claims are never negative (period_claim), so this cannot fail.
            let _ = pool.add_claim(c.buffer_withheld, c.claimable);
            events.push(PoolEvent::Claim {
                bucket: p.bucket,
                buffer_withheld: c.buffer_withheld,
                claimable: c.claimable,
            });
        }
        claims.push((p.bucket, c));
    }
    (claims, pool, events)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::ledger::period::{Grouping, parse_date};

    fn t(tonnes: i64) -> Mass {
        Mass::from_grams(tonnes * 1_000_000)
    }

    fn setting(name: SettingName, value: &str, at: &str) -> Setting {
        Setting {
            project: "P".into(),
            seq: 0,
            name,
            value: value.into(),
            recorded_at: chrono::DateTime::parse_from_rfc3339(at).unwrap().to_utc(),
            effective: None,
            source: None,
        }
    }

    #[test]
    fn rules_follow_the_settings_in_force() {
        let s = vec![
            setting(SettingName::Buffer, "0.1", "2026-01-01T00:00:00Z"),
            setting(SettingName::Buffer, "0.2", "2026-06-01T00:00:00Z"),
            setting(SettingName::AnnualLeak, "0.0001", "2026-01-01T00:00:00Z"),
        ];
        let at = |d: &str| d.parse::<NaiveDate>().unwrap();
        let r = rules(&s, at("2026-03-01"), DeductionRule::WholeUncertainty);
        assert_eq!(r.buffer_share, 0.1);
        assert_eq!(
            r.durability,
            Durability::Retention {
                annual_leak_fraction: 0.0001,
                horizon_years: 100.0
            }
        );
        assert_eq!(
            rules(&s, at("2026-07-01"), DeductionRule::WholeUncertainty).buffer_share,
            0.2
        );
        assert_eq!(
            rules(&[], at("2026-07-01"), DeductionRule::WholeUncertainty).buffer_share,
            0.0
        );
    }

    #[test]
    fn a_losing_period_claims_nothing() {
        let r = ClaimRules {
            deduction: DeductionRule::WholeUncertainty,
            durability: Durability::Retention {
                annual_leak_fraction: 0.0,
                horizon_years: 100.0,
            },
            buffer_share: 0.1,
        };
        let c = period_claim(&Estimate::absolute(-t(5), t(1)), &r);
        assert_eq!(
            (c.conservative, c.buffer_withheld, c.claimable),
            (Mass::ZERO, Mass::ZERO, Mass::ZERO)
        );
        assert_eq!(c.stored - c.uncertainty_deduction, Mass::ZERO);
    }

    #[test]
    fn a_losing_period_draws_on_buffer_contributed_before_it() {
        let y = |year: i32| Grouping::Year.bucket(parse_date(&format!("{year}-06-01")).unwrap());
        let rules = ClaimRules {
            deduction: DeductionRule::WholeUncertainty,
            durability: Durability::Retention {
                annual_leak_fraction: 0.0,
                horizon_years: 100.0,
            },
            buffer_share: 0.1,
        };
        let basis = |year, stored, reversed| ClaimBasis {
            bucket: y(year),
            stored: Estimate::absolute(t(stored), Mass::ZERO),
            reversed: t(reversed),
            reversals: vec![],
            emissions: Mass::ZERO,
        };
        // 2025 stores 100 t (10 t buffer, 90 t claimable); 2026 stores 20 t but reverses
        // 35 t: a loss of 15 t → 10 t of buffer, then 5 t of claimable.
        let (claims, pool, events) =
            claim_pool(&[basis(2025, 100, 0), basis(2026, 20, 35)], |_| rules);
        assert_eq!(claims[1].1.claimable, Mass::ZERO);
        let PoolEvent::Loss { reversal: r, .. } = &events[1] else {
            panic!("{events:?}")
        };
        assert_eq!(
            (
                r.loss,
                r.buffer_cancelled,
                r.claimable_cancelled,
                r.shortfall
            ),
            (t(15), t(10), t(5), Mass::ZERO)
        );
        assert_eq!(pool.remaining(), Mass::ZERO);
    }
}
