//! One table written row by row as its rows are read, for programs (JSON, CSV): memory stays
//! flat whatever the table's length. The bytes are those [`super::render`] writes for the same
//! table held whole.

use super::render::{Format, csv_header, csv_row, json_row};
use super::table::{Cell, Column};
use std::io::{self, Write};

/// A table being written: its header (CSV) or its array's opening (JSON) goes out with the
/// first row, so a table with no rows is written as render writes it.
pub struct RowStream<W: Write> {
    out: W,
    json: bool,
    columns: Vec<Column>,
    rows: u64,
    buf: Vec<u8>,
}

impl<W: Write> RowStream<W> {
    /// A stream of `columns` rows in `format`, which is JSON or CSV (people's tables are
    /// fitted to their widest cell, so they are drawn whole).
    pub fn new(out: W, format: Format, columns: Vec<Column>) -> Self {
        debug_assert!(format != Format::Table, "people's tables are drawn whole");
        RowStream {
            out,
            json: format == Format::Json,
            columns,
            rows: 0,
            buf: Vec::new(),
        }
    }

    /// Writes one row (its cells in column order).
    pub fn row(&mut self, cells: &[Cell]) -> io::Result<()> {
        if self.json {
            self.out
                .write_all(if self.rows == 0 { b"[\n  " } else { b",\n  " })?;
            self.buf.clear();
            serde_json::to_writer_pretty(&mut self.buf, &json_row(&self.columns, cells))?;
            // One level deeper than the object alone: inside the array. Strings hold no raw
            // line break (JSON escapes it), so every one is between two lines of the layout.
            for (i, line) in self.buf.split(|&b| b == b'\n').enumerate() {
                if i > 0 {
                    self.out.write_all(b"\n  ")?;
                }
                self.out.write_all(line)?;
            }
        } else {
            if self.rows == 0 {
                self.out.write_all(csv_header(&self.columns).as_bytes())?;
            }
            self.out.write_all(csv_row(cells).as_bytes())?;
        }
        self.rows += 1;
        Ok(())
    }

    /// Closes the table and hands back the writer, flushed.
    pub fn finish(mut self) -> io::Result<W> {
        match (self.json, self.rows) {
            (true, 0) => self.out.write_all(b"[]\n")?,
            (true, _) => self.out.write_all(b"\n]\n")?,
            (false, 0) => self.out.write_all(csv_header(&self.columns).as_bytes())?,
            (false, _) => {}
        }
        self.out.flush()?;
        Ok(self.out)
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::quantity::Mass;
    use crate::report::names;
    use crate::report::{Report, Table, render};

    fn table(rows: usize) -> Table {
        let mut t = Table::new(
            "t",
            "T",
            vec![names::SEQ, names::READING, names::CO2_T, names::NOTE],
        );
        for i in 0..rows {
            t.push(vec![
                Cell::Int(i as i64),
                Cell::Pairs(vec![
                    ("mass".into(), "1 t".into()),
                    ("a\nb".into(), "\"".into()),
                ]),
                Cell::Tonnes(Mass::from_grams(1_234_567 * i as i64)),
                if i % 2 == 0 {
                    Cell::Empty
                } else {
                    Cell::text("x, \"y\"")
                },
            ]);
        }
        t
    }

    fn streamed(t: &Table, format: Format) -> String {
        let mut s = RowStream::new(Vec::new(), format, t.columns.clone());
        for r in &t.rows {
            s.row(r).unwrap();
        }
        String::from_utf8(s.finish().unwrap()).unwrap()
    }

    #[test]
    fn streamed_rows_are_the_bytes_of_the_whole_table() {
        for rows in [0, 1, 3] {
            let t = table(rows);
            let whole = Report::default().table(t.clone());
            for format in [Format::Json, Format::Csv] {
                assert_eq!(
                    streamed(&t, format),
                    render(&whole, format),
                    "{rows} rows, {format:?}"
                );
            }
        }
    }
}
