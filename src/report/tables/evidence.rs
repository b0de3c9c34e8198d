//! The table of a meter's imported readings on one day, re-read from the files kept.

use crate::import::plan::WatchedRow;
use crate::report::names;
use crate::report::{Cell, Table, columns};
use chrono::NaiveDate;

/// Why `readings` found nothing to show.
pub fn no_readings_line(project: &str, meter: &str, day: NaiveDate) -> String {
    format!("no imported readings of meter {meter} on {day} in project {project}")
}

/// The rows of meter `meter` on `day` found in each import (its id and file name).
pub fn readings_table(
    project: &str,
    meter: &str,
    day: NaiveDate,
    found: Vec<(i64, String, WatchedRow)>,
) -> Table {
    let mut t = Table::new(
        "readings",
        format!("Readings of meter {} on {day}, project {}", meter, project),
        columns(&[
            names::IMPORT,
            names::FILE,
            names::LINE,
            names::TIMESTAMP,
            names::QUANTITY,
            names::UNIT,
            names::CO2_FRACTION,
            names::CO2_T,
        ]),
    );
    for (id, file, w) in found {
        t.push(vec![
            Cell::Int(id),
            Cell::text(file),
            Cell::Int(w.line as i64),
            Cell::text(w.timestamp),
            Cell::text(w.quantity),
            Cell::text(w.unit),
            Cell::text(w.co2_fraction),
            Cell::Tonnes(w.co2),
        ]);
    }
    t.note("Re-read from the files' bytes as kept by the ledger, whose SHA-256 `verify` checks.");
    t
}
