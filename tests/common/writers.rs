//! Many writers into one ledger at once, each a separate `sinkbook record` process, and the
//! check that nothing was lost, doubled or forked.

use super::Ledger;
use std::collections::BTreeSet;

/// `writers` threads, each running `records` `record injection` processes one after another,
/// round-robin over `chains` (project, injection well), every record with its own key. A
/// writer that finds the ledger held waits (`--wait`, 60 s by default) rather than failing.
/// Then every project's entries are every key sent to it once, in seqs 0..n-1, and `verify`
/// passes.
pub fn record_at_once(l: &Ledger, chains: &[(&str, &str)], writers: usize, records: usize) {
    let key = |w: usize, i: usize| format!("w{w}-{i}");
    std::thread::scope(|s| {
        for w in 0..writers {
            s.spawn(move || {
                for i in 0..records {
                    let (project, site) = chains[(w + i) % chains.len()];
                    let day = format!("2026-{:02}-{:02}", 1 + i / 28, 1 + i % 28);
                    let r = l.run(&[
                        "record",
                        "injection",
                        project,
                        "--site",
                        site,
                        "--mass",
                        "10 t",
                        "--co2-fraction",
                        "0.985",
                        "--from",
                        &day,
                        "--to",
                        &day,
                        "--key",
                        &key(w, i),
                    ]);
                    assert_eq!(r.code, 0, "writer {w} record {i} into {project}: {}", r.err);
                }
            });
        }
    });
    for (n, (project, _)) in chains.iter().enumerate() {
        let sent: BTreeSet<String> = (0..writers)
            .flat_map(|w| (0..records).map(move |i| (w, i)))
            .filter(|(w, i)| (w + i) % chains.len() == n)
            .map(|(w, i)| key(w, i))
            .collect();
        let listed = l.json(&["entries", project]);
        let listed = listed.as_array().unwrap();
        let seqs: Vec<u64> = listed.iter().map(|e| e["seq"].as_u64().unwrap()).collect();
        assert_eq!(
            seqs,
            (0..sent.len() as u64).collect::<Vec<u64>>(),
            "{project}: seqs are dense, none twice"
        );
        let kept: BTreeSet<String> = listed
            .iter()
            .map(|e| e["key"].as_str().unwrap().to_string())
            .collect();
        assert_eq!(kept, sent, "{project}: every record kept, none twice");
    }
    l.ok(&["verify"]);
}
