//! Chemistry for CO2 storage: the element table, formulas, the CO2 a mineral or rock can take
//! up, and the CO2 fraction of a gas stream.
//!
//! Pure functions of their inputs: no I/O, printing or clock, so every number can be checked
//! against a published value. Molar masses come from one table (`elements`), so CO2 is
//! 44.009 g/mol everywhere in the program.

pub mod conversion;
pub mod elements;
pub mod formula;
pub mod gas_mix;
pub mod mineral;
pub mod oxide_list;
pub mod oxides;

use elements::weight;

/// Molar mass of carbon, g/mol (the standard atomic weight of C).
pub const M_C: f64 = weight("C");

/// Molar mass of CO2, g/mol.
pub const M_CO2: f64 = weight("C") + 2.0 * weight("O");
