//! The folded balance against the computation it replaced: every reading of every effective
//! entry kept, grouped by period, each term's readings summed per meter at the end.

use super::{ProjectView, Registrations, through::entry_through};
use crate::accounting::balance::{BalanceLine, BalanceMethod, Terms};
use crate::accounting::claims::rel_uncertainty;
use crate::accounting::uncertainty::{
    Estimate, MeteredMass as Metered, Term, TermSign, mass_balance, sum_readings,
};
use crate::ledger::correction::effective;
use crate::ledger::period::{Bucket, Grouping, apportion, parse_date};
use crate::ledger::tally::entrained_fraction;
use crate::ledger::{Entry, EntryKind, Method, Period, Project, Reading, Sign, Site, SiteKind};
use crate::quantity::Mass;
use chrono::{DateTime, Duration, NaiveDate, Utc};
use std::collections::BTreeMap;

fn d(s: &str) -> NaiveDate {
    parse_date(s).unwrap()
}

fn at(day: i64) -> DateTime<Utc> {
    DateTime::UNIX_EPOCH + Duration::days(20_500 + day)
}

fn project() -> Project {
    Project {
        code: "P".into(),
        name: "P".into(),
        method: Method::Eor,
        operator: "O".into(),
        permit_ref: None,
        permit_capacity: Some(Mass::from_grams(10_000_000)),
        permit_annual: None,
        registered_at: at(0),
    }
}

fn sites() -> Vec<Site> {
    ["W1", "W2", "S1"]
        .into_iter()
        .map(|code| Site {
            project: "P".into(),
            code: code.into(),
            kind: SiteKind::InjectionWell,
            area: None,
            uncertainty: (code == "W2").then(|| "1.5%".into()),
            registered_at: at(0),
        })
        .collect()
}

/// (kind, site, meter, from, to, grams, reading, corrects)
type Row<'a> = (
    EntryKind,
    &'a str,
    Option<&'a str>,
    &'a str,
    &'a str,
    i64,
    &'a [(&'a str, &'a str)],
    Option<u64>,
);

/// Several meters on three sites; readings spanning months, quarters and a year's end; two
/// calibrations recorded after the readings they apply to; a correction of a correction.
fn ledger() -> Vec<crate::ledger::SealedEntry> {
    use EntryKind::*;
    #[rustfmt::skip]
    let rows: [Row<'_>; 14] = [
        (Injection, "W1", Some("FM-1"), "2025-12-30", "2026-01-02", 1_000_001, &[], None),
        (Injection, "W1", Some("FM-2"), "2026-01-15", "2026-01-15", 500_000, &[], None),
        (Injection, "W2", None, "2026-03-31", "2026-04-09", 333_333, &[], None),
        (Injection, "W1", Some("FM-1"), "2026-02-01", "2026-05-31", 7_777_777, &[], None),
        (Production, "S1", Some("SEP-1"), "2026-02-01", "2026-03-03", 2_000_003,
            &[("entrained_fraction", "0.0213")], None),
        (EquipmentLeak, "S1", Some("SEP-1"), "2026-05-01", "2026-05-01", 4_321,
            &[("side", "production")], None),
        (Leakage, "", None, "2026-08-01", "2026-08-20", 98_765,
            &[("pathway", "fault F"), ("uncertainty", "0.1")], None),
        (Receipt, "W1", Some("CT-1"), "2026-01-01", "2026-06-30", 9_000_001, &[], None),
        (Redelivery, "W1", Some("CT-1"), "2026-04-01", "2026-04-30", 100_003, &[], None),
        (Calibration, "W1", Some("FM-1"), "2025-12-01", "2025-12-01", 0,
            &[("uncertainty", "0.005")], None),
        (Injection, "W1", Some("FM-2"), "2026-01-15", "2026-01-15", 600_000, &[], Some(1)),
        (Calibration, "W1", None, "2026-01-10", "2026-01-10", 0, &[("uncertainty", "0.02")], None),
        (Injection, "W1", Some("FM-2"), "2026-01-15", "2026-01-15", 650_000, &[], Some(10)),
        (Emission, "W1", None, "2026-06-20", "2026-07-10", 55_555, &[], None),
    ];
    rows.iter()
        .enumerate()
        .map(
            |(seq, (kind, site, meter, from, to, g, reading, corrects))| {
                let e = Entry {
                    project: "P".into(),
                    seq: seq as u64,
                    kind: *kind,
                    site: site.to_string(),
                    period: Period::new(d(from), d(to)).unwrap(),
                    reading: Reading(
                        reading
                            .iter()
                            .map(|(k, v)| (k.to_string(), v.to_string()))
                            .collect(),
                    ),
                    mass: Mass::from_grams(*g),
                    sign: Sign::Adds,
                    recorded_at: at(seq as i64),
                    key: format!("k{seq}"),
                    meter: meter.map(str::to_string),
                    note: None,
                    corrects: *corrects,
                    reason: corrects.map(|_| "fix".into()),
                    evidence: None,
                    recorded_by: None,
                };
                crate::ledger::chain::seal(e, crate::ledger::Hash::GENESIS)
            },
        )
        .collect()
}

/// The balance as it was computed before the fold: every reading kept until the end.
fn previous(entries: &[Entry], grouping: Grouping, method: BalanceMethod) -> Vec<BalanceLine> {
    let p = project();
    let cals: Vec<Entry> = entries
        .iter()
        .filter(|e| e.kind == EntryKind::Calibration)
        .cloned()
        .collect();
    let sites = sites();
    let mut by: BTreeMap<Bucket, (Terms, BTreeMap<&str, Vec<Metered>>)> = BTreeMap::new();
    for e in entries {
        let side = e.reading.get("side") == Some("production");
        let u = rel_uncertainty(e, &sites, &cals).unwrap_or(0.0);
        let meter = e.meter.clone().unwrap_or_else(|| match e.site.as_str() {
            "" => format!("pathway {}", e.reading.get("pathway").unwrap_or("")),
            s => format!("site {s}"),
        });
        let term = match (e.kind, side) {
            (EntryKind::Receipt, _) => Some("receipts"),
            (EntryKind::Redelivery, _) => Some("redeliveries"),
            (EntryKind::Injection, _) => Some("injected"),
            (EntryKind::Production, _) => Some("separated"),
            (EntryKind::Leakage, _) => Some("surface leakage"),
            (EntryKind::EquipmentLeak, true) => Some("leaks production side"),
            (EntryKind::EquipmentLeak, false) => Some("leaks injection side"),
            _ => None,
        };
        let r = |g| Metered {
            meter: meter.clone(),
            mass: Mass::from_grams(g),
            rel_u: u,
        };
        for (b, g) in apportion(e.mass.grams(), e.period, grouping) {
            let (terms, readings) = by.entry(b).or_default();
            add_term(terms, e.kind, side, g);
            if let Some(t) = term {
                readings.entry(t).or_default().push(r(g));
            }
        }
        if e.kind == EntryKind::Production {
            let x = e.mass.scale(entrained_fraction(e));
            for (b, g) in apportion(x.grams(), e.period, grouping) {
                let (terms, readings) = by.entry(b).or_default();
                terms.entrained += Mass::from_grams(g);
                readings.entry("entrained").or_default().push(r(g));
            }
        }
    }
    let mut cum: BTreeMap<&str, Vec<Metered>> = BTreeMap::new();
    let (mut cum_injected, mut cum_stored) = (Mass::ZERO, Mass::ZERO);
    by.into_iter()
        .map(|(bucket, (terms, readings))| {
            let (stored, equation) = terms.stored(method);
            let equation = match equation {
                "RR-12" if p.method == Method::Eor => "RR-11",
                e => e,
            };
            cum_injected += terms.injected;
            cum_stored += stored;
            for (t, rs) in &readings {
                cum.entry(t).or_default().extend(rs.iter().cloned());
            }
            let cap = p.permit_capacity.unwrap();
            BalanceLine {
                bucket,
                terms,
                stored,
                equation,
                cumulative_injected: cum_injected,
                cumulative_stored: cum_stored,
                permit_used_pct: Some(100.0 * cum_stored.grams() as f64 / cap.grams() as f64),
                headroom: Some(cap - cum_stored),
                uncertainty: estimate(&readings, method),
                cumulative_uncertainty: estimate(&cum, method),
            }
        })
        .collect()
}

/// A piece of an entry added to its term.
fn add_term(t: &mut Terms, kind: EntryKind, side: bool, g: i64) {
    let g = Mass::from_grams(g);
    match (kind, side) {
        (EntryKind::Receipt, _) => t.receipts += g,
        (EntryKind::Redelivery, _) => t.redeliveries += g,
        (EntryKind::Injection, _) => t.injected += g,
        (EntryKind::Production, _) => t.separated += g,
        (EntryKind::Leakage, _) => t.surface_leakage += g,
        (EntryKind::EquipmentLeak, true) => t.leaks_production_side += g,
        (EntryKind::EquipmentLeak, false) => t.leaks_injection_side += g,
        (EntryKind::Emission, _) => t.emissions += g,
        _ => {}
    }
}

fn estimate(readings: &BTreeMap<&str, Vec<Metered>>, method: BalanceMethod) -> Estimate {
    use TermSign::{Adds, Deducts};
    let of = |name: &str| readings.get(name).cloned().unwrap_or_default();
    let mut produced = of("separated");
    produced.extend(of("entrained"));
    let names: Vec<(&str, TermSign, Vec<Metered>)> = match method {
        BalanceMethod::Rr => vec![
            ("injected", Adds, of("injected")),
            ("produced", Deducts, produced),
            ("surface leakage", Deducts, of("surface leakage")),
            ("leaks injection side", Deducts, of("leaks injection side")),
            (
                "leaks production side",
                Deducts,
                of("leaks production side"),
            ),
        ],
        BalanceMethod::Iso27916 => vec![
            ("receipts", Adds, of("receipts")),
            ("redeliveries", Deducts, of("redeliveries")),
            ("leaks injection side", Deducts, of("leaks injection side")),
            (
                "leaks production side",
                Deducts,
                of("leaks production side"),
            ),
            ("surface leakage", Deducts, of("surface leakage")),
            ("entrained", Deducts, of("entrained")),
        ],
    };
    let terms: Vec<Term> = names
        .into_iter()
        .map(|(name, sign, rs)| Term {
            name: name.into(),
            sign,
            estimate: sum_readings(&rs).unwrap().total,
        })
        .collect();
    mass_balance(&terms).unwrap()
}

fn folded(all: &[crate::ledger::SealedEntry], through: Option<NaiveDate>) -> super::ProjectFigures {
    let live: Vec<&Entry> = effective(all).collect();
    let mut view = ProjectView::new(
        Registrations {
            project: project(),
            sites: sites(),
            settings: Vec::new(),
            feedstocks: Vec::new(),
            evidence: live
                .iter()
                .filter(|e| super::EVIDENCE.contains(&e.kind))
                .map(|e| (*e).clone())
                .collect(),
        },
        through,
    )
    .unwrap();
    for e in &live {
        view.add(e).unwrap();
    }
    view.finish().unwrap()
}

/// Same figures; the uncertainty, summed in another order, to within rounding of f64 and
/// exactly as printed (whole grams).
fn same(fold: &[BalanceLine], before: &[BalanceLine]) {
    assert_eq!(fold.len(), before.len());
    for (f, b) in fold.iter().zip(before) {
        let plain = |l: &BalanceLine| {
            (
                l.bucket,
                l.terms,
                l.stored,
                l.equation,
                l.cumulative_stored,
                l.headroom,
            )
        };
        assert_eq!(plain(f), plain(b));
        for (x, y) in [
            (f.uncertainty, b.uncertainty),
            (f.cumulative_uncertainty, b.cumulative_uncertainty),
        ] {
            assert_eq!(x.value(), y.value(), "{}", f.bucket);
            assert_eq!(x.abs_u(), y.abs_u(), "{}", f.bucket);
            assert!((x.abs_u_grams() - y.abs_u_grams()).abs() <= 1e-9 * y.abs_u_grams());
        }
    }
}

#[test]
fn the_fold_gives_the_balance_of_every_reading_kept() {
    let all = ledger();
    let live: Vec<Entry> = effective(&all).cloned().collect();
    // The correction of a correction counts, the entries it replaces do not.
    assert!(live.iter().any(|e| e.mass == Mass::from_grams(650_000)));
    assert!(!live.iter().any(|e| e.mass == Mass::from_grams(600_000)));
    let view = folded(&all, None);
    for grouping in [Grouping::Month, Grouping::Quarter, Grouping::Year] {
        for method in [BalanceMethod::Rr, BalanceMethod::Iso27916] {
            let fold = view.geological(grouping, method);
            same(&fold, &previous(&live, grouping, method));
            assert!(fold.iter().any(|l| l.uncertainty.abs_u_grams() > 0.0));
        }
    }
    // The calibration of W1 recorded after FM-1's first reading sets its uncertainty: 0.5 %.
    let jan = &view.geological(Grouping::Month, BalanceMethod::Rr)[1];
    assert!(jan.uncertainty.abs_u_grams() > 0.0);
    // The separator's production and leak, and CT-1's receipt from before W1's calibration.
    assert_eq!(view.unstated_uncertainties(), 3);
}

#[test]
fn the_fold_counts_activity_through_a_day_as_the_entries_cut_there() {
    let all = ledger();
    let day = d("2026-04-03");
    let cut: Vec<Entry> = effective(&all)
        .filter_map(|e| entry_through(e, day).map(|c| c.into_owned()))
        .collect();
    let view = folded(&all, Some(day));
    for grouping in [Grouping::Month, Grouping::Quarter, Grouping::Year] {
        same(
            &view.geological(grouping, BalanceMethod::Rr),
            &previous(&cut, grouping, BalanceMethod::Rr),
        );
    }
}
