//! Accounting methods over ledger entries. Pure: values in, values out.

pub mod balance;
pub mod leakage;
pub mod metering;
pub mod permit;

pub mod carbonation;
pub mod input;
pub mod lifecycle;
pub mod tracer;
pub mod weathering;
