//! A temporary ledger driven through the real binary, with the clock pinned.

#![allow(dead_code)]

use assert_cmd::Command;
use std::path::PathBuf;

pub const NOW: &str = "2026-12-01T09:00:00Z";

/// A reference check whose tool is missing: with `CI=true` a failure that names the tool and
/// how to install it (a check that did not run must not pass); elsewhere a printed skip.
pub fn tool_missing(what: &str) {
    assert!(
        std::env::var("CI").is_err(),
        "{what} is missing, so this reference check did not run (.ci/run installs it)"
    );
    eprintln!("skipped: {what} is missing, so this reference check did not run");
}

pub struct Ledger {
    pub dir: tempfile::TempDir,
    pub path: PathBuf,
}

/// Output of one run: exit code, stdout, stderr.
pub struct Run {
    pub code: i32,
    pub out: String,
    pub err: String,
}

impl Ledger {
    /// A new, initialised, empty ledger.
    pub fn new() -> Ledger {
        let dir = tempfile::tempdir().unwrap();
        let path = dir.path().join("test.db");
        let l = Ledger { dir, path };
        l.ok(&["init"]);
        l
    }

    /// A ledger built by `demo` from the sample projects (all four, TFS's 2026 complete).
    pub fn demo() -> Ledger {
        let dir = tempfile::tempdir().unwrap();
        let path = dir.path().join("demo.db");
        let l = Ledger { dir, path };
        l.ok(&["demo"]);
        l
    }

    /// A ledger with project TFS (permit 2.5 Mt), injection wells TF-I1, TF-I2, monitoring well TF-M1.
    pub fn with_tfs() -> Ledger {
        let l = Ledger::new();
        l.ok(&[
            "project",
            "add",
            "TFS",
            "--name",
            "Tamsin Flats Storage",
            "--method",
            "saline-aquifer",
            "--operator",
            "Northdeep Storage Cooperative",
            "--permit-ref",
            "NSC-SA-0041",
            "--permit-capacity",
            "2.5 Mt",
        ]);
        for (site, kind) in [
            ("TF-I1", "injection-well"),
            ("TF-I2", "injection-well"),
            ("TF-M1", "monitoring-well"),
        ] {
            l.ok(&["site", "add", "TFS", site, "--kind", kind]);
        }
        l
    }

    pub fn run(&self, args: &[&str]) -> Run {
        self.run_at(NOW, args)
    }

    /// Runs with the clock at `now` (RFC 3339).
    pub fn run_at(&self, now: &str, args: &[&str]) -> Run {
        let o = Command::cargo_bin("sinkbook")
            .unwrap()
            .env("SINKBOOK_NOW", now)
            .env_remove("SINKBOOK_DB")
            .env_remove("COLUMNS")
            .arg("--db")
            .arg(&self.path)
            .args(args)
            .output()
            .unwrap();
        Run {
            code: o.status.code().unwrap_or(-1),
            out: String::from_utf8(o.stdout).unwrap(),
            err: String::from_utf8(o.stderr).unwrap(),
        }
    }

    /// Runs and insists on exit 0; returns stdout.
    pub fn ok(&self, args: &[&str]) -> String {
        let r = self.run(args);
        assert_eq!(r.code, 0, "sinkbook {args:?} failed: {}", r.err);
        r.out
    }

    /// Number of entries of a project, read through `entries --format json`.
    pub fn count(&self, project: &str) -> usize {
        let out = self.ok(&["--format", "json", "entries", project]);
        let v: serde_json::Value = serde_json::from_str(&out).unwrap();
        v.as_array().unwrap().len()
    }

    pub fn inject(&self, site: &str, mass: &str, from: &str, to: &str, key: &str) -> Run {
        self.run(&[
            "record",
            "injection",
            "TFS",
            "--site",
            site,
            "--mass",
            mass,
            "--co2-fraction",
            "0.985",
            "--from",
            from,
            "--to",
            to,
            "--key",
            key,
        ])
    }
}

/// A ledger built by `demo` from the sample projects, with the clock pinned.
pub struct Demo {
    pub dir: tempfile::TempDir,
}

impl Demo {
    pub fn new() -> Demo {
        let d = Demo {
            dir: tempfile::tempdir().unwrap(),
        };
        assert!(d.run(&["demo"]).status.success());
        d
    }

    pub fn run(&self, args: &[&str]) -> std::process::Output {
        Command::cargo_bin("sinkbook")
            .unwrap()
            .env("SINKBOOK_NOW", NOW)
            .env_remove("COLUMNS")
            .arg("--db")
            .arg(self.dir.path().join("demo.db"))
            .args(args)
            .output()
            .unwrap()
    }

    /// Runs with `--format json` (exit 0 or 4) and parses what it printed.
    pub fn json(&self, args: &[&str]) -> serde_json::Value {
        let mut all = vec!["--format", "json"];
        all.extend_from_slice(args);
        let o = self.run(&all);
        assert!(
            matches!(o.status.code(), Some(0 | 4)),
            "sinkbook {args:?}: {}",
            String::from_utf8_lossy(&o.stderr)
        );
        serde_json::from_slice(&o.stdout).unwrap()
    }
}
