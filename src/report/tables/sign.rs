//! The signing tables: a key made, and the statements of a project judged.

use crate::ledger::signature::{Statement, fingerprint, hex};
use crate::ledger::statement_check::Judged;
use crate::report::names;
use crate::report::{Cell, Table, columns};
use std::path::Path;

/// The line saying a new key was written.
pub fn new_key_line(file: &Path) -> String {
    format!(
        "wrote a new ed25519 key to {} (readable by its owner only)",
        file.display()
    )
}

/// The line saying a statement was signed.
pub fn signed_line(project: &str, s: &Statement) -> String {
    format!(
        "signed {project} period {} as {} with key {}",
        s.signed.period,
        s.signed.role,
        fingerprint(&s.public_key)
    )
}

/// Why a verifier may not sign period `label` of `project`: it is not sealed.
pub fn unsealed_why(project: &str, label: &str) -> String {
    format!(
        "is not sealed in project {project}; a verifier signs only a sealed period (the operator seals it: sinkbook seal {project} --period {label})"
    )
}

pub fn key_table(public_key: &[u8; 32], file: &Path) -> Table {
    let mut t = Table::new(
        "key",
        format!("Key {}", file.display()),
        columns(&[names::PUBLIC_KEY, names::FINGERPRINT]),
    );
    t.push(vec![
        Cell::text(hex(public_key)),
        Cell::text(fingerprint(public_key)),
    ]);
    t.note("Fingerprint: the first 16 hex digits of the SHA-256 of the 32-byte public key.");
    t
}

pub fn statements_table(project: &str, judged: &[Judged]) -> Table {
    let mut t = Table::new(
        "statements",
        format!("Signed statements, project {project}"),
        columns(&[
            names::SEQ,
            names::PERIOD,
            names::ROLE,
            names::FINGERPRINT,
            names::PUBLIC_KEY.programs(),
            names::STATEMENT,
            names::SIGNED_AT,
            names::SEAL_SEQ,
            names::TREE_SIZE.programs(),
            names::ROOT.programs(),
            names::SIGNATURE_CHECK,
            names::SEAL_MATCHES,
            names::SIGNATURE.programs(),
        ]),
    );
    for j in judged {
        let s = &j.statement;
        let g = &s.signed;
        t.push(vec![
            Cell::Int(s.seq as i64),
            Cell::text(&g.period),
            Cell::text(g.role.name()),
            Cell::text(fingerprint(&s.public_key)),
            Cell::text(hex(&s.public_key)),
            Cell::text(&g.statement),
            Cell::text(g.signed_at.format("%Y-%m-%d %H:%M:%S").to_string()),
            Cell::Int(g.seal_seq as i64),
            Cell::Int(g.tree_size as i64),
            Cell::text(g.root.to_hex()),
            Cell::text(match &j.signature {
                Ok(()) => "valid".to_string(),
                Err(e) => format!("INVALID: {e}"),
            }),
            Cell::text(match &j.seal {
                Ok(()) => "yes".to_string(),
                Err(e) => format!("NO: {e}"),
            }),
            Cell::text(hex(&s.signature)),
        ]);
    }
    t.note("Each signature is ed25519 (RFC 8032) over the statement's canonical bytes: project, seal seq, period, tree size, root, role, statement, time (docs/ledger-format.md). Key: the fingerprint of the signer's public key — who holds that key is for the reader to establish.");
    t
}
