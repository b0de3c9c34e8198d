//! The ledger chain on both backends: a ledger made before it existed gets its links once (and
//! a row that does not check out gets none), a project deleted on the registry is named, and
//! the registry's roles link only what they may write. Every column and row of a ledger file is
//! tests/tamper_matrix.rs's.

mod common;
use common::Ledger;
use common::registry::{self, psql};
use diesel::connection::SimpleConnection;
use diesel::{Connection, SqliteConnection};

fn raw(l: &Ledger) -> SqliteConnection {
    SqliteConnection::establish(l.path.to_str().unwrap()).unwrap()
}

/// The ledger head `verify` printed.
fn ledger_head(verify: &str) -> String {
    let at = verify
        .find("ledger head ")
        .expect("verify prints the ledger head")
        + 12;
    verify[at..at + 64].to_string()
}

/// A ledger file as one made before the ledger chain: TFS, its three sites, one entry, and the
/// chain's table empty with the migration's marker, as the migration leaves an older ledger.
fn made_before_the_chain() -> (Ledger, String) {
    let l = common::on_file(Ledger::with_tfs);
    l.inject("TF-I1", "10 t", "2026-01-01", "2026-01-01", "k1");
    let head = ledger_head(&l.ok(&["verify"]));
    raw(&l)
        .batch_execute(
            "DROP TRIGGER ledger_chain_append_only_delete; DELETE FROM ledger_chain;
             CREATE TABLE ledger_chain_to_link (pending INTEGER NOT NULL) STRICT;
             INSERT INTO ledger_chain_to_link VALUES (1);",
        )
        .unwrap();
    (l, head)
}

#[test]
fn a_ledger_made_before_the_chain_gets_its_links_once() {
    let (l, head) = made_before_the_chain();
    // The project and its three sites, linked in that order: the same links, the same head as
    // the ledger whose links were written as it grew.
    let out = l.ok(&["verify"]);
    assert!(out.contains("Ledger chain: 4 links"), "{out}");
    assert_eq!(ledger_head(&out), head);
    let again = l.ok(&["verify", "--expect-ledger-head", &head]);
    assert!(
        again.contains("--expect-ledger-head is still held"),
        "{again}"
    );
    // The marker is gone, so a later opening links nothing twice.
    let r = raw(&l).batch_execute("SELECT * FROM ledger_chain_to_link");
    assert!(r.is_err(), "the marker was dropped with the links written");
    assert_eq!(
        l.run(&["verify", "--expect-ledger-head", "xyz"]).code,
        1,
        "a head that is not 64 hex digits is bad input"
    );
}

#[test]
fn a_row_that_does_not_check_out_is_not_linked() {
    let (l, _) = made_before_the_chain();
    raw(&l)
        .batch_execute(
            "DROP TRIGGER sites_append_only_update; UPDATE sites SET kind = 'monitoring-well' WHERE code = 'TF-I2';",
        )
        .unwrap();
    let r = l.run(&["verify"]);
    assert_eq!(r.code, 3, "{}", r.out);
    assert!(
        r.err
            .contains("site TF-I2 of project TFS differs from its row hash"),
        "{}",
        r.err
    );
    let r = raw(&l).batch_execute("SELECT * FROM ledger_chain_to_link");
    assert!(r.is_ok(), "nothing was linked, the marker stays");
}

#[test]
fn a_project_deleted_from_the_registry_is_named() {
    if !registry::available() {
        return;
    }
    let l = Ledger::with_tfs_on(true);
    l.add_kre(&[("KR-I1", "injection-well")]);
    let db = l.registry.as_ref().unwrap();
    let head = ledger_head(&l.ok(&["verify"]));
    // The owner, past the append-only triggers (replica mode fires none), removes KRE.
    let (ok, err) = psql(
        "postgres",
        &db.name,
        "SET session_replication_role = replica; DELETE FROM sites WHERE project = 'KRE'; \
         DELETE FROM projects WHERE code = 'KRE';",
    );
    assert!(ok, "{err}");
    let r = l.run(&["verify"]);
    assert_eq!(r.code, 3, "{}", r.out);
    assert!(r.err.contains("project KRE is gone"), "{}", r.err);
    // With its links gone too (they are the chain's last), only the published head shows it.
    let (ok, err) = psql(
        "postgres",
        &db.name,
        "SET session_replication_role = replica; DELETE FROM ledger_chain WHERE project = 'KRE';",
    );
    assert!(ok, "{err}");
    assert_eq!(
        l.run(&["verify"]).code,
        0,
        "a shorter ledger chain checks out"
    );
    let r = l.run(&["verify", "--expect-ledger-head", &head]);
    assert_eq!(r.code, 3, "{}", r.out);
    assert!(
        r.err.contains("the ledger chain no longer holds head"),
        "{}",
        r.err
    );
}

#[test]
fn registry_roles_link_only_what_they_may_write() {
    if !registry::available() {
        return;
    }
    let l = Ledger::with_tfs_on(true);
    let db = l.registry.as_ref().unwrap();
    let [other, verifier, regulator] =
        [db.role("other"), db.role("verifier"), db.role("regulator")];
    for (name, kind) in [
        (&other, &["--operator", "Kestrel Ridge Energy"][..]),
        (&verifier, &["--verifier"]),
        (&regulator, &["--regulator"]),
    ] {
        let mut args = vec!["registry", "role", "add", name.as_str()];
        args.extend(kind);
        l.ok(&args);
    }
    let link = |record: &str| {
        format!("INSERT INTO ledger_chain VALUES (99, '{record}', 'TFS', 'x', 'x', 'x', 'x')")
    };
    for (role, record, refusal) in [
        (
            &other,
            "site",
            "violates row-level security policy for table \"ledger_chain\"",
        ),
        (
            &verifier,
            "site",
            "violates row-level security policy for table \"ledger_chain\"",
        ),
        (
            &regulator,
            "signature",
            "permission denied for table ledger_chain",
        ),
    ] {
        let (ok, err) = psql(role, &db.name, &link(record));
        assert!(!ok && err.contains(refusal), "{role}: {record}: {err}");
    }
    let (ok, err) = psql(
        "postgres",
        &db.name,
        "UPDATE ledger_chain SET item = 'x' WHERE seq = 0",
    );
    assert!(
        !ok && err.contains("append-only"),
        "even the owner cannot rewrite a link: {err}"
    );
    assert_eq!(l.run(&["verify"]).code, 0);
}
