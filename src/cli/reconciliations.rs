//! Recorded reconciliations: `reconcile --record` appends one to the ledger, `reconciliations`
//! lists them, `verify` walks their run of hashes and the chain state each names, and the
//! annual page shows those of its year.

use super::Context;
use super::reconcile::{Compared, ReconcileArgs};
use super::setup::known_project;
use super::sign::RoleArg;
use crate::accounting::materiality::{Level, recorded_lines, recorded_years};
use crate::error::Result;
use crate::import::monitoring_report::MonitoringReport;
use crate::ledger::reconciliation::Recorded;
use crate::report::Report;
use crate::report::tables::reconcile::{line_note, materiality_basis};
use crate::report::tables::reconciliations::record_tables;
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
        method: a.method.name().into(),
        materiality: level.policy.share.to_string(),
        basis: materiality_basis(level),
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
