//! The demo's tour: the commands that show each part of the sample ledger, what the short demo
//! keeps of them, and the table that lists them.

use crate::report::names;
use crate::report::{Cell, Table, columns};

/// What `demo --full` prints once the ledger is built, and what each command shows; the short
/// demo lists them as the commands that show the detail.
pub const TOUR: &[(&[&str], &str)] = &[
    (
        &["project", "list"],
        "the projects, their methods and permits",
    ),
    (
        &["balance", "TFS", "--by", "quarter"],
        "TFS: mass balance by quarter, surface leakage, from stored to claimable, buffer pool",
    ),
    (
        &["meters", "TFS", "--year", "2026"],
        "TFS: each meter by quarter, CO2 concentration, conversion",
    ),
    (
        &["balance", "KRE", "--by", "quarter"],
        "KRE: mass balance by quarter (Subpart RR), claims, buffer pool",
    ),
    (
        &["balance", "KRE", "--by", "year", "--method", "iso27916"],
        "KRE: mass balance by year (ISO 27916)",
    ),
    (
        &[
            "reconcile",
            "TFS",
            "$SAMPLES/tfs-monitoring-report-2026.csv",
        ],
        "TFS: the ledger against the monitoring report, with materiality",
    ),
    (
        &[
            "reconcile",
            "KRE",
            "$SAMPLES/kre-monitoring-report-2026.csv",
        ],
        "KRE: the ledger against the monitoring report, with materiality",
    ),
    (
        &["mineralization", "CRB", "--by", "year"],
        "CRB: injected CO2 split into mineralized and still dissolved",
    ),
    (
        &["feedstock", "list", "EVW"],
        "EVW: the crushed basalt's composition and potential",
    ),
    (
        &["weathering", "EVW"],
        "EVW: each field and soil campaign from applied rock to net removal",
    ),
    (
        &["balance", "EVW", "--by", "year"],
        "EVW: net removal by year, claims",
    ),
    (&["verify"], "every hash and the ledger's structure checked"),
    (&["totals"], "totals across projects"),
];

/// What the short demo prints: a command, and how many of its tables to keep (its first one
/// is the balance; the rest are detail the tour lists).
pub const OVERVIEW: &[(&[&str], usize)] = &[
    (&["project", "list"], usize::MAX),
    (&["balance", "TFS", "--by", "year"], 1),
    (&["balance", "KRE", "--by", "year"], 1),
    (&["balance", "CRB", "--by", "year"], 1),
    (&["balance", "EVW", "--by", "year"], 1),
    (&["totals"], usize::MAX),
];

/// The commands that print the detailed tables, as a person would type them after `--db`.
pub fn tour_table(db: &str) -> Table {
    let mut t = Table::new(
        "more",
        "The detailed tables",
        columns(&[names::COMMAND, names::SHOWS]),
    );
    for (words, shows) in TOUR {
        let words: Vec<String> = words
            .iter()
            .map(|w| w.replace("$SAMPLES", "sample-projects"))
            .collect();
        t.push(vec![Cell::text(words.join(" ")), Cell::text(*shows)]);
    }
    t.note(format!(
        "Each as sinkbook --db {db} COMMAND; sinkbook demo --full prints them all. The monitoring reports are in sample-projects/."
    ));
    t
}

/// Where an annual report page the demo wrote was kept.
pub fn page_line(page: &str) -> String {
    format!("Annual report page written to {page} (kept; open it in a browser, or print it).")
}

/// The demo's first line: where its ledger was built (`place`) and the clock it was built at.
pub fn built_line(place: &str, now: chrono::DateTime<chrono::Utc>) -> String {
    format!(
        "Demo ledger built {place} from the sample projects (invented data, see sample-projects/README.md), recorded as of {}.",
        now.format("%Y-%m-%d %H:%M UTC")
    )
}
