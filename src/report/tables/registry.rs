//! The registry's table of operators, their projects and each project's last seal.

use crate::ledger::Project;
use crate::ledger::signature::Role;
use crate::ledger::statement_check::Judged;
use crate::report::names;
use crate::report::{Cell, Table, columns};
use crate::store::{LastSeal, RoleKind};

/// One row per project, by operator then code; a project never sealed shows "none", a sealed
/// one whether a verifier's statement signs its last seal and checks.
pub fn operators_table(rows: &[(Project, Option<LastSeal>)]) -> Table {
    let mut t = Table::new(
        "operators",
        "Operators, projects and their last seals".to_string(),
        columns(&[
            names::OPERATOR,
            names::PROJECT,
            names::METHOD,
            names::LAST_SEAL,
            names::SEALED_AT,
            names::TREE_SIZE,
            names::VERIFIER_STATEMENT,
        ]),
    );
    for (p, last) in rows {
        let Some((seal, judged)) = last else {
            t.push(vec![
                Cell::text(&p.operator),
                Cell::text(&p.code),
                Cell::text(p.method.name()),
                Cell::text("none"),
                Cell::Empty,
                Cell::Empty,
                Cell::Empty,
            ]);
            continue;
        };
        t.push(vec![
            Cell::text(&p.operator),
            Cell::text(&p.code),
            Cell::text(p.method.name()),
            Cell::text(&seal.label),
            Cell::text(seal.recorded_at.format("%Y-%m-%d %H:%M:%S").to_string()),
            Cell::Int(seal.tree_size as i64),
            Cell::text(verifier_word(judged, seal.seq, &p.code)),
        ]);
    }
    t
}

/// The line saying a login role was created.
pub fn created_line(name: &str, kind: &RoleKind) -> String {
    match kind {
        RoleKind::Operator(o) => format!("created role {name} (operator {o:?})"),
        k => format!("created role {name} ({})", k.word()),
    }
}

/// Whether a verifier's statement over seal `seal_seq` of project `code` checks, among the
/// project's statements judged: "yes", "no", or how many were signed and that none checks.
fn verifier_word(judged: &[Judged], seal_seq: u64, code: &str) -> String {
    let verifiers: Vec<_> = judged
        .iter()
        .filter(|j| {
            j.statement.signed.seal_seq == seal_seq && j.statement.signed.role == Role::Verifier
        })
        .collect();
    match verifiers
        .iter()
        .find(|j| j.signature.is_ok() && j.seal.is_ok())
    {
        Some(_) => "yes".to_string(),
        None if verifiers.is_empty() => "no".to_string(),
        None => format!(
            "no: {} signed, none checks (see sinkbook statements {})",
            verifiers.len(),
            code
        ),
    }
}
