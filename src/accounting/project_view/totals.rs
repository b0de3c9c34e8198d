//! A project's line of the regulator's totals: received, injected, stored, conservative,
//! durable, buffer, claimable and reversed, per year and to date.

use super::{ProjectFigures, ViewError};
use crate::accounting::balance::BalanceMethod;
use crate::accounting::claims::{PoolEvent, claim_pool};
use crate::accounting::conservative::DeductionRule;
use crate::ledger::period::Grouping;
use crate::quantity::Mass;
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
        let terms: BTreeMap<i32, _> = self
            .geological(Grouping::Year, BalanceMethod::Rr)
            .into_iter()
            .map(|l| (l.bucket.year, l.terms))
            .collect();
        let basis = self.claim_basis(BalanceMethod::Rr)?;
        let (claims, _, events) = claim_pool(&basis, |b| self.rules(b, deduction));
        let mut years: BTreeMap<i32, TotalsLine> = terms
            .iter()
            .map(|(y, t)| {
                let line = TotalsLine {
                    received: t.received(),
                    injected: t.injected,
                    ..TotalsLine::default()
                };
                (*y, line)
            })
            .collect();
        // Claim periods shorter than a year add into their year.
        for (b, (bucket, c)) in basis.iter().zip(&claims) {
            let y = years.entry(bucket.year).or_default();
            y.add(&TotalsLine {
                received: Mass::ZERO,
                injected: Mass::ZERO,
                stored: b.stored.value(),
                conservative: c.conservative,
                durable: c.durable,
                buffer: c.buffer_withheld,
                claimable: c.claimable,
                reversed: b.reversed,
            });
        }
        // A period's loss cancels buffer and claimable counted before it, in its year.
        for ev in &events {
            if let PoolEvent::Loss {
                bucket, reversal, ..
            } = ev
            {
                let y = years.entry(bucket.year).or_default();
                y.buffer = y.buffer - reversal.buffer_cancelled;
                y.claimable = y.claimable - reversal.claimable_cancelled;
            }
        }
        let mut total = TotalsLine::default();
        for line in years.values() {
            total.add(line);
        }
        let years: Vec<(i32, TotalsLine)> = years.into_iter().collect();
        Ok(ProjectTotals {
            years,
            headroom: self.project().permit_capacity.map(|c| c - total.stored),
            total,
        })
    }
}
