//! Everything formatted for people or programs: the only module that renders.

pub mod balance;
pub mod chart;
mod fit;
pub mod generated;
pub mod html;
pub mod layout;
pub mod meters;
pub mod names;
mod people;
pub mod progress;
pub mod render;
pub mod stream;
pub mod table;
pub mod tables;
pub mod totals;
mod wrap;

pub use layout::{Layout, Terminal};
pub use render::{CAUTIONS, Format, render, render_with};
pub use table::{Cell, Column, Report, Table, columns};
