//! `entries` in pages: `--from-seq` and `--limit` choose the rows, a table for people holds a
//! page and says where the next begins, and JSON and CSV list the chain as it is read.

mod common;
use common::Ledger;

fn five() -> Ledger {
    let l = Ledger::with_tfs();
    for d in 1..=5 {
        let day = format!("2026-01-0{d}");
        l.inject("TF-I1", "10 t", &day, &day, &format!("k{d}"));
    }
    l
}

fn seqs(v: &serde_json::Value) -> Vec<u64> {
    v.as_array()
        .unwrap()
        .iter()
        .map(|e| e["seq"].as_u64().unwrap())
        .collect()
}

#[test]
fn from_seq_and_limit_choose_the_rows_in_every_format() {
    let l = five();
    assert_eq!(seqs(&l.json(&["entries", "TFS"])), [0, 1, 2, 3, 4]);
    assert_eq!(
        seqs(&l.json(&["entries", "TFS", "--from-seq", "3"])),
        [3, 4]
    );
    assert_eq!(
        seqs(&l.json(&["entries", "TFS", "--from-seq", "1", "--limit", "2"])),
        [1, 2]
    );
    assert_eq!(
        seqs(&l.json(&["entries", "TFS", "--from-seq", "9"])),
        Vec::<u64>::new()
    );
    let csv = l.ok(&["--format", "csv", "entries", "TFS", "--limit", "2"]);
    assert_eq!(csv.lines().count(), 3, "a header and two rows: {csv}");
    assert!(csv.starts_with("seq,kind,site,"), "{csv}");
    let none = l.ok(&["--format", "csv", "entries", "TFS", "--from-seq", "9"]);
    assert_eq!(none.lines().count(), 1, "the header alone: {none}");
}

#[test]
fn a_table_page_says_where_the_next_begins() {
    let l = five();
    let whole = l.ok(&["entries", "TFS"]);
    assert!(!whole.contains("Listed:"), "{whole}");
    let page = l.ok(&["entries", "TFS", "--from-seq", "1", "--limit", "2"]);
    assert!(
        page.contains("Listed: 2 of 5 entries, from seq 1; `--from-seq 3` lists the next 2"),
        "{page}"
    );
    let last = l.ok(&["entries", "TFS", "--from-seq", "3", "--limit", "2"]);
    assert!(!last.contains("Listed:"), "the last page: {last}");
}

/// A chain that does not check out stops the listing at the bad row, exit 3; JSON's array is
/// left open, so no reader takes what was written for the whole chain.
#[test]
fn a_forged_row_stops_the_stream_with_the_array_open() {
    use diesel::connection::SimpleConnection;
    use diesel::{Connection, SqliteConnection};
    let l = common::on_file(five);
    SqliteConnection::establish(l.path.to_str().unwrap())
        .unwrap()
        .batch_execute(
            "DROP TRIGGER entries_append_only_update; UPDATE entries SET grams = grams + 1 WHERE seq = 3;",
        )
        .unwrap();
    let r = l.run(&["--format", "json", "entries", "TFS"]);
    assert_eq!(r.code, 3, "{}", r.err);
    assert!(
        r.err.contains("project TFS seq 3: leaf hash differs"),
        "{}",
        r.err
    );
    assert!(
        serde_json::from_str::<serde_json::Value>(&r.out).is_err(),
        "{}",
        r.out
    );
    assert!(
        r.out.contains("\"seq\": 2") && !r.out.contains("\"seq\": 3"),
        "{}",
        r.out
    );
}
