//! The tables commands show, built from the figures the pure modules compute: one file per
//! topic. cli parses and calls; these decide columns, rows and notes.

pub mod mineralization;
