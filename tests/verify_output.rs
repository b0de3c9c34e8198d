//! What `verify` says besides its findings: the ledger head for programs as for people, that
//! the database's page check was left to `--deep`, and an imported file the chain no longer
//! names.

mod common;
use common::Ledger;
use diesel::connection::SimpleConnection;
use diesel::{Connection, SqliteConnection};

/// The ledger head the human table's note prints.
fn noted_head(verify: &str) -> &str {
    let at = verify.find("ledger head ").expect("the note names it") + 12;
    &verify[at..at + 64]
}

#[test]
fn json_and_csv_carry_the_ledger_head_the_table_notes() {
    let l = Ledger::with_tfs();
    l.inject("TF-I1", "10 t", "2026-01-01", "2026-01-01", "k1");
    let table = l.ok(&["verify"]);
    let v = l.json(&["verify"]);
    assert_eq!(v[0]["ledger_hash"], noted_head(&table), "{v}");
    assert_eq!(v[0]["ledger_links"], 4, "TFS and its three sites: {v}");
    let csv = l.ok(&["--format", "csv", "verify"]);
    let (header, row) = csv.split_once('\n').unwrap();
    assert!(header.ends_with(",ledger_links,ledger_hash"), "{header}");
    assert!(row.trim_end().ends_with(noted_head(&table)), "{row}");
    // The head given back is the head held.
    let head = noted_head(&table).to_string();
    l.ok(&["verify", "--expect-ledger-head", &head]);
}

#[test]
fn plain_verify_says_the_page_check_is_left_to_deep() {
    let l = common::on_file(Ledger::with_tfs);
    let plain = l.ok(&["verify"]);
    assert!(
        plain.contains("Not run: the database's own check of every page")
            && plain.contains("`sinkbook verify --deep` runs it too"),
        "{plain}"
    );
    let deep = l.ok(&["verify", "--deep"]);
    assert!(!deep.contains("Not run"), "{deep}");
    // SQLite checks the file's structure; the PostgreSQL server counts page checksum failures.
    assert!(
        deep.contains("SQLite's integrity_check found the file's structure whole")
            || deep.contains("PostgreSQL server counts no page checksum failure"),
        "{deep}"
    );
}

/// An import whose entries were cut from the end of the chain leaves a chain that still links
/// up, but a kept file no entry names: verify names the import.
#[test]
fn an_imported_file_no_entry_names_is_found() {
    let l = common::on_file(Ledger::with_tfs);
    l.inject("TF-I1", "10 t", "2026-01-01", "2026-01-01", "k1");
    let f = l.dir.path().join("meters.csv");
    std::fs::write(
        &f,
        "timestamp,site,quantity,unit,co2_fraction,meter\n2026-01-02,TF-I1,12,t,0.985,FM-101\n",
    )
    .unwrap();
    l.ok(&["import", "TFS", f.to_str().unwrap()]);
    l.ok(&["verify"]);
    SqliteConnection::establish(l.path.to_str().unwrap())
        .unwrap()
        .batch_execute(
            "DROP TRIGGER entries_append_only_delete; DELETE FROM entries WHERE seq > 0;",
        )
        .unwrap();
    let r = l.run(&["verify"]);
    assert_eq!(r.code, 3, "{}{}", r.out, r.err);
    assert!(
        r.err.contains(
            "project TFS import 1 (meters.csv): no entry of the chain names this file as its evidence"
        ),
        "{}",
        r.err
    );
}
