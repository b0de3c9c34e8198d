//! Accounting methods over ledger entries. Pure: values in, values out.

pub mod balance;
pub mod buffer_pool;
pub mod claims;
pub mod conservative;
pub mod leakage;
pub mod materiality;
pub mod metering;
pub mod permanence;
pub mod permit;
pub mod uncertainty;
