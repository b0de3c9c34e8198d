//! Recorded reconciliations: `reconcile --record` appends one to the ledger, `reconciliations`
//! lists them, `verify` walks their run of hashes and the chain state each names, and the
//! annual page shows those of its year.

use super::Context;
use super::reconcile::{Compared, Level, MonitoringReport, ReconcileArgs, line_note};
use super::setup::known_project;
use super::sign::RoleArg;
use crate::accounting::balance::BalanceMethod;
use crate::accounting::materiality::Presence;
use crate::error::{Error, Result};
use crate::ledger::Hash;
use crate::ledger::reconciliation::{Recorded, RecordedLine, RecordedYear};
use crate::quantity::Mass;
use crate::report::names;
use crate::report::{Cell, Report, Table, columns};
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
    let grams = |m: Mass| m.grams();
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
        lines: r
            .lines
            .iter()
            .map(|l| RecordedLine {
                period: l.period.to_string(),
                quantity: l.quantity.key().into(),
                ledger_g: (!matches!(l.presence, Presence::ReportOnly(_)))
                    .then(|| grams(l.presence.ledger())),
                report_g: (!matches!(l.presence, Presence::LedgerOnly(_)))
                    .then(|| grams(l.presence.report())),
                difference_g: grams(l.difference),
                note: line_note(l.presence, l.judgement),
            })
            .collect(),
        years: r
            .years
            .iter()
            .map(|y| RecordedYear {
                year: y.year,
                stored_g: grams(y.ledger_total),
                counted: y
                    .counted
                    .iter()
                    .map(|q| q.key())
                    .collect::<Vec<_>>()
                    .join(", "),
                misstatement_g: grams(y.misstatement),
                threshold_g: grams(y.threshold),
                verdict: y.verdict.text().into(),
            })
            .collect(),
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

/// The three tables of recorded reconciliations: the records, their lines, their years.
pub fn record_tables(project: &str, records: &[Recorded]) -> Vec<Table> {
    let mut lines = Table::new(
        "reconciliation_lines",
        format!("Recorded reconciliation lines, project {project}"),
        columns(&[
            names::SEQ,
            names::PERIOD,
            names::QUANTITY,
            names::LEDGER_T,
            names::REPORT_T,
            names::DIFFERENCE_T,
            names::NOTE,
        ]),
    );
    let mut years = Table::new(
        "reconciliation_years",
        format!("Recorded materiality by reporting year, project {project}"),
        columns(&[
            names::SEQ,
            names::YEAR,
            names::STORED_LEDGER_T,
            names::COUNTED,
            names::MISSTATEMENT_T,
            names::THRESHOLD_T,
            names::VERDICT,
        ]),
    );
    let tonnes = |g: Option<i64>| g.map_or(Cell::Empty, |g| Cell::Tonnes(Mass::from_grams(g)));
    for r in records {
        for l in &r.lines {
            lines.push(vec![
                Cell::Int(r.seq as i64),
                Cell::text(&l.period),
                Cell::text(&l.quantity),
                tonnes(l.ledger_g),
                tonnes(l.report_g),
                tonnes(Some(l.difference_g)),
                Cell::text(&l.note),
            ]);
        }
        for y in &r.years {
            years.push(vec![
                Cell::Int(r.seq as i64),
                Cell::text(y.year.to_string()),
                tonnes(Some(y.stored_g)),
                Cell::text(&y.counted),
                tonnes(Some(y.misstatement_g)),
                tonnes(Some(y.threshold_g)),
                Cell::text(&y.verdict),
            ]);
        }
    }
    lines.note("Difference = ledger − report, as recorded; the ledger's figures are those of the chain the record names.");
    vec![recorded_table(project, records), lines, years]
}

/// One row per recorded reconciliation.
pub fn recorded_table(project: &str, records: &[Recorded]) -> Table {
    let mut t = Table::new(
        "reconciliations",
        format!("Reconciliations recorded, project {project}"),
        columns(&[
            names::SEQ,
            names::RECORDED_AT,
            names::ROLE,
            names::RECONCILED_BY,
            names::RECORDED_BY.programs(),
            names::MONITORING_REPORT,
            names::REPORT_SHA256,
            names::YEARS,
            names::METHOD,
            names::MATERIALITY_PCT,
            names::VERDICT,
            names::ENTRIES,
            names::CHAIN_HEAD,
            names::CHAIN_HASH.programs(),
            names::ROW_HASH.programs(),
        ]),
    );
    for r in records {
        let share: f64 = r.materiality.parse().unwrap_or(f64::NAN);
        t.push(vec![
            Cell::Int(r.seq as i64),
            Cell::text(r.recorded_at.format("%Y-%m-%d %H:%M:%S").to_string()),
            Cell::text(r.role.name()),
            r.by.as_deref().map_or(Cell::Empty, Cell::text),
            r.recorded_by.as_deref().map_or(Cell::Empty, Cell::text),
            Cell::text(&r.report_name),
            Cell::text(r.report_sha256.to_hex()),
            Cell::text(r.years_text()),
            Cell::text(&r.method),
            Cell::Percent(share * 100.0),
            Cell::text(&r.verdict),
            Cell::Int(r.chain_size as i64),
            Cell::text(r.chain_head.head()),
            Cell::text(r.chain_head.to_hex()),
            Cell::text(r.row_hash().to_hex()),
        ]);
    }
    if records.is_empty() {
        t.note(format!(
            "No reconciliation is recorded for project {project}."
        ));
    }
    t.note("Each record names the monitoring report by its SHA-256 and the chain it was made against (entries and head); its row hash covers every field and the record before it, and verify walks them. A record is evidence about its periods: it changes no entry and no seal, so one recorded after a seal stands beside it.");
    t
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
