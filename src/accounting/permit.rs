//! Permits: cumulative stored against the permitted capacity and a year's injection against an
//! annual maximum, checked before new entries are written.

use crate::ledger::tally::{in_year, stored_share};
use crate::ledger::{Entry, EntryKind, Project};
use crate::quantity::Mass;
use chrono::Datelike;
use std::collections::{BTreeMap, BTreeSet};

/// Where a project stands before new entries, as its chain tip keeps it: cumulative stored (RR)
/// over the entries no correction replaces, and the injection of each year the new entries end
/// in (only when the permit has an annual maximum).
#[derive(Debug, Clone, Default, PartialEq, Eq)]
pub struct Standing {
    pub stored: Mass,
    pub injected: BTreeMap<i32, Mass>,
}

/// A limit of the permit the ledger would pass, with the figures.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum Passed {
    /// Cumulative stored would be `stored`, `pct` % of the permitted capacity `cap`.
    Capacity { stored: Mass, pct: f64, cap: Mass },
    /// A year's injection would be `injected`, above the permitted annual maximum `max`.
    Annual {
        year: i32,
        injected: Mass,
        max: Mass,
    },
}

/// What the permit says of an append it lets through.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum Notice {
    /// More than 90 % of the permitted capacity used: `pct` %.
    NearCapacity { pct: f64 },
    /// A limit passed and acknowledged (`over_permit`): recorded, and every report flags it.
    Recorded(Passed),
}

/// The limits an append would pass, unacknowledged: nothing is written.
#[derive(Debug, Clone, PartialEq)]
pub struct Exceeded {
    pub project: String,
    pub passed: Vec<Passed>,
}

/// Whether entries of `kind` move the figures a permit limits (stored, injected).
pub fn bears_on(kind: EntryKind) -> bool {
    matches!(
        kind,
        EntryKind::Injection
            | EntryKind::Production
            | EntryKind::Leakage
            | EntryKind::EquipmentLeak
    )
}

/// The years whose injection the annual maximum is checked for: those the new entries end in.
pub fn years(new: &[Entry]) -> BTreeSet<i32> {
    new.iter().map(|e| e.period.to.year()).collect()
}

/// Checks the ledger as it would be with `new` appended, `replaced` being the entries the new
/// corrections replace: past 100 % of the permitted capacity, or past the annual maximum, it is
/// refused unless `over_permit` acknowledges it (the ledger records what happened); past 90 % it
/// warns. Returns what it lets through with a notice. The figures are the balance's own (`ledger::tally`), moved by
/// what the new entries add and the replaced ones no longer count.
pub fn check(
    project: &Project,
    standing: &Standing,
    new: &[Entry],
    replaced: &[Entry],
    over_permit: bool,
) -> Result<Vec<Notice>, Exceeded> {
    let share = |es: &[Entry]| {
        es.iter()
            .fold(0i64, |sum, e| sum.saturating_add(stored_share(e)))
    };
    let stored = Mass::from_grams(
        standing
            .stored
            .grams()
            .saturating_add(share(new))
            .saturating_sub(share(replaced)),
    );
    let injected_in = |es: &[Entry], year: i32| -> Mass {
        es.iter()
            .filter(|e| e.kind == EntryKind::Injection)
            .map(|e| in_year(e.mass.grams(), e.period, year))
            .sum()
    };
    let mut warnings = Vec::new();
    let mut exceeded = Vec::new();
    if let Some(cap) = project.permit_capacity.filter(|c| c.is_positive()) {
        let pct = 100.0 * stored.grams() as f64 / cap.grams() as f64;
        if stored > cap {
            exceeded.push(Passed::Capacity { stored, pct, cap });
        } else if pct > 90.0 {
            warnings.push(Notice::NearCapacity { pct });
        }
    }
    if let Some(max) = project.permit_annual {
        for year in years(new) {
            let before = standing.injected.get(&year).copied().unwrap_or(Mass::ZERO);
            let injected = before + injected_in(new, year) - injected_in(replaced, year);
            if injected > max {
                exceeded.push(Passed::Annual {
                    year,
                    injected,
                    max,
                });
            }
        }
    }
    if !exceeded.is_empty() && !over_permit {
        return Err(Exceeded {
            project: project.code.clone(),
            passed: exceeded,
        });
    }
    warnings.extend(exceeded.into_iter().map(Notice::Recorded));
    Ok(warnings)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::accounting::balance::{BalanceMethod, balance};
    use crate::ledger::correction::effective;
    use crate::ledger::period::{Grouping, parse_date};
    use crate::ledger::tally::Tally;
    use crate::ledger::{Method, Period, Reading, SealedEntry};
    use chrono::DateTime;

    fn entry(
        seq: u64,
        kind: EntryKind,
        days: (&str, &str),
        g: i64,
        corrects: Option<u64>,
    ) -> Entry {
        let mut reading = Reading::default();
        if kind == EntryKind::Production {
            reading.push("entrained_fraction", "0.0213");
        }
        if kind == EntryKind::EquipmentLeak {
            reading.push("side", "production");
        }
        Entry {
            project: "TFS".into(),
            seq,
            kind,
            site: "TF-I1".into(),
            period: Period::new(parse_date(days.0).unwrap(), parse_date(days.1).unwrap()).unwrap(),
            reading,
            mass: Mass::from_grams(g),
            sign: kind.sign(),
            recorded_at: DateTime::UNIX_EPOCH,
            key: format!("k{seq}"),
            meter: None,
            note: None,
            corrects,
            reason: corrects.map(|_| "fix".into()),
            evidence: None,
            recorded_by: None,
        }
    }

    fn project(capacity: Option<i64>, annual: Option<i64>) -> Project {
        Project {
            code: "TFS".into(),
            name: "Tamsin Flats Storage".into(),
            method: Method::SalineAquifer,
            operator: "Northdeep Storage Cooperative".into(),
            permit_ref: None,
            permit_capacity: capacity.map(Mass::from_grams),
            permit_annual: annual.map(Mass::from_grams),
            registered_at: DateTime::UNIX_EPOCH,
        }
    }

    /// A chain with entries spanning a year end, production with entrained CO2, leaks on both
    /// sides, a receipt (not in RR) and corrections of an injection and of a production.
    fn chain() -> Vec<SealedEntry> {
        use EntryKind::*;
        [
            entry(
                0,
                Injection,
                ("2025-12-20", "2026-01-10"),
                1_000_123_457,
                None,
            ),
            entry(
                1,
                Production,
                ("2026-02-01", "2026-02-28"),
                300_500_001,
                None,
            ),
            entry(2, Leakage, ("2026-03-01", "2026-03-01"), 1_234_567, None),
            entry(
                3,
                EquipmentLeak,
                ("2026-03-02", "2026-03-02"),
                7_654_321,
                None,
            ),
            entry(
                4,
                Receipt,
                ("2026-03-03", "2026-03-03"),
                5_000_000_000,
                None,
            ),
            entry(
                5,
                Injection,
                ("2025-12-21", "2026-01-09"),
                999_000_001,
                Some(0),
            ),
            entry(
                6,
                Production,
                ("2026-02-01", "2026-02-28"),
                300_000_003,
                Some(1),
            ),
        ]
        .into_iter()
        .map(|e| crate::ledger::chain::seal(e, crate::ledger::Hash::GENESIS))
        .collect()
    }

    #[test]
    fn the_kept_figures_are_the_balances_own() {
        let all = chain();
        let mut tally = Tally::default();
        for s in &all {
            let replaced = s.entry.corrects.map(|c| &all[c as usize].entry);
            tally = tally.after(&s.entry, replaced);
        }
        let p = project(None, None);
        let lines = balance(
            &p,
            effective(&all),
            Grouping::Year,
            BalanceMethod::Rr,
            &|_| 0.0,
        );
        assert_eq!(
            Mass::from_grams(tally.stored),
            lines.last().unwrap().cumulative_stored
        );
        // By hand: 999,000,001 injected − (300,000,003 + round(300,000,003 × 0.0213) =
        // 6,390,000) produced − 1,234,567 − 7,654,321 = 683,721,110 g.
        assert_eq!(tally.stored, 683_721_110);
        // Σ |grams| over every entry, the corrected ones too.
        assert_eq!(
            tally.magnitude,
            1_000_123_457
                + 300_500_001
                + 1_234_567
                + 7_654_321
                + 5_000_000_000
                + 999_000_001
                + 300_000_003
        );
        for year in [2025, 2026] {
            let kept: Mass = effective(&all)
                .filter(|e| e.kind == EntryKind::Injection)
                .map(|e| in_year(e.mass.grams(), e.period, year))
                .sum();
            let line = lines.iter().find(|l| l.bucket.year == year).unwrap();
            assert_eq!(kept, line.terms.injected, "{year}");
        }
    }

    #[test]
    fn a_correction_over_capacity_is_refused_and_one_within_it_warns() {
        let all = chain();
        let effective: Vec<Entry> = effective(&all[..5]).cloned().collect();
        let standing = Standing {
            stored: Mass::from_grams(effective.iter().map(stored_share).sum()),
            injected: BTreeMap::new(),
        };
        // Capacity 1,000 t. Before: 1,000,123,457 − 300,500,001 − 6,400,650 (X of 300,500,001,
        // rounded) − 1,234,567 − 7,654,321 = 684,333,918 g. Correcting seq 0 to 1,300 t adds
        // 299,876,543 g: 984,210,461 g, 98.42 % (a warning); to 1,400 t: 1,084,210,461 g, over.
        let cap = project(Some(1_000_000_000), None);
        let fix = |g| {
            entry(
                5,
                EntryKind::Injection,
                ("2025-12-20", "2026-01-10"),
                g,
                Some(0),
            )
        };
        let w = check(
            &cap,
            &standing,
            &[fix(1_300_000_000)],
            &[effective[0].clone()],
            false,
        )
        .unwrap();
        assert!(
            matches!(w[..], [Notice::NearCapacity { pct }] if (pct - 98.421_046_1).abs() < 1e-6),
            "{w:?}"
        );
        let e = check(
            &cap,
            &standing,
            &[fix(1_400_000_000)],
            &[effective[0].clone()],
            false,
        )
        .unwrap_err();
        assert!(
            matches!(e.passed[..], [Passed::Capacity { stored, cap, .. }]
                if stored.grams() == 1_084_210_461 && cap.grams() == 1_000_000_000),
            "{e:?}"
        );
    }

    #[test]
    fn the_annual_maximum_counts_the_year_a_new_entry_ends_in_by_its_days() {
        // Annual maximum 1,000 t; 2026 holds 900 t. A new injection from 2025-12-22 to
        // 2026-01-10 of 200 t counts 200 × 10/20 = 100 t in 2026: 1,000 t, not above. One of
        // 202 t counts 101 t: 1,001 t, refused (and 2025 is not asked about: it ends in 2026).
        let p = project(None, Some(1_000_000_000));
        let standing = Standing {
            stored: Mass::ZERO,
            injected: BTreeMap::from([(2026, Mass::from_grams(900_000_000))]),
        };
        let new = |g| {
            [entry(
                9,
                EntryKind::Injection,
                ("2025-12-22", "2026-01-10"),
                g,
                None,
            )]
        };
        assert_eq!(
            check(&p, &standing, &new(200_000_000), &[], false).unwrap(),
            []
        );
        let e = check(&p, &standing, &new(202_000_000), &[], false).unwrap_err();
        assert_eq!(
            e.passed,
            [Passed::Annual {
                year: 2026,
                injected: Mass::from_grams(1_001_000_000),
                max: Mass::from_grams(1_000_000_000),
            }]
        );
    }
}
