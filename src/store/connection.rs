//! Opening a ledger file: refusing files that are not ledgers, setting the pragmas every
//! connection needs, applying the embedded migrations.

use super::Wait;
use crate::error::{Error, Result, StoreKind};
use diesel::connection::SimpleConnection;
use diesel::prelude::*;
use diesel::sql_types::{Integer, Text};
use diesel::sqlite::SqliteConnection;
use diesel_migrations::{EmbeddedMigrations, MigrationHarness, embed_migrations};
use std::path::Path;

const MIGRATIONS: EmbeddedMigrations = embed_migrations!("migrations/sqlite");

/// Marks a SQLite file as a sinkbook ledger ("SKB1" in ASCII).
pub const APPLICATION_ID: i32 = 0x534B_4231;

#[derive(QueryableByName)]
struct AppId {
    #[diesel(sql_type = Integer)]
    application_id: i32,
}

#[derive(QueryableByName)]
struct Count {
    #[diesel(sql_type = Integer)]
    n: i32,
}

#[derive(QueryableByName)]
struct Line {
    #[diesel(sql_type = Text)]
    integrity_check: String,
}

fn store_error(path: &Path, e: impl std::fmt::Display) -> Error {
    let m = e.to_string();
    if damaged(&m) {
        return damaged_file(path, m);
    }
    Error::store(
        StoreKind::Connection,
        format!("ledger {}: {m}", path.display()),
    )
}

/// SQLite's words for a file whose pages do not hold together.
pub(super) fn damaged(message: &str) -> bool {
    message.contains("database disk image is malformed")
        || message.contains("file is not a database")
}

fn damaged_file(path: &Path, why: impl std::fmt::Display) -> Error {
    Error::ledger(format!(
        "ledger file {} is damaged ({why}): restore it from a copy; nothing was read or written",
        path.display()
    ))
}

/// The first bytes of every SQLite file.
const SQLITE_HEADER: &[u8; 16] = b"SQLite format 3\0";

/// The length of SQLite's file header, in which the application_id stands.
const HEADER_LEN: u64 = 100;

/// Whether the file starts as a SQLite file does, and its length: a SQLite file that SQLite
/// cannot read is a damaged ledger, anything else is not a ledger at all.
fn sqlite_file(path: &Path) -> Option<u64> {
    use std::io::Read;
    let mut f = std::fs::File::open(path).ok()?;
    let mut head = [0u8; 16];
    f.read_exact(&mut head).ok()?;
    (&head == SQLITE_HEADER).then(|| f.metadata().map(|m| m.len()).unwrap_or(0))
}

fn connect(path: &Path, wait: Wait) -> Result<SqliteConnection> {
    let url = path
        .to_str()
        .ok_or_else(|| Error::field("--db", &path.display().to_string(), "is not valid UTF-8"))?;
    let mut conn = SqliteConnection::establish(url).map_err(|e| store_error(path, e))?;
    // Wait for another writer as long as --wait says rather than failing at once; set first,
    // before anything reads. Readers take no lock a writer holds (WAL), so only writers wait.
    conn.batch_execute(&format!("PRAGMA busy_timeout = {};", wait.millis()))
        .map_err(|e| store_error(path, e))?;
    Ok(conn)
}

/// The file's application_id; a file that is not SQLite at all is refused here, and a SQLite
/// file cut short of its header, or that SQLite cannot read, is damaged.
fn application_id(path: &Path, conn: &mut SqliteConnection) -> Result<i32> {
    let sqlite = sqlite_file(path);
    if let Some(len) = sqlite.filter(|len| *len < HEADER_LEN) {
        return Err(damaged_file(
            path,
            format!("{len} bytes, shorter than SQLite's {HEADER_LEN}-byte header"),
        ));
    }
    diesel::sql_query("PRAGMA application_id")
        .get_result::<AppId>(conn)
        .map(|r| r.application_id)
        .map_err(|e| match sqlite {
            Some(_) => damaged_file(path, e),
            None => Error::store(
                StoreKind::NotALedger,
                format!("{} is not a sinkbook ledger ({e})", path.display()),
            ),
        })
}

/// WAL with full sync: a committed command survives a power cut. Recursive triggers make the
/// rows an INSERT OR REPLACE would delete fire the tables' append-only DELETE triggers (the
/// BEFORE INSERT triggers refuse it on connections of other tools too). The larger page cache
/// keeps a big import's B-tree pages in memory until its single commit.
fn configure(path: &Path, conn: &mut SqliteConnection) -> Result<()> {
    conn.batch_execute(
        "PRAGMA journal_mode = WAL; PRAGMA synchronous = FULL; PRAGMA foreign_keys = ON; \
         PRAGMA recursive_triggers = ON; PRAGMA cache_size = -32768;",
    )
    .map_err(|e| store_error(path, e))?;
    conn.run_pending_migrations(MIGRATIONS)
        .map_err(|e| store_error(path, format!("could not apply migrations: {e}")))?;
    Ok(())
}

/// Opens an existing ledger.
pub fn open(path: &Path, wait: Wait) -> Result<SqliteConnection> {
    if !path.is_file() {
        return Err(Error::store(
            StoreKind::Connection,
            format!(
                "ledger {} does not exist (create it with `sinkbook init`, or name another with --db or SINKBOOK_DB)",
                path.display()
            ),
        ));
    }
    let mut conn = connect(path, wait)?;
    let id = application_id(path, &mut conn)?;
    if id != APPLICATION_ID {
        return Err(Error::store(
            StoreKind::NotALedger,
            format!(
                "{} is not a sinkbook ledger (SQLite application_id {id:#x}, expected {APPLICATION_ID:#x})",
                path.display()
            ),
        ));
    }
    configure(path, &mut conn)?;
    Ok(conn)
}

/// Creates a ledger, or opens one that exists. An empty SQLite file may become a ledger; a file
/// that holds anything else is refused untouched.
pub fn create(path: &Path, wait: Wait) -> Result<(SqliteConnection, bool)> {
    if path.is_file() {
        let mut conn = connect(path, wait)?;
        let id = application_id(path, &mut conn)?;
        if id == APPLICATION_ID {
            configure(path, &mut conn)?;
            return Ok((conn, false));
        }
        let tables = diesel::sql_query("SELECT count(*) AS n FROM sqlite_master")
            .get_result::<Count>(&mut conn)
            .map_err(|e| store_error(path, e))?;
        if id != 0 || tables.n != 0 {
            return Err(Error::store(
                StoreKind::NotALedger,
                format!(
                    "{} is not a sinkbook ledger and is not empty; refusing to touch it",
                    path.display()
                ),
            ));
        }
        drop(conn);
    }
    let mut conn = connect(path, wait)?;
    conn.batch_execute(&format!("PRAGMA application_id = {APPLICATION_ID};"))
        .map_err(|e| store_error(path, e))?;
    configure(path, &mut conn)?;
    Ok((conn, true))
}

/// SQLite's integrity_check, line by line ("ok" alone when the file is whole).
pub fn integrity_check(conn: &mut SqliteConnection) -> Result<Vec<String>> {
    let lines: Vec<Line> = diesel::sql_query("PRAGMA integrity_check").load(conn)?;
    Ok(lines.into_iter().map(|l| l.integrity_check).collect())
}
