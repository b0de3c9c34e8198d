//! `verify`: recompute every hash from the stored fields and check the ledger's structure.

use super::Context;
use crate::error::{Error, Result};
use crate::ledger::Hash;
use crate::ledger::ledger_chain::{LinkWalk, Record};
use crate::ledger::seal_check::SealCheck;
use crate::ledger::{Entry, EntryKind, Project};
use crate::report::names;
use crate::report::{Cell, Report, Table, columns};
use crate::store::{StoredImport, Tx};
use clap::Args;
use indicatif::ProgressBar;
use std::collections::HashMap;

#[derive(Debug, Args)]
pub struct VerifyArgs {
    /// Only this project [default: every project]
    pub project: Option<String>,
    /// A chain head published earlier (e.g. in a monitoring report): the chain must still hold it,
    /// which also catches entries removed from the end
    #[arg(long, value_name = "HEX", requires = "project")]
    pub expect_head: Option<String>,
    /// A ledger head published earlier (verify prints it): the ledger chain must still hold it,
    /// which also catches a project removed with every row it had
    #[arg(long, value_name = "HEX")]
    pub expect_ledger_head: Option<String>,
    /// Also run the database's own check of the file's structure (slower: it reads every page)
    #[arg(long)]
    pub deep: bool,
}

pub fn verify(ctx: &Context, a: VerifyArgs) -> Result<Report> {
    let hex = |option: &str, h: Option<&str>| {
        h.map(|h| Hash::from_hex(h).ok_or_else(|| Error::field(option, h, "is not 64 hex digits")))
            .transpose()
    };
    let expected = hex("--expect-head", a.expect_head.as_deref())?;
    let expected_ledger = hex("--expect-ledger-head", a.expect_ledger_head.as_deref())?;
    let mut store = ctx.open()?;
    if a.deep {
        let integrity = store.integrity_check()?;
        if integrity != ["ok"] {
            return Err(Error::ledger(format!(
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
            names::RECONCILIATIONS,
            names::CHAIN_HEAD,
            names::CHAIN_HASH.programs(),
            names::RESULT,
            names::LEDGER_LINKS.programs(),
            names::LEDGER_HASH.programs(),
        ]),
    );
    let (links, ledger_head) = store.read(|tx| {
        let ledger = check_ledger_chain(tx, a.project.as_deref(), expected_ledger)?;
        let projects = tx.projects()?;
        let chosen: Vec<_> = match &a.project {
            Some(code) => vec![super::setup::known_project(tx, code)?],
            None => projects,
        };
        let (links, head) = ledger;
        // The bar's length only: a tip that does not read back is the walk's to name.
        let mut total = 0;
        for p in &chosen {
            total += tx.chain_tip(&p.code).map_or(0, |(next, _)| next);
        }
        let bar = super::progress::entries("verifying", total);
        for p in chosen {
            let mut row = check_project(tx, &p, expected, &bar)?;
            row.extend([Cell::Int(links as i64), Cell::text(head.to_hex())]);
            t.push(row);
        }
        bar.finish_and_clear();
        Ok(ledger)
    })?;
    t.note("Checked: every project, site, setting and feedstock row against its hash; every entry's leaf and chain hash recomputed from its stored fields; sequences dense from 0; recorded_at never decreasing along a chain; corrections name an earlier entry of the same kind, each corrected once; every entry's site registered; every imported file's kept bytes against its SHA-256 and the entries that name it; every seal's tree head recomputed from the leaves before it, and an RFC 6962 consistency proof from each seal to the next; every signed statement's row hash and ed25519 signature, and the seal it signs still as signed; every recorded reconciliation's row hash, seqs dense from 0, each naming the one before it, and the chain state it names found in the chain.");
    t.note(format!(
        "Ledger chain: {links} links, each naming a project, site, setting, feedstock, import, statement, reconciliation or seal that is still there as linked, and every such row linked; ledger head {}.",
        ledger_head.to_hex()
    ));
    t.note(if a.deep {
        "SQLite's integrity_check found the file's structure whole."
    } else {
        "Not run: the database's own check of every page of the file (slow on a large ledger); `sinkbook verify --deep` runs it too."
    });
    if expected.is_some() {
        t.note("The published chain head given with --expect-head is still held by the chain.");
    }
    if expected_ledger.is_some() {
        t.note("The published ledger head given with --expect-ledger-head is still held by the ledger chain.");
    }
    Ok(Report::default().table(t))
}

/// The ledger chain walked link by link (every link's hashes; with `only`, the rows of that
/// project) and every linked table searched for a row no link names. Returns the number of
/// links and the ledger head.
fn check_ledger_chain(
    tx: &mut Tx<'_>,
    only: Option<&str>,
    expected: Option<Hash>,
) -> Result<(u64, Hash)> {
    let mut walk = LinkWalk::new(expected);
    let mut next = 0;
    loop {
        let page = tx.links_from(next)?;
        if page.is_empty() {
            break;
        }
        for s in &page {
            walk.step(s).map_err(Error::ledger)?;
            next = s.link.seq + 1;
            let l = &s.link;
            if only.is_some_and(|p| p != l.project) {
                continue;
            }
            let row = l.record.describe(&l.project, &l.item);
            match tx.linked_row(l.record, &l.project, &l.item)? {
                None => {
                    return Err(Error::ledger(format!(
                        "ledger link {}: {row} is gone: the ledger no longer holds the row it links",
                        l.seq
                    )));
                }
                Some(h) if h != l.row => {
                    return Err(Error::ledger(format!(
                        "ledger link {}: {row} is not the row linked (its hash {} differs from the link's {})",
                        l.seq,
                        h.head(),
                        l.row.head()
                    )));
                }
                Some(_) => {}
            }
        }
    }
    for record in Record::ALL {
        if let Some((project, item)) = tx.unlinked(record, only)? {
            return Err(Error::ledger(format!(
                "{} is in no ledger link: written outside sinkbook, or its link was removed",
                record.describe(&project, &item)
            )));
        }
    }
    walk.finish().map_err(Error::ledger)
}

/// One project's rows against their hashes, its chain streamed and checked with its seals, and
/// the published head if one is given; the project's row of the table.
fn check_project(
    tx: &mut Tx<'_>,
    p: &Project,
    expected: Option<Hash>,
    bar: &ProgressBar,
) -> Result<Vec<Cell>> {
    let sites = tx.sites(&p.code)?;
    tx.settings(&p.code)?;
    tx.feedstocks(&p.code)?;
    let mut unnamed = Unnamed::new(super::evidence::check(tx, &p.code)?);
    let at =
        |seq: u64, what: String| Error::ledger(format!("project {} seq {seq}: {what}", p.code));
    let listed = tx
        .seal_entries(&p.code)?
        .iter()
        .map(|s| s.entry.seq)
        .collect();
    let mut seals = SealCheck::new(listed);
    let mut holds_expected = false;
    let reconciliations = tx.reconciliations(&p.code)?;
    let states = super::reconciliations::ChainStates::new(&reconciliations);
    let c = tx.walk_chain(&p.code, None, |row| {
        let e = &row.sealed.entry;
        bar.inc(1);
        if e.site.is_empty() {
            if e.kind != EntryKind::Seal && !e.kind.site_optional() {
                return Err(at(e.seq, format!("a {} entry names no site", e.kind)));
            }
        } else if !sites.iter().any(|x| x.code == e.site) {
            return Err(at(e.seq, format!("site {} is not registered", e.site)));
        }
        unnamed.see(e);
        seals.push(row.sealed).map_err(|w| at(e.seq, w))?;
        states.check(&p.code, e.seq, row.sealed.chain)?;
        holds_expected |= expected == Some(row.sealed.chain);
        Ok(())
    })?;
    states.finish(&p.code, c.entries)?;
    unnamed.finish(&p.code)?;
    let seals = seals.finish().map_err(|(seq, w)| at(seq, w))?.len();
    let statements = super::sign::judge_all(tx, &p.code)?;
    for j in &statements {
        if let Err(w) = j.signature.as_ref().and(j.seal.as_ref()) {
            return Err(Error::ledger(format!(
                "project {} statement {}: {w}",
                p.code, j.statement.seq
            )));
        }
    }
    if let Some(h) = expected
        && !holds_expected
    {
        return Err(Error::ledger(format!(
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
        Cell::Int(reconciliations.len() as i64),
        Cell::text(c.head.head()),
        Cell::text(c.head.to_hex()),
        Cell::text("intact"),
    ])
}

/// The project's imported files no entry has named yet as its evidence: each must be named by
/// the end of the walk (an import whose entries were cut from the chain's end leaves its file).
struct Unnamed(HashMap<Hash, StoredImport>);

impl Unnamed {
    fn new(imports: Vec<StoredImport>) -> Self {
        Unnamed(
            imports
                .into_iter()
                .filter_map(|i| Some((Hash::from_hex(&i.sha256)?, i)))
                .collect(),
        )
    }

    fn see(&mut self, e: &Entry) {
        if let Some(ev) = &e.evidence
            && !self.0.is_empty()
        {
            self.0.remove(&ev.sha256);
        }
    }

    fn finish(self, project: &str) -> Result<()> {
        match self.0.into_values().min_by_key(|i| i.id) {
            None => Ok(()),
            Some(i) => Err(Error::ledger(format!(
                "project {project} import {} ({}): no entry of the chain names this file as its evidence",
                i.id, i.file_name
            ))),
        }
    }
}
