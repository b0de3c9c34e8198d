//! Inclusion proofs: written from a sealed ledger, checked without one; any wrong hash or index
//! exits 3.

mod common;
use common::Ledger;

fn sealed() -> Ledger {
    let l = Ledger::with_tfs();
    for i in 0..6 {
        let day = format!("2026-01-{:02}", i + 1);
        let r = l.inject("TF-I1", "100 t", &day, &day, &format!("k{i}"));
        assert_eq!(r.code, 0, "{}", r.err);
    }
    l.ok(&["seal", "TFS", "--period", "2026-Q1"]);
    l
}

fn check(l: &Ledger, file: &std::path::Path) -> common::Run {
    // Run outside any ledger: --db names a file that does not exist.
    let missing = l.dir.path().join("no-ledger.db");
    let o = assert_cmd::Command::cargo_bin("sinkbook")
        .unwrap()
        .arg("--db")
        .arg(&missing)
        .arg("check-proof")
        .arg(file)
        .output()
        .unwrap();
    assert!(!missing.exists(), "check-proof opens no ledger");
    common::Run {
        code: o.status.code().unwrap_or(-1),
        out: String::from_utf8(o.stdout).unwrap(),
        err: String::from_utf8(o.stderr).unwrap(),
    }
}

#[test]
fn every_entry_proves_and_every_altered_field_fails() {
    let l = sealed();
    for seq in 0..6u64 {
        let file = l.dir.path().join(format!("p{seq}.json"));
        l.ok(&[
            "proof",
            "TFS",
            &seq.to_string(),
            "--out",
            file.to_str().unwrap(),
        ]);
        let r = check(&l, &file);
        assert_eq!(r.code, 0, "{}", r.err);
        if seq == 4 {
            crate::snapshot!("check_proof", r.out);
        }
        let v: serde_json::Value =
            serde_json::from_str(&std::fs::read_to_string(&file).unwrap()).unwrap();
        assert_eq!(v["tree_size"], 6);
        assert_eq!(v["leaf_index"], seq);
        // Each hash of the file, one hex digit changed, and the index moved: exit 3.
        let mut variants: Vec<serde_json::Value> = Vec::new();
        for field in ["root", "leaf_hash", "entry_bytes"] {
            let mut w = v.clone();
            let s = w[field].as_str().unwrap().to_string();
            let c = if s.starts_with('0') { "1" } else { "0" };
            w[field] = format!("{c}{}", &s[1..]).into();
            variants.push(w);
        }
        for k in 0..v["audit_path"].as_array().unwrap().len() {
            let mut w = v.clone();
            let s = w["audit_path"][k].as_str().unwrap().to_string();
            let c = if s.ends_with('0') { "1" } else { "0" };
            w["audit_path"][k] = format!("{}{c}", &s[..63]).into();
            variants.push(w);
        }
        let mut w = v.clone();
        w["leaf_index"] = ((seq + 1) % 6).into();
        variants.push(w);
        for (i, w) in variants.iter().enumerate() {
            let bad = l.dir.path().join(format!("bad{seq}-{i}.json"));
            std::fs::write(&bad, serde_json::to_string(w).unwrap()).unwrap();
            let r = check(&l, &bad);
            assert_eq!(r.code, 3, "variant {i} of seq {seq}: {}", r.err);
            assert!(r.err.contains("does not hold"), "{}", r.err);
        }
    }
}

#[test]
fn proofs_refuse_what_no_seal_covers() {
    let l = sealed();
    let out = l.dir.path().join("p.json");
    let out = out.to_str().unwrap();
    let r = l.run(&["proof", "TFS", "6", "--out", out]);
    assert_eq!(r.code, 1);
    assert!(r.err.contains("SEQ \"6\""), "{}", r.err);
    let r = l.run(&["proof", "TFS", "1", "--seal", "3", "--out", out]);
    assert_eq!(r.code, 1);
    assert!(r.err.contains("--seal \"3\""), "{}", r.err);
    std::fs::write(l.dir.path().join("junk.json"), "{}").unwrap();
    assert_eq!(check(&l, &l.dir.path().join("junk.json")).code, 1);
}
