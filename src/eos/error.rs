//! Why a density could not be given.

use std::fmt;

use super::constants::{MIN_PRESSURE_PA, TRIPLE_POINT_TEMPERATURE_K};

/// A state the Span–Wagner equation cannot answer for.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum EosError {
    /// The temperature is not a number, or lies outside 216.592–1100 K.
    TemperatureOutOfRange { temperature_k: f64 },
    /// The pressure is not a number, or lies outside (0, 800 MPa].
    PressureOutOfRange { pressure_pa: f64 },
    /// The pressure is above the melting pressure at this temperature: CO2 is solid there.
    Solid {
        temperature_k: f64,
        pressure_pa: f64,
        melting_pressure_pa: f64,
    },
    /// Liquid and vapour coexist at this state, so it has no single density.
    OnSaturationLine {
        temperature_k: f64,
        saturation_pressure_pa: f64,
    },
}

/// A number as people write it, switching to exponent form for the very large and very small
/// values an out-of-range input can have.
struct Number(f64);

impl fmt::Display for Number {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        let magnitude = self.0.abs();
        if magnitude == 0.0 || (1e-3..1e12).contains(&magnitude) || !magnitude.is_finite() {
            write!(f, "{}", self.0)
        } else {
            write!(f, "{:e}", self.0)
        }
    }
}

impl fmt::Display for EosError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match *self {
            EosError::TemperatureOutOfRange { temperature_k } => {
                let t = Number(temperature_k);
                if temperature_k.is_nan() {
                    write!(f, "temperature is not a number")
                } else {
                    write!(
                        f,
                        "temperature {t} K is outside the Span–Wagner range 216.592–1100 K"
                    )?;
                    if temperature_k < TRIPLE_POINT_TEMPERATURE_K {
                        write!(f, ": CO2 is solid below the triple point")?;
                    }
                    Ok(())
                }
            }
            EosError::PressureOutOfRange { pressure_pa } => {
                let p = Number(pressure_pa);
                if pressure_pa.is_nan() {
                    write!(f, "pressure is not a number")
                } else if pressure_pa > 0.0 && pressure_pa < MIN_PRESSURE_PA {
                    write!(
                        f,
                        "pressure {p} Pa is below {MIN_PRESSURE_PA:e} Pa, too low for a representable density"
                    )
                } else {
                    write!(
                        f,
                        "pressure {p} Pa is outside the Span–Wagner range 0 < p ≤ 800 MPa"
                    )
                }
            }
            EosError::Solid {
                temperature_k,
                pressure_pa,
                melting_pressure_pa,
            } => write!(
                f,
                "pressure {} Pa at {temperature_k} K is above the melting pressure \
                 {melting_pressure_pa:.0} Pa: CO2 is solid there, outside the Span–Wagner fluid range",
                Number(pressure_pa)
            ),
            EosError::OnSaturationLine {
                temperature_k,
                saturation_pressure_pa,
            } => write!(
                f,
                "{temperature_k} K at the saturation pressure {saturation_pressure_pa:.0} Pa: liquid \
                 and vapour coexist, so the state has no single density"
            ),
        }
    }
}

impl std::error::Error for EosError {}
