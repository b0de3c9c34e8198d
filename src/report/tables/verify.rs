//! `verify`'s table: a row per project found intact, and the notes saying what was checked.

use crate::ledger::Hash;
use crate::report::names;
use crate::report::{Cell, Table, columns};
use crate::store::{DeepCheck, ProjectChecked};

/// The table's columns; `project_row` and `ledger_cells` fill a row.
pub fn verify_table() -> Table {
    Table::new(
        "verify",
        "Ledger verification",
        columns(&[
            names::PROJECT,
            names::SITES,
            names::ENTRIES,
            names::SEALS,
            names::STATEMENTS,
            names::RECONCILIATIONS,
            names::CHAIN_HEAD,
            names::CHAIN_HASH.programs(),
            names::RESULT,
            names::LEDGER_LINKS.programs(),
            names::LEDGER_HASH.programs(),
        ]),
    )
}

/// A project found intact: its sites, seals, statements and reconciliations (`counts`, in that
/// order), its entries and chain head.
pub fn project_row(code: &str, c: &ProjectChecked, (links, ledger_head): (u64, Hash)) -> Vec<Cell> {
    vec![
        Cell::text(code),
        Cell::Int(c.sites as i64),
        Cell::Int(c.entries as i64),
        Cell::Int(c.seals as i64),
        Cell::Int(c.statements as i64),
        Cell::Int(c.reconciliations as i64),
        Cell::text(c.head.head()),
        Cell::text(c.head.to_hex()),
        Cell::text("intact"),
        Cell::Int(links as i64),
        Cell::text(ledger_head.to_hex()),
    ]
}

/// What the database's own check of its pages found wrong, named by the check.
pub fn deep_finding(check: DeepCheck, found: &[String]) -> String {
    format!("{}: {}", deep_check_name(check), found.join("; "))
}

/// The name of the database's own check of its pages, as a finding of it is prefixed.
fn deep_check_name(check: DeepCheck) -> &'static str {
    match check {
        DeepCheck::IntegrityCheck => "SQLite integrity_check",
        DeepCheck::PageChecksums => "PostgreSQL page checksums",
    }
}

/// What was checked: the projects' rows, the ledger chain of `links` links ending in `head`,
/// the database's own check if `deep` ran, and the published heads given.
pub fn notes(
    t: &mut Table,
    (links, head): (u64, Hash),
    deep: Option<DeepCheck>,
    expected: bool,
    expected_ledger: bool,
) {
    t.note("Checked: every project, site, setting and feedstock row against its hash; every entry's leaf and chain hash recomputed from its stored fields; sequences dense from 0; recorded_at never decreasing along a chain; corrections name an earlier entry of the same kind, each corrected once; every entry's site registered; every imported file's kept bytes against its SHA-256 and the entries that name it; every seal's tree head recomputed from the leaves before it, and an RFC 6962 consistency proof from each seal to the next; every signed statement's row hash and ed25519 signature, and the seal it signs still as signed; every recorded reconciliation's row hash, seqs dense from 0, each naming the one before it, and the chain state it names found in the chain.");
    t.note(format!(
        "Ledger chain: {links} links, each naming a project, site, setting, feedstock, import, statement, reconciliation or seal that is still there as linked, and every such row linked; ledger head {}.",
        head.to_hex()
    ));
    t.note(match deep {
        Some(DeepCheck::IntegrityCheck) => {
            "SQLite's integrity_check found the file's structure whole."
        }
        Some(DeepCheck::PageChecksums) => {
            "The PostgreSQL server counts no page checksum failure in this database (of the pages it has read)."
        }
        None => {
            "Not run: the database's own check of every page of the file (slow on a large ledger); `sinkbook verify --deep` runs it too."
        }
    });
    if expected {
        t.note("The published chain head given with --expect-head is still held by the chain.");
    }
    if expected_ledger {
        t.note("The published ledger head given with --expect-ledger-head is still held by the ledger chain.");
    }
}
