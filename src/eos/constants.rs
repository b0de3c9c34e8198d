//! Constants of the Span–Wagner (1996) equation of state for CO2.
//!
//! These are the values the equation was fitted with; using others (a newer gas constant, a molar
//! mass from newer atomic weights) would shift every density by a few parts per million.

/// Critical temperature, K.
pub const CRITICAL_TEMPERATURE_K: f64 = 304.1282;
/// Critical pressure, Pa.
pub const CRITICAL_PRESSURE_PA: f64 = 7.3773e6;
/// Critical density, kg/m³; the equation's reduced density is δ = ρ/ρc.
pub const CRITICAL_DENSITY_KG_PER_M3: f64 = 467.6;
/// Triple-point temperature, K: the lowest temperature the equation covers (solid CO2 below).
pub const TRIPLE_POINT_TEMPERATURE_K: f64 = 216.592;
/// Triple-point pressure, Pa.
pub const TRIPLE_POINT_PRESSURE_PA: f64 = 0.51795e6;
/// Molar gas constant the equation was fitted with, J/(mol K).
pub const MOLAR_GAS_CONSTANT: f64 = 8.314510;
/// Molar mass of CO2 the equation was fitted with, kg/mol.
pub const MOLAR_MASS_KG_PER_MOL: f64 = 0.0440098;
/// Specific gas constant R/M, J/(kg K).
pub const SPECIFIC_GAS_CONSTANT: f64 = MOLAR_GAS_CONSTANT / MOLAR_MASS_KG_PER_MOL;

/// Highest temperature of the equation's range of validity, K.
pub const MAX_TEMPERATURE_K: f64 = 1100.0;
/// Highest pressure of the equation's range of validity, Pa.
pub const MAX_PRESSURE_PA: f64 = 800e6;
/// Lowest pressure accepted, Pa. The gas is ideal far above this; below it the density
/// (about p / 2·10⁵ kg/m³ at 1100 K) would fall out of the normal range of an f64.
pub const MIN_PRESSURE_PA: f64 = 1e-300;

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn constants_are_the_published_ones() {
        // read: Span & Wagner 1996 constants, REFERENCES.md "CO2 density".
        assert_eq!(CRITICAL_TEMPERATURE_K, 304.1282);
        assert_eq!(CRITICAL_PRESSURE_PA, 7_377_300.0);
        assert_eq!(CRITICAL_DENSITY_KG_PER_M3, 467.6);
        assert_eq!(TRIPLE_POINT_TEMPERATURE_K, 216.592);
        assert_eq!(TRIPLE_POINT_PRESSURE_PA, 517_950.0);
        assert_eq!(MOLAR_GAS_CONSTANT, 8.31451);
        assert_eq!(MOLAR_MASS_KG_PER_MOL, 44.0098e-3);
        assert_eq!(MAX_TEMPERATURE_K, 1100.0);
        assert_eq!(MAX_PRESSURE_PA, 800e6);
        // computed: R/M.
        assert!((SPECIFIC_GAS_CONSTANT - 188.924_059).abs() < 1e-5);
    }
}
