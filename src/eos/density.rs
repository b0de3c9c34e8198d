//! Density of CO2 at a given temperature and pressure: the stable root of p(ρ) = p.
//!
//! Below the critical temperature an isotherm of the Span–Wagner equation rises along the vapour
//! branch, falls and wiggles (with huge swings at low temperature) inside the two-phase region, then
//! rises along the liquid branch. The solver therefore first decides the phase, then searches only
//! the stretch of density where that phase's branch is the one rising root.

use super::ancillary::{saturated_densities, vapour_pressure};
use super::constants::{
    CRITICAL_DENSITY_KG_PER_M3, CRITICAL_PRESSURE_PA, CRITICAL_TEMPERATURE_K, MAX_PRESSURE_PA,
    MAX_TEMPERATURE_K, MIN_PRESSURE_PA, SPECIFIC_GAS_CONSTANT, TRIPLE_POINT_TEMPERATURE_K,
};
use super::error::EosError;
use super::ideal_gas::ideal_gas_density;
use super::melting::melting_pressure;
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
/// worked out from the full equation to choose the phase: 100 times the ancillary's error.
const NEAR_SATURATION: f64 = 0.005;
/// States this close (relatively) to the saturation pressure are refused as two-phase. The
/// saturation pressure and the pressure along either branch are exact to about 1e-13, so 1e-9
/// leaves a wide margin, and is far finer than any pressure measurement.
const ON_SATURATION_LINE: f64 = 1e-9;
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
    let ideal = ideal_gas_density(temperature_k, pressure_pa);
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
            start: ideal.min(0.9 * DENSITY_CEILING_KG_PER_M3),
            phase,
        };
        return Ok(search
            .run(&isotherm, pressure_pa)
            .unwrap_or_else(|closest| closest));
    }

    let (liquid, vapour) = saturated_densities(temperature_k);
    let ancillary_pressure = vapour_pressure(temperature_k);
    let (mut is_vapour, mut vapour_start, mut liquid_start) =
        (pressure_pa < ancillary_pressure, ideal, liquid);
    if (pressure_pa / ancillary_pressure - 1.0).abs() < NEAR_SATURATION {
        // Too close for the ancillary to decide: use the full equation's saturation line. That
        // fails only within about 10 µK of Tc, where the ancillary decides (see below).
        if let Some(sat) = saturation(&isotherm, liquid, vapour) {
            let distance = (pressure_pa - sat.pressure_pa) / sat.pressure_pa;
            if distance.abs() <= ON_SATURATION_LINE {
                return Err(EosError::OnSaturationLine {
                    temperature_k,
                    saturation_pressure_pa: sat.pressure_pa,
                });
            }
            is_vapour = distance < 0.0;
            (vapour_start, liquid_start) = (sat.vapour_density, sat.liquid_density);
        }
    }

    // Searching the vapour branch no further than halfway from the saturated vapour to the
    // critical density, and the liquid branch from halfway between the critical density and the
    // saturated liquid, keeps clear of the loops inside the two-phase region, which lie nearer
    // the critical density (checked over the whole range in the tests).
    let vapour = Search {
        branch: Branch::Vapour,
        bracket: (0.0, 0.5 * (vapour + CRITICAL_DENSITY_KG_PER_M3)),
        start: vapour_start,
        phase: Phase::Gas,
    };
    let liquid = Search {
        branch: Branch::Liquid,
        bracket: (
            0.5 * (liquid + CRITICAL_DENSITY_KG_PER_M3),
            DENSITY_CEILING_KG_PER_M3,
        ),
        start: liquid_start,
        phase: Phase::Liquid,
    };
    let (chosen, other) = if is_vapour {
        (vapour, liquid)
    } else {
        (liquid, vapour)
    };
    // A branch has no root when the pressure lies beyond its spinodal (the top of the vapour
    // branch, the bottom of the liquid one). That happens only when the ancillary decided a state
    // within 2e-7 of the saturation pressure; the other phase is then the stable one.
    Ok(chosen
        .run(&isotherm, pressure_pa)
        .or_else(|_| other.run(&isotherm, pressure_pa))
        .unwrap_or_else(|closest| closest))
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

/// Newton steps stop when they move the density by less than this, relatively; the error left
/// is then of the order of its square.
const STEP_TOLERANCE: f64 = 1e-10;
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
        let (mut step, mut step_before) = (hi - lo, hi - lo);
        let mut residual = f64::INFINITY;
        for _ in 0..MAX_ITERATIONS {
            let at = isotherm.pressure(x);
            if std::env::var("TRACE").is_ok() {
                eprintln!(
                    "x={x} p={:e} slope={:e} lo={lo} hi={hi}",
                    at.pressure, at.slope
                );
            }
            residual = at.pressure - target;
            if residual == 0.0 {
                return Ok((x, self.phase));
            }
            if self.branch.below_root(at, target) {
                lo = x;
            } else {
                hi = x;
            }
            let newton = if at.pressure > 0.0 {
                x * (-(at.pressure / target).ln() * at.pressure / (x * at.slope)).exp()
            } else {
                x - residual / at.slope
            };
            let newton_ok = at.slope > 0.0
                && newton > lo
                && newton < hi
                && (newton - x).abs() <= 0.5 * step_before.abs();
            step_before = step;
            if newton_ok {
                step = newton - x;
                x = newton;
                if step.abs() <= STEP_TOLERANCE * x {
                    return Ok((x, self.phase));
                }
            } else {
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
