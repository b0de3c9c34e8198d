//! What bundles need of the store: a project's entries streamed row by row (never the whole
//! project in memory) and its imports with everything a bundle carries of them.

use super::rows::{EntryRow, ImportRow};
use super::schema::{entries, imports};
use super::{Tx, inconsistent};
use crate::bundle::line::Import;
use crate::error::Result;
use crate::ledger::{Hash, SealedEntry};
use diesel::connection::DefaultLoadingMode;
use diesel::prelude::*;

/// An import as a bundle carries it, with the ledger's id for reading its kept bytes.
pub struct BundleImport {
    pub id: i64,
    pub file_name: String,
    pub file_sha256: Hash,
    pub kind: String,
    pub row_count: i64,
    pub columns_map: String,
    pub density: String,
    pub byte_count: i64,
    pub imported_at: chrono::DateTime<chrono::Utc>,
}

impl BundleImport {
    /// The import as its bundle line holds it.
    pub fn line(&self) -> Import {
        Import {
            file_name: self.file_name.clone(),
            file_sha256: self.file_sha256,
            kind: self.kind.clone(),
            row_count: self.row_count,
            columns_map: self.columns_map.clone(),
            density: self.density.clone(),
            byte_count: self.byte_count,
            imported_at: self.imported_at,
        }
    }
}

impl Tx<'_> {
    /// Calls `f` with each entry of a project in seq order, one row in memory at a time.
    pub fn each_entry(
        &mut self,
        project: &str,
        f: impl FnMut(SealedEntry) -> Result<()>,
    ) -> Result<()> {
        self.each_entry_through(project, u64::MAX, f)
    }

    /// `each_entry`, up to and including seq `last`.
    pub fn each_entry_through(
        &mut self,
        project: &str,
        last: u64,
        mut f: impl FnMut(SealedEntry) -> Result<()>,
    ) -> Result<()> {
        let last = i64::try_from(last).unwrap_or(i64::MAX);
        let rows = entries::table
            .filter(entries::project.eq(project).and(entries::seq.le(last)))
            .order(entries::seq)
            .select(EntryRow::as_select())
            .load_iter::<EntryRow, DefaultLoadingMode>(self.conn)?;
        for row in rows {
            let r = row?;
            let s = r
                .to_sealed()
                .map_err(|what| crate::error::Error::entry(project, Some(r.seq), what))?;
            f(s)?;
        }
        Ok(())
    }

    /// A project's imports in the order they were made, every column a bundle carries.
    pub fn bundle_imports(&mut self, project: &str) -> Result<Vec<BundleImport>> {
        let rows: Vec<ImportRow> = imports::table
            .filter(imports::project.eq(project))
            .order(imports::id)
            .select(ImportRow::as_select())
            .load(self.conn)?;
        rows.into_iter()
            .map(|r| {
                let sha = Hash::from_hex(&r.file_sha256).ok_or_else(|| {
                    inconsistent(format!(
                        "import {}: file_sha256 is not a SHA-256 hex digest",
                        r.id
                    ))
                })?;
                Ok(BundleImport {
                    id: r.id,
                    file_name: r.file_name,
                    file_sha256: sha,
                    kind: r.kind,
                    row_count: r.row_count,
                    columns_map: r.columns_map,
                    density: r.density,
                    byte_count: r.byte_count,
                    imported_at: r.imported_at.and_utc(),
                })
            })
            .collect()
    }
}
