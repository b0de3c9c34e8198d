//! The saturation line from the full equation: the liquid and vapour densities at which both
//! phases have the same pressure and the same Gibbs energy (the Maxwell condition).
//!
//! At equal temperature the ideal part of the Helmholtz energy differs between the phases only by
//! ln δ, so with J(δ) = δ(1 + δ φr_δ) (pressure / ρc R T) and K(δ) = δ φr_δ + φr + ln δ (Gibbs
//! energy / R T, less terms of T alone) the conditions are J(δl) = J(δv) and K(δl) = K(δv).
//! They are solved by Newton's method in both densities at once (Akasaka 2008,
//! J. Therm. Sci. Tech. 3:442), using K_δ = J_δ / δ.

use super::constants::CRITICAL_DENSITY_KG_PER_M3;
use super::span_wagner::Isotherm;

/// Both phases on the saturation line at one temperature.
#[derive(Debug, Clone, Copy)]
pub(super) struct Saturation {
    /// Saturation (vapour) pressure, Pa.
    pub pressure_pa: f64,
    /// Saturated liquid density, kg/m³.
    pub liquid_density: f64,
    /// Saturated vapour density, kg/m³.
    pub vapour_density: f64,
}

/// J, K and J_δ at one reduced density.
struct Phase {
    delta: f64,
    j: f64,
    k: f64,
    j_d: f64,
}

impl Phase {
    fn at(isotherm: &Isotherm, delta: f64) -> Self {
        let r = isotherm.residual(delta);
        Phase {
            delta,
            j: delta * (1.0 + r.delta_phi_d),
            k: r.delta_phi_d + r.phi + delta.ln(),
            j_d: 1.0 + 2.0 * r.delta_phi_d + r.delta2_phi_dd,
        }
    }
}

/// Iterations allowed; from the ancillary densities it takes 4 to 8.
const MAX_ITERATIONS: usize = 60;
/// Converged when the densities move by less than this, relatively, in one step: the next step
/// would be of the order of its square.
const TOLERANCE: f64 = 1e-10;
/// Within millikelvins of the critical point the two phases differ so little that rounding
/// stops the steps from shrinking below about 1e-8. Steps smaller than this that no longer halve
/// have reached that floor; the pressure is then still exact to about 1e-14, because the
/// isotherm is nearly flat there.
const NOISE_FLOOR: f64 = 1e-6;

/// The saturation state along an isotherm below the critical temperature, from estimates of the
/// two densities (kg/m³), or `None` when Newton's method does not converge to two distinct,
/// mechanically stable phases (only a hair's breadth below the critical temperature, where the
/// phases become one).
pub(super) fn saturation(isotherm: &Isotherm, liquid: f64, vapour: f64) -> Option<Saturation> {
    let mut l = Phase::at(isotherm, liquid / CRITICAL_DENSITY_KG_PER_M3);
    let mut v = Phase::at(isotherm, vapour / CRITICAL_DENSITY_KG_PER_M3);
    let mut last_size = f64::INFINITY;
    for _ in 0..MAX_ITERATIONS {
        let (dj, dk) = (v.j - l.j, v.k - l.k);
        let det = v.j_d * l.j_d / l.delta - l.j_d * v.j_d / v.delta;
        let step_l = (dk * v.j_d - dj * v.j_d / v.delta) / det;
        let step_v = (dk * l.j_d - dj * l.j_d / l.delta) / det;
        if !(step_l.is_finite() && step_v.is_finite()) {
            return None;
        }
        // Halve a step that would swap the phases or leave positive densities.
        let mut scale = 1.0;
        while !(v.delta + scale * step_v > 0.0
            && l.delta + scale * step_l > v.delta + scale * step_v)
        {
            scale *= 0.5;
            if scale < 1e-6 {
                return None;
            }
        }
        l = Phase::at(isotherm, l.delta + scale * step_l);
        v = Phase::at(isotherm, v.delta + scale * step_v);
        let size = scale * ((step_l / l.delta).abs() + (step_v / v.delta).abs());
        let converged = size < TOLERANCE || (size < NOISE_FLOOR && size > 0.5 * last_size);
        last_size = size;
        if converged {
            let stable = l.j_d > 0.0 && v.j_d > 0.0 && l.delta > v.delta * (1.0 + 1e-9);
            return stable.then(|| Saturation {
                pressure_pa: isotherm
                    .pressure(v.delta * CRITICAL_DENSITY_KG_PER_M3)
                    .pressure,
                liquid_density: l.delta * CRITICAL_DENSITY_KG_PER_M3,
                vapour_density: v.delta * CRITICAL_DENSITY_KG_PER_M3,
            });
        }
    }
    None
}
