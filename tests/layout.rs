//! Tables for people fit the terminal: its width or `COLUMNS`, headers wrapped onto two lines
//! first, then stacked column groups that repeat the period column, never a number broken.
//! Pipes and `--wide` keep full-width rows; styling needs a terminal and no `NO_COLOR`.

mod common;

use std::collections::HashMap;
use std::path::Path;

/// A ledger built by `demo --full` from the sample projects, on the backend under test.
struct Demo {
    ledger: common::Ledger,
}

fn sinkbook(columns: Option<&str>) -> assert_cmd::Command {
    let mut c = assert_cmd::Command::cargo_bin("sinkbook").unwrap();
    c.env("SINKBOOK_NOW", common::NOW)
        .env_remove("SINKBOOK_DB")
        .env_remove("NO_COLOR");
    match columns {
        Some(w) => c.env("COLUMNS", w),
        None => c.env_remove("COLUMNS"),
    };
    c
}

fn stdout(c: &mut assert_cmd::Command) -> String {
    let o = c.output().unwrap();
    assert!(o.status.success(), "{}", String::from_utf8_lossy(&o.stderr));
    String::from_utf8(o.stdout).unwrap()
}

/// The whole demo, printed into a fresh ledger, with its path masked; the page folder the demo
/// keeps goes in the ledger's temporary folder.
fn full_demo(ledger: &common::Ledger, columns: Option<&str>) -> String {
    let db = &ledger.path;
    let out = stdout(
        sinkbook(columns)
            .env("TMPDIR", ledger.dir.path())
            .args(["demo", "--full", "--db"])
            .arg(db),
    );
    common::mask_reports(&out.replace(&db.display().to_string(), "[DB]"))
}

impl Demo {
    fn new() -> Demo {
        let ledger = unmade();
        full_demo(&ledger, None);
        Demo { ledger }
    }

    fn run(&self, columns: Option<&str>, args: &[&str]) -> String {
        stdout(
            sinkbook(columns)
                .arg("--db")
                .arg(&self.ledger.path)
                .args(args),
        )
    }
}

/// Where a demo ledger goes: a new file or an empty PostgreSQL database.
fn unmade() -> common::Ledger {
    common::Ledger::unmade(common::on_postgres(), "demo.db")
}

fn columns(line: &str) -> usize {
    line.chars().count()
}

/// Each table's lines (a block of lines drawn with box characters).
fn tables(out: &str) -> Vec<Vec<&str>> {
    let mut all: Vec<Vec<&str>> = Vec::new();
    let mut current = Vec::new();
    for line in out.lines() {
        if line.starts_with(['┌', '│', '╞', '└']) {
            current.push(line);
        } else if !current.is_empty() {
            all.push(std::mem::take(&mut current));
        }
    }
    all
}

/// How often each number appears as a whole cell line (numbers right-aligned in their cells).
fn numbers(out: &str) -> HashMap<String, usize> {
    let is_number = |s: &str| {
        let s = s.strip_suffix(" %").unwrap_or(s);
        let s = s.strip_prefix('-').unwrap_or(s);
        s.starts_with(|c: char| c.is_ascii_digit())
            && s.chars()
                .all(|c| c.is_ascii_digit() || c == ',' || c == '.')
    };
    let mut seen = HashMap::new();
    for table in tables(out) {
        for line in table {
            for cell in line.split(['│', '┆']).map(str::trim) {
                if is_number(cell) {
                    *seen.entry(cell.to_string()).or_insert(0) += 1;
                }
            }
        }
    }
    seen
}

#[test]
fn tables_at_80_120_and_unlimited_width() {
    let demo = Demo::new();
    for (name, args) in [
        ("balance_tfs", &["balance", "TFS", "--by", "quarter"][..]),
        ("projects", &["project", "list"][..]),
        ("feedstocks", &["feedstock", "list", "EVW"][..]),
    ] {
        for width in ["80", "120", "unlimited"] {
            let given = (width != "unlimited").then_some(width);
            let out = demo.run(given, args);
            if let Some(w) = given {
                let longest = out.lines().map(columns).max().unwrap();
                assert!(longest <= w.parse().unwrap(), "{name} at {w}:\n{out}");
            }
            crate::snapshot!(format!("{name}_{width}"), out);
        }
    }
}

#[test]
fn every_table_of_the_demo_fits_100_columns_and_no_number_is_broken() {
    let (a, b) = (unmade(), unmade());
    let narrow = full_demo(&a, Some("100"));
    let full = full_demo(&b, None);
    let drawn = tables(&narrow);
    assert!(drawn.len() > 20, "{} tables", drawn.len());
    for table in &drawn {
        let longest = table.iter().copied().map(columns).max().unwrap();
        assert!(longest <= 100, "{longest} columns:\n{}", table.join("\n"));
    }
    let longest = narrow.lines().map(columns).max().unwrap();
    assert!(longest <= 100, "a note or sentence is {longest} columns");
    // Full-width rows are wider than that, and every number in them is found whole at 100.
    assert!(full.lines().map(columns).max().unwrap() > 200);
    let (wide, fitted) = (numbers(&full), numbers(&narrow));
    assert!(wide.len() > 300, "{} numbers", wide.len());
    for (n, count) in &wide {
        let found = fitted.get(n).copied().unwrap_or(0);
        assert!(
            found >= *count,
            "{n}: {count} at full width, {found} at 100 columns"
        );
    }
}

#[test]
fn pipes_and_wide_keep_full_rows() {
    let demo = Demo::new();
    let args = ["balance", "TFS", "--by", "quarter"];
    let piped = demo.run(None, &args);
    assert!(piped.lines().map(columns).max().unwrap() > 250);
    let wide = demo.run(
        Some("100"),
        &["--wide", "balance", "TFS", "--by", "quarter"],
    );
    assert_eq!(wide, piped);
    // Programs get the same JSON whatever the width.
    let json = ["--format", "json", "balance", "TFS"];
    assert_eq!(demo.run(Some("60"), &json), demo.run(None, &json));
    assert!(!piped.contains('\x1b'));
}

/// Runs sinkbook on a pseudo-terminal of 90 columns (util-linux `script`), with or without
/// NO_COLOR; None when `script` is missing outside CI.
fn at_terminal(db: &Path, no_color: bool) -> Option<String> {
    let found = std::process::Command::new("script")
        .arg("--version")
        .output()
        .is_ok();
    if !found {
        assert!(
            std::env::var_os("CI").is_none(),
            "util-linux `script` is missing: it gives this test a terminal"
        );
        eprintln!("skipped: util-linux `script` is missing");
        return None;
    }
    let bin = assert_cmd::cargo::cargo_bin("sinkbook");
    let line = format!(
        "stty rows 40 cols 90; exec '{}' --db '{}' balance TFS --by quarter",
        bin.display(),
        db.display()
    );
    let mut c = std::process::Command::new("script");
    c.args(["-qec", &line, "/dev/null"])
        .env("SINKBOOK_NOW", common::NOW)
        .env_remove("COLUMNS")
        .env_remove("NO_COLOR");
    if no_color {
        c.env("NO_COLOR", "1");
    }
    let o = c.output().unwrap();
    assert!(o.status.success(), "{}", String::from_utf8_lossy(&o.stderr));
    Some(String::from_utf8(o.stdout).unwrap().replace("\r\n", "\n"))
}

#[test]
fn a_terminal_gets_its_width_and_bold_titles_unless_no_color() {
    let demo = Demo::new();
    let Some(styled) = at_terminal(&demo.ledger.path, false) else {
        return;
    };
    assert!(styled.starts_with("\x1b[1mMass balance"), "{styled}");
    let plain = at_terminal(&demo.ledger.path, true).unwrap();
    assert!(!plain.contains('\x1b'), "{plain}");
    assert_eq!(plain, styled.replace("\x1b[1m", "").replace("\x1b[0m", ""));
    assert_eq!(
        plain,
        demo.run(Some("90"), &["balance", "TFS", "--by", "quarter"])
    );
}
