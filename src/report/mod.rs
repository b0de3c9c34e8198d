//! Everything formatted for people or programs: the only module that renders.

pub mod render;
pub mod table;

pub use render::{render, Format, CAUTIONS};
pub use table::{columns, Cell, Column, Report, Table};
