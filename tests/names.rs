//! One name per quantity: every report of the demo ledger, printed as a table, as JSON and as
//! CSV, calls each column the same thing in all three, through the one list of names
//! (`report::names`): each header is a listed label, its key is the JSON key and the CSV
//! column at its place, and every key programs get is listed; README.md's example sessions
//! use the same names.

mod common;

use common::{Ledger, Run};
use serde_json::Value;
use sinkbook::report::names;

const FORMATS: [&str; 3] = ["table", "json", "csv"];

/// The header cells of each table people get (full width: one header line per table).
fn headers(out: &str) -> Vec<Vec<String>> {
    let mut all = Vec::new();
    let mut in_table = false;
    for line in out.lines() {
        if line.starts_with('┌') {
            in_table = true;
        } else if in_table && line.starts_with('│') {
            let inner = line.trim_start_matches('│').trim_end_matches('│');
            all.push(inner.split('┆').map(|c| c.trim().to_string()).collect());
            in_table = false;
        }
    }
    all
}

/// Each table's CSV header: one table is a header and rows; several are `# id` sections.
fn csv_headers(out: &str) -> Vec<Vec<String>> {
    let split = |l: &str| l.split(',').map(str::to_string).collect::<Vec<_>>();
    if !out.starts_with("# ") {
        return out.lines().next().map(split).into_iter().collect();
    }
    let mut all = Vec::new();
    let mut previous = "";
    let mut lines = out.lines().peekable();
    while let Some(line) = lines.next() {
        if line.starts_with("# ") && previous.is_empty() {
            all.extend(lines.next().map(split));
        }
        previous = line;
    }
    all
}

/// Each table's JSON keys, from its first row (None for a table without rows).
fn json_keys(v: &Value) -> Vec<Option<Vec<String>>> {
    let keys = |rows: &Value| {
        rows.as_array()
            .and_then(|r| r.first())
            .and_then(Value::as_object)
            .map(|o| o.keys().cloned().collect())
    };
    match v {
        // Tables that share an id: {table, title, rows} each.
        Value::Array(a)
            if a.iter()
                .all(|t| t.get("table").is_some() && t.get("rows").is_some()) =>
        {
            a.iter().map(|t| keys(&t["rows"])).collect()
        }
        Value::Array(_) => vec![keys(v)],
        Value::Object(tables) => tables.values().map(keys).collect(),
        _ => Vec::new(),
    }
}

/// Runs one report in the three formats (`{f}` in an argument becomes the format's name and
/// `{n}` its number, so a command that writes writes three times) and checks its names;
/// returns how many tables it printed.
fn check(run: &dyn Fn(&[&str]) -> Run, args: &[&str]) -> usize {
    let mut outs = Vec::new();
    for (n, f) in FORMATS.iter().enumerate() {
        let mut words = vec!["--format", f];
        let given: Vec<String> = args
            .iter()
            .map(|a| a.replace("{f}", f).replace("{n}", &(n + 1).to_string()))
            .collect();
        words.extend(given.iter().map(String::as_str));
        let r = run(&words);
        assert!(
            r.code == 0 || r.code == 4,
            "sinkbook {words:?} exit {}: {}",
            r.code,
            r.err
        );
        outs.push(r.out);
    }
    let shown = headers(&outs[0]);
    let json: Value = serde_json::from_str(&outs[1]).unwrap();
    let rows = json_keys(&json);
    let csv = csv_headers(&outs[2]);
    let what = args.join(" ");
    assert!(!shown.is_empty(), "{what}: no table");
    assert_eq!(shown.len(), csv.len(), "{what}: tables in table and CSV");
    assert_eq!(rows.len(), csv.len(), "{what}: tables in JSON and CSV");
    for ((labels, keys), json) in shown.iter().zip(&csv).zip(&rows) {
        if let Some(json) = json {
            assert_eq!(json, keys, "{what}: JSON keys against CSV columns");
        }
        for key in keys {
            assert!(names::by_key(key).is_some(), "{what}: {key} is not listed");
        }
        // People see the listed label of each key, in the programs' order.
        let mut rest = keys.iter();
        for label in labels {
            let name = names::by_label(label)
                .unwrap_or_else(|| panic!("{what}: header {label:?} is not a listed name"));
            assert!(
                rest.any(|k| k == name.key),
                "{what}: header {label:?} has no column {} in place in {keys:?}",
                name.key
            );
        }
    }
    shown.len()
}

#[test]
fn every_report_names_its_columns_alike_for_people_and_programs() {
    let l = Ledger::demo();
    // The demo sealed TFS's 2026 and signed it; a late adjustment gives balance and totals their
    // late table.
    let statements: Value =
        serde_json::from_str(&l.ok(&["--format", "json", "statements", "TFS"])).unwrap();
    let seal = statements[0]["seal_seq"].to_string();
    let key = l.dir.path().join("operator.key");
    let key = key.to_str().unwrap();
    l.ok(&["key", "new", "--out", key]);
    l.ok(&[
        "--late",
        "record",
        "injection",
        "TFS",
        "--site",
        "TF-I1",
        "--mass",
        "12 t",
        "--co2-fraction",
        "0.99",
        "--from",
        "2026-12-30",
        "--to",
        "2026-12-30",
    ]);
    let file = |name: &str| l.dir.path().join(name).display().to_string();
    let (proof, bundle) = (file("proof-table.json"), file("tfs-table.bundle"));
    l.ok(&["proof", "TFS", "3", "--seal", &seal, "--out", &proof]);
    l.ok(&["bundle", "export", "TFS", "--out", &bundle]);
    let out = |stem: &str| file(&format!("{stem}-{{f}}"));
    let (chart, page, new_key) = (out("chart.svg"), out("page.html"), out("new.key"));
    let (proof_f, bundle_f) = (out("proof.json"), out("tfs.bundle"));
    let reports: Vec<Vec<&str>> = vec![
        vec!["project", "list"],
        vec!["project", "show", "TFS"],
        vec!["site", "list", "KRE"],
        vec!["entries", "TFS"],
        vec!["balance", "TFS", "--by", "quarter"],
        vec!["balance", "KRE", "--by", "month"],
        vec!["balance", "KRE", "--by", "year", "--method", "iso27916"],
        vec!["balance", "CRB", "--by", "year"],
        vec!["balance", "EVW", "--by", "year"],
        vec!["meters", "TFS", "--year", "2026"],
        vec!["meters", "KRE", "--year", "2026"],
        vec![
            "readings",
            "TFS",
            "--meter",
            "FM-101",
            "--day",
            "2026-02-10",
        ],
        vec![
            "reconcile",
            "TFS",
            "sample-projects/tfs-monitoring-report-2026.csv",
        ],
        vec![
            "reconcile",
            "KRE",
            "sample-projects/kre-monitoring-report-2026.csv",
        ],
        vec!["reconciliations", "TFS"],
        vec!["mineralization", "CRB", "--by", "year"],
        vec!["feedstock", "list", "EVW"],
        vec!["weathering", "EVW"],
        vec!["totals"],
        vec!["totals", "--by", "year"],
        vec!["verify"],
        vec!["chart", "TFS", "--out", &chart],
        vec!["report", "TFS", "--year", "2026", "--out", &page],
        vec!["seal", "KRE", "--period", "2026-Q{n}"],
        vec!["statements", "TFS"],
        vec!["proof", "TFS", "3", "--seal", &seal, "--out", &proof_f],
        vec!["check-proof", &proof],
        vec!["bundle", "export", "TFS", "--out", &bundle_f],
        vec!["bundle", "check", &bundle],
        vec!["key", "new", "--out", &new_key],
        vec!["key", "show", key],
        vec!["convert", "1000 short_ton", "--to", "t"],
        vec!["convert", "2.5 MMscf", "--to", "t"],
        vec!["density", "--temperature", "40 C", "--pressure", "10 MPa"],
        vec!["potential", "--mineral", "Mg2SiO4"],
        vec!["potential", "--oxides", "CaO=10,MgO=7,Na2O=2.5,K2O=1.5"],
    ];
    let tables: usize = reports.iter().map(|args| check(&|a| l.run(a), args)).sum();
    assert!(tables > 40, "{tables} tables checked");
}

#[test]
fn writing_commands_name_their_tables_too() {
    let l = Ledger::with_tfs();
    let tables = check(
        &|a| l.run(a),
        &[
            "record",
            "injection",
            "TFS",
            "--site",
            "TF-I1",
            "--mass",
            "100 t",
            "--co2-fraction",
            "0.99",
            "--from",
            "2026-01-01",
            "--to",
            "2026-01-31",
            "--key",
            "jan-{f}",
        ],
    );
    assert_eq!(tables, 1);
    // The short demo, in a temporary ledger of its own.
    let tmp = tempfile::tempdir().unwrap();
    let demo = |a: &[&str]| common::run_without_ledger_in(tmp.path(), a);
    assert!(check(&demo, &["demo"]) > 5);
}

/// README sections whose example sessions their owners have yet to re-run: skipped by heading
/// until they are refreshed, then removed from this list.
const README_NOT_YET_RE_RUN: [&str; 0] = [];

/// The lines of README.md outside the sections [`README_NOT_YET_RE_RUN`] lists, with their
/// line numbers; a section runs to the next heading of its level or above.
fn readme_lines() -> Vec<(usize, String)> {
    let text = std::fs::read_to_string(concat!(env!("CARGO_MANIFEST_DIR"), "/README.md")).unwrap();
    let level = |l: &str| {
        let hashes = l.chars().take_while(|&c| c == '#').count();
        (hashes > 0 && l[hashes..].starts_with(' ')).then_some(hashes)
    };
    let (mut kept, mut fenced, mut skipping) = (Vec::new(), false, None);
    for (n, line) in text.lines().enumerate() {
        if line.starts_with("```") {
            fenced = !fenced;
        }
        if let Some(l) = level(line).filter(|_| !fenced) {
            if skipping.is_some_and(|s| l <= s) {
                skipping = None;
            }
            if README_NOT_YET_RE_RUN.contains(&line) {
                skipping = Some(l);
            }
        }
        if skipping.is_none() {
            kept.push((n + 1, line.to_string()));
        }
    }
    kept
}

/// The README's example sessions were printed by the program, so they call every column what
/// the reports call it: each table header (the line after a `┌` line) is a listed label, and
/// each JSON key of a code block that carries a unit (`_t`, `_pct`, `_at`, `_g`) is a listed key.
#[test]
fn the_readme_calls_each_column_what_the_reports_call_it() {
    let lines = readme_lines();
    let mut stale = Vec::new();
    let (mut labels, mut keys) = (0, 0);
    for pair in lines.windows(2) {
        let ((_, above), (n, line)) = (&pair[0], &pair[1]);
        if above.starts_with('┌') {
            let inner = line.trim_start_matches('│').trim_end_matches('│');
            for cell in inner.split('┆').map(str::trim).filter(|c| !c.is_empty()) {
                labels += 1;
                if names::by_label(cell).is_none() {
                    stale.push(format!("README.md:{n}: header {cell:?}"));
                }
            }
        }
    }
    let mut fenced = false;
    for (n, line) in &lines {
        if line.starts_with("```") {
            fenced = !fenced;
            continue;
        }
        let key = line
            .trim_start()
            .strip_prefix('"')
            .and_then(|l| l.split_once("\":"))
            .map(|(k, _)| k);
        let units = ["_t", "_pct", "_at", "_g"];
        if let Some(key) = key.filter(|k| fenced && units.iter().any(|u| k.ends_with(u))) {
            keys += 1;
            if names::by_key(key).is_none() {
                stale.push(format!("README.md:{n}: JSON key {key:?}"));
            }
        }
    }
    assert!(
        stale.is_empty(),
        "names no report uses:\n{}",
        stale.join("\n")
    );
    // The README shows dozens of tables and a balance in JSON: the walk found them.
    assert!(labels > 200, "{labels} header cells checked");
    assert!(keys > 20, "{keys} JSON keys checked");
}
