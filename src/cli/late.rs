//! Late adjustments in their own lines: what was recorded, after a period was sealed, about days
//! inside it. Each counts in the period it was recorded in, so the sealed figures stand; the
//! reports list them apart so a reader sees what came late and for which sealed period.

pub use crate::report::tables::late::late_table;
