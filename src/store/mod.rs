//! The ledger file: the only module that speaks SQL. SQLite through diesel, migrations embedded
//! and applied on open, every command in one transaction.

mod append_reads;
pub(crate) mod backend;
mod bundle;
mod bundle_export;
mod bundle_load;
mod connection;
mod feedstocks;
mod import_reads;
mod imported_origin;
mod imports;
mod last_seals;
mod ledger_chain;
mod lookup;
mod postgres;
mod project_check;
mod proof;
mod reading_text;
mod reconciliations;
mod rows;
mod schema;
mod seal_append;
mod statements;
mod stored_time;
mod stream;
mod verify;
pub mod wait;

use crate::error::{Error, Result};
use crate::ledger::ledger_chain::Record;
use crate::ledger::{EntryKind, Hash, Project, SealedEntry, Site};
use backend::{Conn, on_backend};
use diesel::prelude::*;
use rows::{EntryRow, ProjectRow, SettingRow, SiteRow, TalliedRow};
use schema::{entries, projects, settings, sites};

pub use bundle::BundleImport;
pub use bundle_load::{BundleAdded, BundleLoader};
use std::cell::RefCell;
use std::path::{Path, PathBuf};

pub use connection::APPLICATION_ID;
pub use imports::{
    CoveredDay, ImportSummary, NewImport, StoredImport, disk_error, room_for, room_for_entries,
};
pub use last_seals::LastSeal;
pub use postgres::{RoleKind, role_name};
pub use project_check::ProjectChecked;
pub use stream::ChainRow;
pub use wait::Wait;

/// An open ledger: a SQLite file, or the shared registry when `--db` is a `postgres://` URL.
pub struct Store {
    conn: Conn,
    path: PathBuf,
    wait: Wait,
}

/// Access to the ledger inside one transaction.
pub struct Tx<'a> {
    conn: &'a mut Conn,
    writing: bool,
    /// The project a write last named, for the registry's refusal to say which it was.
    project: &'a RefCell<Option<String>>,
}

impl Store {
    /// Creates a ledger at `path` (or opens it, if it already is one). Returns whether it was new.
    /// A write waits at most `wait` for another writer to finish.
    pub fn init(path: &Path, wait: Wait) -> Result<(Store, bool)> {
        let (conn, created) = match postgres::url(path) {
            Some(url) => postgres::create(url, wait).map(|(c, new)| (Conn::Pg(c), new))?,
            None => connection::create(path, wait).map(|(c, new)| (Conn::Sqlite(c), new))?,
        };
        let mut store = Store {
            conn,
            path: path.to_path_buf(),
            wait,
        };
        store.link_pending()?;
        Ok((store, created))
    }

    /// Opens an existing ledger; any other file is refused. A write waits at most `wait` for
    /// another writer to finish; a read never waits for one.
    pub fn open(path: &Path, wait: Wait) -> Result<Store> {
        let conn = match postgres::url(path) {
            Some(url) => Conn::Pg(postgres::open(url, wait)?),
            None => Conn::Sqlite(connection::open(path, wait)?),
        };
        let mut store = Store {
            conn,
            path: path.to_path_buf(),
            wait,
        };
        store.link_pending()?;
        Ok(store)
    }

    /// Gives the rows of a ledger made before the ledger chain existed their links, once: the
    /// migration that made the chain left a marker for it (`Tx::link_pending`).
    fn link_pending(&mut self) -> Result<()> {
        if self.read(|tx| tx.links_pending())? {
            self.write(|tx| match tx.links_pending()? {
                true => tx.link_pending(),
                false => Ok(()),
            })?;
        }
        Ok(())
    }

    pub fn path(&self) -> &Path {
        &self.path
    }

    /// Runs `f` in one write transaction in which two writers never fork a chain; nothing is
    /// written if `f` fails. `f` may run again when the database turned the transaction away
    /// for contention (see `backend::write`).
    pub fn write<T>(&mut self, mut f: impl FnMut(&mut Tx<'_>) -> Result<T>) -> Result<T> {
        let project = RefCell::new(None);
        backend::write(&mut self.conn, self.wait, &project, |conn| {
            f(&mut Tx {
                conn,
                writing: true,
                project: &project,
            })
        })
    }

    /// Runs `f` in a read transaction, so a report sees one consistent state.
    pub fn read<T>(&mut self, f: impl FnOnce(&mut Tx<'_>) -> Result<T>) -> Result<T> {
        let project = RefCell::new(None);
        backend::read(&mut self.conn, |conn| {
            f(&mut Tx {
                conn,
                writing: false,
                project: &project,
            })
        })
    }

    /// Adds a login role to the registry (run by its owner); a ledger file has no roles.
    pub fn add_role(
        &mut self,
        name: &str,
        kind: &RoleKind,
        at: chrono::DateTime<chrono::Utc>,
    ) -> Result<()> {
        let Conn::Pg(c) = &mut self.conn else {
            return Err(Error::field(
                "--db",
                &self.path.display().to_string(),
                "is a ledger file; roles belong to a PostgreSQL registry (--db postgres://USER@HOST/DB)",
            ));
        };
        c.transaction(|c| postgres::add_role(c, name, kind, at))
    }

    /// Which check of its own pages the database runs for `verify --deep`.
    pub fn deep_check(&self) -> DeepCheck {
        match &self.conn {
            Conn::Sqlite(_) => DeepCheck::IntegrityCheck,
            Conn::Pg(_) => DeepCheck::PageChecksums,
        }
    }

    /// The database's own check of its pages; "ok" when whole. SQLite checks the file's
    /// structure; the registry's server reports the page checksum failures it has seen.
    pub fn integrity_check(&mut self) -> Result<Vec<String>> {
        match &mut self.conn {
            Conn::Sqlite(c) => connection::integrity_check(c),
            Conn::Pg(c) => postgres::integrity_check(c),
        }
    }
}

/// Entry rows as ledger values; a row that does not read back is named.
fn read_back(project: &str, rows: &[EntryRow]) -> Result<Vec<SealedEntry>> {
    rows.iter()
        .map(|r| {
            r.to_sealed()
                .map_err(|what| Error::entry(project, Some(r.seq), what))
        })
        .collect()
}

/// A stored row that no longer reads back is a sign of tampering or corruption.
fn inconsistent(what: String) -> Error {
    Error::ledger(what)
}

impl Tx<'_> {
    pub fn projects(&mut self) -> Result<Vec<Project>> {
        let rows: Vec<ProjectRow> = projects::table
            .order(projects::code)
            .select(ProjectRow::as_select())
            .load(self.conn)?;
        rows.iter()
            .map(|r| r.to_project().map_err(Error::ledger))
            .collect()
    }

    pub fn project(&mut self, code: &str) -> Result<Option<Project>> {
        self.names(code);
        let row: Option<ProjectRow> = projects::table
            .find(code)
            .select(ProjectRow::as_select())
            .first(self.conn)
            .optional()?;
        row.map(|r| r.to_project().map_err(Error::ledger))
            .transpose()
    }

    pub fn add_project(&mut self, p: &Project) -> Result<()> {
        self.names(&p.code);
        let row = ProjectRow::from_project(p);
        diesel::insert_into(projects::table)
            .values(&row)
            .execute(self.conn)?;
        self.link(Record::Project, &p.code, "", &row.row_hash)
    }

    pub fn sites(&mut self, project: &str) -> Result<Vec<Site>> {
        let rows: Vec<SiteRow> = sites::table
            .filter(sites::project.eq(project))
            .order(sites::code)
            .select(SiteRow::as_select())
            .load(self.conn)?;
        rows.iter()
            .map(|r| r.to_site().map_err(Error::ledger))
            .collect()
    }

    pub fn site(&mut self, project: &str, code: &str) -> Result<Option<Site>> {
        let row: Option<SiteRow> = sites::table
            .find((project, code))
            .select(SiteRow::as_select())
            .first(self.conn)
            .optional()?;
        row.map(|r| r.to_site().map_err(Error::ledger)).transpose()
    }

    pub fn add_site(&mut self, s: &Site) -> Result<()> {
        let row = SiteRow::from_site(s);
        diesel::insert_into(sites::table)
            .values(&row)
            .execute(self.conn)?;
        self.link(Record::Site, &s.project, &s.code, &row.row_hash)
    }

    /// A project's seal entries in seq order: one per sealed period, so few, found through the
    /// partial index `entries_seals` (its condition written out as a literal, as the planner
    /// needs to match it; a bound 'seal' would scan the project's chain).
    pub fn seal_entries(&mut self, project: &str) -> Result<Vec<SealedEntry>> {
        let rows: Vec<EntryRow> = entries::table
            .filter(
                entries::project
                    .eq(project)
                    .and(diesel::dsl::sql::<diesel::sql_types::Bool>("kind = 'seal'")),
            )
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
                crate::ledger::seal::Seal::from_entry(&s.entry)
                    .map_err(|what| Error::entry(project, Some(s.entry.seq as i64), what))
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
            .map(|r| r.to_statement().map_err(Error::ledger))
            .collect()
    }

    pub fn add_signature(&mut self, s: &crate::ledger::signature::Statement) -> Result<()> {
        let row = rows::SignatureRow::from_statement(s);
        diesel::insert_into(schema::signatures::table)
            .values(&row)
            .execute(self.conn)?;
        let item = row.seq.to_string();
        self.link(Record::Signature, &row.project, &item, &row.row_hash)
    }

    /// The entry holding an idempotency key, if any.
    pub fn entry_by_key(&mut self, project: &str, key: &str) -> Result<Option<SealedEntry>> {
        let row: Option<EntryRow> = entries::table
            .filter(entries::project.eq(project).and(entries::idem_key.eq(key)))
            .select(EntryRow::as_select())
            .first(self.conn)
            .optional()?;
        row.map(|r| r.to_sealed().map_err(Error::ledger))
            .transpose()
    }

    /// The seq the next entry takes and the chain head it links to. In a write on the registry
    /// the project's chain is locked first, until the transaction ends.
    pub fn chain_tip(&mut self, project: &str) -> Result<(u64, Hash)> {
        self.hold(project)?;
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
                    Error::entry(project, Some(seq), "chain_hash is not a SHA-256 hex digest")
                })?;
                Ok((seq as u64 + 1, head))
            }
        }
    }

    /// Appends sealed entries; the caller has linked them to the chain tip. Every writer comes
    /// through here, so here the chain's recorded times are kept in order, and each row gets its
    /// project's running figures through it (`ledger::tally`), from the tip's and the rows
    /// before it in the batch, a correction's target read by its seq.
    pub fn append(&mut self, sealed: &[SealedEntry]) -> Result<()> {
        let Some(first) = sealed.first() else {
            return Ok(());
        };
        let project = &first.entry.project;
        let tip = self.tip_tally(project)?;
        let last = tip.as_ref().map(|t| (t.seq, t.recorded_at));
        crate::ledger::chain::in_time_order(project, last, sealed).map_err(Error::Refused)?;
        let mut tally = self.tally_at(project, tip.as_ref())?;
        let mut rows = Vec::with_capacity(sealed.len());
        for (i, s) in sealed.iter().enumerate() {
            let replaced = match s.entry.corrects {
                None => None,
                Some(t) => match t
                    .checked_sub(first.entry.seq)
                    .and_then(|k| usize::try_from(k).ok())
                {
                    Some(k) if k < i => Some(sealed[k].entry.clone()),
                    _ => self.entry_at(project, t)?.map(|r| r.entry),
                },
            };
            tally = tally.after(&s.entry, replaced.as_ref());
            rows.push(TalliedRow::new(s, tally));
        }
        // SQLite: one row a statement, prepared once and kept in diesel's statement cache
        // (every column bound, so the text never changes), stepped per row: there is no round
        // trip to save, and a many-row statement would be parsed anew each time. PostgreSQL:
        // 1,000 rows a statement, each a round trip to the server (22 columns × 1,000 rows
        // stays under its 65,535 bound parameters).
        let per_statement = match &*self.conn {
            Conn::Sqlite(_) => 1,
            Conn::Pg(_) => 1000,
        };
        on_backend!(&mut *self.conn, c => {
            for chunk in rows.chunks(per_statement) {
                match chunk {
                    [one] => diesel::insert_into(entries::table).values(one).execute(c),
                    many => diesel::insert_into(entries::table).values(many).execute(c),
                }?;
            }
        });
        for s in sealed.iter().filter(|s| s.entry.kind == EntryKind::Seal) {
            let seq = s.entry.seq.to_string();
            self.link(Record::Seal, &s.entry.project, &seq, &s.chain.to_hex())?;
        }
        Ok(())
    }

    /// The role the entries appended in this transaction record: the registry's login role,
    /// or none in a ledger file, which has no database roles (docs/ledger-format.md, v2).
    pub fn recorded_by(&mut self) -> Result<Option<String>> {
        match &mut *self.conn {
            Conn::Pg(c) => postgres::current_role(c).map(Some),
            Conn::Sqlite(_) => Ok(None),
        }
    }

    /// Remembers the project a write is about.
    fn names(&self, project: &str) {
        if self.writing {
            *self.project.borrow_mut() = Some(project.to_string());
        }
    }

    /// In a write on the registry, locks `project`'s chain and settings until the transaction
    /// ends, so the seqs a writer reads stay the next ones free (SQLite's BEGIN IMMEDIATE
    /// already holds the whole file).
    fn hold(&mut self, project: &str) -> Result<()> {
        self.names(project);
        match (&mut *self.conn, self.writing) {
            (Conn::Pg(c), true) => postgres::lock_chain(c, project),
            _ => Ok(()),
        }
    }

    /// A project's settings, in the order recorded (locked first in a write: see `hold`).
    pub fn settings(&mut self, project: &str) -> Result<Vec<crate::ledger::setting::Setting>> {
        self.hold(project)?;
        let rows: Vec<SettingRow> = settings::table
            .filter(settings::project.eq(project))
            .order(settings::seq)
            .select(SettingRow::as_select())
            .load(self.conn)?;
        rows.iter()
            .map(|r| r.to_setting().map_err(Error::ledger))
            .collect()
    }

    pub fn add_settings(&mut self, new: &[crate::ledger::setting::Setting]) -> Result<()> {
        let rows: Vec<SettingRow> = new.iter().map(SettingRow::from_setting).collect();
        for r in &rows {
            diesel::insert_into(settings::table)
                .values(r)
                .execute(self.conn)?;
            self.link(Record::Setting, &r.project, &r.seq.to_string(), &r.row_hash)?;
        }
        Ok(())
    }
}

/// The database's own check of its pages: SQLite's `PRAGMA integrity_check` of the file's
/// structure, or the PostgreSQL server's count of page checksum failures in the database.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum DeepCheck {
    IntegrityCheck,
    PageChecksums,
}
