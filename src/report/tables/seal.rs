//! The seals table: each seal's period, tree head and the figures it fixed.

use crate::ledger::SealedEntry;
use crate::ledger::seal::Seal;
use crate::report::names;
use crate::report::{Cell, Table, columns};

/// The line saying a period was sealed.
pub fn sealed_line(project: &str, seal: &Seal) -> String {
    format!("sealed {project} period {} at seq {}", seal.label, seal.seq)
}

/// One line per seal: its period, tree head and the figures it fixed.
pub fn seal_table(project: &str, seals: &[(Seal, SealedEntry)]) -> Table {
    let mut t = Table::new(
        "seals",
        format!("Seals, project {project}"),
        columns(&[
            names::SEQ,
            names::PERIOD,
            names::TREE_SIZE,
            names::TREE_HEAD,
            names::ROOT.programs(),
            names::STORED_T,
            names::CONSERVATIVE_T,
            names::CLAIMABLE_T,
            names::SEALED_AT,
            names::CHAIN_HASH.programs(),
        ]),
    );
    for (s, e) in seals {
        t.push(vec![
            Cell::Int(s.seq as i64),
            Cell::text(&s.label),
            Cell::Int(s.tree_size as i64),
            Cell::text(s.root.head()),
            Cell::text(s.root.to_hex()),
            Cell::Tonnes(s.figures.stored),
            Cell::Tonnes(s.figures.conservative),
            Cell::Tonnes(s.figures.claimable),
            Cell::text(s.recorded_at.format("%Y-%m-%d %H:%M:%S").to_string()),
            Cell::text(e.chain.to_hex()),
        ]);
    }
    t.note("Tree head: the RFC 6962 Merkle tree head over the leaf hashes of the project's entries seq 0 up to the seal (docs/ledger-format.md). Anything recorded later that is dated in a sealed period is refused, or with --late kept as a late adjustment dated when it was recorded.");
    t
}
