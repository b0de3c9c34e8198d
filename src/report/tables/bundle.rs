//! The table summing up a bundle written, checked or loaded.

use crate::bundle::line::Trailer;
use crate::report::names;
use crate::report::{Cell, Table, columns};

/// `1 seal`, `2 seals`.
pub fn counted(n: usize, what: &str) -> String {
    format!("{n} {what}{}", if n == 1 { "" } else { "s" })
}

pub fn summary_table(title: &str, file: &str, project: &str, t: &Trailer, result: &str) -> Table {
    let mut table = Table::new(
        "bundle",
        title,
        columns(&[
            names::FILE,
            names::PROJECT,
            names::LINES,
            names::ENTRIES,
            names::TREE_HEAD,
            names::ROOT.programs(),
            names::CHAIN_HASH.programs(),
            names::SHA256.programs(),
            names::RESULT,
        ]),
    );
    table.push(vec![
        Cell::text(file),
        Cell::text(project),
        Cell::Int(t.lines as i64 + 1),
        Cell::Int(t.entries as i64),
        Cell::text(t.root.head()),
        Cell::text(t.root.to_hex()),
        Cell::text(t.chain_head.to_hex()),
        Cell::text(t.sha256.to_hex()),
        Cell::text(result),
    ]);
    table
}
