//! Ancillary equations of Span & Wagner (1996) for the saturation line: quick estimates that pick
//! the phase far from the line and start the solvers. The full equation decides near the line.

use super::constants::{CRITICAL_DENSITY_KG_PER_M3, CRITICAL_PRESSURE_PA, CRITICAL_TEMPERATURE_K};

/// Vapour pressure, Pa, for a temperature below the critical one (Span & Wagner 1996, eq. 3.13;
/// from memory, checked against CoolProp's saturation pressure to 3e-5 from 220 to 304 K —
/// REFERENCES.md; within 4.2e-5 of the full equation's down to the triple point, tested in
/// `density`): ln(ps/pc) = (Tc/T) Σ aᵢ (1 − T/Tc)^tᵢ.
pub(super) fn vapour_pressure(temperature_k: f64) -> f64 {
    let x = 1.0 - temperature_k / CRITICAL_TEMPERATURE_K;
    let x2 = x * x;
    let sum = -7.0602087 * x + 1.9391218 * x * x.sqrt() - 1.6463597 * x2 - 3.2995634 * x2 * x2;
    CRITICAL_PRESSURE_PA * (CRITICAL_TEMPERATURE_K / temperature_k * sum).exp()
}

/// Saturated liquid and vapour densities, kg/m³, below the critical temperature: a starting
/// point for the saturation solve and the phase brackets only, never an answer (Span & Wagner
/// 1996, eqs. 3.14 and 3.15, from memory; they agree with the full equation's saturated
/// densities to 0.7 % for the liquid and 0.3 % for the vapour, worst a few µK below Tc, where
/// the phases meet): ln(ρ/ρc) = Σ aᵢ (1 − T/Tc)^tᵢ.
pub(super) fn saturated_densities(temperature_k: f64) -> (f64, f64) {
    let x = 1.0 - temperature_k / CRITICAL_TEMPERATURE_K;
    // Powers as exp(k ln x), faster than powf and cbrt; exponents 10/6, 11/6, 7/3 and 14/3 are
    // whole multiples of 1/6.
    let ln_x = x.ln();
    let x_034 = (0.34 * ln_x).exp();
    let x_half = x.sqrt();
    let sixth = (ln_x / 6.0).exp();
    let sixth2 = sixth * sixth;
    let sixth4 = sixth2 * sixth2;
    let x_10_6 = sixth4 * sixth4 * sixth2;
    let x_14_6 = x_10_6 * sixth4;
    let liquid =
        1.9245108 * x_034 - 0.62385555 * x_half - 0.32731127 * x_10_6 + 0.39245142 * x_10_6 * sixth;
    let vapour = -1.7074879 * x_034
        - 0.82274670 * x_half
        - 4.6008549 * x
        - 10.111178 * x_14_6
        - 29.742252 * x_14_6 * x_14_6;
    (
        CRITICAL_DENSITY_KG_PER_M3 * liquid.exp(),
        CRITICAL_DENSITY_KG_PER_M3 * vapour.exp(),
    )
}
