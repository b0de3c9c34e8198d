//! The root search on one rising branch of an isotherm: Newton's method inside a shrinking
//! bracket.

use super::Phase;
use crate::eos::span_wagner::{Isotherm, PressureSlope};

/// Which rising stretch of the isotherm holds the root.
#[derive(Debug, Clone, Copy)]
pub(super) enum Branch {
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
pub(super) struct Search {
    pub(super) branch: Branch,
    /// Densities, kg/m³, between which this branch is the only rising stretch.
    pub(super) bracket: (f64, f64),
    pub(super) start: f64,
    /// The phase a root found here belongs to.
    pub(super) phase: Phase,
}

impl Search {
    /// Newton's method kept inside a shrinking bracket, with bisection whenever a Newton step
    /// leaves the bracket or stops halving (after Press et al., Numerical Recipes, `rtsafe`).
    /// `Err` carries the density the bracket closed on when the branch holds no root.
    pub(super) fn run(
        &self,
        isotherm: &Isotherm,
        target: f64,
    ) -> Result<(f64, Phase), (f64, Phase)> {
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
