//! The ledger's side of a reconciliation: each quantity a monitoring report may give, by period,
//! as the view counts it.

use super::{ProjectFigures, ViewError};
use crate::accounting::balance::BalanceMethod;
use crate::accounting::materiality::{Bearing, Figure, ReportedQuantity, ReportingPeriod};
use crate::ledger::Method;
use crate::ledger::period::{Bucket, Grouping};
use std::collections::BTreeSet;

/// Whether the ledger keeps a figure for the quantity: the mineralized tonnes for basalt
/// projects, the weathering net for weathering projects, the mass-balance terms for all.
fn ledger_keeps(q: ReportedQuantity, method: Method) -> bool {
    match q {
        ReportedQuantity::Mineralized => method == Method::BasaltMineralization,
        ReportedQuantity::WeatheringNet => method == Method::EnhancedWeathering,
        _ => true,
    }
}

/// What a quantity is to the project's stored figure, so reconcile knows which differences
/// count: under Subpart RR stored is injected less produced, leakage and leaks (received is not
/// a term); under ISO 27916 it is received less leaks and losses from the complex (injected and
/// produced CO2 circulate inside it); a rock route that is not injected is judged on its stored,
/// mineralized or net figure alone.
pub fn bearing(q: ReportedQuantity, route: Method, method: BalanceMethod) -> Bearing {
    use ReportedQuantity as Q;
    if !ledger_keeps(q, route) {
        return Bearing::NotKept;
    }
    match (q, geological_route(route), method) {
        (Q::Stored | Q::Mineralized | Q::WeatheringNet, _, _) => Bearing::Headline,
        (_, false, _) => Bearing::Listed,
        (Q::Injected | Q::Produced, true, BalanceMethod::Rr) => Bearing::Term,
        (Q::Received, true, BalanceMethod::Iso27916) => Bearing::Term,
        (Q::Leakage | Q::EquipmentLeak, true, _) => Bearing::Term,
        (Q::Received | Q::Injected | Q::Produced, true, _) => Bearing::Listed,
    }
}

/// The reporting period a bucket is.
pub fn reporting_period(b: Bucket) -> ReportingPeriod {
    match b.grouping_rank {
        0 => ReportingPeriod::Month(b.year, b.part as u8),
        1 => ReportingPeriod::Quarter(b.year, b.part as u8),
        _ => ReportingPeriod::Year(b.year),
    }
}

fn geological_route(m: Method) -> bool {
    matches!(
        m,
        Method::SalineAquifer | Method::DepletedField | Method::Eor | Method::BasaltMineralization
    )
}

impl ProjectFigures {
    /// The ledger's figures for `quantities` by `grouping` over `years`; "stored" is what the
    /// route stores (the mass balance by `method`, or the rock route's net).
    pub fn reported(
        &self,
        grouping: Grouping,
        method: BalanceMethod,
        quantities: &BTreeSet<ReportedQuantity>,
        years: &BTreeSet<i32>,
    ) -> Result<Vec<Figure>, ViewError> {
        let route = self.project().method;
        let mut out = Vec::new();
        let mut push = |b: Bucket, quantity, mass| {
            if years.contains(&b.year) {
                out.push(Figure {
                    period: reporting_period(b),
                    quantity,
                    mass,
                });
            }
        };
        use ReportedQuantity as Q;
        if route == Method::BasaltMineralization && quantities.contains(&Q::Mineralized) {
            for l in self.mineralization(grouping)? {
                push(l.bucket, Q::Mineralized, l.split.mineralized);
            }
        }
        if route == Method::EnhancedWeathering && quantities.contains(&Q::WeatheringNet) {
            for l in self.weathering_rollup(grouping)?.0 {
                push(l.bucket, Q::WeatheringNet, l.net);
            }
        }
        if !geological_route(route) && quantities.contains(&Q::Stored) {
            for (b, u) in self.stored(grouping)? {
                push(b, Q::Stored, u.value());
            }
        }
        for l in self.geological(grouping, method) {
            let t = &l.terms;
            for q in quantities {
                let mass = match q {
                    Q::Received => t.received(),
                    Q::Injected => t.injected,
                    Q::Produced => t.produced(),
                    Q::Leakage => t.surface_leakage,
                    Q::EquipmentLeak => t.leaks_injection_side + t.leaks_production_side,
                    Q::Stored if geological_route(route) => l.stored,
                    Q::Stored | Q::Mineralized | Q::WeatheringNet => continue,
                };
                push(l.bucket, *q, mass);
            }
        }
        Ok(out)
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use ReportedQuantity as Q;

    /// What counts toward a year's misstatement follows each published balance's terms:
    /// 40 CFR 98.443 RR-11/RR-12 start from injected; ISO 27916 from received, less operational
    /// losses and losses from the complex.
    #[test]
    fn the_terms_of_stored_follow_the_balance() {
        let b = |q, route, method| bearing(q, route, method);
        let (rr, iso) = (BalanceMethod::Rr, BalanceMethod::Iso27916);
        for q in [Q::Injected, Q::Produced, Q::Leakage, Q::EquipmentLeak] {
            assert_eq!(b(q, Method::Eor, rr), Bearing::Term, "{q}");
        }
        assert_eq!(b(Q::Received, Method::Eor, rr), Bearing::Listed);
        for q in [Q::Received, Q::Leakage, Q::EquipmentLeak] {
            assert_eq!(b(q, Method::Eor, iso), Bearing::Term, "{q}");
        }
        for q in [Q::Injected, Q::Produced] {
            assert_eq!(b(q, Method::Eor, iso), Bearing::Listed, "{q}");
        }
        assert_eq!(b(Q::Stored, Method::SalineAquifer, rr), Bearing::Headline);
        assert_eq!(
            b(Q::Mineralized, Method::BasaltMineralization, rr),
            Bearing::Headline
        );
        assert_eq!(
            b(Q::Injected, Method::BasaltMineralization, rr),
            Bearing::Term
        );
        // A route that injects nothing is judged on its own figure alone.
        assert_eq!(
            b(Q::WeatheringNet, Method::EnhancedWeathering, rr),
            Bearing::Headline
        );
        assert_eq!(
            b(Q::Injected, Method::EnhancedWeathering, rr),
            Bearing::Listed
        );
        assert_eq!(
            b(Q::Mineralized, Method::SalineAquifer, rr),
            Bearing::NotKept
        );
        assert_eq!(b(Q::WeatheringNet, Method::Eor, rr), Bearing::NotKept);
    }
}
