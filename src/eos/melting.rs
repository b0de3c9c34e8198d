//! The melting line: above it CO2 is solid, outside the fluid range the Span–Wagner equation covers.

use super::constants::{TRIPLE_POINT_PRESSURE_PA, TRIPLE_POINT_TEMPERATURE_K};

/// Melting pressure, Pa, at a temperature at or above the triple point (Span & Wagner 1996,
/// eq. 3.10, from memory; it equals CoolProp's melting line for CO2 to rounding from 216.592 to
/// 330 K): pm/pt = 1 + 1955.5390 (T/Tt − 1) + 2055.4593 (T/Tt − 1)².
pub(super) fn melting_pressure(temperature_k: f64) -> f64 {
    let x = temperature_k / TRIPLE_POINT_TEMPERATURE_K - 1.0;
    TRIPLE_POINT_PRESSURE_PA * (1.0 + 1955.5390 * x + 2055.4593 * x * x)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn melting_line() {
        // read: it starts at the triple point (Span & Wagner 1996 constants).
        assert_eq!(
            melting_pressure(TRIPLE_POINT_TEMPERATURE_K),
            TRIPLE_POINT_PRESSURE_PA
        );
        // computed with CoolProp 8.0.0 (AbstractState melting_line): 182.0759 MPa at 250 K,
        // 548.4474 MPa at 300 K.
        assert!((melting_pressure(250.0) / 182_075_910.245_213 - 1.0).abs() < 1e-12);
        assert!((melting_pressure(300.0) / 548_447_421.146_881 - 1.0).abs() < 1e-12);
    }
}
