//! The potential tables: the CO2 a rock's oxides or a mineral can take up, term by term.

use crate::chem::oxides::Term;
use crate::report::names;
use crate::report::{Cell, Column, Table, columns};

/// One formula's terms, each with the given share, its coefficient and its contribution, and
/// the total.
pub fn terms_table(
    (id, title): (&'static str, String),
    (figure, decimals): (Column, usize),
    terms: &[Term],
    total: f64,
) -> Table {
    let mut t = Table::new(
        id,
        title,
        columns(&[names::TERM, names::GIVEN_WT_PCT, names::COEFFICIENT, figure]),
    );
    for x in terms {
        t.push(vec![
            Cell::text(x.constituent.name()),
            Cell::Number(x.wt_pct, 3),
            Cell::Number(x.coefficient, 4),
            Cell::Number(x.value, decimals),
        ]);
    }
    t.push(vec![
        Cell::text("total"),
        Cell::Empty,
        Cell::Empty,
        Cell::Number(total, decimals),
    ]);
    t
}
