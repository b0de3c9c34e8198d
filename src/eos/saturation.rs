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
struct PhasePoint {
    delta: f64,
    j: f64,
    k: f64,
    j_d: f64,
}

impl PhasePoint {
    fn at(isotherm: &Isotherm, delta: f64) -> Self {
        let r = isotherm.residual(delta);
        PhasePoint {
            delta,
            j: delta * (1.0 + r.delta_phi_d),
            k: r.delta_phi_d + r.phi + delta.ln(),
            j_d: 1.0 + 2.0 * r.delta_phi_d + r.delta2_phi_dd,
        }
    }
}

/// Iterations allowed; from the ancillary densities it typically takes 4 to 8.
const MAX_ITERATIONS: usize = 60;
/// Converged when the densities move by less than this, relatively, in one step: the next step
/// would be of the order of its square.
const TOLERANCE: f64 = 1e-10;
/// Within millikelvins of the critical point the two phases differ so little that rounding
/// stops the steps from shrinking below about 1e-8. Steps smaller than this that no longer halve
/// have reached that floor; the pressure hardly moves with them, the isotherm being nearly flat.
const NOISE_FLOOR: f64 = 1e-6;

/// The saturation state along an isotherm below the critical temperature, from estimates of the
/// two densities (kg/m³), or `None` when Newton's method does not converge to two distinct,
/// mechanically stable phases (only a hair's breadth below the critical temperature, where the
/// phases become one).
pub(super) fn saturation(isotherm: &Isotherm, liquid: f64, vapour: f64) -> Option<Saturation> {
    let mut l = PhasePoint::at(isotherm, liquid / CRITICAL_DENSITY_KG_PER_M3);
    let mut v = PhasePoint::at(isotherm, vapour / CRITICAL_DENSITY_KG_PER_M3);
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
        l = PhasePoint::at(isotherm, l.delta + scale * step_l);
        v = PhasePoint::at(isotherm, v.delta + scale * step_v);
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

#[cfg(test)]
mod tests {
    use super::*;
    use crate::eos::ancillary::saturated_densities;
    use crate::eos::constants::CRITICAL_TEMPERATURE_K;

    fn at(temperature_k: f64) -> Option<Saturation> {
        let (liquid, vapour) = saturated_densities(temperature_k);
        saturation(&Isotherm::new(temperature_k), liquid, vapour)
    }

    #[test]
    fn saturation_states_agree_with_coolprop() {
        // computed with CoolProp 8.0.0 (PropsSI "P" and "D" at Q = 0 and 1), same equation.
        // CoolProp reduces density by 467.600001 kg/m³, which puts its pressures 2.7e-9 higher.
        let cases = [
            (216.592, 517_964.343_345, 1_178.462_643_2, 13.760_885_01),
            (250.0, 1_785_044.242_825, 1_045.972_130_2, 46.644_014_47),
            (300.0, 6_713_078.062_910, 679.239_165_2, 268.583_657_4),
            (304.0, 7_355_525.693_873, 530.302_217_3, 406.424_240_5),
        ];
        for (t, p, liquid, vapour) in cases {
            let sat = at(t).unwrap();
            assert!(
                (sat.pressure_pa / p - 1.0).abs() < 5e-9,
                "{t} K: {}",
                sat.pressure_pa
            );
            assert!((sat.liquid_density / liquid - 1.0).abs() < 1e-8, "{t} K");
            assert!((sat.vapour_density / vapour - 1.0).abs() < 1e-8, "{t} K");
        }
    }

    #[test]
    fn both_phases_have_equal_pressure_and_gibbs_energy() {
        for t in [220.0, 260.0, 295.0, 304.1] {
            let sat = at(t).unwrap();
            let isotherm = Isotherm::new(t);
            let l = PhasePoint::at(&isotherm, sat.liquid_density / CRITICAL_DENSITY_KG_PER_M3);
            let v = PhasePoint::at(&isotherm, sat.vapour_density / CRITICAL_DENSITY_KG_PER_M3);
            assert!(
                (l.j / v.j - 1.0).abs() < 1e-10 && (l.k - v.k).abs() < 1e-10,
                "{t} K"
            );
            assert!(l.j_d > 0.0 && v.j_d > 0.0);
        }
    }

    #[test]
    fn gives_up_cleanly_at_the_critical_point() {
        for dt in [1e-7, 1e-9, 0.0] {
            assert!(at(CRITICAL_TEMPERATURE_K - dt).is_none());
        }
    }
}
