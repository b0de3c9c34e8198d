//! `reconcile`: the ledger against an independent monitoring report, line by line, and per
//! reporting year the misstatement against materiality. Exit 4 when it is material, 5 when
//! nothing in the report could be assessed; `--record` keeps the reconciliation in the ledger.

use super::Context;
use super::reconciliations::RecordArgs;
use super::sign::RoleArg;
use super::view::load;
use crate::accounting::balance::BalanceMethod;
use crate::accounting::materiality::{
    Level, Reconciliation, Verdict, recorded_lines, recorded_years,
};
use crate::accounting::project_view::ReconcileError;
use crate::error::{Error, Result};
use crate::import::monitoring_report::{self, MonitoringReport};
use crate::ledger::Hash;
use crate::ledger::reconciliation::Recorded;
use crate::report::tables::reconcile::{
    line_note, lines_table, materiality_basis, not_assessed_warning, reconcile_report,
    verdicts_table,
};
use crate::report::{Report, Table};
use crate::store::Tx;
use clap::Args;
use std::path::PathBuf;

/// Exit code when a reporting year's misstatement is material.
pub const MATERIAL: u8 = 4;
/// Exit code when no line of the report could be assessed against the ledger.
pub const NOT_ASSESSED: u8 = 5;

#[derive(Debug, Args)]
pub struct ReconcileArgs {
    /// Project code (e.g. TFS)
    pub project: String,
    /// CSV with columns period,quantity,value,unit (period 2026, 2026-Q1 or 2026-03; quantity
    /// received, injected, produced, leakage, equipment-leak, stored, mineralized, weathering-net)
    pub report: PathBuf,
    /// Materiality level as a share of the year's stored total, as the programme sets it
    /// [default: 5%]
    #[arg(long)]
    pub materiality: Option<String>,
    /// Which mass balance gives the ledger's figures
    #[arg(long, value_enum, default_value_t = BalanceMethod::Rr)]
    pub method: BalanceMethod,
    /// First recompute every imported meter-day from its raw readings
    #[arg(long)]
    pub recompute: bool,
    #[command(flatten)]
    pub record: RecordArgs,
}

/// The ledger against a report, inside one transaction.
struct Compared {
    reconciliation: Reconciliation,
    recompute: Option<Table>,
    /// Entries in the project's chain and its head when compared: the ledger state reconciled.
    tip: (u64, Hash),
    route: crate::ledger::Method,
}

fn compare(
    tx: &mut Tx<'_>,
    a: &ReconcileArgs,
    report: &MonitoringReport,
    level: &Level,
) -> Result<Compared> {
    let view = load(tx, &a.project, None)?;
    let recompute = a
        .recompute
        .then(|| super::evidence::recompute_table(tx, &a.project));
    let recompute = recompute.transpose()?;
    let tip = tx.chain_tip(&a.project)?;
    let reconciliation = view
        .reconcile_report(&report.figures, a.method, &level.policy)
        .map_err(|e| match e {
            ReconcileError::View(e) => e.into(),
            ReconcileError::Materiality(e) => {
                Error::field("REPORT", &a.report.display().to_string(), e)
            }
        })?;
    Ok(Compared {
        reconciliation,
        recompute,
        tip,
        route: view.project().method,
    })
}

pub fn reconcile(ctx: &Context, a: ReconcileArgs) -> Result<Report> {
    let given = a.materiality.as_deref();
    let level =
        Level::parse(given).map_err(|e| Error::field("--materiality", given.unwrap_or(""), e))?;
    let report = monitoring_report::read(&a.report)?;
    super::inputs::optional_text("--by", &a.record.by)?;
    let mut store = ctx.open()?;
    let (c, recorded) = if a.record.record {
        store.write(|tx| {
            let c = compare(tx, &a, &report, &level)?;
            let r = record(tx, ctx, &a, &report, &level, &c)?;
            Ok((c, Some(r)))
        })?
    } else {
        store.read(|tx| Ok((compare(tx, &a, &report, &level)?, None)))?
    };
    let r = &c.reconciliation;
    let lines = lines_table(r, &report.name, &a.project);
    let basis = materiality_basis(&level);
    let verdicts = verdicts_table(r, &a.project, c.route, a.method, &basis);
    let mut out = reconcile_report(c.recompute, lines, verdicts, recorded.as_ref());
    out.exit_code = match r.overall() {
        Verdict::Material => MATERIAL,
        Verdict::NotAssessed => {
            let why = not_assessed_warning(&report.name, &a.project, NOT_ASSESSED);
            out.warnings.push(why);
            NOT_ASSESSED
        }
        Verdict::WithinMateriality => 0,
    };
    Ok(out)
}

/// Appends the reconciliation just compared, inside the command's write transaction.
fn record(
    tx: &mut Tx<'_>,
    ctx: &Context,
    a: &ReconcileArgs,
    report: &MonitoringReport,
    level: &Level,
    c: &Compared,
) -> Result<Recorded> {
    let r = &c.reconciliation;
    tx.add_next_reconciliation(&a.project, |seq, previous, recorded_by| Recorded {
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
        recorded_by,
        recorded_at: ctx.now,
    })
}
