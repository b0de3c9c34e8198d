//! A stored reading value that does not decode (an injection's meter uncertainty "abc", its
//! meter type "sonic"), with every hash recomputed over it so that only the decoding can tell: reports stop with exit 3 naming the project, the seq and the field,
//! instead of reading the value as absent (an uncertainty of 0) or as a default.

mod common;
use common::Ledger;
use diesel::connection::SimpleConnection;
use diesel::{Connection, SqliteConnection};
use sinkbook::ledger::canonical::encode;
use sinkbook::ledger::hash::{chain_hash, leaf_hash};
use sinkbook::store::{Store, Wait};

/// TFS with three injections.
fn ledger() -> Ledger {
    let l = common::on_file(Ledger::with_tfs);
    for m in 1..=3 {
        let r = l.inject(
            "TF-I1",
            "30000 t",
            &format!("2026-0{m}-01"),
            &format!("2026-0{m}-28"),
            &format!("k{m}"),
        );
        assert_eq!(r.code, 0, "{}", r.err);
    }
    l
}

/// Sets the chain tip's reading `field` to `value` (added when the reading has none) and its
/// leaf and chain hashes to match, as a forger who knows the format would (the triggers dropped
/// first). Returns the tip's seq.
fn forge(l: &Ledger, field: &str, value: &str) -> u64 {
    let entries = Store::open(&l.path, Wait::default())
        .unwrap()
        .read(|tx| {
            let mut all = Vec::new();
            tx.for_each_entry("TFS", None, |s| {
                all.push(s.clone());
                Ok(())
            })?;
            Ok(all)
        })
        .unwrap();
    let (tip, before) = entries.split_last().unwrap();
    let mut e = tip.entry.clone();
    match e.reading.0.iter_mut().find(|(n, _)| n == field) {
        Some(slot) => slot.1 = value.to_string(),
        None => e.reading.push(field, value),
    }
    let leaf = leaf_hash(&encode(&e));
    let chain = chain_hash(before.last().unwrap().chain, leaf);
    let reading = serde_json::to_string(&e.reading.0).unwrap();
    SqliteConnection::establish(l.path.to_str().unwrap())
        .unwrap()
        .batch_execute(&format!(
            "DROP TRIGGER entries_append_only_update; \
             UPDATE entries SET reading = '{}', leaf_hash = '{}', chain_hash = '{}' WHERE project = 'TFS' AND seq = {};",
            reading.replace('\'', "''"),
            leaf.to_hex(),
            chain.to_hex(),
            e.seq
        ))
        .unwrap();
    e.seq
}

#[test]
fn an_uncertainty_that_does_not_decode_stops_the_balance_naming_seq_and_field() {
    let l = ledger();
    assert_eq!(l.run(&["balance", "TFS"]).code, 0);
    let seq = forge(&l, "uncertainty", "abc");
    let needle =
        format!("project TFS seq {seq}: reading field uncertainty \"abc\" does not decode");
    for args in [&["balance", "TFS"][..], &["totals"], &["verify"]] {
        let r = l.run(args);
        assert_eq!(r.code, 3, "{args:?}: {}", r.out);
        assert!(r.err.contains(&needle), "{args:?}: {}", r.err);
        assert_eq!(r.err.trim_end().lines().count(), 1, "{}", r.err);
    }
}

#[test]
fn a_meter_type_that_does_not_decode_stops_the_meters_table() {
    let l = ledger();
    let seq = forge(&l, "meter_type", "sonic");
    let r = l.run(&["meters", "TFS", "--year", "2026"]);
    assert_eq!(r.code, 3, "{}", r.out);
    assert!(
        r.err
            .contains(&format!("seq {seq}: reading field meter_type \"sonic\"")),
        "{}",
        r.err
    );
}
