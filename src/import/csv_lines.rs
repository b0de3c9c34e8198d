//! A small streaming CSV reader that knows the file's own line numbers: RFC 4180 quoting
//! (a quoted field may hold commas, doubled quotes and line breaks), CRLF or LF line ends, a
//! UTF-8 byte-order mark, blank lines skipped.

use std::io::BufRead;

/// One record and the line it starts on (1-based, as an editor shows it).
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct Record {
    pub line: u64,
    /// The record's text as written, without its line end.
    pub raw: String,
    /// The unquoted text, when the record had quotes (else the fields are slices of `raw`).
    unquoted: Option<String>,
    spans: Vec<(usize, usize)>,
}

impl Record {
    /// Field `i`, or "" past the last.
    pub fn field(&self, i: usize) -> &str {
        let text = self.unquoted.as_deref().unwrap_or(&self.raw);
        self.spans.get(i).map_or("", |&(a, b)| &text[a..b])
    }

    pub fn fields(&self) -> Vec<&str> {
        (0..self.spans.len()).map(|i| self.field(i)).collect()
    }
}

/// Why a record could not be read.
#[derive(Debug, Clone, PartialEq, Eq)]
pub enum CsvError {
    Io(String),
    /// Not UTF-8 text.
    Encoding {
        line: u64,
    },
    /// A quote opened and never closed before the end of the file.
    UnclosedQuote {
        line: u64,
    },
    /// Text after a closing quote, before the next comma.
    AfterQuote {
        line: u64,
    },
}

impl std::fmt::Display for CsvError {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        match self {
            Self::Io(e) => write!(f, "could not read the file: {e}"),
            Self::Encoding { .. } => f.write_str("not UTF-8 text"),
            Self::UnclosedQuote { .. } => {
                f.write_str("a quoted field opens here and is never closed")
            }
            Self::AfterQuote { .. } => f.write_str("text after a closing quote"),
        }
    }
}

pub struct Lines<R> {
    input: R,
    line: u64,
    buf: Vec<u8>,
    /// Bytes consumed so far, for progress.
    pub bytes: u64,
}

impl<R: BufRead> Lines<R> {
    pub fn new(input: R) -> Self {
        Lines {
            input,
            line: 0,
            buf: Vec::new(),
            bytes: 0,
        }
    }

    /// Reads one physical line into `buf` (without its line end); false at the end of the file.
    fn physical(&mut self) -> Result<bool, CsvError> {
        self.buf.clear();
        let n = self
            .input
            .read_until(b'\n', &mut self.buf)
            .map_err(|e| CsvError::Io(e.to_string()))?;
        if n == 0 {
            return Ok(false);
        }
        self.bytes += n as u64;
        self.line += 1;
        if self.line == 1 && self.buf.starts_with(&[0xEF, 0xBB, 0xBF]) {
            self.buf.drain(..3);
        }
        while matches!(self.buf.last(), Some(b'\n' | b'\r')) {
            self.buf.pop();
        }
        Ok(true)
    }

    /// The next non-blank record.
    pub fn next_record(&mut self) -> Option<Result<Record, CsvError>> {
        loop {
            match self.physical() {
                Err(e) => return Some(Err(e)),
                Ok(false) => return None,
                Ok(true) if self.buf.iter().all(|b| b.is_ascii_whitespace()) => continue,
                Ok(true) => return Some(self.parse_record()),
            }
        }
    }

    fn parse_record(&mut self) -> Result<Record, CsvError> {
        if !self.buf.contains(&b'"') {
            // Most meter exports quote nothing: the fields are slices of the line.
            let raw = String::from_utf8(self.buf.clone())
                .map_err(|_| CsvError::Encoding { line: self.line })?;
            let mut spans = Vec::with_capacity(8);
            let mut a = 0;
            for (i, b) in raw.bytes().enumerate() {
                if b == b',' {
                    spans.push((a, i));
                    a = i + 1;
                }
            }
            spans.push((a, raw.len()));
            return Ok(Record {
                line: self.line,
                raw,
                unquoted: None,
                spans,
            });
        }
        let start = self.line;
        let mut fields = Vec::new();
        let mut field = String::new();
        let mut text = std::str::from_utf8(&self.buf)
            .map_err(|_| CsvError::Encoding { line: self.line })?
            .to_string();
        let mut raw = text.clone();
        let mut i = 0;
        let mut quoted = false;
        let mut after_quote = false;
        loop {
            let bytes = text.as_bytes();
            if i >= bytes.len() {
                if quoted {
                    // The quoted field goes on to the next physical line.
                    if !self.physical()? {
                        return Err(CsvError::UnclosedQuote { line: start });
                    }
                    field.push('\n');
                    text = std::str::from_utf8(&self.buf)
                        .map_err(|_| CsvError::Encoding { line: self.line })?
                        .to_string();
                    raw.push('\n');
                    raw.push_str(&text);
                    i = 0;
                    continue;
                }
                fields.push(std::mem::take(&mut field));
                let mut unquoted = String::new();
                let mut spans = Vec::with_capacity(fields.len());
                for f in &fields {
                    spans.push((unquoted.len(), unquoted.len() + f.len()));
                    unquoted.push_str(f);
                }
                return Ok(Record {
                    line: start,
                    raw,
                    unquoted: Some(unquoted),
                    spans,
                });
            }
            let c = bytes[i];
            if quoted {
                if c == b'"' {
                    if bytes.get(i + 1) == Some(&b'"') {
                        field.push('"');
                        i += 2;
                        continue;
                    }
                    quoted = false;
                    after_quote = true;
                    i += 1;
                    continue;
                }
            } else if c == b',' {
                fields.push(std::mem::take(&mut field));
                after_quote = false;
                i += 1;
                continue;
            } else if c == b'"' && field.trim().is_empty() && !after_quote {
                field.clear();
                quoted = true;
                i += 1;
                continue;
            } else if after_quote && !c.is_ascii_whitespace() {
                return Err(CsvError::AfterQuote { line: self.line });
            }
            // Copy the whole UTF-8 character starting here.
            let ch_len = text[i..].chars().next().map_or(1, char::len_utf8);
            if !(after_quote && c.is_ascii_whitespace()) {
                field.push_str(&text[i..i + ch_len]);
            }
            i += ch_len;
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn all(text: &[u8]) -> Vec<Result<Record, CsvError>> {
        let mut l = Lines::new(text);
        std::iter::from_fn(|| l.next_record()).collect()
    }

    /// Each record as (line, fields), or its error.
    fn fields(rs: Vec<Result<Record, CsvError>>) -> Vec<Result<(u64, Vec<String>), CsvError>> {
        rs.into_iter()
            .map(|r| r.map(|r| (r.line, r.fields().iter().map(|f| f.to_string()).collect())))
            .collect()
    }

    fn rec(line: u64, f: &[&str]) -> Result<(u64, Vec<String>), CsvError> {
        Ok((line, f.iter().map(|s| s.to_string()).collect()))
    }

    #[test]
    fn lines_are_the_files_own() {
        let raw = all(
            b"\xEF\xBB\xBFa,b\r\n1,2\r\n\r\n3,\"4,5\"\r\n\n\"x\"\"y\",\"multi\nline\"\nlast,\n",
        );
        assert_eq!(raw[2].as_ref().unwrap().raw, "3,\"4,5\"");
        assert_eq!(raw[3].as_ref().unwrap().raw, "\"x\"\"y\",\"multi\nline\"");
        let got = fields(raw);
        assert_eq!(
            got,
            vec![
                rec(1, &["a", "b"]),
                rec(2, &["1", "2"]),
                rec(4, &["3", "4,5"]),
                rec(6, &["x\"y", "multi\nline"]),
                rec(8, &["last", ""])
            ]
        );
    }

    #[test]
    fn broken_quotes() {
        assert_eq!(
            fields(all(b"a\n\"open,1\n2\n")),
            vec![rec(1, &["a"]), Err(CsvError::UnclosedQuote { line: 2 })]
        );
        assert_eq!(
            fields(all(b"\"a\"b,1\n")),
            vec![Err(CsvError::AfterQuote { line: 1 })]
        );
        assert_eq!(
            fields(all(b"\xff,1\n")),
            vec![Err(CsvError::Encoding { line: 1 })]
        );
    }

    proptest::proptest! {
        #[test]
        fn never_panics(bytes in proptest::collection::vec(proptest::num::u8::ANY, 0..200)) {
            let _ = all(&bytes);
        }
    }
}
