//! A ledger written by an earlier sinkbook opens under this one: its schema migrates without
//! losing a trigger or an index, and every hash it holds still verifies.
//!
//! tests/fixtures/ledger-2026-12-03.sqlite was written by sinkbook as of 2026-12-03 (schema up
//! to 2026-12-03-110000_signature_time), with the clock at 2026-04-10T09:00:00Z:
//! ```text
//! init
//! project add TFS --name "Tamsin Flats Storage" --method saline-aquifer
//!     --operator "Northdeep Storage Cooperative" --permit-ref NSC-SA-0041 --permit-capacity "2.5 Mt"
//! site add TFS TF-I1 --kind injection-well --uncertainty 0.5%
//! site add TFS TF-M1 --kind monitoring-well
//! project set TFS --buffer 5% --from 2026-01-01
//! record injection TFS --site TF-I1 --mass "1000 t" --co2-fraction 0.98 --from 2026-01-01 --to 2026-01-31 --meter FM-101
//! record injection TFS --site TF-I1 --mass "500 t" --from 2026-02-01 --to 2026-02-28 --meter FM-101
//! record survey TFS --site TF-M1 --date 2026-01-20 --result no-leak --pathway "TF-M1 annulus"
//! record leakage TFS --site TF-M1 --pathway "TF-M1 annulus" --mass "2 t" --from 2026-02-10 --to 2026-02-12
//! record reversal TFS --site TF-I1 --mass "3 t" --date 2026-03-05 --reason "CO2 found behind casing"
//! key new --out op.key
//! seal TFS --period 2026-Q1
//! sign TFS --period 2026-Q1 --role operator --key op.key --statement "Q1 as reported."
//! ```
//! That version's `verify` printed chain head 22fd9666c79d…eeb29e15 for TFS.

mod common;
use common::Ledger;
use diesel::connection::SimpleConnection;
use diesel::sql_types::Text;
use diesel::{Connection, QueryableByName, RunQueryDsl, SqliteConnection};
use std::collections::BTreeMap;

const FIXTURE: &str = "tests/fixtures/ledger-2026-12-03.sqlite";
const HEAD: &str = "22fd9666c79d1a68174785e8a68de8352f552910a9608d5cb5bed286eeb29e15";

#[derive(QueryableByName)]
struct Object {
    #[diesel(sql_type = Text)]
    kind: String,
    #[diesel(sql_type = Text)]
    name: String,
    #[diesel(sql_type = Text)]
    sql: String,
}

/// The old ledger, copied into a test folder (always a file: it is a SQLite fixture).
fn old_ledger() -> Ledger {
    let l = Ledger::unmade(false, "old.sqlite");
    std::fs::copy(FIXTURE, &l.path).unwrap();
    l
}

fn raw(l: &Ledger) -> SqliteConnection {
    SqliteConnection::establish(l.path.to_str().unwrap()).unwrap()
}

/// Every table, index and trigger the file holds, by (type, name), with its SQL.
fn schema(l: &Ledger) -> BTreeMap<(String, String), String> {
    diesel::sql_query(
        "SELECT type AS kind, name, coalesce(sql, '') AS sql FROM sqlite_master \
         WHERE name NOT LIKE 'sqlite_autoindex_%'",
    )
    .load::<Object>(&mut raw(l))
    .unwrap()
    .into_iter()
    .map(|o| ((o.kind, o.name), o.sql))
    .collect()
}

#[test]
fn the_schema_migrates_keeping_every_trigger_and_index() {
    let l = old_ledger();
    let before = schema(&l);
    for trigger in [
        "entries_append_only_update",
        "entries_append_only_delete",
        "entries_append_only_replace",
        "signatures_append_only_update",
        "signatures_append_only_delete",
        "signatures_append_only_replace",
    ] {
        assert!(before.contains_key(&("trigger".into(), trigger.into())));
    }
    assert!(before.contains_key(&("index".into(), "entries_corrects".into())));

    let v = l.run(&["--format", "json", "verify"]);
    assert_eq!(v.code, 0, "{}", v.err);
    let after = schema(&l);
    // Later migrations may add tables (each with its triggers); none is lost.
    let lost: Vec<_> = before.keys().filter(|k| !after.contains_key(*k)).collect();
    assert!(
        lost.is_empty(),
        "tables, indexes or triggers lost: {lost:?}"
    );
    let changed: Vec<&(String, String)> =
        before.keys().filter(|k| before[*k] != after[*k]).collect();
    // entries is rebuilt (and later gains its running figures); settings gains its source
    // column (2026-12-04-600000). Every trigger and index keeps its text.
    assert_eq!(
        changed,
        vec![
            &("table".to_string(), "entries".to_string()),
            &("table".to_string(), "settings".to_string())
        ],
        "only the entries and settings tables' text changes; every trigger and index keeps its text"
    );
    let entries = &after[&("table".to_string(), "entries".to_string())];
    assert!(entries.contains("WHEN 'leakage' THEN 1"), "{entries}");
    assert!(entries.contains("recorded_by TEXT"), "{entries}");
}

#[test]
fn an_old_ledger_verifies_with_its_hashes_and_takes_an_entry_at_no_site() {
    let l = old_ledger();
    let v = l.json(&["verify"]);
    assert_eq!(v[0]["chain_hash"], HEAD, "{v}");
    assert_eq!(v[0]["result"], "intact");
    assert_eq!(v[0]["statements"], 1);

    // After 2026-Q1's seal, a reversal at no site in April: 3 t (March) and now 4 t.
    l.ok(&[
        "record",
        "reversal",
        "TFS",
        "--pathway",
        "legacy well W-3",
        "--mass",
        "4 t",
        "--date",
        "2026-04-02",
        "--reason",
        "CO2 found at the surface beside legacy well W-3",
    ]);
    let v = l.json(&["verify"]);
    assert_eq!(v[0]["entries"], 7);
    assert_eq!(v[0]["result"], "intact");
    let totals = l.json(&["totals"]);
    // 3 t reversed in March + 4 t in April = 7 t.
    assert_eq!(totals[0]["reversed_t"], 7.0);

    // The rebuilt tables stay append-only and their references hold.
    let mut c = raw(&l);
    for sql in [
        "UPDATE entries SET grams = grams + 1 WHERE seq = 0",
        "DELETE FROM entries WHERE seq = 6",
        "INSERT OR REPLACE INTO entries SELECT * FROM entries WHERE seq = 0",
        "DELETE FROM signatures",
        "UPDATE signatures SET statement = 'other'",
    ] {
        let e = c.batch_execute(sql).expect_err(sql).to_string();
        assert!(e.contains("append-only"), "{sql}: {e}");
    }
    #[derive(QueryableByName)]
    struct Violation {
        #[diesel(sql_type = Text)]
        table: String,
    }
    let broken: Vec<Violation> = diesel::sql_query("PRAGMA foreign_key_check")
        .load(&mut c)
        .unwrap();
    assert!(
        broken.is_empty(),
        "{:?}",
        broken.iter().map(|v| &v.table).collect::<Vec<_>>()
    );
}
