//! Ex-situ carbonation: CO2 taken up by a solid from its CO2 content before and after.
//!
//! The CO2-free solid is conserved, so the product weighs M(1 − w_b)/(1 − w_a) and the uptake is
//! M(w_a − w_b)/(1 − w_a). The naive M(w_a − w_b) forgets that the product is heavier than the
//! feed and understates the uptake. Derivation: docs/mineralization.md.

use super::input::{InputError, Rule, check, grams};
use crate::quantity::Mass;

/// What the carbonation did, from dry-basis CO2 mass fractions.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum Carbonation {
    /// w_a > w_b: the solid took up `co2`; `product_t` is the dry carbonated product.
    Uptake { co2: Mass, product_t: f64 },
    /// w_a ≤ w_b: no uptake. A finding rather than an error, because the measurements are
    /// valid and say the solid kept or lost CO2: `released` (≥ 0) is what it lost, which the
    /// ledger may have to count as an emission and must not count as storage.
    NoUptake { released: Mass, product_t: f64 },
}

/// Uptake of a dry feed of `fed_t` tonnes whose CO2 mass fraction goes from `w_before` to
/// `w_after` (both on a dry basis, in [0, 1)). Assumes CO2 is the only mass gained or lost.
pub fn uptake(fed_t: f64, w_before: f64, w_after: f64) -> Result<Carbonation, InputError> {
    check("fed_t", fed_t, Rule::NonNegative)?;
    check("w_before", w_before, Rule::BelowOne)?;
    check("w_after", w_after, Rule::BelowOne)?;
    let product_t = fed_t * (1.0 - w_before) / (1.0 - w_after);
    let signed_g = 1e6 * fed_t * (w_after - w_before) / (1.0 - w_after);
    let co2 = grams("uptake_g", signed_g.abs())?;
    Ok(if w_after > w_before {
        Carbonation::Uptake { co2, product_t }
    } else {
        Carbonation::NoUptake {
            released: co2,
            product_t,
        }
    })
}

#[cfg(test)]
mod tests {
    use super::*;
    use proptest::prelude::*;

    fn taken(fed_t: f64, wb: f64, wa: f64) -> (Mass, f64) {
        match uptake(fed_t, wb, wa) {
            Ok(Carbonation::Uptake { co2, product_t }) => (co2, product_t),
            other => panic!("{other:?}"),
        }
    }

    /// Derived in docs/mineralization.md: 1000 t at 2 % → 20 % CO2 takes up
    /// 1000·0.18/0.8 = 225 t; the naive 1000·0.18 = 180 t understates it by a fifth.
    #[test]
    fn uptake_exceeds_the_naive_difference() {
        let (co2, product_t) = taken(1000.0, 0.02, 0.20);
        assert_eq!(co2, Mass::from_grams(225_000_000));
        assert!((product_t - 1225.0).abs() < 1e-9);
        let naive = 1e6 * 1000.0 * (0.20 - 0.02);
        assert!((co2.grams() as f64) > naive);
        // The product's CO2 less the feed's CO2 is the uptake.
        let held = product_t * 0.20 - 1000.0 * 0.02;
        assert!((held * 1e6 - co2.grams() as f64).abs() < 1e-3);
    }

    /// Round trip: a known CO2-free solid and CO2 mass, contents computed from them,
    /// uptake recovered.
    #[test]
    fn round_trip_recovers_the_added_co2() {
        for (solid_t, before_t, added_t) in [(800.0, 12.5, 97.25), (1.0, 0.0, 0.3), (5e4, 0.0, 1e4)]
        {
            let fed_t: f64 = solid_t + before_t;
            let wb = before_t / fed_t;
            let wa = (before_t + added_t) / (fed_t + added_t);
            let (co2, product_t) = taken(fed_t, wb, wa);
            assert!((co2.grams() as f64 - added_t * 1e6).abs() <= 1.0, "{co2}");
            assert!((product_t - (fed_t + added_t)).abs() < 1e-9 * product_t);
        }
    }

    #[test]
    fn no_uptake_is_a_finding() {
        match uptake(100.0, 0.2, 0.1) {
            // 100·0.1/0.9 = 11.111 t lost.
            Ok(Carbonation::NoUptake { released, .. }) => {
                assert_eq!(released, Mass::from_grams(11_111_111));
            }
            other => panic!("{other:?}"),
        }
        assert_eq!(
            uptake(100.0, 0.1, 0.1),
            Ok(Carbonation::NoUptake {
                released: Mass::ZERO,
                product_t: 100.0
            })
        );
    }

    #[test]
    fn refusals_name_the_field() {
        for (args, field) in [
            ((-1.0, 0.1, 0.2), "fed_t"),
            ((1.0, 1.0, 0.2), "w_before"),
            ((1.0, 0.1, 1.0), "w_after"),
            ((1.0, 0.1, f64::NAN), "w_after"),
            ((1e15, 0.0, 0.9), "uptake_g"),
        ] {
            let e = uptake(args.0, args.1, args.2).map(|_| ()).unwrap_err();
            assert_eq!(e.field, field);
        }
    }

    proptest! {
        #[test]
        fn never_panics(
            m in proptest::num::f64::ANY,
            wb in proptest::num::f64::ANY,
            wa in proptest::num::f64::ANY,
        ) {
            let _ = uptake(m, wb, wa);
        }
    }
}
