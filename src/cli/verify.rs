//! `verify`: recompute every hash from the stored fields and check the ledger's structure.

use super::Context;
use crate::error::{Error, Result};
use crate::ledger::Hash;
use crate::ledger::chain::check;
use crate::ledger::seal_check::SealCheck;
use crate::ledger::{EntryKind, SealedEntry};
use crate::report::{Cell, Report, Table, columns};
use crate::store::Tx;
use clap::Args;

#[derive(Debug, Args)]
pub struct VerifyArgs {
    /// Only this project [default: every project]
    pub project: Option<String>,
    /// A chain head published earlier (e.g. in a monitoring report): the chain must still hold it,
    /// which also catches entries removed from the end
    #[arg(long, value_name = "HEX", requires = "project")]
    pub expect_head: Option<String>,
}

pub fn verify(ctx: &Context, a: VerifyArgs) -> Result<Report> {
    let expected = a
        .expect_head
        .as_deref()
        .map(|h| {
            Hash::from_hex(h)
                .ok_or_else(|| Error::field("--expect-head", h, "is not 64 hex digits"))
        })
        .transpose()?;
    let mut store = ctx.open()?;
    let integrity = store.integrity_check()?;
    if integrity != ["ok"] {
        return Err(Error::Inconsistent(format!(
            "SQLite integrity_check: {}",
            integrity.join("; ")
        )));
    }
    let mut t = Table::new(
        "verify",
        "Ledger verification",
        columns(&[
            ("Project", "project"),
            ("Sites", "sites"),
            ("Entries", "entries"),
            ("Seals", "seals"),
            ("Statements", "statements"),
            ("Chain head", "chain_head"),
            ("", "chain_hash"),
            ("Result", "result"),
        ]),
    );
    store.read(|tx| {
        let projects = tx.projects()?;
        let chosen: Vec<_> = match &a.project {
            Some(code) => vec![super::setup::known_project(tx, code)?],
            None => projects,
        };
        for p in chosen {
            let sites = tx.sites(&p.code)?;
            tx.settings(&p.code)?;
            tx.feedstocks(&p.code)?;
            super::evidence::check(tx, &p.code)?;
            let entries = tx.entries(&p.code)?;
            let c = check(&p.code, &entries).map_err(|f| Error::Inconsistent(f.to_string()))?;
            let seals = check_seals(tx, &p.code, &entries)?;
            let statements = super::sign::judge_all(tx, &p.code)?;
            for j in &statements {
                if let Err(w) = j.signature.as_ref().and(j.seal.as_ref()) {
                    return Err(Error::Inconsistent(format!(
                        "project {} statement {}: {w}",
                        p.code, j.statement.seq
                    )));
                }
            }
            for s in entries.iter().filter(|s| s.entry.kind != EntryKind::Seal) {
                if !sites.iter().any(|x| x.code == s.entry.site) {
                    return Err(Error::Inconsistent(format!(
                        "project {} seq {}: site {} is not registered",
                        p.code, s.entry.seq, s.entry.site
                    )));
                }
            }
            if let Some(h) = expected
                && !entries.iter().any(|s| s.chain == h)
            {
                return Err(Error::Inconsistent(format!(
                    "project {}: the chain no longer holds head {} (it has {} entries, head {})",
                    p.code,
                    h.head(),
                    c.entries,
                    c.head.head()
                )));
            }
            t.push(vec![
                Cell::text(&p.code),
                Cell::Int(sites.len() as i64),
                Cell::Int(c.entries as i64),
                Cell::Int(seals as i64),
                Cell::Int(statements.len() as i64),
                Cell::text(c.head.head()),
                Cell::text(c.head.to_hex()),
                Cell::text("whole"),
            ]);
        }
        Ok(())
    })?;
    t.note("Checked: SQLite integrity_check; every project, site, setting and feedstock row against its hash; every entry's leaf and chain hash recomputed from its stored fields; sequences dense from 0; corrections name an earlier entry of the same kind, each corrected once; every entry's site registered; every imported file's kept bytes against its SHA-256 and the entries that name it; every seal's tree head recomputed from the leaves before it, and an RFC 6962 consistency proof from each seal to the next; every signed statement's row hash and ed25519 signature, and the seal it signs still as signed.");
    if expected.is_some() {
        t.note("The published chain head given with --expect-head is still held by the chain.");
    }
    Ok(Report::default().table(t))
}

/// Every seal's root recomputed from the leaves before it, and each seal's tree shown a prefix of
/// the next by a consistency proof; returns how many seals there are.
fn check_seals(tx: &mut Tx<'_>, project: &str, entries: &[SealedEntry]) -> Result<usize> {
    let at = |seq: u64, what: String| {
        Error::Inconsistent(format!("project {project} seq {seq}: {what}"))
    };
    let listed = tx
        .seal_entries(project)?
        .iter()
        .map(|s| s.entry.seq)
        .collect();
    let mut seals = SealCheck::new(listed);
    for s in entries {
        seals.push(s).map_err(|w| at(s.entry.seq, w))?;
    }
    let checked = seals.finish().map_err(|(seq, w)| at(seq, w))?;
    Ok(checked.len())
}
