//! The ledger file: the only module that speaks SQL. SQLite through diesel, migrations embedded
//! and applied on open, every command in one transaction.

mod connection;
mod feedstocks;
mod rows;
pub mod schema;

use crate::error::{Error, Result};
use crate::ledger::{Hash, Project, SealedEntry, Site};
use diesel::connection::SimpleConnection;
use diesel::prelude::*;
use diesel::sqlite::SqliteConnection;
use rows::{EntryRow, ImportRow, ProjectRow, SettingRow, SiteRow};
use schema::{entries, imports, projects, settings, sites};

pub use rows::ReadingRow;
use std::path::{Path, PathBuf};

pub use connection::APPLICATION_ID;

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
        rows.iter()
            .map(|r| {
                r.to_sealed().map_err(|what| {
                    inconsistent(format!("project {project} seq {}: {what}", r.seq))
                })
            })
            .collect()
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

    /// The import of this file into this project, if it was imported before.
    pub fn import_of(&mut self, project: &str, sha256: Hash) -> Result<Option<ImportSummary>> {
        let row: Option<ImportRow> = imports::table
            .filter(
                imports::project
                    .eq(project)
                    .and(imports::file_sha256.eq(sha256.to_hex())),
            )
            .select(ImportRow::as_select())
            .first(self.conn)
            .optional()?;
        Ok(row.map(|r| ImportSummary {
            id: r.id,
            file_name: r.file_name,
            rows: r.row_count,
            imported_at: r.imported_at.and_utc(),
        }))
    }

    /// The id the next import takes.
    pub fn next_import_id(&mut self) -> Result<i64> {
        let max: Option<i64> = imports::table
            .select(diesel::dsl::max(imports::id))
            .first(self.conn)?;
        Ok(max.unwrap_or(0) + 1)
    }

    /// Appends raw readings, 5 000 rows a statement. The values are written into the statement
    /// as SQL literals (integers formatted here, text quoted with every `'` doubled; NUL refused
    /// upstream): binding each field of a million rows through the query builder one by one costs
    /// several times SQLite's own insert work.
    pub fn add_readings(&mut self, import_id: i64, rows: &[ReadingRow]) -> Result<()> {
        use std::fmt::Write;
        for chunk in rows.chunks(5_000) {
            let mut sql = String::with_capacity(64 + chunk.len() * 110);
            sql.push_str("INSERT INTO readings (import_id, line, meter, day, grams, raw) VALUES ");
            for (i, r) in chunk.iter().enumerate() {
                if i > 0 {
                    sql.push(',');
                }
                let _ = write!(sql, "({import_id},{},", r.line);
                sql_text(&mut sql, &r.meter);
                sql.push(',');
                sql_text(&mut sql, &r.day);
                let _ = write!(sql, ",{},", r.grams);
                sql_text(&mut sql, &r.raw);
                sql.push(')');
            }
            self.conn.batch_execute(&sql)?;
        }
        Ok(())
    }

    /// Records that a file was imported (after its readings and entries, in the same transaction).
    pub fn add_import(&mut self, import: &NewImport<'_>) -> Result<()> {
        diesel::insert_into(imports::table)
            .values(ImportRow {
                id: import.id,
                project: import.project.into(),
                file_name: import.file_name.into(),
                file_sha256: import.sha256.to_hex(),
                kind: import.kind.into(),
                row_count: import.rows,
                imported_at: import.at.naive_utc(),
            })
            .execute(self.conn)?;
        Ok(())
    }
}

/// An import to record: which file went into which project, as what, when.
pub struct NewImport<'a> {
    pub id: i64,
    pub project: &'a str,
    pub file_name: &'a str,
    pub sha256: Hash,
    pub kind: &'a str,
    pub rows: i64,
    pub at: chrono::DateTime<chrono::Utc>,
}

/// A file imported earlier.
#[derive(Debug, Clone)]
pub struct ImportSummary {
    pub id: i64,
    pub file_name: String,
    pub rows: i64,
    pub imported_at: chrono::DateTime<chrono::Utc>,
}

/// Appends `s` as an SQL string literal.
fn sql_text(sql: &mut String, s: &str) {
    sql.push('\'');
    let mut parts = s.split('\'');
    if let Some(first) = parts.next() {
        sql.push_str(first);
    }
    for p in parts {
        sql.push_str("''");
        sql.push_str(p);
    }
    sql.push('\'');
}

/// The readings of one meter-day of one imported file.
#[derive(Debug, Clone, PartialEq, Eq, QueryableByName)]
pub struct ReadingTotal {
    #[diesel(sql_type = diesel::sql_types::Text)]
    pub file_sha256: String,
    #[diesel(sql_type = diesel::sql_types::Text)]
    pub meter: String,
    #[diesel(sql_type = diesel::sql_types::Text)]
    pub day: String,
    #[diesel(sql_type = diesel::sql_types::BigInt)]
    pub grams: i64,
    #[diesel(sql_type = diesel::sql_types::BigInt)]
    pub rows: i64,
}

impl Tx<'_> {
    /// Σ grams and row count of the raw readings per file, meter and day, for recomputing the
    /// entries they rolled up into.
    pub fn reading_totals(&mut self, project: &str) -> Result<Vec<ReadingTotal>> {
        Ok(diesel::sql_query(
            "SELECT i.file_sha256 AS file_sha256, r.meter AS meter, r.day AS day, \
             SUM(r.grams) AS grams, COUNT(*) AS rows \
             FROM readings r JOIN imports i ON i.id = r.import_id \
             WHERE i.project = ? GROUP BY i.file_sha256, r.meter, r.day",
        )
        .bind::<diesel::sql_types::Text, _>(project)
        .load(self.conn)?)
    }
}
