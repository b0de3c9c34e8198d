//! Everything formatted for people or programs: the only module that renders.

pub mod chart;
pub mod html;
pub mod render;
pub mod table;

pub use render::{CAUTIONS, Format, render};
pub use table::{Cell, Column, Report, Table, columns};
