//! The Peng–Robinson (1976) cubic equation of state, solved in closed form: densities within a
//! few per cent of the Span–Wagner ones for dense states, used only to start Newton's method
//! close to the root. An error here costs an iteration, never accuracy.

use super::constants::{CRITICAL_PRESSURE_PA, CRITICAL_TEMPERATURE_K, SPECIFIC_GAS_CONSTANT};

/// Acentric factor of CO2 (from memory; CoolProp 8.0.0 gives the same, 0.22394).
const ACENTRIC_FACTOR: f64 = 0.22394;

/// Peng–Robinson densities, kg/m³, at a temperature and pressure: the vapour-like (smallest
/// density) and the liquid-like (largest density) root, equal where the cubic has one real root.
/// The constants are those of Peng & Robinson (1976), from memory.
pub(super) fn peng_robinson_densities(temperature_k: f64, pressure_pa: f64) -> (f64, f64) {
    let rt = SPECIFIC_GAS_CONSTANT * temperature_k;
    let kappa = 0.37464 + 1.54226 * ACENTRIC_FACTOR - 0.26992 * ACENTRIC_FACTOR * ACENTRIC_FACTOR;
    let alpha = (1.0 + kappa * (1.0 - (temperature_k / CRITICAL_TEMPERATURE_K).sqrt())).powi(2);
    let rtc = SPECIFIC_GAS_CONSTANT * CRITICAL_TEMPERATURE_K;
    let a = 0.45724 * rtc * rtc / CRITICAL_PRESSURE_PA * alpha * pressure_pa / (rt * rt);
    let b = 0.07780 * rtc / CRITICAL_PRESSURE_PA * pressure_pa / rt;
    // Z³ + c2 Z² + c1 Z + c0 = 0; with Z = x − c2/3 it becomes x³ + p x + q = 0.
    let c2 = b - 1.0;
    let c1 = a - 3.0 * b * b - 2.0 * b;
    let c0 = b * b * b + b * b - a * b;
    let p = c1 - c2 * c2 / 3.0;
    let q = 2.0 * c2 * c2 * c2 / 27.0 - c2 * c1 / 3.0 + c0;
    let discriminant = q * q / 4.0 + p * p * p / 27.0;
    let (smallest, largest) = if discriminant > 0.0 {
        // Cardano: x = u + v with u v = −p/3 and u³ the root of larger size of
        // w² + q w − p³/27 = 0 (no cancellation).
        let w = -q / 2.0 - q.signum() * discriminant.sqrt();
        // The cube root as exp(ln |w| / 3), faster than cbrt.
        let u = ((w.abs().ln() / 3.0).exp()).copysign(w);
        let x = if u == 0.0 { 0.0 } else { u - p / (3.0 * u) };
        (x, x)
    } else {
        // Three real roots (Viète's trigonometric form); p < 0 here.
        let m = 2.0 * (-p / 3.0).sqrt();
        let angle = (3.0 * q / (p * m)).clamp(-1.0, 1.0).acos() / 3.0;
        (
            m * (angle + 2.0 * std::f64::consts::FRAC_PI_3).cos(),
            m * angle.cos(),
        )
    };
    // The vapour has the largest compressibility factor, the liquid the smallest; a root at or
    // below b (a volume below the co-volume) has no physical meaning.
    let z_vapour = largest - c2 / 3.0;
    let z_liquid = Some(smallest - c2 / 3.0)
        .filter(|&z| z > b)
        .unwrap_or(z_vapour);
    (pressure_pa / (z_vapour * rt), pressure_pa / (z_liquid * rt))
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::eos::constants::{MAX_PRESSURE_PA, MAX_TEMPERATURE_K, TRIPLE_POINT_TEMPERATURE_K};

    #[test]
    fn roots_are_positive_and_finite_over_the_whole_range() {
        for i in 0..=100 {
            let t = TRIPLE_POINT_TEMPERATURE_K
                + (MAX_TEMPERATURE_K - TRIPLE_POINT_TEMPERATURE_K) * f64::from(i) / 100.0;
            for j in 0..=100 {
                let p = 1e-300_f64.powf(1.0 - f64::from(j) / 100.0)
                    * MAX_PRESSURE_PA.powf(f64::from(j) / 100.0);
                let (vapour, liquid) = peng_robinson_densities(t, p);
                assert!(
                    vapour.is_finite() && vapour > 0.0 && liquid >= vapour,
                    "{t} K, {p} Pa"
                );
            }
        }
    }

    #[test]
    fn two_phase_states_get_both_roots() {
        // Within a few per cent of the Span–Wagner densities at 250 K, 1 MPa: gas 23.4 kg/m³
        // (computed with CoolProp 8.0.0) and, as the liquid-like root, a liquid near the
        // saturated liquid's 1046 kg/m³.
        let (vapour, liquid) = peng_robinson_densities(250.0, 1e6);
        assert!((vapour / 23.435 - 1.0).abs() < 0.05, "{vapour}");
        assert!((liquid / 1046.0 - 1.0).abs() < 0.1, "{liquid}");
    }
}
