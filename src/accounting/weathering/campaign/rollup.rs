//! The campaigns credited period by period: each brings the change since its field's previous
//! campaign.

use super::{Application, CampaignLine, CampaignResult, Emission};
use crate::accounting::uncertainty::{self, Estimate, Term, TermSign};
use crate::accounting::weathering::removal::Deduction;
use crate::ledger::period::{Bucket, Grouping, apportion};
use crate::quantity::Mass;
use std::collections::BTreeMap;

/// One reporting period of a project's weathering.
#[derive(Debug, Clone, PartialEq)]
pub struct RollupLine {
    pub bucket: Bucket,
    /// Rock applied in the period, exact grams.
    pub applied_g: i64,
    /// Change in gross CO2 credited by the period's campaigns.
    pub gross: Mass,
    pub deducted: [(Deduction, Mass); 4],
    /// Change in removal after deductions.
    pub removal: Mass,
    /// Every emission of the project in the period (days apportioned).
    pub emissions: Mass,
    pub net: Mass,
    pub cumulative_net: Mass,
    /// Net with its 95 % uncertainty: each field's change is its campaign's removal less the
    /// previous one, their uncertainties in quadrature; fields and emissions (stated exact) too.
    pub uncertainty: Estimate,
    /// The campaigns credited here whose removal has no uncertainty estimate, and why.
    pub unestimated: Vec<String>,
}

/// Per period: the change each campaign brings to its field's removal (gross and each
/// deduction), the rock applied and every emission of the project. A campaign that cannot be
/// read changes nothing: the field's last read stands until one can.
pub fn rollup(
    lines: &[CampaignLine],
    applications: &[Application],
    emissions: &[Emission<'_>],
    grouping: Grouping,
) -> Vec<RollupLine> {
    let empty = |bucket| RollupLine {
        bucket,
        applied_g: 0,
        gross: Mass::ZERO,
        deducted: Deduction::ALL.map(|d| (d, Mass::ZERO)),
        removal: Mass::ZERO,
        emissions: Mass::ZERO,
        net: Mass::ZERO,
        cumulative_net: Mass::ZERO,
        uncertainty: Estimate::absolute(Mass::ZERO, Mass::ZERO),
        unestimated: Vec::new(),
    };
    let mut by: BTreeMap<Bucket, RollupLine> = BTreeMap::new();
    let mut terms: BTreeMap<Bucket, Vec<Term>> = BTreeMap::new();
    for a in applications {
        let b = grouping.bucket(a.date);
        by.entry(b).or_insert_with(|| empty(b)).applied_g += a.rock_g;
    }
    for e in emissions {
        for (b, g) in apportion(e.mass.grams(), e.period, grouping) {
            by.entry(b).or_insert_with(|| empty(b)).emissions += Mass::from_grams(g);
        }
    }
    let exact = |m: Mass| Estimate::absolute(m, Mass::ZERO);
    let mut last: BTreeMap<&str, (Mass, [Mass; 4], Estimate)> = BTreeMap::new();
    for l in lines {
        let CampaignResult::Resolved(r) = &l.reading else {
            continue;
        };
        let b = grouping.bucket(l.date);
        let line = by.entry(b).or_insert_with(|| empty(b));
        let estimate = r.removal_estimate().unwrap_or_else(|why| {
            line.unestimated
                .push(format!("{} {}: {why}", l.field, l.date));
            exact(r.removal.net)
        });
        let now = (r.gross.total, r.removal.deducted.map(|(_, m)| m), estimate);
        let before =
            last.insert(&l.field, now)
                .unwrap_or((Mass::ZERO, [Mass::ZERO; 4], exact(Mass::ZERO)));
        line.gross += now.0 - before.0;
        for (k, slot) in line.deducted.iter_mut().enumerate() {
            slot.1 += now.1[k] - before.1[k];
        }
        line.removal += now.2.value() - before.2.value();
        let t = terms.entry(b).or_default();
        t.push(term(TermSign::Adds, now.2));
        t.push(term(TermSign::Deducts, before.2));
    }
    let mut cumulative = Mass::ZERO;
    by.into_values()
        .map(|mut l| {
            l.net = l.removal - l.emissions;
            cumulative += l.net;
            l.cumulative_net = cumulative;
            let mut t = terms.remove(&l.bucket).unwrap_or_default();
            t.push(term(TermSign::Deducts, exact(l.emissions)));
            let u = uncertainty::mass_balance(&t).map_or(0.0, |e| e.abs_u_grams());
            l.uncertainty = Estimate::absolute(
                l.net,
                Mass::from_grams(crate::quantity::mass::round_half_even_f64(u)),
            );
            l
        })
        .collect()
}

fn term(sign: TermSign, estimate: Estimate) -> Term {
    Term {
        name: "removal".into(),
        sign,
        estimate,
    }
}
