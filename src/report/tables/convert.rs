//! The conversion table: a quantity, what it converts to and how.

use crate::report::names;
use crate::report::{Cell, Table, columns};

/// `quantity` of `species` converted: the result, its unit and the working.
pub fn conversion_table(
    quantity: &str,
    species: &str,
    (result, unit, how): (f64, &str, &str),
) -> Table {
    let mut t = Table::new(
        "conversion",
        "Conversion",
        columns(&[
            names::QUANTITY,
            names::SPECIES,
            names::RESULT,
            names::UNIT,
            names::HOW,
        ]),
    );
    t.push(vec![
        Cell::text(quantity),
        Cell::text(species),
        Cell::Number(result, 6),
        Cell::text(unit),
        Cell::text(how),
    ]);
    t.note(
        "Molar masses from CIAAW 2021 abridged atomic weights; unit factors exact (NIST SP 811).",
    );
    t
}
