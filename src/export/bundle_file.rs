//! A bundle file written through the checker, so an export is checked line by line as it is
//! written, and the file appears only once its trailer is written and the whole checks.

use super::WholeFile;
use crate::bundle::line::Trailer;
use crate::bundle::{Checker, Line};
use std::path::Path;

/// Why a bundle could not be written whole.
#[derive(Debug)]
pub enum Unwritten {
    /// A line the checker refuses: the ledger does not export whole.
    Line(String),
    /// The finished bundle does not check.
    Bundle(String),
    /// The file could not be written.
    File(std::io::Error),
}

impl From<std::io::Error> for Unwritten {
    fn from(e: std::io::Error) -> Self {
        Unwritten::File(e)
    }
}

pub struct BundleFile {
    checker: Checker,
    file: WholeFile,
}

impl BundleFile {
    pub fn create(path: &Path) -> Result<BundleFile, Unwritten> {
        Ok(BundleFile {
            checker: Checker::default(),
            file: WholeFile::create(path)?,
        })
    }

    /// The next line, checked, then written.
    pub fn put(&mut self, line: &Line) -> Result<(), Unwritten> {
        let text = line.to_text();
        self.checker
            .push(text.trim_end_matches('\n'))
            .map_err(Unwritten::Line)?;
        Ok(self.file.write(text.as_bytes())?)
    }

    /// Writes the trailer, puts the file in place and gives what the whole bundle checked to.
    pub fn finish(mut self) -> Result<Trailer, Unwritten> {
        let trailer = self.checker.trailer();
        self.put(&trailer)?;
        self.file.persist()?;
        self.checker.finish().map_err(Unwritten::Bundle)
    }
}
