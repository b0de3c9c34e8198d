//! How a reporting year is judged: which of its lines count, and whether their misstatement
//! exceeds the threshold.

use super::period::{holds, overlap};
use super::{
    Bearing, Figure, Judgement, MaterialityError, MaterialityPolicy, ReconciledLine,
    ReportedQuantity, ReportingPeriod, Verdict, YearVerdict,
};
use crate::quantity::Mass;
use std::collections::BTreeMap;

/// The headline figures, in the order a year is judged on the first the report gives.
const HEADLINE: [ReportedQuantity; 3] = [
    ReportedQuantity::Stored,
    ReportedQuantity::WeatheringNet,
    ReportedQuantity::Mineralized,
];

/// Settles which of year `year`'s lines count, and the year's verdict.
pub(super) fn judge_year(
    year: i32,
    lines: &mut [ReconciledLine],
    totals: &[Figure],
    bearing: &impl Fn(ReportedQuantity) -> Bearing,
    policy: &MaterialityPolicy,
) -> Result<YearVerdict, MaterialityError> {
    let idx: Vec<usize> = (0..lines.len())
        .filter(|&i| lines[i].period.year() == year)
        .collect();
    let headline = judge_on_headline(lines, &idx, bearing);
    set_aside_coarser(lines, &idx);
    let added: Vec<&ReconciledLine> = idx
        .iter()
        .map(|&i| &lines[i])
        .filter(|l| counted(l))
        .collect();
    let whole_year = MaterialityError::TooLarge {
        period: ReportingPeriod::Year(year),
        quantity: headline.unwrap_or(ReportedQuantity::Stored),
    };
    let misstatement = misstatement(&added, bearing, whole_year)?;
    let base_quantity = headline.unwrap_or_else(|| {
        HEADLINE
            .into_iter()
            .find(|q| bearing(*q) == Bearing::Headline)
            .unwrap_or(ReportedQuantity::Stored)
    });
    let ledger_total = totals
        .iter()
        .find(|f| f.period == ReportingPeriod::Year(year) && f.quantity == base_quantity)
        .map_or(Mass::ZERO, |f| f.mass);
    let threshold = Mass::from_grams(ledger_total.grams().saturating_abs()).scale(policy.share);
    let misstatement = Mass::from_grams(misstatement);
    let mut quantities: Vec<ReportedQuantity> = added.iter().map(|l| l.quantity).collect();
    quantities.sort();
    quantities.dedup();
    Ok(YearVerdict {
        year,
        lines: added.len(),
        counted: quantities,
        misstatement,
        ledger_total,
        threshold_share: policy.share,
        threshold,
        verdict: if added.is_empty() {
            Verdict::NotAssessed
        } else if misstatement > threshold {
            Verdict::Material
        } else {
            Verdict::WithinMateriality
        },
    })
}

fn counted(l: &ReconciledLine) -> bool {
    l.judgement == Judgement::Counted
}

/// One headline a year: the first the report gives. Other headline lines of the year are
/// judged on it; returns it.
fn judge_on_headline(
    lines: &mut [ReconciledLine],
    idx: &[usize],
    bearing: &impl Fn(ReportedQuantity) -> Bearing,
) -> Option<ReportedQuantity> {
    let headline = HEADLINE.into_iter().find(|q| {
        idx.iter()
            .any(|&i| lines[i].quantity == *q && counted(&lines[i]))
    });
    for &i in idx {
        let l = &mut lines[i];
        if let Some(h) = headline
            && counted(l)
            && bearing(l.quantity) == Bearing::Headline
            && l.quantity != h
        {
            l.judgement = Judgement::JudgedOn(h);
        }
    }
    headline
}

/// Finest periods first: a line whose period holds a finer counted line of its quantity is
/// not added again.
fn set_aside_coarser(lines: &mut [ReconciledLine], idx: &[usize]) {
    let mut by_fineness = idx.to_vec();
    by_fineness.sort_by_key(|&i| std::cmp::Reverse(lines[i].period.granularity()));
    for (n, &i) in by_fineness.iter().enumerate() {
        let covered = by_fineness[..n].iter().any(|&j| {
            counted(&lines[j])
                && lines[j].quantity == lines[i].quantity
                && lines[j].period != lines[i].period
                && holds(lines[i].period, lines[j].period)
        });
        if covered && counted(&lines[i]) {
            lines[i].judgement = Judgement::FinerCounted;
        }
    }
}

/// The year's misstatement in grams. Lines covering one stretch of time are one group: in it,
/// the headline's differences and the terms' differences are two readings of one
/// misstatement, so the larger counts. `whole_year` is the error when the groups' sum
/// overflows.
fn misstatement(
    added: &[&ReconciledLine],
    bearing: &impl Fn(ReportedQuantity) -> Bearing,
    whole_year: MaterialityError,
) -> Result<i64, MaterialityError> {
    let mut group: Vec<usize> = (0..added.len()).collect();
    fn root(group: &[usize], mut i: usize) -> usize {
        while group[i] != i {
            i = group[i];
        }
        i
    }
    for a in 0..added.len() {
        for b in a + 1..added.len() {
            if overlap(added[a].period, added[b].period) {
                let (ra, rb) = (root(&group, a), root(&group, b));
                group[ra.max(rb)] = ra.min(rb);
            }
        }
    }
    let mut sums: BTreeMap<usize, (i64, i64)> = BTreeMap::new();
    for (n, l) in added.iter().enumerate() {
        let r = root(&group, n);
        let (h, t) = sums.entry(r).or_default();
        let slot = if bearing(l.quantity) == Bearing::Headline {
            h
        } else {
            t
        };
        let Some(sum) = l
            .difference
            .grams()
            .checked_abs()
            .and_then(|d| slot.checked_add(d))
        else {
            return Err(MaterialityError::TooLarge {
                period: l.period,
                quantity: l.quantity,
            });
        };
        *slot = sum;
    }
    sums.values()
        .try_fold(0i64, |acc, (h, t)| acc.checked_add(*h.max(t)))
        .ok_or(whole_year)
}
