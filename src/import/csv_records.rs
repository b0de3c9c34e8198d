//! CSV records with the file's own line numbers, read by the `csv` crate (RFC 4180 quoting,
//! CRLF or LF, a UTF-8 byte-order mark). Blank lines are skipped. A record whose quoted field
//! holds a line break is reported with every line it took, so a quote left open cannot
//! silently swallow the rows after it.
//!
//! Line numbers come from the record's byte offsets, counting the line ends before them: the
//! crate's own line count starts a CRLF record on the line before and does not count line
//! breaks inside quotes.

use std::cell::RefCell;
use std::io::Read;
use std::rc::Rc;

/// The bytes the CSV reader has taken but whose line ends are not counted yet.
#[derive(Default)]
struct Window {
    /// Offset in the file of `bytes[0]`.
    base: u64,
    bytes: Vec<u8>,
    /// Line ends before offset `counted_to`.
    newlines: u64,
    counted_to: u64,
    /// The last byte counted, so a CRLF split between reads counts once.
    last: Option<u8>,
}

impl Window {
    fn at(&self, offset: u64) -> Option<u8> {
        let i = usize::try_from(offset.checked_sub(self.base)?).ok()?;
        self.bytes.get(i).copied()
    }

    /// Line ends before `offset` (not before the last offset asked).
    fn newlines_before(&mut self, offset: u64) -> u64 {
        let from = (self.counted_to.max(self.base) - self.base) as usize;
        let to = ((offset.max(self.counted_to) - self.base) as usize).min(self.bytes.len());
        // A line ends at LF, CRLF or a lone CR (as the csv crate reads them): CR counts, and LF
        // unless a CR came just before it.
        let part = &self.bytes[from..to];
        if part.contains(&b'\r') {
            for &b in part {
                if b == b'\r' || (b == b'\n' && self.last != Some(b'\r')) {
                    self.newlines += 1;
                }
                self.last = Some(b);
            }
        } else if let Some(&end) = part.last() {
            // LF alone ends lines here (the common case, counted fast), but for one that
            // completes a CRLF split between reads.
            let lf = part.iter().filter(|&&b| b == b'\n').count() as u64;
            let split_crlf = self.last == Some(b'\r') && part[0] == b'\n';
            self.newlines += lf - u64::from(split_crlf);
            self.last = Some(end);
        }
        self.counted_to = self.base + to as u64;
        // Forget what is counted, a block at a time.
        if to > 1 << 16 {
            self.bytes.drain(..to);
            self.base += to as u64;
        }
        self.newlines
    }
}

/// The input, keeping a copy of what passes for the line count.
struct Tracked<R> {
    inner: R,
    window: Rc<RefCell<Window>>,
}

impl<R: Read> Read for Tracked<R> {
    fn read(&mut self, buf: &mut [u8]) -> std::io::Result<usize> {
        let n = self.inner.read(buf)?;
        self.window.borrow_mut().bytes.extend_from_slice(&buf[..n]);
        Ok(n)
    }
}

/// One record: its fields and the lines it spans (1-based, as an editor shows them).
#[derive(Debug, Default)]
pub struct Record {
    pub line: u64,
    pub last_line: u64,
    fields: csv::ByteRecord,
}

impl Record {
    /// Field `i` as text, or "" past the last; None when it is not UTF-8.
    pub fn field(&self, i: usize) -> Option<&str> {
        self.fields
            .get(i)
            .map_or(Some(""), |b| std::str::from_utf8(b).ok())
    }

    /// Every field, each not UTF-8 shown lossily (for headers in messages).
    pub fn fields(&self) -> Vec<String> {
        self.fields
            .iter()
            .map(|f| String::from_utf8_lossy(f).into_owned())
            .collect()
    }

    /// How many lines past its first the record runs (a quoted line break, or an open quote).
    pub fn extra_lines(&self) -> u64 {
        self.last_line - self.line
    }

    fn is_blank(&self) -> bool {
        self.fields
            .iter()
            .all(|f| f.iter().all(u8::is_ascii_whitespace))
    }
}

/// Why the file could not be read on.
#[derive(Debug)]
pub struct ReadError(String);

impl std::fmt::Display for ReadError {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        write!(f, "could not read the file: {}", self.0)
    }
}

/// A streaming reader of records; memory holds one record and the reader's buffer.
pub struct Records<R: Read> {
    reader: csv::Reader<Tracked<R>>,
    window: Rc<RefCell<Window>>,
}

impl<R: Read> Records<R> {
    pub fn new(input: R) -> Self {
        let window = Rc::new(RefCell::new(Window::default()));
        let tracked = Tracked {
            inner: input,
            window: Rc::clone(&window),
        };
        Records {
            reader: csv::ReaderBuilder::new()
                .has_headers(false)
                .flexible(true)
                .buffer_capacity(1 << 16)
                .from_reader(tracked),
            window,
        }
    }

    /// The lines of the record between byte offsets `start` and `end`, leaving out the line
    /// ends (and blank lines) around it.
    fn lines_of(&self, start: u64, end: u64) -> (u64, u64) {
        let mut w = self.window.borrow_mut();
        let is_end = |b: Option<u8>| matches!(b, Some(b'\r' | b'\n'));
        let mut first = start;
        while first < end && is_end(w.at(first)) {
            first += 1;
        }
        let mut last = end;
        while last > first && is_end(w.at(last - 1)) {
            last -= 1;
        }
        let line = 1 + w.newlines_before(first);
        let last_line = 1 + w.newlines_before(last.saturating_sub(1).max(first));
        (line, last_line)
    }

    /// Reads the next non-blank record into `record`; false at the end of the file.
    pub fn next_into(&mut self, record: &mut Record) -> Result<bool, ReadError> {
        loop {
            if !self
                .reader
                .read_byte_record(&mut record.fields)
                .map_err(|e| ReadError(e.to_string()))?
            {
                return Ok(false);
            }
            let start = record.fields.position().map_or(0, csv::Position::byte);
            let end = self.reader.position().byte();
            (record.line, record.last_line) = self.lines_of(start, end);
            if !record.is_blank() {
                return Ok(true);
            }
        }
    }

    /// The next non-blank record, newly allocated.
    pub fn next_record(&mut self) -> Option<Result<Record, ReadError>> {
        let mut r = Record::default();
        match self.next_into(&mut r) {
            Ok(true) => Some(Ok(r)),
            Ok(false) => None,
            Err(e) => Some(Err(e)),
        }
    }

    /// The reader it reads from, to drain what the parser left.
    pub fn into_inner(self) -> R {
        self.reader.into_inner().inner
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn all(text: &[u8]) -> Vec<(u64, u64, Vec<String>)> {
        let mut r = Records::new(text);
        std::iter::from_fn(|| r.next_record())
            .map(|x| x.unwrap())
            .map(|x| (x.line, x.last_line, x.fields()))
            .collect()
    }

    fn row(line: u64, last: u64, f: &[&str]) -> (u64, u64, Vec<String>) {
        (line, last, f.iter().map(|s| s.to_string()).collect())
    }

    #[test]
    fn lines_are_the_files_own() {
        assert_eq!(
            all(b"\xEF\xBB\xBFa,b\r\n\r\n  \r\n1,\"x,y\"\r\n\"q\"\"r\",2"),
            vec![
                row(1, 1, &["a", "b"]),
                row(4, 4, &["1", "x,y"]),
                row(5, 5, &["q\"r", "2"])
            ]
        );
    }

    /// Old Macintosh line ends (a lone CR) end lines too, as the reader splits records there.
    #[test]
    fn a_lone_cr_ends_a_line() {
        assert_eq!(
            all(b"a,b\r1,2\r\n3,4\n\r5,6"),
            vec![
                row(1, 1, &["a", "b"]),
                row(2, 2, &["1", "2"]),
                row(3, 3, &["3", "4"]),
                row(5, 5, &["5", "6"])
            ]
        );
    }

    #[test]
    fn an_open_quote_counts_every_line_it_takes() {
        let rows = all(b"a,b\n1,\"2\n3,4\n5,6\n");
        assert_eq!(rows[1].0, 2);
        assert_eq!(rows[1].1, 4, "{rows:?}");
        assert_eq!(rows.len(), 2);
    }

    #[test]
    fn fields_that_are_not_utf8_are_none() {
        let mut r = Records::new(&b"a,\xff\n"[..]);
        let rec = r.next_record().unwrap().unwrap();
        assert_eq!(rec.field(0), Some("a"));
        assert_eq!(rec.field(1), None);
        assert_eq!(rec.field(7), Some(""));
    }

    proptest::proptest! {
        #[test]
        fn never_panics(bytes in proptest::collection::vec(proptest::num::u8::ANY, 0..200)) {
            let mut r = Records::new(&bytes[..]);
            let mut rec = Record::default();
            while let Ok(true) = r.next_into(&mut rec) {
                proptest::prop_assert!(rec.last_line >= rec.line);
            }
        }
    }
}
