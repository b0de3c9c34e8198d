//! A project's line of the regulator's totals: received, injected, stored, conservative,
//! durable, buffer, claimable and reversed, per year and to date.

use super::{ProjectFigures, ViewError};
use crate::accounting::balance::BalanceMethod;
use crate::accounting::claims::{PoolEvent, period_claim};
use crate::accounting::conservative::DeductionRule;
use crate::ledger::period::Grouping;
use crate::quantity::Mass;
use chrono::Datelike;
use std::collections::BTreeMap;

/// The figures of one line of the totals.
#[derive(Debug, Default, Clone, Copy, PartialEq, Eq)]
pub struct TotalsLine {
    pub received: Mass,
    pub injected: Mass,
    pub stored: Mass,
    pub conservative: Mass,
    pub durable: Mass,
    pub buffer: Mass,
    pub claimable: Mass,
    pub reversed: Mass,
}

impl TotalsLine {
    pub fn add(&mut self, o: &TotalsLine) {
        self.received += o.received;
        self.injected += o.injected;
        self.stored += o.stored;
        self.conservative += o.conservative;
        self.durable += o.durable;
        self.buffer += o.buffer;
        self.claimable += o.claimable;
        self.reversed += o.reversed;
    }

    /// Adds another project's line, or None when a sum would leave the range of whole grams
    /// (each project stays within [`Mass::LIMIT`], a ledger of many such projects need not).
    pub fn checked_add(&self, o: &TotalsLine) -> Option<TotalsLine> {
        let [a, b] = [self.figures(), o.figures()];
        let mut s = [Mass::ZERO; 8];
        for i in 0..8 {
            s[i] = a[i].checked_add(b[i])?;
        }
        let [
            received,
            injected,
            stored,
            conservative,
            durable,
            buffer,
            claimable,
            reversed,
        ] = s;
        Some(TotalsLine {
            received,
            injected,
            stored,
            conservative,
            durable,
            buffer,
            claimable,
            reversed,
        })
    }

    pub fn figures(&self) -> [Mass; 8] {
        [
            self.received,
            self.injected,
            self.stored,
            self.conservative,
            self.durable,
            self.buffer,
            self.claimable,
            self.reversed,
        ]
    }
}

/// A project's years and its total, buffer and claimable net of what reversals cancelled.
#[derive(Debug, Clone, PartialEq)]
pub struct ProjectTotals {
    pub years: Vec<(i32, TotalsLine)>,
    pub total: TotalsLine,
    /// Permitted capacity less stored, where a capacity is registered.
    pub headroom: Option<Mass>,
}

impl ProjectFigures {
    pub fn totals(&self, deduction: DeductionRule) -> Result<ProjectTotals, ViewError> {
        let rules = self.rules(deduction);
        let terms: BTreeMap<i32, _> = self
            .geological(Grouping::Year, BalanceMethod::Rr)
            .into_iter()
            .map(|l| (l.bucket.year, l.terms))
            .collect();
        let (pool, events) = self.pool(deduction)?;
        let mut years = Vec::new();
        let mut total = TotalsLine::default();
        for (bucket, u) in self.stored(Grouping::Year)? {
            let c = period_claim(&u, &rules);
            let t = terms.get(&bucket.year).copied().unwrap_or_default();
            let line = TotalsLine {
                received: t.received(),
                injected: t.injected,
                stored: u.value(),
                conservative: c.conservative,
                durable: c.durable,
                buffer: c.buffer_withheld,
                claimable: c.claimable,
                reversed: self
                    .reversals()
                    .filter(|e| e.period.from.year() == bucket.year)
                    .map(|e| e.mass)
                    .sum(),
            };
            total.add(&line);
            years.push((bucket.year, line));
        }
        let cancelled_claimable: Mass = events
            .iter()
            .filter_map(|e| match e {
                PoolEvent::Reversal { reversal, .. } => Some(reversal.claimable_cancelled),
                PoolEvent::Claim { .. } => None,
            })
            .sum();
        total.buffer = total.buffer - pool.cancelled();
        total.claimable = total.claimable - cancelled_claimable;
        Ok(ProjectTotals {
            years,
            headroom: self.project().permit_capacity.map(|c| c - total.stored),
            total,
        })
    }
}
