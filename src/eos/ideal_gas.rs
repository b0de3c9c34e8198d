//! The ideal-gas density, ρ = p M / (R T): the baseline the Span–Wagner density is timed and
//! compared against, and the low-pressure limit it must reach.

use super::constants::SPECIFIC_GAS_CONSTANT;

/// Ideal-gas density of CO2, kg/m³, with the Span–Wagner gas constant and molar mass. No range
/// check: the formula holds for any positive temperature, however poorly at high pressure.
pub fn ideal_gas_density(temperature_k: f64, pressure_pa: f64) -> f64 {
    pressure_pa / (SPECIFIC_GAS_CONSTANT * temperature_k)
}
