//! The chain recomputed by an implementation that shares no code with sinkbook: Python's
//! hashlib and struct, following docs/ledger-format.md (tests/recompute_chain.py).

mod common;
use common::Ledger;
use std::io::Write;
use std::process::{Command, Stdio};

fn python_available() -> bool {
    Command::new("python3")
        .arg("--version")
        .output()
        .is_ok_and(|o| o.status.success())
}

/// Records, corrects and lists TFS on `l`, has Python recompute every hash, and returns the
/// entries as listed.
fn python_recomputes(l: &Ledger) -> serde_json::Value {
    for (i, (site, mass)) in [
        ("TF-I1", "35164.5 t"),
        ("TF-I2", "1000 short_ton"),
        ("TF-I1", "0.75 Mt"),
    ]
    .iter()
    .enumerate()
    {
        let r = l.inject(site, mass, "2026-01-01", "2026-01-31", &format!("k{i}"));
        assert_eq!(r.code, 0, "{}", r.err);
    }
    l.ok(&[
        "correct",
        "TFS",
        "1",
        "--mass",
        "1001 short_ton",
        "--reason",
        "re-read, «quoted» ünïcode",
    ]);
    let json = l.ok(&["--format", "json", "entries", "TFS"]);
    let mut child = Command::new("python3")
        .arg(concat!(
            env!("CARGO_MANIFEST_DIR"),
            "/tests/recompute_chain.py"
        ))
        .arg("TFS")
        .stdin(Stdio::piped())
        .stdout(Stdio::piped())
        .stderr(Stdio::piped())
        .spawn()
        .unwrap();
    child
        .stdin
        .take()
        .unwrap()
        .write_all(json.as_bytes())
        .unwrap();
    let out = child.wait_with_output().unwrap();
    assert!(
        out.status.success(),
        "python disagrees: {}",
        String::from_utf8_lossy(&out.stderr)
    );
    let lines: Vec<String> = String::from_utf8(out.stdout)
        .unwrap()
        .lines()
        .map(str::to_string)
        .collect();
    assert_eq!(lines.len(), 4);
    let v: serde_json::Value = serde_json::from_str(&json).unwrap();
    let last = lines[3].split(' ').nth(2).unwrap();
    assert_eq!(last, v[3]["chain_hash"].as_str().unwrap());
    let verify: serde_json::Value =
        serde_json::from_str(&l.ok(&["--format", "json", "verify"])).unwrap();
    assert_eq!(
        verify[0]["chain_hash"].as_str().unwrap(),
        last,
        "verify's head is python's head"
    );
    v
}

#[test]
fn python_recomputes_every_leaf_and_chain_hash() {
    if !python_available() {
        common::tool_missing("python3 (the independent chain recomputation)");
        return;
    }
    python_recomputes(&Ledger::with_tfs());
}

/// On the registry every entry names the role that recorded it: canonical encoding v2.
#[test]
fn python_recomputes_the_registry_s_entries_that_name_their_role() {
    if !python_available() {
        common::tool_missing("python3 (the independent chain recomputation)");
        return;
    }
    if !common::registry::available() {
        return;
    }
    let v = python_recomputes(&Ledger::with_tfs_on(true));
    for e in v.as_array().unwrap() {
        assert_eq!(e["recorded_by"], "postgres", "{e}");
    }
}
