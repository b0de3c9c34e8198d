//! Opening the shared registry on a PostgreSQL server: the URL, the session settings every
//! connection needs, the embedded migrations, and the lock that keeps each project's chain whole.

use super::Wait;
use crate::error::{Error, Result, StoreKind};
use diesel::connection::SimpleConnection;
use diesel::pg::PgConnection;
use diesel::prelude::*;
use diesel::sql_types::{BigInt, Bool, Text};
use diesel_migrations::{EmbeddedMigrations, MigrationHarness, embed_migrations};
use std::path::Path;

const MIGRATIONS: EmbeddedMigrations = embed_migrations!("migrations/postgres");

/// The PostgreSQL URL `--db` names, if it names one (anything else is a SQLite file).
pub fn url(db: &Path) -> Option<&str> {
    db.to_str()
        .filter(|s| s.starts_with("postgres://") || s.starts_with("postgresql://"))
}

fn store_error(url: &str, e: impl std::fmt::Display) -> Error {
    Error::store(StoreKind::Connection, format!("registry {url}: {e}"))
}

#[derive(QueryableByName)]
struct Exists {
    #[diesel(sql_type = Bool)]
    exists: bool,
}

/// Connects and sets the session: UTC, no chatter on standard error, and locks (a project's
/// chain above all) waited for as long as `--wait` says; PostgreSQL reads take no such lock.
/// A lock timeout of 0 would wait for ever, so `--wait 0s` waits the least the server counts.
fn connect(url: &str, wait: Wait) -> Result<PgConnection> {
    let mut conn = PgConnection::establish(url).map_err(|e| store_error(url, e))?;
    conn.batch_execute(&format!(
        "SET TIME ZONE 'UTC'; SET client_min_messages = warning; SET lock_timeout = '{}ms';",
        wait.millis().max(1)
    ))
    .map_err(|e| store_error(url, e))?;
    Ok(conn)
}

fn is_registry(url: &str, conn: &mut PgConnection) -> Result<bool> {
    diesel::sql_query("SELECT to_regclass('public.projects') IS NOT NULL AS exists")
        .get_result::<Exists>(conn)
        .map(|r| r.exists)
        .map_err(|e| store_error(url, e))
}

fn migrate(url: &str, conn: &mut PgConnection) -> Result<()> {
    conn.run_pending_migrations(MIGRATIONS)
        .map(|_| ())
        .map_err(|e| store_error(url, format!("could not apply migrations: {e}")))
}

/// Opens an existing registry; a database without the ledger's tables is refused.
pub fn open(url: &str, wait: Wait) -> Result<PgConnection> {
    let mut conn = connect(url, wait)?;
    if !is_registry(url, &mut conn)? {
        return Err(Error::store(
            StoreKind::NotALedger,
            format!("{url} holds no sinkbook registry (create it with `sinkbook init --db {url}`)"),
        ));
    }
    // The owner migrates; an application role may create nothing, and reads and writes the
    // tables as the owner left them.
    let owner = diesel::sql_query("SELECT has_schema_privilege('public', 'CREATE') AS exists")
        .get_result::<Exists>(&mut conn)
        .map_err(|e| store_error(url, e))?;
    if owner.exists {
        migrate(url, &mut conn)?;
    }
    Ok(conn)
}

/// Creates the registry's tables, roles and policies in the database, or opens it if they are
/// there. Returns whether it was new.
pub fn create(url: &str, wait: Wait) -> Result<(PgConnection, bool)> {
    let mut conn = connect(url, wait)?;
    let existed = is_registry(url, &mut conn)?;
    migrate(url, &mut conn)?;
    Ok((conn, !existed))
}

/// Holds `project`'s chain for the rest of the transaction, so two writers append one after
/// the other and seqs stay dense. An advisory lock rather than `SELECT … FOR UPDATE`: row locks
/// need UPDATE privilege, which no application role holds on a ledger table.
pub fn lock_chain(conn: &mut PgConnection, project: &str) -> Result<()> {
    diesel::sql_query("SELECT pg_advisory_xact_lock(hashtextextended('sinkbook chain ' || $1, 0))")
        .bind::<Text, _>(project)
        .execute(conn)?;
    Ok(())
}

/// Holds the ledger chain for the rest of the transaction, so links stay dense whoever writes
/// them. Links are few (registrations, imports, statements, seals), so writers of different
/// projects seldom meet here, and only at the end of what they write.
pub fn lock_ledger_chain(conn: &mut PgConnection) -> Result<()> {
    diesel::sql_query("SELECT pg_advisory_xact_lock(hashtextextended('sinkbook ledger chain', 0))")
        .execute(conn)?;
    Ok(())
}

#[derive(QueryableByName)]
struct Role {
    #[diesel(sql_type = Text)]
    role: String,
}

/// The database role the connection writes as, which every entry it appends records.
pub fn current_role(conn: &mut PgConnection) -> Result<String> {
    Ok(
        diesel::sql_query("SELECT CAST(current_user AS TEXT) AS role")
            .get_result::<Role>(conn)?
            .role,
    )
}

#[derive(QueryableByName)]
struct Next {
    #[diesel(sql_type = BigInt)]
    id: i64,
}

/// The next import id from the imports table's own sequence, never taken twice.
pub fn next_import_id(conn: &mut PgConnection) -> Result<i64> {
    Ok(
        diesel::sql_query("SELECT nextval(pg_get_serial_sequence('imports', 'id')) AS id")
            .get_result::<Next>(conn)?
            .id,
    )
}

#[derive(QueryableByName)]
struct Failures {
    #[diesel(sql_type = BigInt)]
    failures: i64,
}

/// The page checksum failures the server has counted in this database ("ok" when none).
pub fn integrity_check(conn: &mut PgConnection) -> Result<Vec<String>> {
    let n = diesel::sql_query(
        "SELECT COALESCE(checksum_failures, 0) AS failures FROM pg_stat_database \
         WHERE datname = current_database()",
    )
    .get_result::<Failures>(conn)?
    .failures;
    Ok(vec![match n {
        0 => "ok".into(),
        n => format!("the server counted {n} page checksum failures in this database"),
    }])
}

/// What a registry role may do: write one operator's projects, read and attest, or read.
#[derive(Debug, Clone, PartialEq, Eq)]
pub enum RoleKind {
    Operator(String),
    Verifier,
    Regulator,
}

impl RoleKind {
    /// The group role (migrations/postgres) the login role joins.
    fn group(&self) -> &'static str {
        match self {
            RoleKind::Operator(_) => "sinkbook_operator",
            RoleKind::Verifier => "sinkbook_verifier",
            RoleKind::Regulator => "sinkbook_regulator",
        }
    }

    pub fn word(&self) -> &'static str {
        match self {
            RoleKind::Operator(_) => "operator",
            RoleKind::Verifier => "verifier",
            RoleKind::Regulator => "regulator",
        }
    }
}

#[derive(QueryableByName)]
struct Statement {
    #[diesel(sql_type = Text)]
    sql: String,
}

/// Refuses a login role name PostgreSQL would not keep whole: 1 to 63 bytes.
pub fn role_name(name: &str) -> std::result::Result<(), &'static str> {
    match name.is_empty() || name.len() > 63 {
        true => Err("must be 1 to 63 bytes (PostgreSQL's limit)"),
        false => Ok(()),
    }
}

/// Creates login role `name` in its kind's group and records what it may write, in one
/// transaction: a role the mapping does not hold writes nothing.
pub fn add_role(
    conn: &mut PgConnection,
    name: &str,
    kind: &RoleKind,
    at: chrono::DateTime<chrono::Utc>,
) -> Result<()> {
    // format('%I') quotes the name as PostgreSQL itself would.
    let create =
        diesel::sql_query("SELECT format('CREATE ROLE %I LOGIN IN ROLE %I', $1, $2) AS sql")
            .bind::<Text, _>(name)
            .bind::<Text, _>(kind.group())
            .get_result::<Statement>(conn)?
            .sql;
    conn.batch_execute(&create)?;
    let operator = match kind {
        RoleKind::Operator(o) => Some(o.as_str()),
        _ => None,
    };
    diesel::sql_query("INSERT INTO registry_roles VALUES ($1, $2, $3, $4)")
        .bind::<Text, _>(name)
        .bind::<Text, _>(kind.word())
        .bind::<diesel::sql_types::Nullable<Text>, _>(operator)
        .bind::<diesel::sql_types::Timestamp, _>(at.naive_utc())
        .execute(conn)?;
    Ok(())
}

#[cfg(test)]
mod tests {
    #[test]
    fn a_role_name_is_1_to_63_bytes() {
        assert!(super::role_name("northdeep_ops").is_ok());
        assert!(super::role_name("").is_err());
        assert!(super::role_name(&"é".repeat(32)).is_err(), "64 bytes");
    }
}
