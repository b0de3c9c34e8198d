//! Accounting methods over ledger entries. Pure: values in, values out.

pub mod balance;
pub mod leakage;
pub mod metering;
pub mod permit;
