//! A temporary ledger driven through the real binary, with the clock pinned.

#![allow(dead_code)]

pub mod registry;
pub mod writers;

use assert_cmd::Command;
use std::path::PathBuf;

pub const NOW: &str = "2027-01-15T09:00:00Z";

/// A reference check whose tool is missing: with `CI=true` a failure that names the tool and
/// how to install it (a check that did not run must not pass); elsewhere a printed skip.
pub fn tool_missing(what: &str) {
    assert!(
        std::env::var("CI").is_err(),
        "{what} is missing, so this reference check did not run (.ci/run installs it)"
    );
    eprintln!("skipped: {what} is missing, so this reference check did not run");
}

/// A ledger for one test: a file in a temporary folder, or, with
/// `SINKBOOK_TEST_BACKEND=postgres`, a throwaway database on the local PostgreSQL server, so
/// the same tests run on both backends. `path` is what `--db` takes.
pub struct Ledger {
    pub dir: tempfile::TempDir,
    pub path: PathBuf,
    pub registry: Option<registry::Database>,
}

/// Whether the ledgers made now go to PostgreSQL: `SINKBOOK_TEST_BACKEND=postgres`, outside
/// [`on_file`].
pub fn on_postgres() -> bool {
    !FILE_ONLY.get() && std::env::var("SINKBOOK_TEST_BACKEND").as_deref() == Ok("postgres")
}

thread_local! {
    static FILE_ONLY: std::cell::Cell<bool> = const { std::cell::Cell::new(false) };
}

/// Makes the ledgers `make` makes SQLite files whatever the backend under test: for what only a
/// file has (raw SQLite access to tamper with it, damaged bytes, a file that goes missing).
pub fn on_file<T>(make: impl FnOnce() -> T) -> T {
    let before = FILE_ONLY.replace(true);
    let made = make();
    FILE_ONLY.set(before);
    made
}

/// What legitimately differs between the backends. An entry appended to the registry names the
/// role that wrote it (`postgres` here; canonical encoding v2), so its leaf hash, and the chain
/// and tree heads over it, differ from the file's v1 entries: this sets the role back to the
/// file's none and blanks every SHA-256 (64 hex digits, or the 12 a chain head is shown by),
/// leaving every other byte to compare.
pub fn without_role_and_hashes(report: &str) -> String {
    let report = report.replace("\"recorded_by\": \"postgres\"", "\"recorded_by\": null");
    let mut out = String::with_capacity(report.len());
    let mut run = String::new();
    for c in report.chars().chain(std::iter::once(' ')) {
        if c.is_ascii_hexdigit() && !c.is_ascii_uppercase() {
            run.push(c);
            continue;
        }
        out.push_str(if [12, 64].contains(&run.len()) {
            "SHA-256"
        } else {
            &run
        });
        run.clear();
        out.push(c);
    }
    out.pop();
    out
}

/// Pins `value` by the insta snapshot `name` of the calling test file. On PostgreSQL
/// (`SINKBOOK_TEST_BACKEND=postgres`) the same stored snapshot must match byte for byte but for
/// the hashes [`without_role_and_hashes`] blanks: entries appended there name the role that
/// wrote them, so their hashes differ from a file's. Snapshots are written on the file backend.
#[macro_export]
macro_rules! snapshot {
    ($name:expr, $value:expr $(,)?) => {{
        let value: String = $value;
        if $crate::common::on_postgres() {
            $crate::common::same_as_stored(module_path!(), &$name, &value);
        } else {
            insta::assert_snapshot!($name, value);
        }
    }};
}

/// `value` against the stored snapshot `name` of test file `module`, hashes aside.
pub fn same_as_stored(module: &str, name: &str, value: &str) {
    let path = std::path::Path::new(env!("CARGO_MANIFEST_DIR"))
        .join("tests/snapshots")
        .join(format!("{}__{name}.snap", module.replace("::", "__")));
    let text = std::fs::read_to_string(&path)
        .unwrap_or_else(|e| panic!("snapshot {}: {e}", path.display()));
    let stored = text.splitn(3, "---\n").nth(2).expect("an insta snapshot");
    assert_eq!(
        without_role_and_hashes(value.trim_end()),
        without_role_and_hashes(stored.trim_end()),
        "{} on PostgreSQL, hashes aside",
        path.display()
    );
}

/// Output of one run: exit code, stdout, stderr.
pub struct Run {
    pub code: i32,
    pub out: String,
    pub err: String,
}

impl From<std::process::Output> for Run {
    fn from(o: std::process::Output) -> Run {
        Run {
            code: o.status.code().unwrap_or(-1),
            out: String::from_utf8(o.stdout).unwrap(),
            err: String::from_utf8(o.stderr).unwrap(),
        }
    }
}

/// Runs sinkbook without a ledger (`demo` makes its own, `convert` needs none), clock pinned.
pub fn run_without_ledger(args: &[&str]) -> Run {
    run_without_ledger_in(&std::env::temp_dir(), args)
}

/// `run_without_ledger` with the binary's temporary folders (the demo keeps its report page's)
/// made in `tmp`.
pub fn run_without_ledger_in(tmp: &std::path::Path, args: &[&str]) -> Run {
    let o = Command::cargo_bin("sinkbook")
        .unwrap()
        .env("SINKBOOK_NOW", NOW)
        .env("TMPDIR", tmp)
        .env_remove("SINKBOOK_DB")
        .env_remove("COLUMNS")
        .args(args)
        .output()
        .unwrap();
    Run::from(o)
}

/// The demo's output with the temporary folder it kept the report page in masked as
/// `[REPORTS]` (its name is random).
pub fn mask_reports(out: &str) -> String {
    const FOLDER: &str = "sinkbook-demo-reports-";
    let mut out = out.to_string();
    while let Some(at) = out.find(FOLDER) {
        let start = out[..at].rfind(char::is_whitespace).map_or(0, |i| i + 1);
        let end = (at + FOLDER.len() + 6).min(out.len());
        out.replace_range(start..end, "[REPORTS]");
    }
    out
}

/// `verify`'s ledger head masked as `[LEDGER HEAD]`: the demo signs its statements with keys
/// it makes anew each run, and the ledger chain links each statement's row.
pub fn mask_ledger_head(out: &str) -> String {
    const AT: &str = "ledger head ";
    let mut out = out.to_string();
    let mut from = 0;
    while let Some(i) = out[from..].find(AT) {
        let start = from + i + AT.len();
        let end = (start + 64).min(out.len());
        if out[start..end].bytes().all(|b| b.is_ascii_hexdigit()) {
            out.replace_range(start..end, "[LEDGER HEAD]");
        }
        from = start;
    }
    out
}

impl Ledger {
    /// A new, initialised, empty ledger.
    pub fn new() -> Ledger {
        let l = Ledger::unmade(on_postgres(), "test.db");
        l.ok(&["init"]);
        l
    }

    /// A ledger built by `demo` from the sample projects (all four, TFS's 2026 complete).
    pub fn demo() -> Ledger {
        let l = Ledger::unmade(on_postgres(), "demo.db");
        l.ok(&["demo"]);
        l
    }

    /// Where a ledger would go, not yet created: a SQLite file, or an empty PostgreSQL database.
    pub fn unmade(postgres: bool, file: &str) -> Ledger {
        let dir = tempfile::tempdir().unwrap();
        if postgres {
            assert!(
                registry::available(),
                "PostgreSQL does not answer on 127.0.0.1:5432"
            );
            let db = registry::Database::new();
            let path = PathBuf::from(db.url());
            return Ledger {
                dir,
                path,
                registry: Some(db),
            };
        }
        let path = dir.path().join(file);
        Ledger {
            dir,
            path,
            registry: None,
        }
    }

    /// A ledger with project TFS (permit 2.5 Mt), injection wells TF-I1, TF-I2, monitoring well TF-M1.
    pub fn with_tfs() -> Ledger {
        Ledger::with_tfs_on(on_postgres())
    }

    /// `with_tfs` on the backend named: PostgreSQL when `postgres`, else a SQLite file.
    pub fn with_tfs_on(postgres: bool) -> Ledger {
        let l = Ledger::unmade(postgres, "test.db");
        l.ok(&["init"]);
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

    /// A ledger with project P (saline aquifer) whose well W1 injects `monthly` in each month of
    /// 2026 (the 1st to the 28th), nothing lost: stored = injected in every period.
    pub fn with_pilot(monthly: &str) -> Ledger {
        let l = Ledger::new();
        l.ok(&[
            "project",
            "add",
            "P",
            "--name",
            "Pilot",
            "--method",
            "saline-aquifer",
            "--operator",
            "Northdeep Storage Cooperative",
        ]);
        l.ok(&["site", "add", "P", "W1", "--kind", "injection-well"]);
        for m in 1..=12 {
            l.ok(&[
                "record",
                "injection",
                "P",
                "--site",
                "W1",
                "--mass",
                monthly,
                "--from",
                &format!("2026-{m:02}-01"),
                "--to",
                &format!("2026-{m:02}-28"),
            ]);
        }
        l
    }

    /// A ledger with the EOR project KRE and the sites given as (code, kind).
    pub fn with_kre(sites: &[(&str, &str)]) -> Ledger {
        let l = Ledger::new();
        l.add_kre(sites);
        l
    }

    /// Registers the EOR project KRE with the sites given as (code, kind).
    pub fn add_kre(&self, sites: &[(&str, &str)]) {
        self.ok(&[
            "project",
            "add",
            "KRE",
            "--name",
            "Kestrel Ridge EOR",
            "--method",
            "eor",
            "--operator",
            "Northdeep Storage Cooperative",
        ]);
        for (site, kind) in sites {
            self.ok(&["site", "add", "KRE", site, "--kind", kind]);
        }
    }

    /// Registers the ex-situ project XSM with its plant AS-P1.
    pub fn add_xsm(&self) {
        self.ok(&[
            "project",
            "add",
            "XSM",
            "--name",
            "Ashby Slag Carbonation",
            "--method",
            "ex-situ-mineralization",
            "--operator",
            "Northdeep Storage Cooperative",
        ]);
        self.ok(&["site", "add", "XSM", "AS-P1", "--kind", "plant"]);
    }

    /// `record carbonation` of a batch at XSM's plant AS-P1: `mass` of solid whose CO2 content
    /// went from `before` to `after`, over the days `from` to `to`.
    pub fn carbonate(&self, mass: &str, before: &str, after: &str, from: &str, to: &str) -> Run {
        self.run(&[
            "record",
            "carbonation",
            "XSM",
            "--site",
            "AS-P1",
            "--mass",
            mass,
            "--co2-before",
            before,
            "--co2-after",
            after,
            "--from",
            from,
            "--to",
            to,
        ])
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
            // What the binary keeps in a temporary folder (the demo's report page) goes in the
            // test's own, removed with it.
            .env("TMPDIR", self.dir.path())
            .arg("--db")
            .arg(&self.path)
            .args(args)
            .output()
            .unwrap();
        Run::from(o)
    }

    /// Runs and insists on exit 0; returns stdout.
    pub fn ok(&self, args: &[&str]) -> String {
        let r = self.run(args);
        assert_eq!(r.code, 0, "sinkbook {args:?} failed: {}", r.err);
        r.out
    }

    /// `project set PROJECT ARGS…`, insisting on exit 0.
    pub fn set(&self, project: &str, args: &[&str]) -> String {
        let mut all = vec!["project", "set", project];
        all.extend_from_slice(args);
        self.ok(&all)
    }

    /// Runs with `--format json`, insists on exit 0 and parses what it printed.
    pub fn json(&self, args: &[&str]) -> serde_json::Value {
        let mut all = vec!["--format", "json"];
        all.extend_from_slice(args);
        serde_json::from_str(&self.ok(&all)).unwrap()
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

/// A ledger built by `demo` from the sample projects (on the backend under test), read
/// through whole process outputs.
pub struct Demo {
    pub ledger: Ledger,
}

impl Demo {
    pub fn new() -> Demo {
        Demo {
            ledger: Ledger::demo(),
        }
    }

    /// The ledger's temporary folder, for the files a test writes beside it.
    pub fn dir(&self) -> &std::path::Path {
        self.ledger.dir.path()
    }

    pub fn run(&self, args: &[&str]) -> std::process::Output {
        Command::cargo_bin("sinkbook")
            .unwrap()
            .env("SINKBOOK_NOW", NOW)
            .env_remove("SINKBOOK_DB")
            .env_remove("COLUMNS")
            .env("TMPDIR", self.dir())
            .arg("--db")
            .arg(&self.ledger.path)
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

/// Runs a Python script of tests/ with `input` on its stdin (the format checks that use nothing
/// of sinkbook's code).
pub fn python(script: &str, input: &[u8]) -> Run {
    use std::io::Write;
    let mut child = std::process::Command::new("python3")
        .arg(format!("{}/tests/{script}", env!("CARGO_MANIFEST_DIR")))
        .stdin(std::process::Stdio::piped())
        .stdout(std::process::Stdio::piped())
        .stderr(std::process::Stdio::piped())
        .spawn()
        .unwrap();
    child.stdin.take().unwrap().write_all(input).unwrap();
    Run::from(child.wait_with_output().unwrap())
}
