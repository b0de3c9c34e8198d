//! INSERT OR REPLACE cannot replace a stored row of any append-only table: the conflict
//! resolution would delete the row without firing its DELETE trigger, so each table refuses an
//! insert whose key is already held, whatever tool opened the file.

mod common;
use common::Ledger;
use diesel::connection::SimpleConnection;
use diesel::sql_types::Text;
use diesel::{Connection, QueryableByName, RunQueryDsl, SqliteConnection};

/// Every append-only table, with a column to change in the replacing row and its new value.
const TABLES: &[(&str, &str, &str)] = &[
    ("projects", "name", "'Renamed'"),
    ("sites", "kind", "'monitoring-well'"),
    ("entries", "grams", "grams + 1"),
    ("imports", "row_count", "row_count + 1"),
    ("feedstocks", "density", "'9 t/m3'"),
    ("settings", "value", "'0.99'"),
    ("signatures", "statement", "'Nothing to see.'"),
    ("import_evidence", "bytes", "zeroblob(1)"),
    ("ledger_chain", "row_hash", "leaf_hash"),
    ("reconciliations", "verdict", "'MATERIAL'"),
];

#[derive(QueryableByName)]
struct Name {
    #[diesel(sql_type = Text)]
    name: String,
}

#[derive(QueryableByName)]
struct Dump {
    #[diesel(sql_type = Text)]
    rows: String,
}

fn raw(l: &Ledger) -> SqliteConnection {
    SqliteConnection::establish(l.path.to_str().unwrap()).unwrap()
}

fn columns(c: &mut SqliteConnection, table: &str) -> Vec<String> {
    diesel::sql_query(format!(
        "SELECT name FROM pragma_table_info('{table}') ORDER BY cid"
    ))
    .load::<Name>(c)
    .unwrap()
    .into_iter()
    .map(|n| n.name)
    .collect()
}

/// Every row of `table`, every column quoted, in storage order: what must not change.
fn dump(c: &mut SqliteConnection, table: &str) -> String {
    let quoted: Vec<String> = columns(c, table)
        .iter()
        .map(|n| format!("quote({n})"))
        .collect();
    diesel::sql_query(format!(
        "SELECT coalesce(group_concat(r, char(10)), '') AS rows FROM \
         (SELECT {} AS r FROM {table} ORDER BY rowid)",
        quoted.join(" || ',' || ")
    ))
    .get_result::<Dump>(c)
    .unwrap_or_else(|e| panic!("dump {table}: {e}"))
    .rows
}

/// `verb` INTO `table` a copy of its first row with `column` set to `value`: same key, new content.
fn replacing(
    c: &mut SqliteConnection,
    verb: &str,
    table: &str,
    column: &str,
    value: &str,
) -> String {
    let cols = columns(c, table);
    let values: Vec<String> = cols
        .iter()
        .map(|n| {
            if n == column {
                value.to_string()
            } else {
                n.clone()
            }
        })
        .collect();
    format!(
        "{verb} INTO {table} ({}) SELECT {} FROM {table} ORDER BY rowid LIMIT 1",
        cols.join(", "),
        values.join(", ")
    )
}

/// The demo's ledger in a file (these tests run SQLite's own REPLACE on it): every table
/// filled (the demo signs TFS's sealed 2026 as operator and as verifier).
fn every_table_filled() -> Ledger {
    let l = common::on_file(Ledger::demo);
    let mut c = raw(&l);
    let tables: Vec<String> = diesel::sql_query(
        "SELECT name FROM sqlite_master WHERE type = 'table' AND name NOT LIKE 'sqlite_%' \
         AND name <> '__diesel_schema_migrations' ORDER BY name",
    )
    .load::<Name>(&mut c)
    .unwrap()
    .into_iter()
    .map(|n| n.name)
    .collect();
    for t in &tables {
        assert!(
            TABLES.iter().any(|(name, _, _)| name == t),
            "table {t} is not in TABLES: give it the three append-only triggers and list it here"
        );
    }
    for (table, _, _) in TABLES {
        assert_ne!(dump(&mut c, table), "", "{table} has no row to replace");
    }
    l
}

/// Runs `sql`, insists that it fails and leaves `table` as it was; returns the error.
fn assert_refused(c: &mut SqliteConnection, sql: &str, table: &str) -> String {
    let before = dump(c, table);
    let e = c
        .batch_execute(sql)
        .expect_err(&format!("{sql} went through"))
        .to_string();
    assert!(e.contains("append-only"), "{sql}: {e}");
    assert_eq!(dump(c, table), before, "{sql} changed {table}");
    e
}

#[test]
fn insert_or_replace_is_refused_on_every_append_only_table() {
    let l = every_table_filled();
    let mut c = raw(&l);
    for (table, column, value) in TABLES {
        for verb in ["INSERT OR REPLACE", "REPLACE"] {
            let sql = replacing(&mut c, verb, table, column, value);
            let e = assert_refused(&mut c, &sql, table);
            let words = table.replace('_', " ");
            assert!(
                e.contains(&format!("{words} cannot be replaced")),
                "{sql}: {e}"
            );
        }
    }
    drop(c);
    let v = l.run(&["verify"]);
    assert_eq!(v.code, 0, "{}", v.err);
}

/// With the insert triggers gone, a connection that sets recursive_triggers (as every sinkbook
/// connection does) still refuses: the rows REPLACE would delete fire the DELETE triggers.
#[test]
fn recursive_triggers_make_replace_fire_the_delete_triggers() {
    let l = every_table_filled();
    let mut c = raw(&l);
    c.batch_execute("PRAGMA recursive_triggers = ON;").unwrap();
    for (table, column, value) in TABLES {
        c.batch_execute(&format!("DROP TRIGGER {table}_append_only_replace;"))
            .unwrap();
        let sql = replacing(&mut c, "INSERT OR REPLACE", table, column, value);
        assert_refused(&mut c, &sql, table);
    }
}
