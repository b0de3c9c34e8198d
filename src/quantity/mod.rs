//! Quantities as the ledger keeps them: exact decimals, grams of CO2, fractions.

pub mod area;
pub mod conditions;
pub mod decimal;
pub mod fraction;
pub mod mass;
pub mod measure;
pub mod share;
pub mod volume;

pub use decimal::Decimal;
pub use fraction::Fraction;
pub use mass::{Mass, MassReading, MassUnit};
