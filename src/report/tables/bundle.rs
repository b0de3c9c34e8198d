//! The table summing up a bundle written, checked or loaded.

use crate::bundle::line::Trailer;
use crate::import::bundle_file::Checked;
use crate::report::names;
use crate::report::{Cell, Table, columns};
use crate::store::BundleAdded;

/// `1 seal`, `2 seals`.
pub fn counted(n: usize, what: &str) -> String {
    format!("{n} {what}{}", if n == 1 { "" } else { "s" })
}

pub fn summary_table(title: &str, file: &str, project: &str, t: &Trailer, result: &str) -> Table {
    let mut table = Table::new(
        "bundle",
        title,
        columns(&[
            names::FILE,
            names::PROJECT,
            names::LINES,
            names::ENTRIES,
            names::TREE_HEAD,
            names::ROOT.programs(),
            names::CHAIN_HASH.programs(),
            names::SHA256.programs(),
            names::RESULT,
        ]),
    );
    table.push(vec![
        Cell::text(file),
        Cell::text(project),
        Cell::Int(t.lines as i64 + 1),
        Cell::Int(t.entries as i64),
        Cell::text(t.root.head()),
        Cell::text(t.root.to_hex()),
        Cell::text(t.chain_head.to_hex()),
        Cell::text(t.sha256.to_hex()),
        Cell::text(result),
    ]);
    table
}

/// `bundle check`'s table: the bundle found whole, and what was checked.
pub fn checked_table(file: &str, c: &Checked) -> Table {
    let mut table = summary_table(
        "Bundle check",
        file,
        &c.project,
        &c.trailer,
        &format!(
            "whole: {}, {}, {}",
            counted(c.seals, "seal"),
            counted(c.signatures, "signed statement"),
            counted(c.reconciliations as usize, "reconciliation")
        ),
    );
    table.note("Checked: every line in its one spelling and in order; every registration, entry and statement against its hash; seqs dense from 0; each chain hash recomputed; each imported file's bytes against its SHA-256; every seal's tree head recomputed from the leaves before it and an RFC 6962 consistency proof from each seal to the next; every statement's ed25519 signature over its bytes and the seal it names holding the tree head it signed; every recorded reconciliation's row hash, each naming the one before it; the RFC 6962 tree head over the entries' leaves; the digest of every line before the trailer.");
    table
}

/// `bundle load`'s table: what the load added (entries, statements, reconciliations).
pub fn loaded_table(file: &str, project: &str, t: &Trailer, new: &BundleAdded) -> Table {
    let mut table = summary_table(
        "Bundle loaded",
        file,
        project,
        t,
        &format!(
            "{} new entries, {} new statements, {} new reconciliations",
            new.entries, new.signatures, new.reconciliations
        ),
    );
    table.note("Loaded in one transaction after checking the whole file; a project already held is extended only when an RFC 6962 consistency proof shows its entries are the bundle's first ones.");
    table
}
