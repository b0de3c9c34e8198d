//! Recorded reconciliations: `reconcile --record` appends one to the ledger, `reconciliations`
//! lists them, `verify` walks their run of hashes and the chain state each names, and the
//! annual page shows those of its year.

use super::Context;
use super::reconcile::{Compared, Level, ReconcileArgs};
use super::setup::known_project;
use super::sign::RoleArg;
use crate::accounting::balance::BalanceMethod;
use crate::accounting::materiality::{recorded_lines, recorded_years};
use crate::error::{Error, Result};
use crate::import::monitoring_report::MonitoringReport;
use crate::ledger::Hash;
use crate::ledger::reconciliation::Recorded;
use crate::report::Report;
use crate::report::tables::reconcile::line_note;
pub use crate::report::tables::reconciliations::{record_tables, recorded_table};
use crate::store::Tx;
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

impl RecordArgs {
    /// Refuses a bad name before anything is read or written.
    pub fn check(&self) -> Result<()> {
        match &self.by {
            Some(by) => super::inputs::text("--by", by),
            None => Ok(()),
        }
    }
}

#[derive(Debug, Args)]
pub struct ReconciliationsArgs {
    /// Project code (e.g. TFS)
    pub project: String,
    /// Only the reconciliations that judged this reporting year
    #[arg(long)]
    pub year: Option<i32>,
}

fn method_name(m: BalanceMethod) -> &'static str {
    match m {
        BalanceMethod::Rr => "rr",
        BalanceMethod::Iso27916 => "iso27916",
    }
}

/// Appends the reconciliation just compared, inside the command's write transaction.
pub fn record(
    tx: &mut Tx<'_>,
    ctx: &Context,
    a: &ReconcileArgs,
    report: &MonitoringReport,
    level: &Level,
    c: &Compared,
) -> Result<Recorded> {
    let (seq, previous) = tx.next_reconciliation(&a.project)?;
    let r = &c.reconciliation;
    let rec = Recorded {
        project: a.project.clone(),
        seq,
        previous,
        report_name: report.name.clone(),
        report_sha256: report.sha256,
        method: method_name(a.method).into(),
        materiality: level.policy.share.to_string(),
        basis: level.basis(),
        chain_size: c.tip.0,
        chain_head: c.tip.1,
        lines: recorded_lines(r, line_note),
        years: recorded_years(r),
        verdict: r.overall().text().into(),
        role: a.record.role.unwrap_or(RoleArg::Verifier).role(),
        by: a.record.by.clone(),
        recorded_by: tx.recorded_by()?,
        recorded_at: ctx.now,
    };
    tx.add_reconciliation(&rec)?;
    Ok(rec)
}

pub fn reconciliations(ctx: &Context, a: ReconciliationsArgs) -> Result<Report> {
    let all = ctx.open()?.read(|tx| {
        known_project(tx, &a.project)?;
        tx.reconciliations(&a.project)
    })?;
    let chosen: Vec<Recorded> = all
        .into_iter()
        .filter(|r| a.year.is_none_or(|y| r.covers(y)))
        .collect();
    Ok(record_tables(&a.project, &chosen)
        .into_iter()
        .fold(Report::default(), Report::table))
}

/// The chain states the records name, found again as `verify` walks the chain: `check` is
/// called with each entry's seq and chain hash, `finish` with the chain's length.
pub struct ChainStates<'a> {
    records: &'a [Recorded],
}

impl<'a> ChainStates<'a> {
    pub fn new(records: &'a [Recorded]) -> Self {
        ChainStates { records }
    }

    pub fn check(&self, project: &str, seq: u64, chain: Hash) -> Result<()> {
        match self
            .records
            .iter()
            .find(|r| r.chain_size == seq + 1 && r.chain_head != chain)
        {
            Some(r) => Err(self.wrong(project, r)),
            None => Ok(()),
        }
    }

    pub fn finish(&self, project: &str, entries: u64) -> Result<()> {
        match self.records.iter().find(|r| {
            r.chain_size > entries || (r.chain_size == 0 && r.chain_head != Hash::GENESIS)
        }) {
            Some(r) => Err(self.wrong(project, r)),
            None => Ok(()),
        }
    }

    fn wrong(&self, project: &str, r: &Recorded) -> Error {
        Error::ledger(format!(
            "project {project}: reconciliations row seq {} names a chain of {} entries with head {}, which the chain never had",
            r.seq,
            r.chain_size,
            r.chain_head.head()
        ))
    }
}
