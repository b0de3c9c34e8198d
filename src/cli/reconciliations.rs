//! Recorded reconciliations: `reconcile --record` appends one to the ledger (its options are
//! here), `reconciliations` lists them, `verify` walks their run of hashes and the chain state
//! each names, and the annual page shows those of its year.

use super::Context;
use super::setup::known_project;
use super::sign::RoleArg;
use crate::error::Result;
use crate::report::Report;
use crate::report::tables::reconciliations::record_tables;
use clap::Args;

#[derive(Debug, Args)]
pub struct RecordArgs {
    /// Record the reconciliation in the ledger (append-only, hashed): the report's name and
    /// SHA-256, every line, each year's verdict, the materiality level, who and when
    #[arg(long)]
    pub record: bool,
    /// Who reconciled, as the record should name them (e.g. the verification body); with --record
    #[arg(long, value_name = "NAME", requires = "record")]
    pub by: Option<String>,
    /// In which role [default: verifier]; with --record
    #[arg(long, value_enum, requires = "record")]
    pub role: Option<RoleArg>,
}

#[derive(Debug, Args)]
pub struct ReconciliationsArgs {
    /// Project code (e.g. TFS)
    pub project: String,
    /// Only the reconciliations that judged this reporting year
    #[arg(long)]
    pub year: Option<i32>,
}

pub fn reconciliations(ctx: &Context, a: ReconciliationsArgs) -> Result<Report> {
    let mut chosen = ctx.open()?.read(|tx| {
        known_project(tx, &a.project)?;
        tx.reconciliations(&a.project)
    })?;
    chosen.retain(|r| a.year.is_none_or(|y| r.covers(y)));
    Ok(record_tables(&a.project, &chosen)
        .into_iter()
        .fold(Report::default(), Report::table))
}
