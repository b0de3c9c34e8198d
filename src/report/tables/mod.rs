//! The tables commands show, built from the figures the pure modules compute: one file per
//! topic. cli parses and calls; these decide columns, rows and notes.

pub mod annual;
pub mod balance;
pub mod bundle;
pub mod chart;
pub mod claims;
pub mod convert;
pub mod dates;
pub mod demo;
pub mod density;
pub mod entries;
pub mod evidence;
pub mod feedstock;
pub mod import;
pub mod late;
pub mod mineralization;
pub mod permit;
pub mod potential;
pub mod proof;
pub mod reconcile;
pub mod reconciliations;
pub mod record;
pub mod registry;
pub mod rock_findings;
pub mod seal;
pub mod settings;
pub mod setup;
pub mod sign;
pub mod verify;
pub mod weathering;
