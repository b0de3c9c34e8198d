//! `verify`: recompute every hash from the stored fields and check the ledger's structure.

use super::Context;
use crate::error::{Error, Result};
use crate::ledger::Hash;
use crate::ledger::seal_check::SealCheck;
use crate::ledger::unnamed_files::UnnamedFiles;
use crate::ledger::{EntryKind, Project};
use crate::report::tables::verify::{
    deep_check_name, ledger_cells, notes, project_row, verify_table,
};
use crate::report::{Cell, Report};
use crate::store::Tx;
use clap::Args;
use indicatif::ProgressBar;

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
    let deep = a.deep.then(|| store.deep_check());
    if let Some(check) = deep {
        let integrity = store.integrity_check()?;
        if integrity != ["ok"] {
            return Err(Error::ledger(format!(
                "{}: {}",
                deep_check_name(check),
                integrity.join("; ")
            )));
        }
    }
    let mut t = verify_table();
    let (links, ledger_head) = store.read(|tx| {
        let ledger = tx.check_ledger_chain(a.project.as_deref(), expected_ledger)?;
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
            row.extend(ledger_cells(links, head));
            t.push(row);
        }
        bar.finish_and_clear();
        Ok(ledger)
    })?;
    notes(
        &mut t,
        links,
        ledger_head,
        deep,
        expected.is_some(),
        expected_ledger.is_some(),
    );
    Ok(Report::default().table(t))
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
    let imports = tx.check_evidence(&p.code)?;
    let mut unnamed = UnnamedFiles::new(
        imports
            .into_iter()
            .filter_map(|i| Some((Hash::from_hex(&i.sha256)?, i.id, i.file_name))),
    );
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
    unnamed.finish(&p.code).map_err(Error::ledger)?;
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
    Ok(project_row(
        &p.code,
        &[sites.len(), seals, statements.len(), reconciliations.len()],
        c.entries,
        c.head,
    ))
}
