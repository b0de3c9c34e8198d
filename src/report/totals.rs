//! The regulator's totals table: one line per project (or per project and year), and the line
//! of all of them, each figure by route.

use super::names;
use super::tables::claims::backdated_notes;
use super::{Cell, Table, columns};
use crate::accounting::project_view::{AcrossProjects, ProjectFigures, TotalsLine, ViewError};
use crate::ledger::Project;
use crate::quantity::Mass;

/// The totals of `views` (one line each, or one per year with `by_year`), the line of all of
/// them and the notes, with the backdated settings each project's claim periods use.
pub fn table(
    views: &[ProjectFigures],
    across: &AcrossProjects,
    by_year: bool,
) -> Result<Table, ViewError> {
    let mut t = empty();
    let mut backdated = Vec::new();
    for (v, totals) in views.iter().zip(&across.each) {
        for note in backdated_notes(v, &v.periods(v.claim_period())?) {
            backdated.push(format!("{}: {note}", v.project().code));
        }
        if by_year {
            for (year, line) in &totals.years {
                project_row(&mut t, v.project(), Some(*year), line, None);
            }
        } else {
            project_row(&mut t, v.project(), None, &totals.total, totals.headroom);
        }
    }
    all_row(&mut t, &across.all);
    notes(&mut t, backdated, by_year);
    Ok(t)
}

/// The table, without rows.
fn empty() -> Table {
    Table::new(
        "totals",
        "Totals across projects",
        columns(&[
            names::PROJECT,
            names::YEAR,
            names::METHOD,
            names::OPERATOR,
            names::PERMIT,
            names::RECEIVED_T,
            names::INJECTED_T,
            names::STORED_GEOLOGICAL_T,
            names::MINERALIZED_T,
            names::WEATHERING_NET_REMOVAL_T,
            names::CONSERVATIVE_T,
            names::DURABLE_T,
            names::BUFFER_HELD_T,
            names::CLAIMABLE_GEOLOGICAL_T,
            names::CLAIMABLE_MINERALIZED_T,
            names::CLAIMABLE_WEATHERING_T,
            names::REVERSED_T,
            names::HEADROOM_T,
        ]),
    )
}

/// A project's line (of a year, where given), with its headroom where it has one.
fn project_row(
    t: &mut Table,
    p: &Project,
    year: Option<i32>,
    line: &TotalsLine,
    headroom: Option<Mass>,
) {
    let mut row = vec![
        Cell::text(&p.code),
        year.map_or(Cell::Empty, |y| Cell::text(y.to_string())),
        Cell::text(p.method.name()),
        Cell::text(&p.operator),
        Cell::opt_text(p.permit_ref.as_deref()),
    ];
    row.extend(cells(line));
    row.push(headroom.map_or(Cell::Empty, Cell::Tonnes));
    t.push(row);
}

/// The line of all the projects.
fn all_row(t: &mut Table, all: &TotalsLine) {
    let mut row = vec![
        Cell::text("all"),
        Cell::Empty,
        Cell::Empty,
        Cell::Empty,
        Cell::Empty,
    ];
    row.extend(cells(all));
    row.push(Cell::Empty);
    t.push(row);
}

/// What the figures are, the backdated settings they use, and how reversals count.
fn notes(t: &mut Table, backdated: Vec<String>, by_year: bool) {
    t.note("Stored and claimable by route, never added across routes: geological, the 40 CFR 98.443 mass balance of injection projects (basalt mineralization counts here: the CO2 injected and kept, mineralized or not); mineralized, the carbonation uptake of ex-situ projects less their emissions; weathering net removal, removal less the project's emissions (default settings). Conservative, durable, buffer and claimable as each project's settings in force set them.");
    for note in backdated {
        t.note(note);
    }
    if !by_year {
        t.note("Buffer and claimable are net of what reversals cancelled (buffer first, then claimable), in the year of the reversal, so the years add up to the project's line.");
    }
}

fn cells(l: &TotalsLine) -> Vec<Cell> {
    l.figures().map(Cell::Tonnes).to_vec()
}
