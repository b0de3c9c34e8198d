//! The two databases a ledger lives in: a SQLite file (an operator's own ledger) or a PostgreSQL
//! server (the shared registry). One connection type for both, so every query is written once;
//! the few statements diesel cannot build for both at once go through `on_backend!`.

use super::Wait;
use crate::error::{Error, Result, StoreKind};
use diesel::connection::{AnsiTransactionManager, Connection, TransactionManager};
use diesel::pg::PgConnection;
use diesel::result::{DatabaseErrorKind, Error as DieselError};
use diesel::sqlite::SqliteConnection;
use std::cell::RefCell;
use std::time::Duration;

/// An open ledger database.
#[derive(diesel::MultiConnection)]
pub enum Conn {
    Sqlite(SqliteConnection),
    Pg(PgConnection),
}

/// Runs the same expression on whichever connection `conn` holds, for the statements diesel's
/// multi-backend connection cannot carry (multi-row inserts, upserts).
macro_rules! on_backend {
    ($conn:expr, $c:ident => $body:expr) => {
        match $conn {
            $crate::store::backend::Conn::Sqlite($c) => $body,
            $crate::store::backend::Conn::Pg($c) => $body,
        }
    };
}
pub(crate) use on_backend;

/// How many times a write turned away for contention is tried in all, and the pause before the
/// second try, doubled before each later one (0.1 + 0.2 + 0.4 + 0.8 s).
const ATTEMPTS: u32 = 5;
const FIRST_PAUSE: Duration = Duration::from_millis(100);

impl From<DieselError> for Error {
    /// The backend's reason becomes a `StoreKind`; the message keeps the backend's words.
    fn from(e: DieselError) -> Self {
        let (kind, message) = match &e {
            DieselError::DatabaseError(DatabaseErrorKind::SerializationFailure, _) => {
                (StoreKind::Busy, format!("the ledger is busy ({e})"))
            }
            DieselError::DatabaseError(_, info)
                if info.message().starts_with("deadlock detected") =>
            {
                (StoreKind::Busy, format!("the ledger is busy ({e})"))
            }
            DieselError::DatabaseError(_, info)
                if [
                    "canceling statement due to lock timeout",
                    "could not obtain lock",
                    "database is locked",
                ]
                .iter()
                .any(|m| info.message().starts_with(m)) =>
            {
                (
                    StoreKind::Locked,
                    format!("another writer holds the ledger ({e})"),
                )
            }
            DieselError::DatabaseError(_, info)
                if info
                    .message()
                    .starts_with("new row violates row-level security policy")
                    || info.message().starts_with("permission denied for") =>
            {
                (StoreKind::Denied, info.message().to_string())
            }
            DieselError::DatabaseError(_, info) if super::connection::damaged(info.message()) => {
                return Error::ledger(format!("the ledger file is damaged ({})", info.message()));
            }
            DieselError::DatabaseError(DatabaseErrorKind::UniqueViolation, _) => {
                (StoreKind::Unique, format!("ledger database error: {e}"))
            }
            DieselError::DatabaseError(DatabaseErrorKind::ClosedConnection, _) => {
                (StoreKind::Connection, format!("ledger database error: {e}"))
            }
            _ if ["disk is full", "disk I/O error"]
                .iter()
                .any(|m| e.to_string().contains(m)) =>
            {
                (StoreKind::Disk, format!("ledger database error: {e}"))
            }
            _ => (StoreKind::Other, format!("ledger database error: {e}")),
        };
        Error::store(kind, message)
    }
}

fn is_busy(e: &Error) -> bool {
    e.store_kind() == Some(StoreKind::Busy)
}

/// Runs `f` in one transaction: on SQLite taken at once (BEGIN IMMEDIATE), so two writers never
/// fork a chain; on PostgreSQL the appends lock their project's chain instead. Either waits
/// at most `wait` (set on the connection) for another writer, then ends with one line saying
/// so. A transaction turned away for a deadlock left nothing behind, so it is run again from
/// the start, after a pause that doubles each time; after `ATTEMPTS` tries the command ends
/// with one line saying so.
pub fn write<T>(
    conn: &mut Conn,
    wait: Wait,
    project: &RefCell<Option<String>>,
    mut f: impl FnMut(&mut Conn) -> Result<T>,
) -> Result<T> {
    let mut pause = FIRST_PAUSE;
    let mut tried = 1;
    let mut done = transaction(conn, true, &mut f);
    while tried < ATTEMPTS && done.as_ref().is_err_and(is_busy) {
        std::thread::sleep(pause);
        pause *= 2;
        tried += 1;
        done = transaction(conn, true, &mut f);
    }
    match done {
        Err(e) if e.store_kind() == Some(StoreKind::Locked) => Err(wait.ran_out()),
        Err(e) if is_busy(&e) => Err(Error::store(
            StoreKind::Busy,
            format!(
                "{e}; tried {ATTEMPTS} times, pausing {:.1} s in all between tries; nothing was written, try again later",
                (pause - FIRST_PAUSE).as_secs_f64()
            ),
        )),
        Err(Error::Store {
            kind: StoreKind::Denied,
            message,
        }) => Err(Error::Refused(format!(
            "role {} may not write {}: an operator's role writes only its own operator's projects, a verifier's only signed statements, a regulator's nothing {}; nothing written",
            role(conn),
            match project.borrow().as_deref() {
                Some(p) => format!("project {p}"),
                None => "this".into(),
            },
            format_args!("({message})")
        ))),
        done => done,
    }
}

/// The database role the connection writes as.
fn role(conn: &mut Conn) -> String {
    match conn {
        Conn::Pg(c) => super::postgres::current_role(c).ok(),
        Conn::Sqlite(_) => None,
    }
    .unwrap_or_else(|| "(unknown)".into())
}

/// Runs `f` in a read transaction, so a report sees one consistent state.
pub fn read<T>(conn: &mut Conn, f: impl FnOnce(&mut Conn) -> Result<T>) -> Result<T> {
    transaction(conn, false, f)
}

fn transaction<T>(
    conn: &mut Conn,
    write: bool,
    f: impl FnOnce(&mut Conn) -> Result<T>,
) -> Result<T> {
    match conn {
        Conn::Sqlite(c) if write => {
            AnsiTransactionManager::begin_transaction_sql(c, "BEGIN IMMEDIATE")
        }
        Conn::Sqlite(c) => AnsiTransactionManager::begin_transaction(c),
        Conn::Pg(c) => AnsiTransactionManager::begin_transaction(c),
    }?;
    match f(conn) {
        Ok(v) => {
            <Conn as Connection>::TransactionManager::commit_transaction(conn)?;
            Ok(v)
        }
        Err(e) => {
            // The failure is what the user needs to see; a failed rollback leaves nothing written.
            let _ = <Conn as Connection>::TransactionManager::rollback_transaction(conn);
            Err(e)
        }
    }
}

/// Turns `?` placeholders into PostgreSQL's `$1, $2, …` for a hand-written statement.
pub fn placeholders<'s>(conn: &Conn, sql: &'s str) -> std::borrow::Cow<'s, str> {
    match conn {
        Conn::Sqlite(_) => sql.into(),
        Conn::Pg(_) => {
            let mut out = String::with_capacity(sql.len() + 8);
            let mut n = 0;
            for ch in sql.chars() {
                if ch == '?' {
                    n += 1;
                    out.push_str(&format!("${n}"));
                } else {
                    out.push(ch);
                }
            }
            out.into()
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn contention_is_told_apart_from_other_store_errors() {
        let waited_out = |e: &Error| e.store_kind() == Some(StoreKind::Locked);
        assert!(!is_busy(&Error::store(StoreKind::Other, "disk full")));
        assert!(!is_busy(&Error::Refused("the ledger is busy".into())));
        let locked = DieselError::DatabaseError(
            DatabaseErrorKind::Unknown,
            Box::new("database is locked".to_string()),
        );
        assert!(waited_out(&Error::from(locked)), "SQLite's busy file");
        let timeout = DieselError::DatabaseError(
            DatabaseErrorKind::Unknown,
            Box::new("canceling statement due to lock timeout".to_string()),
        );
        let timeout = Error::from(timeout);
        assert!(
            waited_out(&timeout) && !is_busy(&timeout),
            "PostgreSQL's 55P03"
        );
        let deadlock = DieselError::DatabaseError(
            DatabaseErrorKind::Unknown,
            Box::new("deadlock detected".to_string()),
        );
        assert!(is_busy(&Error::from(deadlock)), "PostgreSQL's 40P01");
    }
}
