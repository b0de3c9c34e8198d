//! The table of an entry recorded: its seq, kind, grams, hashes and key, and the line saying
//! whether it was written.

use crate::ledger::SealedEntry;
use crate::ledger::append::Appended;
use crate::report::names;
use crate::report::{Cell, Report, Table, columns};

pub fn recorded_table(s: &SealedEntry) -> Table {
    let e = &s.entry;
    let mut t = Table::new(
        "entry",
        format!("Entry {} seq {}", e.project, e.seq),
        columns(&[
            names::SEQ,
            names::KIND,
            names::SITE,
            names::PERIOD,
            names::CO2_T,
            names::CORRECTS,
            names::KEY,
            names::CHAIN_HASH,
        ]),
    );
    t.push(vec![
        Cell::Int(e.seq as i64),
        Cell::text(e.kind.name()),
        Cell::text(&e.site),
        Cell::text(e.period.to_string()),
        Cell::Tonnes(e.mass),
        e.corrects.map_or(Cell::Empty, |c| Cell::Int(c as i64)),
        Cell::text(&e.key),
        Cell::text(s.chain.to_hex()),
    ]);
    t
}

/// What an append came to, said: the entry recorded, or the one its key already holds.
pub fn appended_report(outcome: &Appended) -> Report {
    match outcome {
        Appended::New(s) => Report::default()
            .line(format!("recorded {} seq {}", s.entry.project, s.entry.seq))
            .table(recorded_table(s)),
        Appended::Existing(s) => Report::default()
            .line(format!(
                "already recorded as {} seq {} (key {}); nothing written",
                s.entry.project, s.entry.seq, s.entry.key
            ))
            .table(recorded_table(s)),
    }
}
