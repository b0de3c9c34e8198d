//! The shared registry on PostgreSQL against the same ledger in a SQLite file: the same output
//! byte for byte, chains that never fork under concurrent writers, and writes the server itself
//! refuses.

mod common;

use common::registry::{self, psql};
use common::{Ledger, without_role_and_hashes};

/// Every report the sample scripts lead to, as JSON, with the ledger's location blanked.
fn reports(l: &Ledger) -> Vec<String> {
    let place = l.path.display().to_string();
    let mut all = vec![l.ok(&["--format", "json", "verify"])];
    for p in ["TFS", "KRE", "CRB", "EVW"] {
        for args in [
            vec!["entries", p],
            vec!["balance", p, "--by", "quarter"],
            vec![
                "balance",
                p,
                "--through",
                "2026-06-30",
                "--as-of",
                "2027-01-31",
            ],
            vec!["meters", p],
        ] {
            let mut words = vec!["--format", "json"];
            words.extend(args);
            let r = l.run(&words);
            all.push(format!("{} {} {}", r.code, r.out, r.err).replace(&place, "DB"));
        }
    }
    for args in [
        vec!["totals"],
        vec!["totals", "--by", "year"],
        vec!["totals", "--as-of", "2026-07-01"],
        vec!["totals", "--by", "year", "--through", "2026-06-30"],
        vec!["totals", "--permit", "NSC-SA-0041"],
        vec!["project", "list"],
    ] {
        let mut words = vec!["--format", "json"];
        words.extend(args);
        all.push(l.ok(&words).replace(&place, "DB"));
    }
    all
}

#[test]
fn the_sample_projects_report_byte_for_byte_the_same_on_both_backends() {
    if !registry::available() {
        return;
    }
    let file = Ledger::unmade(false, "demo.db");
    let server = Ledger::unmade(true, "demo.db");
    let demo_file = file.ok(&["--format", "json", "demo"]);
    let demo_server = server.ok(&["--format", "json", "demo"]);
    assert_eq!(
        without_role_and_hashes(&demo_file),
        without_role_and_hashes(&demo_server),
        "the demo's own tour differs"
    );
    let (a, b) = (reports(&file), reports(&server));
    assert_eq!(a.len(), b.len());
    let mut identical = 0;
    for (x, y) in a.iter().zip(&b) {
        if x == y {
            identical += 1;
        } else {
            assert_eq!(without_role_and_hashes(x), without_role_and_hashes(y));
        }
    }
    // Only verify and the four entries lists name hashes; balances, meters, totals and the
    // project list are the same bytes.
    assert_eq!(identical, a.len() - 5, "of {} reports", a.len());
    let roles = |l: &Ledger| {
        let v: serde_json::Value =
            serde_json::from_str(&l.ok(&["--format", "json", "entries", "TFS"])).unwrap();
        let by: Vec<String> = v
            .as_array()
            .unwrap()
            .iter()
            .map(|e| e["recorded_by"].to_string())
            .collect();
        assert!(by.len() > 700, "TFS's entries were listed");
        by.into_iter().collect::<std::collections::BTreeSet<_>>()
    };
    assert_eq!(roles(&file), ["null".to_string()].into());
    assert_eq!(roles(&server), ["\"postgres\"".to_string()].into());
}

/// The concurrency suite's four writers of sixty records into one project (tests/concurrency.rs
/// runs it on the backend under test), here always on the registry.
#[test]
fn four_concurrent_writers_keep_one_dense_chain_on_postgres() {
    if !registry::available() {
        return;
    }
    common::writers::record_at_once(&Ledger::with_tfs_on(true), &[("TFS", "TF-I1")], 4, 60);
}

#[test]
fn no_role_can_rewrite_history_through_sql() {
    if !registry::available() {
        return;
    }
    let l = Ledger::with_tfs_on(true);
    let db = l.registry.as_ref().unwrap();
    l.inject("TF-I1", "10 t", "2026-01-01", "2026-01-01", "k1");
    for (sql, refusal) in [
        (
            "UPDATE entries SET grams = 1",
            "append-only: entries cannot be updated",
        ),
        (
            "DELETE FROM entries",
            "append-only: entries cannot be deleted",
        ),
        ("TRUNCATE entries CASCADE", "cannot be truncated"),
        (
            "DELETE FROM projects",
            "append-only: projects cannot be deleted",
        ),
        (
            "UPDATE sites SET kind = 'vent'",
            "append-only: sites cannot be updated",
        ),
    ] {
        let (ok, err) = psql("postgres", &db.name, sql);
        assert!(!ok && err.contains(refusal), "the owner's {sql}: {err}");
    }
}

/// A registry with TFS (operator Northdeep Storage Cooperative) and one role of each kind, made
/// through `registry role add`: TFS's operator, another operator, a verifier, a regulator.
fn registry_with_roles() -> (Ledger, [String; 4]) {
    let l = Ledger::with_tfs_on(true);
    let names = roles_on(&l);
    (l, names)
}

/// Adds TFS's operator's role, another operator's, a verifier's and a regulator's to `l`.
fn roles_on(l: &Ledger) -> [String; 4] {
    let db = l.registry.as_ref().unwrap();
    let names = [
        db.role("nsc"),
        db.role("other"),
        db.role("verifier"),
        db.role("regulator"),
    ];
    let kinds: [&[&str]; 4] = [
        &["--operator", "Northdeep Storage Cooperative"],
        &["--operator", "Kestrel Ridge Energy"],
        &["--verifier"],
        &["--regulator"],
    ];
    for (name, kind) in names.iter().zip(kinds) {
        let mut args = vec!["registry", "role", "add", name.as_str()];
        args.extend(kind);
        let out = l.ok(&args);
        assert!(out.contains(&format!("created role {name}")), "{out}");
    }
    names
}

/// The registry as `role` sees it: the same database, connecting as that role.
fn as_role(l: &Ledger, role: &str) -> Ledger {
    let db = l.registry.as_ref().unwrap();
    Ledger {
        dir: tempfile::tempdir().unwrap(),
        path: db.url_as(role).into(),
        registry: None,
    }
}

#[test]
fn each_role_writes_only_what_it_may_through_the_command_line() {
    if !registry::available() {
        return;
    }
    let (l, [nsc, other, verifier, regulator]) = registry_with_roles();
    let r = as_role(&l, &nsc).inject("TF-I1", "10 t", "2026-01-01", "2026-01-01", "own");
    assert_eq!(r.code, 0, "the operator's own role records: {}", r.err);
    for role in [&other, &verifier, &regulator] {
        let r = as_role(&l, role).inject("TF-I1", "10 t", "2026-01-02", "2026-01-02", role);
        assert_eq!(r.code, 1, "{role} recorded into TFS: {}", r.out);
        assert_eq!(r.err.lines().count(), 1, "one line: {}", r.err);
        assert!(
            r.err
                .contains(&format!("role {role} may not write project TFS")),
            "{}",
            r.err
        );
    }
    let project = [
        "project",
        "add",
        "NEW",
        "--name",
        "New",
        "--method",
        "saline-aquifer",
        "--operator",
        "Northdeep Storage Cooperative",
    ];
    let r = as_role(&l, &other).run(&project);
    assert_eq!(r.code, 1, "another operator registered NSC's project");
    assert!(r.err.contains("table \"projects\""), "{}", r.err);
    assert_eq!(as_role(&l, &nsc).run(&project).code, 0);
    let r = as_role(&l, &regulator).run(&["--format", "json", "entries", "TFS"]);
    assert_eq!(r.code, 0, "a regulator reads: {}", r.err);
    assert_eq!(l.count("TFS"), 1, "only the operator's own record was kept");
    let db = l.registry.as_ref().unwrap();
    let (_, by) = psql("postgres", &db.name, "SELECT recorded_by FROM entries");
    assert_eq!(by.trim(), nsc, "the entry names the role that wrote it");
}

#[test]
fn the_server_refuses_each_role_s_forbidden_sql() {
    if !registry::available() {
        return;
    }
    let (l, [nsc, other, verifier, regulator]) = registry_with_roles();
    let db = l.registry.as_ref().unwrap();
    l.inject("TF-I1", "10 t", "2026-01-01", "2026-01-01", "k1");
    let site = "INSERT INTO sites VALUES ('TFS', 'TF-X', 'injection-well', NULL, NULL, now(), 'x')";
    for (role, sql, refusal) in [
        (
            &nsc,
            "UPDATE entries SET grams = 1",
            "permission denied for table entries",
        ),
        (
            &nsc,
            "DELETE FROM entries",
            "permission denied for table entries",
        ),
        (
            &nsc,
            "TRUNCATE entries",
            "permission denied for table entries",
        ),
        (
            &other,
            site,
            "violates row-level security policy for table \"sites\"",
        ),
        (&verifier, site, "permission denied for table sites"),
        (&regulator, site, "permission denied for table sites"),
        (
            &regulator,
            "UPDATE projects SET name = 'x'",
            "permission denied for table projects",
        ),
        (
            &nsc,
            "INSERT INTO registry_roles VALUES ('x', 'operator', 'Kestrel Ridge Energy', now())",
            "permission denied for table registry_roles",
        ),
    ] {
        let (ok, err) = psql(role, &db.name, sql);
        assert!(!ok && err.contains(refusal), "{role}: {sql}: {err}");
    }
    let (ok, err) = psql(&nsc, &db.name, site);
    assert!(
        ok,
        "the operator's own role adds a site to its project: {err}"
    );
    let entry = |by: &str| {
        format!(
            "INSERT INTO entries (project, seq, kind, site, period_from, period_to, reading, grams, \
             sign, recorded_at, idem_key, leaf_hash, chain_hash, recorded_by) VALUES ('TFS', 1, \
             'injection', 'TF-I1', '2026-01-02', '2026-01-02', '[]', 1, 'adds', now(), 'x', 'x', \
             'x', '{by}')"
        )
    };
    let (ok, err) = psql(&nsc, &db.name, &entry(&other));
    assert!(
        !ok && err.contains(&format!(
            "names {other} as the role that recorded it, but {nsc} is writing it"
        )),
        "an entry under another role's name: {err}"
    );
    let (_, by) = psql("postgres", &db.name, "SELECT written_by FROM entries");
    assert_eq!(
        by.trim(),
        "postgres",
        "the server notes who inserted each row"
    );
}

/// The migration versions under `migrations/<backend>`, sorted.
fn versions(backend: &str) -> Vec<String> {
    let dir = std::path::Path::new(env!("CARGO_MANIFEST_DIR"))
        .join("migrations")
        .join(backend);
    let mut all: Vec<String> = std::fs::read_dir(&dir)
        .unwrap()
        .map(|d| d.unwrap().file_name().to_string_lossy().into_owned())
        .collect();
    all.sort();
    all
}

#[test]
fn both_backends_list_the_same_migration_versions() {
    let sqlite = versions("sqlite");
    assert!(sqlite.len() >= 8, "{sqlite:?}");
    assert_eq!(sqlite, versions("postgres"));
}

/// Another session holds TFS's chain (the lock every append takes) while a record is tried with
/// `--wait 200ms`: the server's lock timeout ends the wait, and the command gives up with one
/// line naming the wait, writing nothing.
#[test]
fn a_record_kept_waiting_by_a_held_chain_past_its_wait_gives_up_in_one_line() {
    if !registry::available() {
        return;
    }
    let l = Ledger::with_tfs_on(true);
    let db = l.registry.as_ref().unwrap();
    let chain = "hashtextextended('sinkbook chain ' || 'TFS', 0)";
    let mut holder = std::process::Command::new("psql")
        .args([
            "-h",
            registry::HOST,
            "-U",
            "postgres",
            "-d",
            &db.name,
            "-qAtc",
        ])
        .arg(format!(
            "SELECT pg_advisory_lock({chain}); SELECT pg_sleep(60)"
        ))
        .stdout(std::process::Stdio::null())
        .spawn()
        .expect("psql must be installed beside the server");
    let held = "SELECT count(*) FROM pg_locks WHERE locktype = 'advisory' AND granted";
    while psql("postgres", &db.name, held).1.trim() != "1" {
        std::thread::sleep(std::time::Duration::from_millis(50));
    }
    let r = l.run(&[
        "--wait",
        "200ms",
        "record",
        "injection",
        "TFS",
        "--site",
        "TF-I1",
        "--mass",
        "10 t",
        "--co2-fraction",
        "0.985",
        "--from",
        "2026-01-01",
        "--to",
        "2026-01-01",
    ]);
    holder.kill().unwrap();
    holder.wait().unwrap();
    assert_eq!(r.code, 1, "{}", r.out);
    assert_eq!(r.err.lines().count(), 1, "one line: {}", r.err);
    assert!(
        r.err.contains("waited 200ms for another writer to finish")
            && r.err.contains("--wait")
            && r.err.contains("nothing was written"),
        "{}",
        r.err
    );
    let (_, n) = psql("postgres", &db.name, "SELECT count(*) FROM entries");
    assert_eq!(n.trim(), "0");
}

/// TFS's `stored_geological_t` in the regulator's `totals --format json`.
fn stored_t(l: &Ledger) -> serde_json::Value {
    let v: serde_json::Value =
        serde_json::from_str(&l.ok(&["--format", "json", "totals"])).unwrap();
    let tfs = v.as_array().unwrap().iter().find(|r| r["project"] == "TFS");
    let stored = tfs.expect("TFS is in the totals")["stored_geological_t"].clone();
    assert!(stored.is_number() || stored.is_string(), "{stored}");
    stored
}

/// An operator keeps TFS in its own ledger file and sends it as bundles: the registry takes
/// them only from that operator's role, extends its copy with a later bundle, and the regulator
/// sees the project in its totals as the file reports it.
#[test]
fn an_operator_s_bundle_from_its_ledger_file_loads_and_shows_in_the_regulator_s_totals() {
    if !registry::available() {
        return;
    }
    let file = Ledger::with_tfs_on(false);
    file.inject("TF-I1", "1200 t", "2026-01-01", "2026-01-31", "jan");
    let registry = Ledger::unmade(true, "unused.db");
    registry.ok(&["init"]);
    let [nsc, other, _, regulator] = roles_on(&registry);
    let send = |name: &str| {
        let out = file.dir.path().join(name);
        file.ok(&["bundle", "export", "TFS", "--out", out.to_str().unwrap()]);
        out
    };
    let load = |role: &str, bundle: &std::path::Path| {
        as_role(&registry, role).run(&["bundle", "load", bundle.to_str().unwrap()])
    };
    let first = send("tfs-1.bundle");
    let r = load(&other, &first);
    assert_eq!(r.code, 1, "another operator's role loaded TFS: {}", r.out);
    assert_eq!(r.err.lines().count(), 1, "one line: {}", r.err);
    assert!(
        r.err
            .contains(&format!("role {other} may not write project TFS")),
        "{}",
        r.err
    );
    let r = load(&nsc, &first);
    assert_eq!(r.code, 0, "TFS's operator loads its bundle: {}", r.err);
    assert!(r.out.contains("1 new entries"), "{}", r.out);
    let watcher = as_role(&registry, &regulator);
    assert_eq!(stored_t(&watcher), stored_t(&file));
    // The regulator's activity through 15 January: 1200 t × 0.985 = 1182 t over 31 days, 15
    // of them: 17,730,000,000 / 31 = 571,935,483.87 g, and the other 16 days 610,064,516.13 g;
    // the left-over gram goes to the larger remainder, the first part.
    let v: serde_json::Value = serde_json::from_str(&watcher.ok(&[
        "--format",
        "json",
        "totals",
        "--by",
        "year",
        "--through",
        "2026-01-15",
    ]))
    .unwrap();
    assert_eq!(v[0]["project"], "TFS");
    assert_eq!(v[0]["year"], "2026");
    assert_eq!(v[0]["injected_t"].as_f64(), Some(571.935484));

    file.inject("TF-I1", "900 t", "2026-02-01", "2026-02-28", "feb");
    let r = load(&nsc, &send("tfs-2.bundle"));
    assert_eq!(r.code, 0, "the later bundle extends the copy: {}", r.err);
    assert!(r.out.contains("1 new entries"), "{}", r.out);
    assert_eq!(stored_t(&watcher), stored_t(&file));
    assert_eq!(
        watcher.ok(&["--format", "json", "entries", "TFS"]),
        file.ok(&["--format", "json", "entries", "TFS"]),
        "the copy holds the file's entries, v1 bytes and all"
    );
    let r = load(&nsc, &first);
    assert_eq!(r.code, 1, "an older bundle is refused: {}", r.out);
    watcher.ok(&["verify"]);
    let listed = watcher.ok(&["--format", "csv", "registry", "operators"]);
    assert!(
        listed.contains("Northdeep Storage Cooperative,TFS,saline-aquifer,none,"),
        "{listed}"
    );
}

/// A verifier's role records a reconciliation under its own name; a regulator's may not, and no
/// role may write one under another's name.
#[test]
fn a_verifier_s_role_records_a_reconciliation_under_its_own_name() {
    if !registry::available() {
        return;
    }
    let (l, [nsc, _other, verifier, regulator]) = registry_with_roles();
    let db = l.registry.as_ref().unwrap();
    l.inject("TF-I1", "10 t", "2026-01-01", "2026-01-01", "k1");
    let report = l.dir.path().join("report.csv");
    std::fs::write(
        &report,
        "period,quantity,value,unit\n2026-01,injected,9.85,t\n",
    )
    .unwrap();
    let report = report.to_str().unwrap();
    let r = as_role(&l, &verifier).run(&["reconcile", "TFS", report, "--record"]);
    assert_eq!(r.code, 0, "the verifier records: {}", r.err);
    let (_, by) = psql(
        "postgres",
        &db.name,
        "SELECT recorded_by FROM reconciliations",
    );
    assert_eq!(
        by.trim(),
        verifier,
        "the record names the role that wrote it"
    );
    let r = as_role(&l, &regulator).run(&["reconcile", "TFS", report, "--record"]);
    assert_eq!(r.code, 1, "a regulator recorded: {}", r.out);
    let forged = format!(
        "INSERT INTO reconciliations SELECT project, 1, row_hash, report_name, report_sha256, \
         method, materiality, basis, chain_size, chain_head, lines, years, verdict, role, by_name, \
         '{verifier}', recorded_at, 'x' FROM reconciliations"
    );
    let (ok, err) = psql(&nsc, &db.name, &forged);
    assert!(
        !ok && err.contains(&format!(
            "names {verifier} as the role that recorded it, but {nsc} is writing it"
        )),
        "a reconciliation under another role's name: {err}"
    );
    for sql in [
        "UPDATE reconciliations SET verdict = 'x'",
        "DELETE FROM reconciliations",
    ] {
        let (ok, err) = psql(&verifier, &db.name, sql);
        assert!(!ok && err.contains("permission denied"), "{sql}: {err}");
    }
    assert_eq!(l.json(&["verify"])[0]["reconciliations"], 1);
}
