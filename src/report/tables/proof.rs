//! The table of an inclusion proof: the entry, the seal it is proven under and the result.

use crate::ledger::proof::{InclusionProof, Proven};
use crate::report::names;
use crate::report::{Cell, Table, columns};

pub fn proven_table(p: &Proven, path_len: usize, result: &str) -> Table {
    let mut t = Table::new(
        "inclusion_proof",
        format!("Inclusion proof, project {} seq {}", p.project, p.seq),
        columns(&[
            names::PROJECT,
            names::SEQ,
            names::LEAF_HEAD,
            names::LEAF_HASH.programs(),
            names::TREE_SIZE,
            names::TREE_HEAD,
            names::ROOT.programs(),
            names::PATH_HASHES,
            names::RESULT,
        ]),
    );
    t.push(vec![
        Cell::text(&p.project),
        Cell::Int(p.seq as i64),
        Cell::text(p.leaf.head()),
        Cell::text(p.leaf.to_hex()),
        Cell::Int(p.tree_size as i64),
        Cell::text(p.root.head()),
        Cell::text(p.root.to_hex()),
        Cell::Int(path_len as i64),
        Cell::text(result),
    ]);
    t.note("RFC 6962 audit path from SHA-256(0x00 || the entry's canonical bytes) to the seal's tree head; the head itself is what a seal records and a statement signs.");
    t
}

/// What `proof` says it wrote.
pub fn written_line(p: &InclusionProof, out: &str) -> String {
    format!(
        "wrote the inclusion proof of {} seq {} under seal seq {} ({} period {}) to {out}",
        p.project, p.leaf_index, p.seal_seq, p.project, p.period
    )
}

/// What `check-proof` says of a proof that holds.
pub fn holds_line(p: &Proven) -> String {
    format!(
        "the proof holds: {} seq {} is leaf {} of the tree of {} entries with head {}",
        p.project, p.seq, p.seq, p.tree_size, p.root
    )
}
