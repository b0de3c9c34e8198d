//! Density of CO2 at a given temperature and pressure: the stable root of p(ρ) = p.
//!
//! Below the critical temperature an isotherm of the Span–Wagner equation rises along the vapour
//! branch, falls and wiggles (with huge swings at low temperature) inside the two-phase region, then
//! rises along the liquid branch. The solver therefore first decides the phase, then searches only
//! the stretch of density where that phase's branch is the one rising root.

mod search;

use search::{Branch, Search};
use std::fmt;

use super::ancillary::{saturated_densities, vapour_pressure};
use super::constants::{
    CRITICAL_DENSITY_KG_PER_M3, CRITICAL_PRESSURE_PA, CRITICAL_TEMPERATURE_K, MAX_PRESSURE_PA,
    MAX_TEMPERATURE_K, MIN_PRESSURE_PA, SPECIFIC_GAS_CONSTANT, TRIPLE_POINT_TEMPERATURE_K,
};
use super::error::EosError;
use super::melting::melting_pressure;
use super::peng_robinson::peng_robinson_densities;
use super::saturation::saturation;
use super::span_wagner::Isotherm;

/// Which phase the density belongs to.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Phase {
    /// Vapour below the critical temperature and saturation pressure, or any state at or above the
    /// critical temperature below the critical pressure.
    Gas,
    /// Below the critical temperature, above the saturation pressure (including above the
    /// critical pressure: compressed liquid).
    Liquid,
    /// At or above both the critical temperature and the critical pressure.
    Supercritical,
}

impl fmt::Display for Phase {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(match self {
            Phase::Gas => "gas",
            Phase::Liquid => "liquid",
            Phase::Supercritical => "supercritical",
        })
    }
}

/// A solved state of CO2.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct State {
    pub temperature_k: f64,
    pub pressure_pa: f64,
    /// Density, kg/m³.
    pub density_kg_per_m3: f64,
    pub phase: Phase,
    /// Compressibility factor Z = p / (ρ R T); 1 for an ideal gas.
    pub compressibility_factor: f64,
}

/// Within this relative distance of the ancillary vapour pressure the saturation pressure is
/// worked out from the full equation to choose the phase: over 100 times the ancillary's error.
const NEAR_SATURATION: f64 = 0.005;
/// States this close (relatively) to the saturation pressure are refused as two-phase. The
/// saturation pressure and the pressure along either branch are exact to about 1e-13, so 1e-9
/// leaves a wide margin, and is far finer than any pressure measurement.
const ON_SATURATION_LINE: f64 = 1e-9;
/// From 303.7 to 303.9 K a loop of the two-phase region reaches up to the liquid spinodal, past
/// the ancillary brackets; from here to Tc the brackets come from the saturation line instead.
const LOOPS_NEAR_SPINODAL_K: f64 = 303.0;
/// A density no fluid state in range reaches: p exceeds 800 MPa there at every temperature.
const DENSITY_CEILING_KG_PER_M3: f64 = 1800.0;

/// Density of CO2 by the Span–Wagner (1996) equation at `temperature_k` (216.592–1100 K) and
/// `pressure_pa` (up to 800 MPa, below the melting pressure), in the stable phase.
pub fn density(temperature_k: f64, pressure_pa: f64) -> Result<State, EosError> {
    check_range(temperature_k, pressure_pa)?;
    let (density, phase) = solve_state(temperature_k, pressure_pa)?;
    Ok(State {
        temperature_k,
        pressure_pa,
        density_kg_per_m3: density,
        phase,
        compressibility_factor: pressure_pa / (density * SPECIFIC_GAS_CONSTANT * temperature_k),
    })
}

/// Refuses non-finite values and states outside the equation's range (the negated comparisons
/// also catch NaN).
fn check_range(temperature_k: f64, pressure_pa: f64) -> Result<(), EosError> {
    if !(TRIPLE_POINT_TEMPERATURE_K..=MAX_TEMPERATURE_K).contains(&temperature_k) {
        return Err(EosError::TemperatureOutOfRange { temperature_k });
    }
    if !(MIN_PRESSURE_PA..=MAX_PRESSURE_PA).contains(&pressure_pa) {
        return Err(EosError::PressureOutOfRange { pressure_pa });
    }
    let melting_pressure_pa = melting_pressure(temperature_k);
    if pressure_pa > melting_pressure_pa {
        return Err(EosError::Solid {
            temperature_k,
            pressure_pa,
            melting_pressure_pa,
        });
    }
    Ok(())
}

/// Density and phase of a state already checked to be in range.
fn solve_state(temperature_k: f64, pressure_pa: f64) -> Result<(f64, Phase), EosError> {
    let isotherm = Isotherm::new(temperature_k);
    let (vapour_like, liquid_like) = peng_robinson_densities(temperature_k, pressure_pa);
    if temperature_k >= CRITICAL_TEMPERATURE_K {
        // One phase: the isotherm rises everywhere, so it crosses the pressure exactly once.
        let phase = if pressure_pa >= CRITICAL_PRESSURE_PA {
            Phase::Supercritical
        } else {
            Phase::Gas
        };
        let search = Search {
            branch: Branch::Vapour,
            bracket: (0.0, DENSITY_CEILING_KG_PER_M3),
            start: vapour_like,
            phase,
        };
        // The bracket always holds the root; were it missed by rounding, the closest density
        // found is the answer.
        return Ok(search
            .run(&isotherm, pressure_pa)
            .unwrap_or_else(|closest| closest));
    }

    let (liquid, vapour) = saturated_densities(temperature_k);
    let ancillary_pressure = vapour_pressure(temperature_k);
    let near_saturation = (pressure_pa / ancillary_pressure - 1.0).abs() < NEAR_SATURATION;
    // The full equation's saturation line decides the phase where the ancillary is too coarse
    // and gives the brackets where the ancillary ones are unsafe. It is out of reach only
    // within about 3 µK of Tc, where the ancillary takes over (see below).
    let sat = if near_saturation || temperature_k >= LOOPS_NEAR_SPINODAL_K {
        saturation(&isotherm, liquid, vapour)
    } else {
        None
    };
    let (is_vapour, (vapour_bracket, liquid_bracket), (vapour_start, liquid_start)) = match sat {
        Some(sat) => {
            let distance = (pressure_pa - sat.pressure_pa) / sat.pressure_pa;
            if distance.abs() <= ON_SATURATION_LINE {
                return Err(EosError::OnSaturationLine {
                    temperature_k,
                    saturation_pressure_pa: sat.pressure_pa,
                });
            }
            // Each saturated phase ends its stable branch, so nothing but that branch lies
            // between it and zero density or the ceiling.
            let brackets = (
                (0.0, sat.vapour_density),
                (sat.liquid_density, DENSITY_CEILING_KG_PER_M3),
            );
            let starts = if near_saturation {
                (sat.vapour_density, sat.liquid_density)
            } else {
                (vapour_like, liquid_like)
            };
            (distance < 0.0, brackets, starts)
        }
        None => (
            pressure_pa < ancillary_pressure,
            ancillary_brackets(liquid, vapour),
            (vapour_like, liquid_like),
        ),
    };

    let vapour = Search {
        branch: Branch::Vapour,
        bracket: vapour_bracket,
        start: vapour_start,
        phase: Phase::Gas,
    };
    let liquid = Search {
        branch: Branch::Liquid,
        bracket: liquid_bracket,
        start: liquid_start,
        phase: Phase::Liquid,
    };
    let (chosen, other) = if is_vapour {
        (vapour, liquid)
    } else {
        (liquid, vapour)
    };
    // A branch has no root when the pressure lies beyond its spinodal (the top of the vapour
    // branch, the bottom of the liquid one). That happens only where the ancillary decided,
    // within microkelvins of Tc, a state it cannot tell from the saturation pressure; the other
    // phase is then the stable one.
    Ok(chosen
        .run(&isotherm, pressure_pa)
        .or_else(|_| other.run(&isotherm, pressure_pa))
        .unwrap_or_else(|closest| closest))
}

/// Density brackets, kg/m³, for the vapour and the liquid branch below the critical temperature,
/// from the ancillary saturated densities. Searching the vapour branch no further than halfway
/// from the saturated vapour to the critical density, and the liquid branch from halfway between
/// the critical density and the saturated liquid, keeps clear of the loops inside the two-phase
/// region, which lie nearer the critical density below [`LOOPS_NEAR_SPINODAL_K`] and within a few
/// µK of Tc (checked in the tests).
fn ancillary_brackets(liquid: f64, vapour: f64) -> ((f64, f64), (f64, f64)) {
    (
        (0.0, 0.5 * (vapour + CRITICAL_DENSITY_KG_PER_M3)),
        (
            0.5 * (liquid + CRITICAL_DENSITY_KG_PER_M3),
            DENSITY_CEILING_KG_PER_M3,
        ),
    )
}
#[cfg(test)]
mod tests;
