//! Density of CO2 from the Span–Wagner (1996) equation of state (J. Phys. Chem. Ref. Data
//! 25:1509), the reference equation for CO2 from the triple point to 1100 K and 800 MPa.
//!
//! [`density()`] gives the density of the stable phase at a temperature and pressure, with the
//! phase and the compressibility factor, or an [`EosError`] for states outside the fluid range
//! (beyond 216.592–1100 K or 800 MPa, above the melting pressure) and for states on the
//! saturation line. [`ideal_gas_density`] is the baseline it is measured against.
//!
//! Pure: no I/O, no clock, no state beyond constant tables.

mod ancillary;
mod coefficients;
pub mod constants;
mod density;
mod error;
mod ideal_gas;
mod melting;
mod peng_robinson;
mod saturation;
mod span_wagner;
mod table_layout;

pub use density::{Phase, State, density};
pub use error::EosError;
pub use ideal_gas::ideal_gas_density;
