//! A chain's recorded times never run backwards: whatever clock a writer is given
//! (`SINKBOOK_NOW`), an entry recorded before the chain tip's recorded_at is refused, by every
//! command that appends, and nothing is written.

mod common;
use common::{Ledger, NOW};

/// One hour before the tests' clock, in the form the error prints.
fn an_hour_earlier() -> String {
    let now = chrono::DateTime::parse_from_rfc3339(NOW).unwrap().to_utc();
    (now - chrono::Duration::hours(1)).to_rfc3339_opts(chrono::SecondsFormat::AutoSi, true)
}

/// Runs `args` with the clock an hour behind the chain tip and expects the refusal naming both
/// times and the tip's seq, with the ledger as it was.
fn refused_before_tip(l: &Ledger, tip_seq: u64, args: &[&str]) {
    let before = l.count("TFS");
    let earlier = an_hour_earlier();
    let r = l.run_at(&earlier, args);
    assert_eq!(r.code, 1, "{args:?} with the clock at {earlier}: {}", r.out);
    let expected = format!(
        "recorded_at {earlier} is before the chain tip's recorded_at {} (project TFS seq {tip_seq})",
        NOW
    );
    assert!(r.err.contains(&expected), "{args:?}: {}", r.err);
    assert_eq!(r.err.trim().lines().count(), 1, "{}", r.err);
    assert_eq!(l.count("TFS"), before, "{args:?} wrote something");
}

#[test]
fn record_import_and_seal_refuse_a_clock_behind_the_chain_tip() {
    let l = Ledger::with_tfs();
    let r = l.inject("TF-I1", "1000 t", "2026-01-01", "2026-01-31", "jan");
    assert_eq!(r.code, 0, "{}", r.err);

    refused_before_tip(
        &l,
        0,
        &[
            "record",
            "injection",
            "TFS",
            "--site",
            "TF-I1",
            "--mass",
            "900 t",
            "--from",
            "2026-02-01",
            "--to",
            "2026-02-28",
        ],
    );
    refused_before_tip(
        &l,
        0,
        &["correct", "TFS", "0", "--mass", "999 t", "--reason", "typo"],
    );
    let csv = l.dir.path().join("march.csv");
    std::fs::write(
        &csv,
        "timestamp,site,quantity,unit,co2_fraction\n2026-03-01,TF-I1,100,t,1\n",
    )
    .unwrap();
    refused_before_tip(
        &l,
        0,
        &[
            "import",
            "TFS",
            csv.to_str().unwrap(),
            "--kind",
            "injection",
        ],
    );
    refused_before_tip(&l, 0, &["seal", "TFS", "--period", "2026-01"]);

    // At the tip's own time (or later) the chain takes it.
    let r = l.inject("TF-I1", "900 t", "2026-02-01", "2026-02-28", "feb");
    assert_eq!(r.code, 0, "{}", r.err);
    let v = l.run(&["verify"]);
    assert_eq!(v.code, 0, "{}", v.err);
}
