//! sinkbook: an append-only, tamper-evident ledger of CO2 stored underground and in rock.
//!
//! Layers (docs/architecture.md): `quantity` and `ledger` are pure; `store` is the only module
//! that speaks SQL, `report` the only one that formats for people, `cli` wires them.

pub mod accounting;
pub mod bundle;
pub mod chem;
pub mod cli;
pub mod eos;
pub mod error;
pub mod export;
pub mod import;
pub mod ledger;
pub mod quantity;
pub mod report;
pub mod store;
