//! The columns and cells of `entries`, one row per stored entry (the table, JSON and CSV alike).

use crate::error::{Error, Result, StoreKind};
use crate::ledger::SealedEntry;
use crate::report::names;
use crate::report::stream::RowStream;
use crate::report::{Cell, Column, Format, Report, Table, columns};
use std::io::{self, BufWriter, StdoutLock};

/// The most rows a table for people holds unless a limit says otherwise: a table is fitted
/// to its widest cell, so it is drawn whole, in memory.
pub const TABLE_PAGE: u64 = 10_000;

/// A project's entries listed as its chain is read, from a seq on and at most a limit of
/// them: JSON and CSV go to standard output row by row (memory stays flat); a table for
/// people holds one page.
pub struct Listing {
    from: u64,
    limit: u64,
    out: Out,
}

enum Out {
    Streamed(RowStream<BufWriter<StdoutLock<'static>>>),
    Page { table: Table, any_replaced: bool },
}

impl Listing {
    /// A listing in `format`; without a limit, every entry for programs, a page for people.
    pub fn new(format: Format, project: &str, from: u64, limit: Option<u64>) -> Listing {
        let (limit, out) = match format {
            Format::Table => {
                let title = format!("Entries, project {project}");
                let table = Table::new("entries", title, entry_columns());
                let page = Out::Page {
                    table,
                    any_replaced: false,
                };
                (limit.unwrap_or(TABLE_PAGE), page)
            }
            _ => {
                let out = BufWriter::with_capacity(1 << 16, io::stdout().lock());
                let rows = RowStream::new(out, format, entry_columns());
                (limit.unwrap_or(u64::MAX), Out::Streamed(rows))
            }
        };
        Listing { from, limit, out }
    }

    /// Lists an entry (and the seq that corrects it) when it falls in the page asked.
    pub fn push(&mut self, s: &SealedEntry, by: Option<u64>) -> Result<()> {
        let seq = s.entry.seq;
        if seq < self.from || seq - self.from >= self.limit {
            return Ok(());
        }
        match &mut self.out {
            Out::Streamed(rows) => rows.row(&entry_cells(s, by)).map_err(standard_output)?,
            Out::Page {
                table,
                any_replaced,
            } => {
                *any_replaced |= by.is_some();
                table.push(entry_cells(s, by));
            }
        }
        Ok(())
    }

    /// The listing ended, the chain holding `total` entries: the page with its notes, or
    /// nothing left to print.
    pub fn finish(self, total: u64) -> Result<Report> {
        match self.out {
            Out::Streamed(rows) => {
                rows.finish().map_err(standard_output)?;
                Ok(Report::written())
            }
            Out::Page {
                mut table,
                any_replaced,
            } => {
                entries_notes(&mut table, any_replaced, self.from, self.limit, total);
                Ok(Report::default().table(table))
            }
        }
    }
}

/// A write to standard output that failed (a closed pipe, a full disk).
fn standard_output(e: io::Error) -> Error {
    Error::store(
        StoreKind::System,
        format!("standard output: {e} (the listing was not written in full)"),
    )
}

/// The columns of an entry's row.
pub fn entry_columns() -> Vec<Column> {
    columns(&[
        names::SEQ,
        names::KIND,
        names::SITE,
        names::PERIOD,
        names::PERIOD_FROM.programs(),
        names::PERIOD_TO.programs(),
        names::READING,
        names::CO2_T,
        names::CO2_G.programs(),
        names::SIGN,
        names::CORRECTS,
        names::CORRECTED_BY,
        names::REASON.programs(),
        names::KEY.programs(),
        names::METER.programs(),
        names::NOTE.programs(),
        names::RECORDED_AT.programs(),
        names::EVIDENCE_NAME.programs(),
        names::EVIDENCE_SHA256.programs(),
        names::RECORDED_BY.programs(),
        names::LEAF_HASH.programs(),
        names::CHAIN_HEAD,
        names::CHAIN_HASH.programs(),
    ])
}

/// One entry's row, `by` the seq of the entry that corrects it.
pub fn entry_cells(s: &SealedEntry, by: Option<u64>) -> Vec<Cell> {
    let e = &s.entry;
    vec![
        Cell::Int(e.seq as i64),
        Cell::text(e.kind.name()),
        Cell::text(&e.site),
        Cell::text(e.period.to_string()),
        Cell::text(e.period.from.to_string()),
        Cell::text(e.period.to.to_string()),
        Cell::Pairs(e.reading.0.clone()),
        Cell::Tonnes(e.mass),
        Cell::Int(e.mass.grams()),
        Cell::text(e.sign.name()),
        e.corrects.map_or(Cell::Empty, |c| Cell::Int(c as i64)),
        by.map_or(Cell::Empty, |c| Cell::Int(c as i64)),
        Cell::opt_text(e.reason.as_deref()),
        Cell::text(&e.key),
        Cell::opt_text(e.meter.as_deref()),
        Cell::opt_text(e.note.as_deref()),
        Cell::text(e.recorded_at.format("%Y-%m-%dT%H:%M:%S%.6fZ").to_string()),
        Cell::opt_text(e.evidence.as_ref().map(|v| v.file_name.clone())),
        Cell::opt_text(e.evidence.as_ref().map(|v| v.sha256.to_hex())),
        Cell::opt_text(e.recorded_by.as_deref()),
        Cell::text(s.leaf.to_hex()),
        Cell::text(s.chain.head()),
        Cell::text(s.chain.to_hex()),
    ]
}

/// The notes of a page of entries: what a "Corrected by" seq means, when any is shown, and how
/// to list the rest when the page (`limit` rows from seq `from`) holds fewer than the chain's
/// `total`.
fn entries_notes(t: &mut Table, any_replaced: bool, from: u64, limit: u64, total: u64) {
    if any_replaced {
        t.note("Entries with a \"Corrected by\" seq are kept for the record; reports count the entry that corrects them.");
    }
    if from.saturating_add(limit) < total {
        let next = from + limit;
        t.note(format!(
            "Listed: {} of {total} entries, from seq {from}; `--from-seq {next}` lists the next {limit}, and `--format csv` or `--format json` lists every entry as it is read.",
            t.rows.len()
        ));
    }
}
