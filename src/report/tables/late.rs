//! The late-adjustments table: entries recorded after the period they cover was sealed.

use crate::accounting::project_view::ProjectFigures;
use crate::ledger::Entry;
use crate::ledger::reading_fields::checked;
use crate::ledger::seal::{late_for, late_replaces};
use crate::report::names;
use crate::report::{Cell, Table, columns};

/// The late adjustments of every project of `views`, one row each; None when there are none.
pub fn late_of<'a>(views: impl IntoIterator<Item = &'a ProjectFigures>) -> Option<Table> {
    late_table(
        views
            .into_iter()
            .flat_map(|v| v.listed().map(move |e| (v.project().code.as_str(), e))),
    )
}

/// The late adjustments among `entries` (project code, entry), one row each; None when there are
/// none.
pub fn late_table<'a>(entries: impl IntoIterator<Item = (&'a str, &'a Entry)>) -> Option<Table> {
    let mut t = Table::new(
        "late_adjustments",
        "Late adjustments",
        columns(&[
            names::PROJECT,
            names::SEQ,
            names::SEALED_PERIOD,
            names::KIND,
            names::SITE,
            names::PERIOD_FROM,
            names::PERIOD_TO,
            names::SIGN,
            names::ENTRY_T,
            names::CORRECTS,
            names::RECORDED_AT,
        ]),
    );
    for (project, e) in entries {
        let Some(sealed) = late_for(e) else {
            continue;
        };
        let day =
            |name| checked(e.reading.day(name)).map_or(Cell::Empty, |d| Cell::text(d.to_string()));
        t.push(vec![
            Cell::text(project),
            Cell::Int(e.seq as i64),
            Cell::text(sealed),
            Cell::text(e.kind.name()),
            Cell::text(&e.site),
            day("late_from"),
            day("late_to"),
            Cell::text(e.sign.name()),
            Cell::Tonnes(e.mass),
            late_replaces(e).map_or(Cell::Empty, |s| Cell::Int(s as i64)),
            Cell::text(e.recorded_at.format("%Y-%m-%d %H:%M:%S").to_string()),
        ]);
    }
    if t.rows.is_empty() {
        return None;
    }
    t.note("Recorded after the period they are about was sealed. Each counts on the day it was recorded, in an open period, so the sealed figures stand as sealed; Period from and to are the days its reading covers. A late correction is kept as the difference it makes to the entry it corrects (Corrects), which stays as sealed.");
    Some(t)
}
