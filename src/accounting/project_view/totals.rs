//! A project's line of the regulator's totals: received, injected, stored by route,
//! conservative, durable, buffer, claimable by route and reversed, per year and to date.

use super::{ProjectFigures, ViewError};
use crate::accounting::balance::BalanceMethod;
use crate::accounting::claims::{PoolEvent, claim_pool};
use crate::accounting::conservative::DeductionRule;
use crate::ledger::Method;
use crate::ledger::period::Grouping;
use crate::quantity::Mass;
use std::collections::BTreeMap;

/// What a project's stored tonnes are, by its route: tonnes kept in a storage complex, tonnes
/// bound as carbonate in a plant's solid, tonnes removed by rock weathering in soil. Unlike
/// quantities, so the totals keep each in its own column and never add them together.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Route {
    /// The 40 CFR 98.443 mass balance of an injection project; basalt mineralization counts
    /// here, the CO2 injected and kept, mineralized or not.
    Geological,
    /// Carbonation uptake of an ex-situ project, net of its emissions.
    Mineralized,
    /// The weathering net: removal less the project's emissions.
    Weathering,
}

impl Route {
    pub fn of(method: Method) -> Route {
        match method {
            Method::SalineAquifer
            | Method::DepletedField
            | Method::Eor
            | Method::BasaltMineralization => Route::Geological,
            Method::ExSituMineralization => Route::Mineralized,
            Method::EnhancedWeathering => Route::Weathering,
        }
    }
}

/// A figure kept apart by route.
#[derive(Debug, Default, Clone, Copy, PartialEq, Eq)]
pub struct ByRoute {
    pub geological: Mass,
    pub mineralized: Mass,
    pub weathering: Mass,
}

impl ByRoute {
    /// `m` in the column of `route`, zero in the others.
    pub fn only(route: Route, m: Mass) -> ByRoute {
        let mut b = ByRoute::default();
        *b.of_mut(route) = m;
        b
    }

    pub fn of(&self, route: Route) -> Mass {
        match route {
            Route::Geological => self.geological,
            Route::Mineralized => self.mineralized,
            Route::Weathering => self.weathering,
        }
    }

    fn of_mut(&mut self, route: Route) -> &mut Mass {
        match route {
            Route::Geological => &mut self.geological,
            Route::Mineralized => &mut self.mineralized,
            Route::Weathering => &mut self.weathering,
        }
    }

    /// Geological, mineralized, weathering.
    pub fn figures(&self) -> [Mass; 3] {
        [self.geological, self.mineralized, self.weathering]
    }

    fn from_figures([geological, mineralized, weathering]: [Mass; 3]) -> ByRoute {
        ByRoute {
            geological,
            mineralized,
            weathering,
        }
    }
}

/// The figures of one line of the totals: stored and claimable by route, the claim chain's
/// other steps as each project's settings make them.
#[derive(Debug, Default, Clone, Copy, PartialEq, Eq)]
pub struct TotalsLine {
    pub received: Mass,
    pub injected: Mass,
    pub stored: ByRoute,
    pub conservative: Mass,
    pub durable: Mass,
    pub buffer: Mass,
    /// Net of what reversals and losses cancelled.
    pub claimable: ByRoute,
    pub reversed: Mass,
}

/// How many figures a line has, in [`TotalsLine::figures`] order.
pub const FIGURES: usize = 12;

impl TotalsLine {
    pub fn add(&mut self, o: &TotalsLine) {
        let mut s = self.figures();
        for (x, y) in s.iter_mut().zip(o.figures()) {
            *x += y;
        }
        *self = TotalsLine::from_figures(s);
    }

    /// Adds another project's line, or None when a sum would leave the range of whole grams
    /// (each project stays within [`Mass::LIMIT`], a ledger of many such projects need not).
    pub fn checked_add(&self, o: &TotalsLine) -> Option<TotalsLine> {
        let [a, b] = [self.figures(), o.figures()];
        let mut s = [Mass::ZERO; FIGURES];
        for i in 0..FIGURES {
            s[i] = a[i].checked_add(b[i])?;
        }
        Some(TotalsLine::from_figures(s))
    }

    /// Received, injected, stored (geological, mineralized, weathering), conservative,
    /// durable, buffer, claimable (geological, mineralized, weathering), reversed: the order of
    /// the totals' columns.
    pub fn figures(&self) -> [Mass; FIGURES] {
        let [sg, sm, sw] = self.stored.figures();
        let [cg, cm, cw] = self.claimable.figures();
        [
            self.received,
            self.injected,
            sg,
            sm,
            sw,
            self.conservative,
            self.durable,
            self.buffer,
            cg,
            cm,
            cw,
            self.reversed,
        ]
    }

    fn from_figures(f: [Mass; FIGURES]) -> TotalsLine {
        let [
            received,
            injected,
            sg,
            sm,
            sw,
            conservative,
            durable,
            buffer,
            cg,
            cm,
            cw,
            reversed,
        ] = f;
        TotalsLine {
            received,
            injected,
            stored: ByRoute::from_figures([sg, sm, sw]),
            conservative,
            durable,
            buffer,
            claimable: ByRoute::from_figures([cg, cm, cw]),
            reversed,
        }
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
        let route = Route::of(self.project().method);
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
                stored: ByRoute::only(route, b.stored.value()),
                conservative: c.conservative,
                durable: c.durable,
                buffer: c.buffer_withheld,
                claimable: ByRoute::only(route, c.claimable),
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
                let claimable = y.claimable.of_mut(route);
                *claimable = *claimable - reversal.claimable_cancelled;
            }
        }
        let mut total = TotalsLine::default();
        for line in years.values() {
            total.add(line);
        }
        let years: Vec<(i32, TotalsLine)> = years.into_iter().collect();
        Ok(ProjectTotals {
            years,
            headroom: self
                .project()
                .permit_capacity
                .map(|c| c - total.stored.of(route)),
            total,
        })
    }
}
