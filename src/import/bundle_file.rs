//! Reading a bundle file line by line, streamed: each line's text handed on with its number,
//! so memory stays flat whatever the bundle's size.

use crate::bundle::line::Trailer;
use crate::bundle::{Checker, Item};
use crate::error::{Error, Result};
use std::io::BufRead;
use std::path::Path;

/// Calls `f` with each line (1-based number, text without the newline). A file that cannot be
/// opened is refused (exit 1); one that is not UTF-8 text or does not end in a newline is a
/// damaged bundle (exit 3).
pub fn each_line(path: &Path, mut f: impl FnMut(u64, &str) -> Result<()>) -> Result<()> {
    let name = path.display().to_string();
    let file = std::fs::File::open(path).map_err(|e| Error::field("FILE", &name, e))?;
    let mut reader = std::io::BufReader::with_capacity(1 << 16, file);
    let mut buf = Vec::new();
    let mut n = 0u64;
    loop {
        buf.clear();
        let read = reader
            .read_until(b'\n', &mut buf)
            .map_err(|e| Error::field("FILE", &name, e))?;
        if read == 0 {
            return Ok(());
        }
        n += 1;
        let damaged = |what: &str| Error::ledger(format!("bundle {name} line {n}: {what}"));
        if buf.pop() != Some(b'\n') {
            return Err(damaged("no newline at its end (the file is cut short?)"));
        }
        let text = std::str::from_utf8(&buf).map_err(|_| damaged("not UTF-8 text"))?;
        f(n, text)?;
    }
}

/// What a whole bundle was found to hold.
pub struct Checked {
    pub project: String,
    pub trailer: Trailer,
    pub seals: usize,
    pub signatures: usize,
    pub reconciliations: u64,
}

/// Reads a bundle through the checker, handing each checked line's value to `f`.
pub fn read_checked(path: &Path, mut f: impl FnMut(&Item) -> Result<()>) -> Result<Checked> {
    let name = path.display().to_string();
    let mut checker = Checker::default();
    each_line(path, |n, text| {
        let item = checker
            .push(text)
            .map_err(|e| Error::ledger(format!("bundle {name} line {n}: {e}")))?;
        f(&item)
    })?;
    let t = checker
        .finish()
        .map_err(|e| Error::ledger(format!("bundle {name}: {e}")))?;
    Ok(Checked {
        project: checker.project().to_string(),
        trailer: t,
        seals: checker.seals(),
        signatures: checker.signatures(),
        reconciliations: checker.reconciliations(),
    })
}
