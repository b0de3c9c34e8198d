//! The ideal-gas density, ρ = p M / (R T): the baseline the Span–Wagner density is timed and
//! compared against, and the low-pressure limit it must reach.

use super::constants::SPECIFIC_GAS_CONSTANT;

/// Ideal-gas density of CO2, kg/m³, with the Span–Wagner gas constant and molar mass. No range
/// check: the formula holds for any positive temperature, however poorly at high pressure.
pub fn ideal_gas_density(temperature_k: f64, pressure_pa: f64) -> f64 {
    pressure_pa / (SPECIFIC_GAS_CONSTANT * temperature_k)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn ideal_gas_at_standard_conditions() {
        // computed: p M / (R T) with R = 8.31451 J/(mol K), M = 44.0098 g/mol (REFERENCES.md).
        let rho = ideal_gas_density(273.15, 101_325.0);
        assert!((rho - 101_325.0 * 0.044_009_8 / (8.314_51 * 273.15)).abs() < 1e-12);
        assert!((rho - 1.963_488).abs() < 1e-6);
    }
}
