//! From the mass balance to what may be claimed: each period's stored figure with its
//! uncertainty runs through the chain stored → conservative → durable → buffer withheld →
//! claimable, and reversals draw on the buffer pool in date order.

use super::balance::BalanceLine;
use super::buffer_pool::{BufferPool, Reversal};
use super::conservative::DeductionRule;
use super::permanence::{Claim, ClaimRules, Durability, claim};
use super::uncertainty::Estimate;
use crate::ledger::period::Bucket;
use crate::ledger::setting::{Setting, SettingName, in_force};
use crate::ledger::{Entry, EntryKind, Site};
use crate::quantity::Mass;
use chrono::{DateTime, NaiveDate, Utc};

/// Tonne-year equivalence time when a project does not set one: 55 years for a 100-year
/// horizon (Moura-Costa & Wilson 2000, read through quotation).
pub const DEFAULT_EQUIVALENCE_YEARS: f64 = 55.0;
/// Retention horizon when a project sets a leak fraction but no horizon.
pub const DEFAULT_HORIZON_YEARS: f64 = 100.0;

/// The relative uncertainty (95 %) of an entry: its own, else the latest calibration of its site
/// (and meter) on or before the period's start, else the site's; None where nothing is stated.
pub fn rel_uncertainty(e: &Entry, sites: &[Site], calibrations: &[&Entry]) -> Option<f64> {
    let parse = |s: &str| s.parse::<f64>().ok();
    if let Some(u) = e.reading.get("uncertainty").and_then(parse) {
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
        .and_then(|c| c.reading.get("uncertainty").and_then(parse));
    calibrated.or_else(|| {
        sites
            .iter()
            .find(|s| s.code == e.site)
            .and_then(|s| s.uncertainty.as_deref())
            .and_then(|u| crate::quantity::fraction::parse_uncertainty(u).ok())
            .map(|d| d.to_f64())
    })
}

/// The claim rules in force at `as_of`, from the project's settings.
pub fn rules(settings: &[Setting], as_of: DateTime<Utc>, deduction: DeductionRule) -> ClaimRules {
    let num = |name| in_force(settings, name, as_of).and_then(|v| v.parse::<f64>().ok());
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
        uncertainty_deduction: stored.value(),
        conservative: zero,
        durability_discount: zero,
        durable: zero,
        buffer_withheld: zero,
        claimable: zero,
    })
}

/// The claims of each balance line.
pub fn claims(lines: &[BalanceLine], rules: &ClaimRules) -> Vec<(Bucket, Claim)> {
    lines
        .iter()
        .map(|l| (l.bucket, period_claim(&l.uncertainty, rules)))
        .collect()
}

/// One event of the buffer pool: a period's claim, or a reversal.
#[derive(Debug, Clone, PartialEq)]
pub enum PoolEvent {
    Claim {
        bucket: Bucket,
        buffer_withheld: Mass,
        claimable: Mass,
    },
    Reversal {
        date: NaiveDate,
        seq: u64,
        reversal: Reversal,
    },
}

/// The pool after the claims and reversals, in date order: a reversal draws only on buffer
/// contributed by periods that ended before it was found.
pub fn buffer_pool<'a>(
    claims: &[(Bucket, Claim)],
    reversals: impl Iterator<Item = &'a Entry>,
) -> (BufferPool, Vec<PoolEvent>) {
    let mut events: Vec<(NaiveDate, u8, PoolEvent)> = claims
        .iter()
        .map(|(b, c)| {
            (
                b.last_day(),
                0,
                PoolEvent::Claim {
                    bucket: *b,
                    buffer_withheld: c.buffer_withheld,
                    claimable: c.claimable,
                },
            )
        })
        .collect();
    let reversal_list: Vec<&Entry> = reversals
        .filter(|e| e.kind == EntryKind::Reversal)
        .collect();
    for e in &reversal_list {
        events.push((
            e.period.from,
            1,
            PoolEvent::Reversal {
                date: e.period.from,
                seq: e.seq,
                reversal: Reversal {
                    loss: e.mass,
                    buffer_cancelled: Mass::ZERO,
                    claimable_cancelled: Mass::ZERO,
                    shortfall: Mass::ZERO,
                },
            },
        ));
    }
    // A reversal found on a period's last day is after that period's claim.
    events.sort_by_key(|(d, order, _)| (*d, *order));
    let mut pool = BufferPool::new();
    let mut out = Vec::with_capacity(events.len());
    for (_, _, ev) in events {
        match ev {
            PoolEvent::Claim {
                bucket,
                buffer_withheld,
                claimable,
            } => {
                // Claims are never negative (period_claim), so this cannot fail.
                let _ = pool.add_claim(buffer_withheld, claimable);
                out.push(PoolEvent::Claim {
                    bucket,
                    buffer_withheld,
                    claimable,
                });
            }
            PoolEvent::Reversal {
                date,
                seq,
                reversal,
            } => {
                if let Ok(r) = pool.reverse(reversal.loss) {
                    out.push(PoolEvent::Reversal {
                        date,
                        seq,
                        reversal: r,
                    });
                }
            }
        }
    }
    (pool, out)
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
            recorded_at: DateTime::parse_from_rfc3339(at).unwrap().to_utc(),
        }
    }

    #[test]
    fn rules_follow_the_settings_in_force() {
        let s = vec![
            setting(SettingName::Buffer, "0.1", "2026-01-01T00:00:00Z"),
            setting(SettingName::Buffer, "0.2", "2026-06-01T00:00:00Z"),
            setting(SettingName::AnnualLeak, "0.0001", "2026-01-01T00:00:00Z"),
        ];
        let at = |d: &str| DateTime::parse_from_rfc3339(d).unwrap().to_utc();
        let r = rules(
            &s,
            at("2026-03-01T00:00:00Z"),
            DeductionRule::WholeUncertainty,
        );
        assert_eq!(r.buffer_share, 0.1);
        assert_eq!(
            r.durability,
            Durability::Retention {
                annual_leak_fraction: 0.0001,
                horizon_years: 100.0
            }
        );
        assert_eq!(
            rules(
                &s,
                at("2026-07-01T00:00:00Z"),
                DeductionRule::WholeUncertainty
            )
            .buffer_share,
            0.2
        );
        assert_eq!(
            rules(
                &[],
                at("2026-07-01T00:00:00Z"),
                DeductionRule::WholeUncertainty
            )
            .buffer_share,
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
    fn reversals_draw_on_buffer_contributed_before_them() {
        let q = |d: &str| Grouping::Quarter.bucket(parse_date(d).unwrap());
        let claim_of = |buffer: i64, claimable: i64| Claim {
            applied: super::super::conservative::AppliedRule::WholeUncertainty,
            durable_share: 1.0,
            buffer_share: 0.1,
            stored: t(buffer + claimable),
            uncertainty_deduction: Mass::ZERO,
            conservative: t(buffer + claimable),
            durability_discount: Mass::ZERO,
            durable: t(buffer + claimable),
            buffer_withheld: t(buffer),
            claimable: t(claimable),
        };
        let claims = vec![
            (q("2026-02-01"), claim_of(10, 90)),
            (q("2026-05-01"), claim_of(10, 90)),
        ];
        let reversal = |date: &str, tonnes: i64, seq: u64| Entry {
            project: "P".into(),
            seq,
            kind: EntryKind::Reversal,
            site: "S".into(),
            period: crate::ledger::Period::day(parse_date(date).unwrap()),
            reading: Default::default(),
            mass: t(tonnes),
            sign: crate::ledger::Sign::Deducts,
            recorded_at: DateTime::UNIX_EPOCH,
            key: format!("r{seq}"),
            meter: None,
            note: None,
            corrects: None,
            reason: None,
            evidence: None,
        };
        // Found in May: only Q1's 10 t of buffer exist; 15 t → 10 buffer + 5 claimable.
        let rs = [reversal("2026-05-10", 15, 7)];
        let (pool, events) = buffer_pool(&claims, rs.iter());
        let PoolEvent::Reversal { reversal: r, .. } = &events[1] else {
            panic!("{events:?}")
        };
        assert_eq!(
            (r.buffer_cancelled, r.claimable_cancelled, r.shortfall),
            (t(10), t(5), Mass::ZERO)
        );
        assert_eq!(pool.remaining(), t(10));
    }
}
