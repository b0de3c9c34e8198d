//! The tamper matrix: every column of every table of a ledger file, read from the schema itself
//! (so a new column or table cannot be forgotten), is changed in one row with every trigger
//! dropped, and `verify` must exit 3 naming the row; every table's first row is deleted, and
//! `verify` must name it; every table's last row is deleted, and `verify` given the heads
//! published before must exit 3. (INSERT OR REPLACE on every table is tests/refuse_replace.rs.)

mod common;
use common::Ledger;
use diesel::connection::SimpleConnection;
use diesel::sql_types::{BigInt, Nullable, Text};
use diesel::{Connection, QueryableByName, RunQueryDsl, SqliteConnection};
use std::path::{Path, PathBuf};

/// Tables that hold no ledger data: diesel's list of the migrations applied.
const NOT_LEDGER_DATA: &[&str] = &["__diesel_schema_migrations"];

#[derive(QueryableByName)]
struct Name {
    #[diesel(sql_type = Text)]
    name: String,
}

#[derive(QueryableByName)]
struct Column {
    #[diesel(sql_type = Text)]
    name: String,
    #[diesel(sql_type = Text)]
    kind: String,
}

#[derive(QueryableByName)]
struct Value {
    #[diesel(sql_type = Nullable<Text>)]
    v: Option<String>,
}

#[derive(QueryableByName)]
struct RowId {
    #[diesel(sql_type = BigInt)]
    id: i64,
}

fn raw(path: &Path) -> SqliteConnection {
    SqliteConnection::establish(path.to_str().unwrap()).unwrap()
}

fn names(c: &mut SqliteConnection, sql: &str) -> Vec<String> {
    diesel::sql_query(sql)
        .load::<Name>(c)
        .unwrap()
        .into_iter()
        .map(|n| n.name)
        .collect()
}

fn tables(c: &mut SqliteConnection) -> Vec<String> {
    names(
        c,
        "SELECT name FROM sqlite_master WHERE type = 'table' AND name NOT LIKE 'sqlite_%' ORDER BY name",
    )
    .into_iter()
    .filter(|t| !NOT_LEDGER_DATA.contains(&t.as_str()))
    .collect()
}

fn columns(c: &mut SqliteConnection, table: &str) -> Vec<Column> {
    diesel::sql_query(format!(
        "SELECT name, type AS kind FROM pragma_table_info('{table}') ORDER BY cid"
    ))
    .load(c)
    .unwrap()
}

/// One value of a row, as text (NULL, or no such row, as None).
fn value(c: &mut SqliteConnection, table: &str, column: &str, rowid: i64) -> Option<String> {
    diesel::sql_query(format!(
        "SELECT CAST({column} AS TEXT) AS v FROM {table} WHERE rowid = {rowid}"
    ))
    .get_result::<Value>(c)
    .ok()
    .and_then(|r| r.v)
}

fn rowid(c: &mut SqliteConnection, sql: &str) -> Option<i64> {
    diesel::sql_query(sql)
        .get_result::<RowId>(c)
        .ok()
        .map(|r| r.id)
}

/// How `verify` may name a row of `table`, from its key values: every table must be here.
fn row_names(c: &mut SqliteConnection, table: &str, rowid: i64) -> Vec<String> {
    let mut v = |col: &str| value(c, table, col, rowid).unwrap_or_default();
    match table {
        "projects" => vec![format!("project {}", v("code"))],
        "sites" => vec![format!("site {} of project {}", v("code"), v("project"))],
        "entries" => vec![format!("project {} seq {}", v("project"), v("seq"))],
        "settings" => vec![format!("setting {} of project {}", v("seq"), v("project"))],
        "feedstocks" => vec![format!(
            "feedstock {} of project {}",
            v("code"),
            v("project")
        )],
        "imports" => vec![format!("project {} import {}", v("project"), v("id"))],
        "import_evidence" => {
            let id = v("import_id");
            let project = value(c, "imports", "project", id.parse().unwrap()).unwrap_or_default();
            vec![format!("project {project} import {id}")]
        }
        "signatures" => vec![format!(
            "signature {} of project {}",
            v("seq"),
            v("project")
        )],
        "ledger_chain" => vec![format!("ledger link {}", v("seq"))],
        // Its link names "reconciliation N of project P"; its own run, decoding or hashing it,
        // "[project P: ]reconciliations row seq N[ of project P]".
        "reconciliations" => vec![
            format!("reconciliation {} of project {}", v("seq"), v("project")),
            format!(
                "project {}: reconciliations row seq {}",
                v("project"),
                v("seq")
            ),
            format!(
                "reconciliations row seq {} of project {}",
                v("seq"),
                v("project")
            ),
        ],
        other => panic!(
            "table {other} is not in the tamper matrix: say how verify names its rows, and make verify catch every change to it"
        ),
    }
}

/// A different value for a stored one, of the same type and still well formed where it can
/// be: the last letter or digit of a text moved by one (a date stays a date), an integer
/// moved far (no key it collides with), a blob's first byte flipped; NULL becomes a value.
fn changed(kind: &str, old: Option<&str>) -> String {
    let quote = |s: &str| format!("'{}'", s.replace('\'', "''"));
    match (kind, old) {
        ("INTEGER", None) => "1000003".into(),
        ("INTEGER", Some(n)) => format!("{}", n.parse::<i64>().unwrap() + 1_000_003),
        ("BLOB", _) => "CAST(X'5A' AS BLOB)".into(),
        (_, None) => quote("x"),
        (_, Some(s)) => {
            let mut chars: Vec<char> = s.chars().collect();
            match chars.iter().rposition(|ch| ch.is_ascii_alphanumeric()) {
                Some(i) => {
                    chars[i] = match chars[i] {
                        '0' => '1',
                        d @ '1'..='9' => (d as u8 - 1) as char,
                        'z' => 'y',
                        'Z' => 'Y',
                        l => (l as u8 + 1) as char,
                    }
                }
                None => chars.push('x'),
            }
            quote(&chars.into_iter().collect::<String>())
        }
    }
}

/// The demo's ledger (every table filled) as a file with its WAL folded in, and the heads
/// `verify` printed for it: the ledger head and each project's chain head.
struct Template {
    ledger: Ledger,
    ledger_head: String,
    chain_heads: Vec<(String, String)>,
}

fn template() -> Template {
    let ledger = common::on_file(Ledger::demo);
    let text = ledger.ok(&["verify"]);
    let ledger_head = text
        .split("ledger head ")
        .nth(1)
        .and_then(|t| t.get(..64))
        .unwrap_or_else(|| panic!("verify prints the ledger head: {text}"))
        .to_string();
    let chain_heads = ledger
        .json(&["verify"])
        .as_array()
        .unwrap()
        .iter()
        .map(|p| {
            (
                p["project"].as_str().unwrap().to_string(),
                p["chain_hash"].as_str().unwrap().to_string(),
            )
        })
        .collect();
    raw(&ledger.path)
        .batch_execute("PRAGMA wal_checkpoint(TRUNCATE);")
        .unwrap();
    Template {
        ledger,
        ledger_head,
        chain_heads,
    }
}

impl Template {
    /// A fresh copy of the ledger with every trigger dropped, as an attacker would leave it.
    fn copy(&self, name: &str) -> (Ledger, SqliteConnection) {
        let dir = tempfile::tempdir().unwrap();
        let path: PathBuf = dir.path().join(format!("{name}.db"));
        std::fs::copy(&self.ledger.path, &path).unwrap();
        let mut c = raw(&path);
        // As the sqlite3 shell opens it: foreign keys not enforced (diesel turns them on).
        c.batch_execute("PRAGMA foreign_keys = OFF;").unwrap();
        for t in names(
            &mut c,
            "SELECT name FROM sqlite_master WHERE type = 'trigger'",
        ) {
            c.batch_execute(&format!("DROP TRIGGER {t};")).unwrap();
        }
        let l = Ledger {
            dir,
            path,
            registry: None,
        };
        (l, c)
    }
}

fn assert_named(l: &Ledger, args: &[&str], what: &str, names: &[String]) {
    let r = l.run(args);
    assert_eq!(
        r.code, 3,
        "{what}: verify exited {}: {}{}",
        r.code, r.out, r.err
    );
    assert!(
        names
            .iter()
            .any(|n| r.err.contains(&format!("{n}:")) || r.err.contains(&format!("{n} "))),
        "{what}: verify should name one of {names:?}: {}",
        r.err
    );
}

#[test]
fn every_column_changed_in_one_row_is_caught_and_the_row_named() {
    let t = template();
    let mut c = raw(&t.ledger.path);
    let mut cases = 0;
    for table in tables(&mut c) {
        let cols = columns(&mut c, &table);
        assert!(!cols.is_empty(), "{table} has no columns");
        for col in cols {
            let (l, mut lc) = t.copy(&format!("{table}-{}", col.name));
            let id = rowid(
                &mut lc,
                &format!(
                    "SELECT rowid AS id FROM {table} WHERE {} IS NOT NULL ORDER BY rowid LIMIT 1",
                    col.name
                ),
            )
            .or_else(|| {
                rowid(
                    &mut lc,
                    &format!("SELECT rowid AS id FROM {table} ORDER BY rowid LIMIT 1"),
                )
            })
            .unwrap_or_else(|| panic!("{table} has no row in the demo's ledger to change"));
            let mut named = row_names(&mut lc, &table, id);
            let old = value(&mut lc, &table, &col.name, id);
            let new = changed(&col.kind, old.as_deref());
            let sql = format!("UPDATE {table} SET {} = {new} WHERE rowid = {id}", col.name);
            lc.batch_execute(&sql)
                .unwrap_or_else(|e| panic!("{sql}: {e}"));
            named.extend(row_names(&mut lc, &table, id));
            drop(lc);
            assert_named(&l, &["verify"], &sql, &named);
            cases += 1;
        }
    }
    eprintln!("tamper matrix: {cases} columns changed, each caught by verify naming its row");
}

/// A copy of the template with the first (`ASC`) or last (`DESC`) row of `table` deleted: the
/// copy, the names verify may give the row, the project it belonged to, the SQL run.
fn deleted(
    t: &Template,
    table: &str,
    order: &str,
) -> (Ledger, Vec<String>, Option<String>, String) {
    let (l, mut c) = t.copy(&format!("{table}-{order}"));
    let id = rowid(
        &mut c,
        &format!("SELECT rowid AS id FROM {table} ORDER BY rowid {order} LIMIT 1"),
    )
    .unwrap_or_else(|| panic!("{table} has no row in the demo's ledger"));
    let named = row_names(&mut c, table, id);
    let project = match table {
        "projects" => value(&mut c, table, "code", id),
        "import_evidence" | "ledger_chain" => None,
        _ => value(&mut c, table, "project", id),
    };
    let sql = format!("DELETE FROM {table} WHERE rowid = {id}");
    c.batch_execute(&sql).unwrap();
    (l, named, project, sql)
}

#[test]
fn every_table_s_first_row_deleted_is_caught_and_named() {
    let t = template();
    for table in tables(&mut raw(&t.ledger.path)) {
        let (l, named, _, sql) = deleted(&t, &table, "ASC");
        assert_named(&l, &["verify"], &sql, &named);
    }
}

/// The last row of a table may be the tail of a chain, which a shorter chain hides: the heads
/// published before (the ledger head, and the chain head of the project whose row it was)
/// catch it.
#[test]
fn every_table_s_last_row_deleted_is_caught_with_the_published_heads() {
    let t = template();
    for table in tables(&mut raw(&t.ledger.path)) {
        let (l, mut named, project, sql) = deleted(&t, &table, "DESC");
        named.push("the ledger chain no longer holds head".into());
        named.push("the chain no longer holds head".into());
        // The last link gone, the row it named is in none.
        named.push("is in no ledger link".into());
        let mut args = vec!["verify", "--expect-ledger-head", t.ledger_head.as_str()];
        let head = project.and_then(|p| t.chain_heads.iter().find(|(q, _)| *q == p).cloned());
        if let Some((p, h)) = &head {
            args.extend([p.as_str(), "--expect-head", h.as_str()]);
        }
        assert_named(&l, &args, &sql, &named);
    }
}

/// A project deleted with everything it had, triggers dropped: its tonnes would vanish from the
/// totals, and `verify` names it from its link; with its links cut from the end of the ledger
/// chain too, the ledger head published before catches it.
#[test]
fn a_deleted_project_is_named() {
    let t = template();
    let delete = "DELETE FROM signatures WHERE project = 'EVW'; DELETE FROM entries WHERE project = 'EVW';
         DELETE FROM settings WHERE project = 'EVW'; DELETE FROM feedstocks WHERE project = 'EVW';
         DELETE FROM import_evidence WHERE import_id IN (SELECT id FROM imports WHERE project = 'EVW');
         DELETE FROM imports WHERE project = 'EVW'; DELETE FROM sites WHERE project = 'EVW';
         DELETE FROM projects WHERE code = 'EVW';";
    let (l, mut c) = t.copy("evw");
    c.batch_execute(delete).unwrap();
    drop(c);
    let r = l.run(&["verify"]);
    assert_eq!(r.code, 3, "{}", r.out);
    assert!(r.err.contains("project EVW is gone"), "{}", r.err);
    let r = l.run(&["verify", "EVW"]);
    assert_eq!(r.code, 3, "{}", r.out);
    assert!(r.err.contains("project EVW is gone"), "{}", r.err);

    // The links gone too, from wherever they stood to the end (the rows linked after them with
    // them): the shorter ledger chain is consistent, so only a published head shows it.
    let (l, mut c) = t.copy("evw-links");
    c.batch_execute(&format!(
        "{delete} DELETE FROM ledger_chain WHERE seq >= (SELECT min(seq) FROM ledger_chain WHERE project = 'EVW');"
    ))
    .unwrap();
    drop(c);
    let r = l.run(&["verify", "--expect-ledger-head", &t.ledger_head]);
    assert_eq!(r.code, 3, "{}", r.out);
    assert!(
        r.err.contains("the ledger chain no longer holds head")
            || r.err.contains("is in no ledger link"),
        "{}",
        r.err
    );
}
