//! The two databases a ledger lives in: a SQLite file (an operator's own ledger) or a PostgreSQL
//! server (the shared registry). One connection type for both, so every query is written once;
//! the few statements diesel cannot build for both at once go through `on_backend!`.

use crate::error::{Error, Result};
use diesel::connection::{AnsiTransactionManager, Connection, TransactionManager};
use diesel::pg::PgConnection;
use diesel::result::{DatabaseErrorKind, Error as DieselError};
use diesel::sqlite::SqliteConnection;
use std::cell::RefCell;

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

/// Marks a store error worth another attempt: a deadlock, a serialization failure or a lock
/// that timed out, all of which leave the database as it was.
const BUSY: &str = "the registry is busy";

impl From<DieselError> for Error {
    fn from(e: DieselError) -> Self {
        match &e {
            DieselError::DatabaseError(DatabaseErrorKind::SerializationFailure, _) => {
                Error::Store(format!("{BUSY} ({e})"))
            }
            DieselError::DatabaseError(_, info)
                if info.message().starts_with("deadlock detected")
                    || info
                        .message()
                        .starts_with("canceling statement due to lock timeout") =>
            {
                Error::Store(format!("{BUSY} ({e})"))
            }
            DieselError::DatabaseError(_, info)
                if info
                    .message()
                    .starts_with("new row violates row-level security policy")
                    || info.message().starts_with("permission denied for") =>
            {
                Error::Refused(format!("{REFUSED} ({})", info.message()))
            }
            _ => Error::Store(format!("ledger database error: {e}")),
        }
    }
}

/// Marks a write the registry's roles do not allow; `write` names the role in the message.
const REFUSED: &str = "the registry refused the write";

fn is_busy(e: &Error) -> bool {
    matches!(e, Error::Store(m) if m.starts_with(BUSY))
}

/// Runs `f` in one transaction: on SQLite taken at once (BEGIN IMMEDIATE), so two writers never
/// fork a chain; on PostgreSQL the appends lock their project's chain instead. A write the
/// server refused for contention (deadlock, lock timeout) ends with one line saying so.
pub fn write<T>(
    conn: &mut Conn,
    project: &RefCell<Option<String>>,
    f: impl FnOnce(&mut Conn) -> Result<T>,
) -> Result<T> {
    match transaction(conn, true, f) {
        Err(e) if is_busy(&e) => Err(Error::Store(format!("{e}; nothing was written: try again"))),
        Err(Error::Refused(m)) if m.starts_with(REFUSED) => Err(Error::Refused(format!(
            "role {} may not write {}: an operator's role writes only its own operator's projects, a verifier's only signed statements, a regulator's nothing {}; nothing written",
            role(conn),
            match project.borrow().as_deref() {
                Some(p) => format!("project {p}"),
                None => "this".into(),
            },
            m[REFUSED.len()..].trim_start()
        ))),
        done => done,
    }
}

#[derive(diesel::QueryableByName)]
struct Role {
    #[diesel(sql_type = diesel::sql_types::Text)]
    role: String,
}

/// The database role the connection writes as.
fn role(conn: &mut Conn) -> String {
    use diesel::RunQueryDsl;
    diesel::sql_query("SELECT CAST(current_user AS TEXT) AS role")
        .get_result::<Role>(conn)
        .map(|r| r.role)
        .unwrap_or_else(|_| "(unknown)".into())
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
        assert!(is_busy(&Error::Store(format!(
            "{BUSY} (deadlock detected)"
        ))));
        assert!(!is_busy(&Error::Store(
            "ledger database error: disk full".into()
        )));
        assert!(!is_busy(&Error::Refused(BUSY.into())));
    }
}
