//! Accounting methods over ledger entries. Pure: values in, values out.

pub mod balance;
pub mod buffer_pool;
pub mod carbonation;
pub mod claims;
pub mod conservative;
pub mod input;
pub mod inventory;
pub mod leak_start;
pub mod leakage;
pub mod lifecycle;
pub mod materiality;
pub mod meter_quarters;
pub mod metering;
pub mod permanence;
pub mod permit;
pub mod project_view;
pub mod restatement;
pub mod rock_record;
pub mod tracer;
pub mod uncertainty;
pub mod weathering;
