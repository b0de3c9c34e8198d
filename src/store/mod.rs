//! The ledger file: the only module that speaks SQL. SQLite through diesel, migrations embedded
//! and applied on open, every command in one transaction.

mod bundle;
mod connection;
mod feedstocks;
mod imports;
mod rows;
pub mod schema;

use crate::error::{Error, Result};
use crate::ledger::{Hash, Project, SealedEntry, Site};
use diesel::prelude::*;
use diesel::sqlite::SqliteConnection;
use rows::{EntryRow, ProjectRow, SettingRow, SiteRow};
use schema::{entries, projects, settings, sites};

pub use bundle::BundleImport;
use std::path::{Path, PathBuf};

pub use connection::APPLICATION_ID;
pub use imports::{
    BYTES_PER_ENTRY, CoveredDay, ImportSummary, NewImport, StoredImport, disk_error, room_for,
};

impl From<diesel::result::Error> for Error {
    fn from(e: diesel::result::Error) -> Self {
        Error::Store(format!("ledger database error: {e}"))
    }
}

/// An open ledger file.
pub struct Store {
    conn: SqliteConnection,
    path: PathBuf,
}

/// Access to the ledger inside one transaction.
pub struct Tx<'a> {
    conn: &'a mut SqliteConnection,
}

impl Store {
    /// Creates a ledger at `path` (or opens it, if it already is one). Returns whether it was new.
    pub fn init(path: &Path) -> Result<(Store, bool)> {
        let (conn, created) = connection::create(path)?;
        Ok((
            Store {
                conn,
                path: path.to_path_buf(),
            },
            created,
        ))
    }

    /// Opens an existing ledger; any other file is refused.
    pub fn open(path: &Path) -> Result<Store> {
        let conn = connection::open(path)?;
        Ok(Store {
            conn,
            path: path.to_path_buf(),
        })
    }

    pub fn path(&self) -> &Path {
        &self.path
    }

    /// Runs `f` in a write transaction taken at once (BEGIN IMMEDIATE), so two writers never
    /// fork a chain; nothing is written if `f` fails.
    pub fn write<T>(&mut self, f: impl FnOnce(&mut Tx<'_>) -> Result<T>) -> Result<T> {
        self.conn.immediate_transaction(|conn| f(&mut Tx { conn }))
    }

    /// Runs `f` in a read transaction, so a report sees one consistent state.
    pub fn read<T>(&mut self, f: impl FnOnce(&mut Tx<'_>) -> Result<T>) -> Result<T> {
        self.conn.transaction(|conn| f(&mut Tx { conn }))
    }

    /// SQLite's own check of the file's structure; "ok" when whole.
    pub fn integrity_check(&mut self) -> Result<Vec<String>> {
        connection::integrity_check(&mut self.conn)
    }
}

/// Entry rows as ledger values; a row that does not read back is named.
fn read_back(project: &str, rows: &[EntryRow]) -> Result<Vec<SealedEntry>> {
    rows.iter()
        .map(|r| {
            r.to_sealed()
                .map_err(|what| inconsistent(format!("project {project} seq {}: {what}", r.seq)))
        })
        .collect()
}

/// A stored row that no longer reads back is a sign of tampering or corruption.
fn inconsistent(what: String) -> Error {
    Error::Inconsistent(what)
}

impl Tx<'_> {
    pub fn projects(&mut self) -> Result<Vec<Project>> {
        let rows: Vec<ProjectRow> = projects::table
            .order(projects::code)
            .select(ProjectRow::as_select())
            .load(self.conn)?;
        rows.iter()
            .map(|r| r.to_project().map_err(inconsistent))
            .collect()
    }

    pub fn project(&mut self, code: &str) -> Result<Option<Project>> {
        let row: Option<ProjectRow> = projects::table
            .find(code)
            .select(ProjectRow::as_select())
            .first(self.conn)
            .optional()?;
        row.map(|r| r.to_project().map_err(inconsistent))
            .transpose()
    }

    pub fn add_project(&mut self, p: &Project) -> Result<()> {
        diesel::insert_into(projects::table)
            .values(ProjectRow::from_project(p))
            .execute(self.conn)?;
        Ok(())
    }

    pub fn sites(&mut self, project: &str) -> Result<Vec<Site>> {
        let rows: Vec<SiteRow> = sites::table
            .filter(sites::project.eq(project))
            .order(sites::code)
            .select(SiteRow::as_select())
            .load(self.conn)?;
        rows.iter()
            .map(|r| r.to_site().map_err(inconsistent))
            .collect()
    }

    pub fn site(&mut self, project: &str, code: &str) -> Result<Option<Site>> {
        let row: Option<SiteRow> = sites::table
            .find((project, code))
            .select(SiteRow::as_select())
            .first(self.conn)
            .optional()?;
        row.map(|r| r.to_site().map_err(inconsistent)).transpose()
    }

    pub fn add_site(&mut self, s: &Site) -> Result<()> {
        diesel::insert_into(sites::table)
            .values(SiteRow::from_site(s))
            .execute(self.conn)?;
        Ok(())
    }

    /// Every entry of a project in seq order, exactly as stored.
    pub fn entries(&mut self, project: &str) -> Result<Vec<SealedEntry>> {
        let rows: Vec<EntryRow> = entries::table
            .filter(entries::project.eq(project))
            .order(entries::seq)
            .select(EntryRow::as_select())
            .load(self.conn)?;
        read_back(project, &rows)
    }

    /// A project's seal entries in seq order: one per sealed period, so few.
    pub fn seal_entries(&mut self, project: &str) -> Result<Vec<SealedEntry>> {
        let rows: Vec<EntryRow> = entries::table
            .filter(entries::project.eq(project).and(entries::kind.eq("seal")))
            .order(entries::seq)
            .select(EntryRow::as_select())
            .load(self.conn)?;
        read_back(project, &rows)
    }

    /// A project's seals, read back from their entries.
    pub fn seals(&mut self, project: &str) -> Result<Vec<crate::ledger::seal::Seal>> {
        self.seal_entries(project)?
            .iter()
            .map(|s| {
                crate::ledger::seal::Seal::from_entry(&s.entry).map_err(|what| {
                    inconsistent(format!("project {project} seq {}: {what}", s.entry.seq))
                })
            })
            .collect()
    }

    /// A project's signed statements, in the order recorded.
    pub fn signatures(
        &mut self,
        project: &str,
    ) -> Result<Vec<crate::ledger::signature::Statement>> {
        let rows: Vec<rows::SignatureRow> = schema::signatures::table
            .filter(schema::signatures::project.eq(project))
            .order(schema::signatures::seq)
            .select(rows::SignatureRow::as_select())
            .load(self.conn)?;
        rows.iter()
            .map(|r| r.to_statement().map_err(inconsistent))
            .collect()
    }

    pub fn add_signature(&mut self, s: &crate::ledger::signature::Statement) -> Result<()> {
        diesel::insert_into(schema::signatures::table)
            .values(rows::SignatureRow::from_statement(s))
            .execute(self.conn)?;
        Ok(())
    }

    /// The entry holding an idempotency key, if any.
    pub fn entry_by_key(&mut self, project: &str, key: &str) -> Result<Option<SealedEntry>> {
        let row: Option<EntryRow> = entries::table
            .filter(entries::project.eq(project).and(entries::idem_key.eq(key)))
            .select(EntryRow::as_select())
            .first(self.conn)
            .optional()?;
        row.map(|r| r.to_sealed().map_err(inconsistent)).transpose()
    }

    /// The seq the next entry takes and the chain head it links to.
    pub fn chain_tip(&mut self, project: &str) -> Result<(u64, Hash)> {
        let last: Option<(i64, String)> = entries::table
            .filter(entries::project.eq(project))
            .order(entries::seq.desc())
            .select((entries::seq, entries::chain_hash))
            .first(self.conn)
            .optional()?;
        match last {
            None => Ok((0, Hash::GENESIS)),
            Some((seq, chain)) => {
                let head = Hash::from_hex(&chain).ok_or_else(|| {
                    inconsistent(format!(
                        "project {project} seq {seq}: chain_hash is not a SHA-256 hex digest"
                    ))
                })?;
                Ok((seq as u64 + 1, head))
            }
        }
    }

    /// Appends sealed entries; the caller has linked them to the chain tip.
    pub fn append(&mut self, sealed: &[SealedEntry]) -> Result<()> {
        let rows: Vec<EntryRow> = sealed.iter().map(EntryRow::from_sealed).collect();
        for chunk in rows.chunks(1000) {
            diesel::insert_into(entries::table)
                .values(chunk)
                .execute(self.conn)?;
        }
        Ok(())
    }

    /// A project's settings, in the order recorded.
    pub fn settings(&mut self, project: &str) -> Result<Vec<crate::ledger::setting::Setting>> {
        let rows: Vec<SettingRow> = settings::table
            .filter(settings::project.eq(project))
            .order(settings::seq)
            .select(SettingRow::as_select())
            .load(self.conn)?;
        rows.iter()
            .map(|r| r.to_setting().map_err(inconsistent))
            .collect()
    }

    pub fn add_settings(&mut self, new: &[crate::ledger::setting::Setting]) -> Result<()> {
        let rows: Vec<SettingRow> = new.iter().map(SettingRow::from_setting).collect();
        for r in &rows {
            diesel::insert_into(settings::table)
                .values(r)
                .execute(self.conn)?;
        }
        Ok(())
    }
}
