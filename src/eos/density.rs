//! Density of CO2 at a given temperature and pressure: the stable root of p(ρ) = p.
//!
//! Below the critical temperature an isotherm of the Span–Wagner equation rises along the vapour
//! branch, falls and wiggles (with huge swings at low temperature) inside the two-phase region, then
//! rises along the liquid branch. The solver therefore first decides the phase, then searches only
//! the stretch of density where that phase's branch is the one rising root.

use std::fmt;

use super::ancillary::{saturated_densities, vapour_pressure};
use super::constants::{
    CRITICAL_DENSITY_KG_PER_M3, CRITICAL_PRESSURE_PA, CRITICAL_TEMPERATURE_K, MAX_PRESSURE_PA,
    MAX_TEMPERATURE_K, MIN_PRESSURE_PA, SPECIFIC_GAS_CONSTANT, TRIPLE_POINT_TEMPERATURE_K,
};
use super::error::EosError;
use super::melting::melting_pressure;
use super::peng_robinson::peng_robinson_densities;
use super::saturation::saturation;
use super::span_wagner::{Isotherm, PressureSlope};

/// Which phase the density belongs to.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Phase {
    /// Vapour below the critical temperature and saturation pressure, or any state at or above the
    /// critical temperature below the critical pressure.
    Gas,
    /// Below the critical temperature, above the saturation pressure (including above the
    /// critical pressure: compressed liquid).
    Liquid,
    /// At or above both the critical temperature and the critical pressure.
    Supercritical,
}

impl fmt::Display for Phase {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(match self {
            Phase::Gas => "gas",
            Phase::Liquid => "liquid",
            Phase::Supercritical => "supercritical",
        })
    }
}

/// A solved state of CO2.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct State {
    pub temperature_k: f64,
    pub pressure_pa: f64,
    /// Density, kg/m³.
    pub density_kg_per_m3: f64,
    pub phase: Phase,
    /// Compressibility factor Z = p / (ρ R T); 1 for an ideal gas.
    pub compressibility_factor: f64,
}

/// Within this relative distance of the ancillary vapour pressure the saturation pressure is
/// worked out from the full equation to choose the phase: over 100 times the ancillary's error.
const NEAR_SATURATION: f64 = 0.005;
/// States this close (relatively) to the saturation pressure are refused as two-phase. The
/// saturation pressure and the pressure along either branch are exact to about 1e-13, so 1e-9
/// leaves a wide margin, and is far finer than any pressure measurement.
const ON_SATURATION_LINE: f64 = 1e-9;
/// From 303.7 to 303.9 K a loop of the two-phase region reaches up to the liquid spinodal, past
/// the ancillary brackets; from here to Tc the brackets come from the saturation line instead.
const LOOPS_NEAR_SPINODAL_K: f64 = 303.0;
/// A density no fluid state in range reaches: p exceeds 800 MPa there at every temperature.
const DENSITY_CEILING_KG_PER_M3: f64 = 1800.0;

/// Density of CO2 by the Span–Wagner (1996) equation at `temperature_k` (216.592–1100 K) and
/// `pressure_pa` (up to 800 MPa, below the melting pressure), in the stable phase.
pub fn density(temperature_k: f64, pressure_pa: f64) -> Result<State, EosError> {
    check_range(temperature_k, pressure_pa)?;
    let (density, phase) = solve_state(temperature_k, pressure_pa)?;
    Ok(State {
        temperature_k,
        pressure_pa,
        density_kg_per_m3: density,
        phase,
        compressibility_factor: pressure_pa / (density * SPECIFIC_GAS_CONSTANT * temperature_k),
    })
}

/// Refuses non-finite values and states outside the equation's range (the negated comparisons
/// also catch NaN).
fn check_range(temperature_k: f64, pressure_pa: f64) -> Result<(), EosError> {
    if !(TRIPLE_POINT_TEMPERATURE_K..=MAX_TEMPERATURE_K).contains(&temperature_k) {
        return Err(EosError::TemperatureOutOfRange { temperature_k });
    }
    if !(MIN_PRESSURE_PA..=MAX_PRESSURE_PA).contains(&pressure_pa) {
        return Err(EosError::PressureOutOfRange { pressure_pa });
    }
    let melting_pressure_pa = melting_pressure(temperature_k);
    if pressure_pa > melting_pressure_pa {
        return Err(EosError::Solid {
            temperature_k,
            pressure_pa,
            melting_pressure_pa,
        });
    }
    Ok(())
}

/// Density and phase of a state already checked to be in range.
fn solve_state(temperature_k: f64, pressure_pa: f64) -> Result<(f64, Phase), EosError> {
    let isotherm = Isotherm::new(temperature_k);
    let (vapour_like, liquid_like) = peng_robinson_densities(temperature_k, pressure_pa);
    if temperature_k >= CRITICAL_TEMPERATURE_K {
        // One phase: the isotherm rises everywhere, so it crosses the pressure exactly once.
        let phase = if pressure_pa >= CRITICAL_PRESSURE_PA {
            Phase::Supercritical
        } else {
            Phase::Gas
        };
        let search = Search {
            branch: Branch::Vapour,
            bracket: (0.0, DENSITY_CEILING_KG_PER_M3),
            start: vapour_like,
            phase,
        };
        // The bracket always holds the root; were it missed by rounding, the closest density
        // found is the answer.
        return Ok(search
            .run(&isotherm, pressure_pa)
            .unwrap_or_else(|closest| closest));
    }

    let (liquid, vapour) = saturated_densities(temperature_k);
    let ancillary_pressure = vapour_pressure(temperature_k);
    let near_saturation = (pressure_pa / ancillary_pressure - 1.0).abs() < NEAR_SATURATION;
    // The full equation's saturation line decides the phase where the ancillary is too coarse
    // and gives the brackets where the ancillary ones are unsafe. It is out of reach only
    // within about 3 µK of Tc, where the ancillary takes over (see below).
    let sat = if near_saturation || temperature_k >= LOOPS_NEAR_SPINODAL_K {
        saturation(&isotherm, liquid, vapour)
    } else {
        None
    };
    let (is_vapour, (vapour_bracket, liquid_bracket), (vapour_start, liquid_start)) = match sat {
        Some(sat) => {
            let distance = (pressure_pa - sat.pressure_pa) / sat.pressure_pa;
            if distance.abs() <= ON_SATURATION_LINE {
                return Err(EosError::OnSaturationLine {
                    temperature_k,
                    saturation_pressure_pa: sat.pressure_pa,
                });
            }
            // Each saturated phase ends its stable branch, so nothing but that branch lies
            // between it and zero density or the ceiling.
            let brackets = (
                (0.0, sat.vapour_density),
                (sat.liquid_density, DENSITY_CEILING_KG_PER_M3),
            );
            let starts = if near_saturation {
                (sat.vapour_density, sat.liquid_density)
            } else {
                (vapour_like, liquid_like)
            };
            (distance < 0.0, brackets, starts)
        }
        None => (
            pressure_pa < ancillary_pressure,
            ancillary_brackets(liquid, vapour),
            (vapour_like, liquid_like),
        ),
    };

    let vapour = Search {
        branch: Branch::Vapour,
        bracket: vapour_bracket,
        start: vapour_start,
        phase: Phase::Gas,
    };
    let liquid = Search {
        branch: Branch::Liquid,
        bracket: liquid_bracket,
        start: liquid_start,
        phase: Phase::Liquid,
    };
    let (chosen, other) = if is_vapour {
        (vapour, liquid)
    } else {
        (liquid, vapour)
    };
    // A branch has no root when the pressure lies beyond its spinodal (the top of the vapour
    // branch, the bottom of the liquid one). That happens only where the ancillary decided,
    // within microkelvins of Tc, a state it cannot tell from the saturation pressure; the other
    // phase is then the stable one.
    Ok(chosen
        .run(&isotherm, pressure_pa)
        .or_else(|_| other.run(&isotherm, pressure_pa))
        .unwrap_or_else(|closest| closest))
}

/// Density brackets, kg/m³, for the vapour and the liquid branch below the critical temperature,
/// from the ancillary saturated densities. Searching the vapour branch no further than halfway
/// from the saturated vapour to the critical density, and the liquid branch from halfway between
/// the critical density and the saturated liquid, keeps clear of the loops inside the two-phase
/// region, which lie nearer the critical density below [`LOOPS_NEAR_SPINODAL_K`] and within a few
/// µK of Tc (checked in the tests).
fn ancillary_brackets(liquid: f64, vapour: f64) -> ((f64, f64), (f64, f64)) {
    (
        (0.0, 0.5 * (vapour + CRITICAL_DENSITY_KG_PER_M3)),
        (
            0.5 * (liquid + CRITICAL_DENSITY_KG_PER_M3),
            DENSITY_CEILING_KG_PER_M3,
        ),
    )
}

/// Which rising stretch of the isotherm holds the root.
#[derive(Debug, Clone, Copy)]
enum Branch {
    /// The first rising stretch from zero density: vapour, gas or supercritical fluid.
    Vapour,
    /// The last rising stretch: liquid, above the loops of the two-phase region.
    Liquid,
}

impl Branch {
    /// Whether a density, with its pressure and slope, lies below the root on this branch.
    fn below_root(self, at: PressureSlope, target: f64) -> bool {
        match self {
            Branch::Vapour => at.slope > 0.0 && at.pressure < target,
            Branch::Liquid => at.slope <= 0.0 || at.pressure < target,
        }
    }
}

/// Newton's method stops once the error left after a step, estimated from the last two steps, is
/// below this, relatively, both in density and in the pressure it gives: a tenth of the 1e-9 to
/// which the pressure must be reproduced.
const ERROR_TOLERANCE: f64 = 1e-10;
/// A bracket closed to adjacent f64 values holds a root if the pressure there is this close,
/// relatively; otherwise it closed on a spinodal, where the branch ends short of the pressure.
const ROOT_TOLERANCE: f64 = 1e-9;
/// More than enough for bisection alone to close any bracket to adjacent f64 values.
const MAX_ITERATIONS: usize = 2200;

/// A root search on one branch of an isotherm.
struct Search {
    branch: Branch,
    /// Densities, kg/m³, between which this branch is the only rising stretch.
    bracket: (f64, f64),
    start: f64,
    /// The phase a root found here belongs to.
    phase: Phase,
}

impl Search {
    /// Newton's method kept inside a shrinking bracket, with bisection whenever a Newton step
    /// leaves the bracket or stops halving (after Press et al., Numerical Recipes, `rtsafe`).
    /// `Err` carries the density the bracket closed on when the branch holds no root.
    fn run(&self, isotherm: &Isotherm, target: f64) -> Result<(f64, Phase), (f64, Phase)> {
        let (mut lo, mut hi) = self.bracket;
        let mut x = self.start.max(lo).min(hi);
        // The last two steps, to see that the steps keep halving.
        let (mut step, mut step_before) = (hi - lo, hi - lo);
        // Relative size of the last step, if it was a Newton step.
        let mut last_newton: Option<f64> = None;
        // The last density evaluated and the slope there.
        let mut previous: Option<(f64, f64)> = None;
        let mut residual = f64::INFINITY;
        for _ in 0..MAX_ITERATIONS {
            let at = isotherm.pressure(x);
            residual = at.pressure - target;
            if residual == 0.0 {
                return Ok((x, self.phase));
            }
            if self.branch.below_root(at, target) {
                lo = x;
            } else {
                hi = x;
            }
            let newton = newton_step(x, at, target, previous);
            previous = Some((x, at.slope));
            let newton_ok = at.slope > 0.0
                && newton > lo
                && newton < hi
                && (newton - x).abs() <= 0.5 * step_before.abs();
            step_before = step;
            if newton_ok {
                step = newton - x;
                // Converging quadratically, the error left after a step s is about
                // s³/s_before², s_before being the step before; d ln p / d ln ρ turns it into
                // an error in pressure.
                let size = (step / newton).abs();
                let left = last_newton.map_or(size, |before| size * (size / before).powi(2));
                let stiffness = (x * at.slope / at.pressure).abs().max(1.0);
                x = newton;
                if size <= 1e-6 && left * stiffness <= ERROR_TOLERANCE {
                    return Ok((x, self.phase));
                }
                last_newton = Some(size);
            } else {
                last_newton = None;
                let mid = lo + 0.5 * (hi - lo);
                if mid <= lo || mid >= hi {
                    break;
                }
                step = mid - x;
                x = mid;
            }
        }
        if residual.abs() <= ROOT_TOLERANCE * target {
            Ok((x, self.phase))
        } else {
            Err((x, self.phase))
        }
    }
}

/// The next density from `x` by Newton's method. While the pressure is off by more than 1 % the
/// step is taken on ln p: dense isotherms rise about exponentially, so it overshoots far less
/// than a step on p. Closer in, the curvature from the `previous` density and slope turns it into
/// Halley's step, which converges faster. The caller checks the result against its bracket.
fn newton_step(x: f64, at: PressureSlope, target: f64, previous: Option<(f64, f64)>) -> f64 {
    let ratio = at.pressure / target;
    if ratio > 0.0 && (ratio - 1.0).abs() > 0.01 {
        return x - ratio.ln() * at.pressure / at.slope;
    }
    let step = (target - at.pressure) / at.slope;
    // Halley: x + s / (1 + s p'' / (2 p')), with p'' from the change of slope.
    let halley = previous.map_or(0.0, |(x_before, slope_before)| {
        0.5 * step * (at.slope - slope_before) / ((x - x_before) * at.slope)
    });
    if halley.abs() < 0.5 {
        x + step / (1.0 + halley)
    } else {
        x + step
    }
}

#[cfg(test)]
mod tests {
    use proptest::prelude::*;

    use super::*;
    use crate::eos::constants::MIN_PRESSURE_PA;
    use crate::eos::ideal_gas_density;

    /// Asserts a density to the REFERENCES.md tolerance, 0.01 %.
    fn assert_density(temperature_k: f64, pressure_pa: f64, expected: f64) -> State {
        let state = density(temperature_k, pressure_pa).unwrap();
        let relative = state.density_kg_per_m3 / expected - 1.0;
        assert!(
            relative.abs() < 1e-4,
            "{temperature_k} K, {pressure_pa} Pa: {} kg/m³, expected {expected} ({relative:.2e})",
            state.density_kg_per_m3
        );
        state
    }

    /// The saturation pressure at a temperature, from the full equation.
    fn saturation_pressure(temperature_k: f64) -> f64 {
        let (liquid, vapour) = saturated_densities(temperature_k);
        saturation(&Isotherm::new(temperature_k), liquid, vapour)
            .unwrap()
            .pressure_pa
    }

    #[test]
    fn reference_densities() {
        // computed with the Span–Wagner equation; the same values come from CoolProp —
        // REFERENCES.md, "CO2 density".
        assert_eq!(assert_density(300.0, 1e6, 18.5794).phase, Phase::Gas);
        assert_eq!(
            assert_density(313.15, 8e6, 277.90).phase,
            Phase::Supercritical
        );
        assert_eq!(
            assert_density(313.15, 10e6, 628.61).phase,
            Phase::Supercritical
        );
        assert_eq!(assert_density(273.15, 101_325.0, 1.9768).phase, Phase::Gas);
        assert_eq!(assert_density(288.15, 101_325.0, 1.8718).phase, Phase::Gas);
        // 60 °F = 288.705556 K (read: NIST SP 811, REFERENCES.md "Units").
        assert_eq!(
            assert_density(288.705_556, 101_325.0, 1.8682).phase,
            Phase::Gas
        );
    }

    #[test]
    fn liquid_and_dense_states() {
        // computed with CoolProp 8.0.0 (PropsSI "D", same Span–Wagner equation).
        assert_eq!(
            assert_density(250.0, 5e6, 1_058.860_082_6).phase,
            Phase::Liquid
        );
        assert_eq!(
            assert_density(280.0, 10e6, 938.224_692_2).phase,
            Phase::Liquid
        );
        assert_eq!(
            assert_density(350.0, 100e6, 1_027.733_182_4).phase,
            Phase::Supercritical
        );
        assert_eq!(
            assert_density(1000.0, 800e6, 1_129.164_754_1).phase,
            Phase::Supercritical
        );
        assert_eq!(assert_density(310.0, 5e6, 116.129_222_6).phase, Phase::Gas);
        assert_eq!(
            assert_density(310.0, 10e6, 685.773_206_6).phase,
            Phase::Supercritical
        );
    }

    #[test]
    fn critical_point_is_supercritical() {
        // At (Tc, pc) the density is only fixed to the cube root of the pressure: CoolProp
        // 8.0.0 gives 480.99 kg/m³, close to ρc = 467.6 (read: Span & Wagner 1996 constants).
        let state = density(CRITICAL_TEMPERATURE_K, CRITICAL_PRESSURE_PA).unwrap();
        assert_eq!(state.phase, Phase::Supercritical);
        assert!((state.density_kg_per_m3 / 480.99 - 1.0).abs() < 2e-4);
    }

    #[test]
    fn phase_flips_across_the_saturation_pressure() {
        // Saturated densities computed with CoolProp 8.0.0 (PropsSI "D" at Q = 0 and 1).
        for (t, liquid, vapour) in [
            (250.0, 1_045.972_130_2, 46.644_014_5),
            (300.0, 679.239_165_2, 268.583_657_4),
        ] {
            let ps = saturation_pressure(t);
            for f in [1e-8, 1e-4, 1e-3, 4e-3, 6e-3] {
                let below = density(t, ps * (1.0 - f)).unwrap();
                let above = density(t, ps * (1.0 + f)).unwrap();
                assert_eq!(
                    (below.phase, above.phase),
                    (Phase::Gas, Phase::Liquid),
                    "{t} K, {f}"
                );
                if f < 1e-6 {
                    assert!((below.density_kg_per_m3 / vapour - 1.0).abs() < 1e-6);
                    assert!((above.density_kg_per_m3 / liquid - 1.0).abs() < 1e-6);
                }
            }
        }
    }

    #[test]
    fn state_on_the_saturation_line_is_refused() {
        // Saturation pressure at 250 K computed with CoolProp 8.0.0: 1785044.2428 Pa.
        let ps = saturation_pressure(250.0);
        assert!((ps / 1_785_044.242_8 - 1.0).abs() < 1e-8);
        for p in [ps, ps * (1.0 + 5e-10), ps * (1.0 - 5e-10)] {
            let error = density(250.0, p).unwrap_err();
            assert_eq!(
                error,
                EosError::OnSaturationLine {
                    temperature_k: 250.0,
                    saturation_pressure_pa: ps
                }
            );
            assert!(
                error.to_string().contains("saturation pressure 1785044 Pa"),
                "{error}"
            );
        }
    }

    #[test]
    fn within_microkelvins_of_the_critical_point_states_still_solve() {
        // There the saturation solve gives up and the ancillary picks the phase; whichever it
        // picks, the answer must be a true root on a stable branch.
        for dt in [1e-5, 3e-6, 1e-6, 1e-7, 1e-9] {
            let t = CRITICAL_TEMPERATURE_K - dt;
            let ps = vapour_pressure(t);
            for f in [-1e-3, -1e-6, -1e-7, 0.0, 1e-7, 1e-6, 1e-3] {
                let p = ps * (1.0 + f);
                let state = density(t, p).unwrap();
                let at = Isotherm::new(t).pressure(state.density_kg_per_m3);
                assert!(
                    ((at.pressure - p) / p).abs() < 1e-9 && at.slope > 0.0,
                    "{t} K, {p} Pa"
                );
            }
        }
    }

    #[test]
    fn phase_names() {
        assert_eq!(density(400.0, 5e6).unwrap().phase, Phase::Gas);
        assert_eq!(density(400.0, 8e6).unwrap().phase, Phase::Supercritical);
        assert_eq!(density(290.0, 8e6).unwrap().phase, Phase::Liquid);
        assert_eq!(Phase::Supercritical.to_string(), "supercritical");
    }

    #[test]
    fn compressibility_factor_and_ideal_gas_limit() {
        let state = density(300.0, 1e6).unwrap();
        let z = 1e6 / (state.density_kg_per_m3 * SPECIFIC_GAS_CONSTANT * 300.0);
        assert!((state.compressibility_factor - z).abs() < 1e-15);
        // The gas is ideal in the limit of zero pressure.
        for t in [220.0, 300.0, 1100.0] {
            let state = density(t, 1.0).unwrap();
            assert!((state.density_kg_per_m3 / ideal_gas_density(t, 1.0) - 1.0).abs() < 1e-5);
            assert!((state.compressibility_factor - 1.0).abs() < 1e-5);
        }
        let tiny = density(1100.0, MIN_PRESSURE_PA).unwrap();
        assert!(tiny.density_kg_per_m3 > 0.0 && (tiny.compressibility_factor - 1.0).abs() < 1e-12);
    }

    #[test]
    fn range_errors_name_the_bound_and_the_value() {
        let cases = [
            (
                1200.0,
                1e6,
                "temperature 1200 K is outside the Span–Wagner range 216.592–1100 K",
            ),
            (
                200.0,
                1e6,
                "temperature 200 K is outside the Span–Wagner range 216.592–1100 K: CO2 is solid \
                 below the triple point",
            ),
            (f64::NAN, 1e6, "temperature is not a number"),
            (
                f64::INFINITY,
                1e6,
                "temperature inf K is outside the Span–Wagner range 216.592–1100 K",
            ),
            (
                300.0,
                9e8,
                "pressure 900000000 Pa is outside the Span–Wagner range 0 < p ≤ 800 MPa",
            ),
            (
                300.0,
                0.0,
                "pressure 0 Pa is outside the Span–Wagner range 0 < p ≤ 800 MPa",
            ),
            (
                300.0,
                -1.0,
                "pressure -1 Pa is outside the Span–Wagner range 0 < p ≤ 800 MPa",
            ),
            (300.0, f64::NAN, "pressure is not a number"),
            (
                300.0,
                1e13,
                "pressure 1e13 Pa is outside the Span–Wagner range 0 < p ≤ 800 MPa",
            ),
            (
                300.0,
                1e-310,
                "pressure 1e-310 Pa is below 1e-300 Pa, too low for a representable density",
            ),
        ];
        for (t, p, message) in cases {
            assert_eq!(density(t, p).unwrap_err().to_string(), message);
        }
        assert_eq!(
            density(1100.0001, 1e6),
            Err(EosError::TemperatureOutOfRange {
                temperature_k: 1100.0001
            })
        );
        assert!(density(1100.0, 800e6).is_ok() && density(TRIPLE_POINT_TEMPERATURE_K, 1e5).is_ok());
    }

    #[test]
    fn solid_states_are_refused() {
        // Melting pressure at 250 K computed with CoolProp 8.0.0: 182.0759 MPa.
        assert!(density(250.0, 182.0e6).is_ok());
        let error = density(250.0, 182.1e6).unwrap_err();
        assert!(matches!(error, EosError::Solid { .. }));
        assert!(
            error
                .to_string()
                .contains("above the melting pressure 182075910 Pa"),
            "{error}"
        );
    }

    /// Temperatures from the triple point to just below Tc: every 0.25 K, every 0.01 K over the
    /// loops near the liquid spinodal, and closing in on Tc down to 1 nK.
    fn subcritical_temperatures() -> Vec<f64> {
        let t_t = TRIPLE_POINT_TEMPERATURE_K;
        let mut temperatures: Vec<f64> = (0..=345).map(|i| t_t + 0.25 * f64::from(i)).collect();
        temperatures.extend((0..=40).map(|i| 303.6 + 0.01 * f64::from(i)));
        temperatures.extend((0..=30).map(|i| CRITICAL_TEMPERATURE_K - 0.1 * 0.5_f64.powi(i)));
        temperatures
    }

    /// Whether ∂p/∂ρ is positive at the first of `n` densities spread over `bracket`, and how
    /// often its sign changes.
    fn slope_sign_changes(isotherm: &Isotherm, bracket: (f64, f64), n: u32) -> (bool, usize) {
        let mut signs = (1..=n).map(|i| {
            let rho = bracket.0 + (bracket.1 - bracket.0) * f64::from(i) / f64::from(n);
            isotherm.pressure(rho).slope > 0.0
        });
        let first = signs.next().unwrap_or(false);
        let (mut last, mut changes) = (first, 0);
        for sign in signs {
            changes += usize::from(sign != last);
            last = sign;
        }
        (first, changes)
    }

    #[test]
    fn brackets_hold_one_rising_branch_each() {
        // What `Branch::below_root` relies on: within the vapour bracket the isotherm rises, then
        // (if at all) falls; within the liquid bracket it falls (if at all), then rises.
        for t in subcritical_temperatures() {
            let isotherm = Isotherm::new(t);
            let (liquid, vapour) = saturated_densities(t);
            let sat = saturation(&isotherm, liquid, vapour);
            let (vapour_bracket, liquid_bracket) = match sat {
                Some(sat) if t >= LOOPS_NEAR_SPINODAL_K => (
                    (0.0, sat.vapour_density),
                    (sat.liquid_density, DENSITY_CEILING_KG_PER_M3),
                ),
                _ => ancillary_brackets(liquid, vapour),
            };
            let (rising, changes) = slope_sign_changes(&isotherm, vapour_bracket, 2000);
            assert!(rising && changes <= 1, "{t} K vapour: {changes} changes");
            let (rising, changes) = slope_sign_changes(&isotherm, liquid_bracket, 2000);
            assert_eq!(changes, usize::from(!rising), "{t} K liquid");
            // Saturated phases lie inside the ancillary brackets, so do the roots near them.
            if let (Some(sat), true) = (sat, t < LOOPS_NEAR_SPINODAL_K) {
                assert!(sat.vapour_density < vapour_bracket.1, "{t} K");
                assert!(sat.liquid_density > liquid_bracket.0, "{t} K");
            }
        }
    }

    #[test]
    fn saturation_line_is_found_up_to_microkelvins_below_tc() {
        for t in subcritical_temperatures() {
            let (liquid, vapour) = saturated_densities(t);
            let found = saturation(&Isotherm::new(t), liquid, vapour).is_some();
            assert!(found || t > CRITICAL_TEMPERATURE_K - 5e-6, "{t} K");
        }
    }

    #[test]
    fn supercritical_isotherms_rise_everywhere() {
        let mut temperatures = vec![
            CRITICAL_TEMPERATURE_K,
            304.1283,
            304.13,
            304.2,
            305.0,
            310.0,
        ];
        temperatures.extend((0..=40).map(|i| 320.0 + 20.0 * f64::from(i)));
        for t in temperatures {
            let (rising, changes) =
                slope_sign_changes(&Isotherm::new(t), (0.0, DENSITY_CEILING_KG_PER_M3), 1000);
            assert!(rising && changes == 0, "{t} K");
        }
    }

    #[test]
    fn density_ceiling_is_beyond_every_fluid_state() {
        for i in 0..=200 {
            let t = TRIPLE_POINT_TEMPERATURE_K
                + (MAX_TEMPERATURE_K - TRIPLE_POINT_TEMPERATURE_K) * f64::from(i) / 200.0;
            let highest = melting_pressure(t).min(MAX_PRESSURE_PA);
            assert!(
                Isotherm::new(t)
                    .pressure(DENSITY_CEILING_KG_PER_M3)
                    .pressure
                    > 2.0 * highest,
                "{t} K"
            );
        }
    }

    #[test]
    fn ancillary_is_close_enough_to_the_saturation_line() {
        // The ancillary vapour pressure decides the phase outside NEAR_SATURATION, so it must be
        // far closer than that to the full equation's saturation pressure; its densities only
        // start the solvers.
        let (mut pressure, mut liquid_worst, mut vapour_worst) = (0.0_f64, 0.0_f64, 0.0_f64);
        for t in subcritical_temperatures() {
            let (liquid, vapour) = saturated_densities(t);
            let Some(sat) = saturation(&Isotherm::new(t), liquid, vapour) else {
                continue;
            };
            pressure = pressure.max((vapour_pressure(t) / sat.pressure_pa - 1.0).abs());
            liquid_worst = liquid_worst.max((liquid / sat.liquid_density - 1.0).abs());
            vapour_worst = vapour_worst.max((vapour / sat.vapour_density - 1.0).abs());
        }
        assert!(pressure < NEAR_SATURATION / 50.0, "{pressure}");
        assert!(
            liquid_worst < 0.007 && vapour_worst < 0.003,
            "{liquid_worst} {vapour_worst}"
        );
    }

    /// Any answer is a positive, finite density that gives back the pressure on a stable branch.
    fn check_answer(temperature_k: f64, pressure_pa: f64) -> Result<(), TestCaseError> {
        if let Ok(state) = density(temperature_k, pressure_pa) {
            let rho = state.density_kg_per_m3;
            prop_assert!(rho.is_finite() && rho > 0.0);
            let at = Isotherm::new(temperature_k).pressure(rho);
            prop_assert!(
                ((at.pressure - pressure_pa) / pressure_pa).abs() <= 1e-9,
                "{at:?}"
            );
            prop_assert!(at.slope > 0.0);
            prop_assert!(state.compressibility_factor.is_finite());
        }
        Ok(())
    }

    proptest! {
        #![proptest_config(ProptestConfig::with_cases(1000))]

        #[test]
        fn arbitrary_inputs_never_panic(t in any::<f64>(), p in any::<f64>()) {
            check_answer(t, p)?;
        }

        #[test]
        fn states_in_range_give_back_their_pressure(t in 210.0..1110.0_f64, log_p in -4.0..9.0_f64) {
            check_answer(t, 10_f64.powf(log_p))?;
        }

        #[test]
        fn states_near_the_saturation_line(t in TRIPLE_POINT_TEMPERATURE_K..CRITICAL_TEMPERATURE_K, log_f in -12.0..-1.0_f64, above: bool) {
            let f = if above { 10_f64.powf(log_f) } else { -(10_f64.powf(log_f)) };
            check_answer(t, vapour_pressure(t) * (1.0 + f))?;
        }

        #[test]
        fn states_near_the_critical_point(dt in -0.5..0.5_f64, dp in -0.05..0.05_f64) {
            check_answer(CRITICAL_TEMPERATURE_K + dt, CRITICAL_PRESSURE_PA * (1.0 + dp))?;
        }
    }
}
