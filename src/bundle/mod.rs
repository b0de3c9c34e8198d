//! Bundles: a project's whole record in one portable file (JSON Lines, docs/bundle-format.md),
//! checked line by line without a ledger. Pure: lines in, checked values out.

pub mod check;
pub mod line;
pub mod stop;

pub use check::Checker;
pub use line::{Item, Line};
