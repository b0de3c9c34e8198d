//! `verify`: recompute every hash from the stored fields and check the ledger's structure.

use super::Context;
use crate::error::{Error, Result};
use crate::ledger::Hash;
use crate::ledger::seal_check::SealCheck;
use crate::ledger::{EntryKind, Project};
use crate::report::names;
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
    /// Also run the database's own check of the file's structure (slower: it reads every page)
    #[arg(long)]
    pub deep: bool,
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
    if a.deep {
        let integrity = store.integrity_check()?;
        if integrity != ["ok"] {
            return Err(Error::Inconsistent(format!(
                "SQLite integrity_check: {}",
                integrity.join("; ")
            )));
        }
    }
    let mut t = Table::new(
        "verify",
        "Ledger verification",
        columns(&[
            names::PROJECT,
            names::SITES,
            names::ENTRIES,
            names::SEALS,
            names::STATEMENTS,
            names::CHAIN_HEAD,
            names::CHAIN_HASH.programs(),
            names::RESULT,
        ]),
    );
    store.read(|tx| {
        let projects = tx.projects()?;
        let chosen: Vec<_> = match &a.project {
            Some(code) => vec![super::setup::known_project(tx, code)?],
            None => projects,
        };
        for p in chosen {
            t.push(check_project(tx, &p, expected)?);
        }
        Ok(())
    })?;
    t.note("Checked: every project, site, setting and feedstock row against its hash; every entry's leaf and chain hash recomputed from its stored fields; sequences dense from 0; recorded_at never decreasing along a chain; corrections name an earlier entry of the same kind, each corrected once; every entry's site registered; every imported file's kept bytes against its SHA-256 and the entries that name it; every seal's tree head recomputed from the leaves before it, and an RFC 6962 consistency proof from each seal to the next; every signed statement's row hash and ed25519 signature, and the seal it signs still as signed.");
    if a.deep {
        t.note("SQLite's integrity_check found the file's structure whole.");
    }
    if expected.is_some() {
        t.note("The published chain head given with --expect-head is still held by the chain.");
    }
    Ok(Report::default().table(t))
}

/// One project's rows against their hashes, its chain streamed and checked with its seals, and
/// the published head if one is given; the project's row of the table.
fn check_project(tx: &mut Tx<'_>, p: &Project, expected: Option<Hash>) -> Result<Vec<Cell>> {
    let sites = tx.sites(&p.code)?;
    tx.settings(&p.code)?;
    tx.feedstocks(&p.code)?;
    super::evidence::check(tx, &p.code)?;
    let at = |seq: u64, what: String| {
        Error::Inconsistent(format!("project {} seq {seq}: {what}", p.code))
    };
    let listed = tx
        .seal_entries(&p.code)?
        .iter()
        .map(|s| s.entry.seq)
        .collect();
    let mut seals = SealCheck::new(listed);
    let mut holds_expected = false;
    let c = tx.walk_chain(&p.code, None, |row| {
        let e = &row.sealed.entry;
        if e.site.is_empty() {
            if e.kind != EntryKind::Seal && !e.kind.site_optional() {
                return Err(at(e.seq, format!("a {} entry names no site", e.kind)));
            }
        } else if !sites.iter().any(|x| x.code == e.site) {
            return Err(at(e.seq, format!("site {} is not registered", e.site)));
        }
        seals.push(row.sealed).map_err(|w| at(e.seq, w))?;
        holds_expected |= expected == Some(row.sealed.chain);
        Ok(())
    })?;
    let seals = seals.finish().map_err(|(seq, w)| at(seq, w))?.len();
    let statements = super::sign::judge_all(tx, &p.code)?;
    for j in &statements {
        if let Err(w) = j.signature.as_ref().and(j.seal.as_ref()) {
            return Err(Error::Inconsistent(format!(
                "project {} statement {}: {w}",
                p.code, j.statement.seq
            )));
        }
    }
    if let Some(h) = expected
        && !holds_expected
    {
        return Err(Error::Inconsistent(format!(
            "project {}: the chain no longer holds head {} (it has {} entries, head {})",
            p.code,
            h.head(),
            c.entries,
            c.head.head()
        )));
    }
    Ok(vec![
        Cell::text(&p.code),
        Cell::Int(sites.len() as i64),
        Cell::Int(c.entries as i64),
        Cell::Int(seals as i64),
        Cell::Int(statements.len() as i64),
        Cell::text(c.head.head()),
        Cell::text(c.head.to_hex()),
        Cell::text("intact"),
    ])
}
