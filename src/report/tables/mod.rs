//! The tables commands show, built from the figures the pure modules compute: one file per
//! topic. cli parses and calls; these decide columns, rows and notes.

pub mod bundle;
pub mod convert;
pub mod demo;
pub mod density;
pub mod evidence;
pub mod feedstock;
pub mod late;
pub mod mineralization;
pub mod permit;
pub mod potential;
pub mod proof;
pub mod reconciliations;
pub mod record;
pub mod registry;
pub mod settings;
pub mod setup;
pub mod sign;
pub mod weathering;
