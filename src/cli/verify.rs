//! `verify`: recompute every hash from the stored fields and check the ledger's structure.

use super::Context;
use super::inputs::optional;
use crate::error::{Error, Result};
use crate::ledger::Hash;
use crate::report::Report;
use crate::report::tables::verify::{deep_finding, notes, project_row, verify_table};
use clap::Args;

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
    let hex = |h: &str| Hash::from_hex(h).ok_or("is not 64 hex digits");
    let expected = optional("--expect-head", a.expect_head.as_deref(), hex)?;
    let expected_ledger = optional("--expect-ledger-head", a.expect_ledger_head.as_deref(), hex)?;
    let mut store = ctx.open()?;
    let deep = a.deep.then(|| store.deep_check());
    if let Some(check) = deep {
        let found = store.integrity_check()?;
        if found != ["ok"] {
            return Err(Error::ledger(deep_finding(check, &found)));
        }
    }
    let mut t = verify_table();
    let ledger = store.read(|tx| {
        let ledger = tx.check_ledger_chain(a.project.as_deref(), expected_ledger)?;
        let projects = tx.projects()?;
        let chosen: Vec<_> = match &a.project {
            Some(code) => vec![super::setup::known_project(tx, code)?],
            None => projects,
        };
        let bar = super::progress::entries("verifying", tx.entries_of(&chosen));
        for p in chosen {
            let c = tx.check_project(&p.code, expected, || bar.inc(1))?;
            t.push(project_row(&p.code, &c, ledger));
        }
        bar.finish_and_clear();
        Ok(ledger)
    })?;
    notes(
        &mut t,
        ledger,
        deep,
        expected.is_some(),
        expected_ledger.is_some(),
    );
    Ok(Report::default().table(t))
}
