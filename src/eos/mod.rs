//! Density of CO2 from the Span–Wagner (1996) equation of state (J. Phys. Chem. Ref. Data
//! 25:1509), the reference equation for CO2 from the triple point to 1100 K and 800 MPa.
//!
//! Pure: no I/O, no clock, no global state beyond constant tables. [`density`] solves for the
//! stable phase; [`ideal_gas_density`] is the baseline it is measured against.

mod ancillary;
mod coefficients;
pub mod constants;
mod density;
mod error;
mod ideal_gas;
mod melting;
mod saturation;
pub mod span_wagner;

pub use density::{Phase, State, density};
pub use error::EosError;
pub use ideal_gas::ideal_gas_density;
