//! `entries` and `balance`: what the ledger holds, and what it adds up to.

use super::Context;
use super::claims::{
    claims_table, deduction_rule, pool_table, rock_uncertainty_notes, uncertainty_note,
};
use super::dates::DateArgs;
use super::setup::known_project;
use crate::accounting::balance::BalanceMethod;
use crate::accounting::claims::PoolEvent;
use crate::accounting::project_view::ProjectFigures;
use crate::error::{Error, Result, StoreKind};
use crate::ledger::period::Grouping;
use crate::ledger::{Method, SealedEntry};
use crate::report::balance as tables;
use crate::report::names;
use crate::report::stream::RowStream;
use crate::report::{Cell, Column, Format, Report, Table, columns};
use clap::{Args, ValueEnum};

#[derive(Debug, Args)]
pub struct EntriesArgs {
    /// Project code (e.g. TFS)
    pub project: String,
    /// List from this seq on [default: 0]
    #[arg(long, value_name = "SEQ")]
    pub from_seq: Option<u64>,
    /// List at most this many entries [default: every one as JSON or CSV; a page of 10,000 in
    /// a table]
    #[arg(long, value_name = "N")]
    pub limit: Option<u64>,
}

/// The most rows a table for people holds unless `--limit` says otherwise: a table is fitted
/// to its widest cell, so it is drawn whole, in memory.
const TABLE_PAGE: u64 = 10_000;

/// Every entry of a project, each checked as it is read. JSON and CSV are written to standard
/// output row by row as the chain is read (memory stays flat); a table holds one page.
pub fn entries(ctx: &Context, a: EntriesArgs, format: Format) -> Result<Report> {
    let from = a.from_seq.unwrap_or(0);
    let page = |limit: u64| move |seq: u64| seq >= from && seq - from < limit;
    if format != Format::Table {
        let shown = page(a.limit.unwrap_or(u64::MAX));
        let out = std::io::BufWriter::with_capacity(1 << 16, std::io::stdout().lock());
        let mut rows = RowStream::new(out, format, entry_columns());
        walk_entries(ctx, &a.project, |s, by| match shown(s.entry.seq) {
            true => rows.row(&entry_cells(s, by)).map_err(standard_output),
            false => Ok(()),
        })?;
        rows.finish().map_err(standard_output)?;
        return Ok(Report::written());
    }
    let limit = a.limit.unwrap_or(TABLE_PAGE);
    let shown = page(limit);
    let mut t = Table::new(
        "entries",
        format!("Entries, project {}", a.project),
        entry_columns(),
    );
    let mut any_replaced = false;
    let total = walk_entries(ctx, &a.project, |s, by| {
        if shown(s.entry.seq) {
            any_replaced |= by.is_some();
            t.push(entry_cells(s, by));
        }
        Ok(())
    })?;
    if any_replaced {
        t.note("Entries with a \"Corrected by\" seq are kept for the record; reports count the entry that corrects them.");
    }
    if from.saturating_add(limit) < total {
        let next = from + limit;
        t.note(format!(
            "Listed: {} of {total} entries, from seq {from}; `--from-seq {next}` lists the next {limit}, and `--format csv` or `--format json` lists every entry as it is read.",
            t.rows.len()
        ));
    }
    Ok(Report::default().table(t))
}

/// Walks the project's chain, checking every entry, with a bar for a long one; hands `f` each
/// entry and the seq that corrects it. Returns the chain's length.
fn walk_entries(
    ctx: &Context,
    project: &str,
    mut f: impl FnMut(&SealedEntry, Option<u64>) -> Result<()>,
) -> Result<u64> {
    ctx.open()?.read(|tx| {
        known_project(tx, project)?;
        // The bar's length only: a tip that does not read back is the walk's to name.
        let length = tx.chain_tip(project).map_or(0, |(next, _)| next);
        let bar = super::progress::entries("listing entries", length);
        let c = tx.walk_chain(project, None, |row| {
            bar.inc(1);
            f(row.sealed, row.replaced_by)
        })?;
        bar.finish_and_clear();
        Ok(c.entries)
    })
}

/// A write to standard output that failed (a closed pipe, a full disk).
fn standard_output(e: std::io::Error) -> Error {
    Error::store(
        StoreKind::System,
        format!("standard output: {e} (the listing was not written in full)"),
    )
}

fn entry_columns() -> Vec<Column> {
    columns(&[
        names::SEQ,
        names::KIND,
        names::SITE,
        names::PERIOD,
        names::PERIOD_FROM.programs(),
        names::PERIOD_TO.programs(),
        names::READING,
        names::CO2_T,
        names::CO2_G.programs(),
        names::SIGN,
        names::CORRECTS,
        names::CORRECTED_BY,
        names::REASON.programs(),
        names::KEY.programs(),
        names::METER.programs(),
        names::NOTE.programs(),
        names::RECORDED_AT.programs(),
        names::EVIDENCE_NAME.programs(),
        names::EVIDENCE_SHA256.programs(),
        names::RECORDED_BY.programs(),
        names::LEAF_HASH.programs(),
        names::CHAIN_HEAD,
        names::CHAIN_HASH.programs(),
    ])
}

/// One entry's row, `by` the seq of the entry that corrects it.
fn entry_cells(s: &SealedEntry, by: Option<u64>) -> Vec<Cell> {
    let e = &s.entry;
    vec![
        Cell::Int(e.seq as i64),
        Cell::text(e.kind.name()),
        Cell::text(&e.site),
        Cell::text(e.period.to_string()),
        Cell::text(e.period.from.to_string()),
        Cell::text(e.period.to.to_string()),
        Cell::Pairs(e.reading.0.clone()),
        Cell::Tonnes(e.mass),
        Cell::Int(e.mass.grams()),
        Cell::text(e.sign.name()),
        e.corrects.map_or(Cell::Empty, |c| Cell::Int(c as i64)),
        by.map_or(Cell::Empty, |c| Cell::Int(c as i64)),
        Cell::opt_text(e.reason.as_deref()),
        Cell::text(&e.key),
        Cell::opt_text(e.meter.as_deref()),
        Cell::opt_text(e.note.as_deref()),
        Cell::text(e.recorded_at.format("%Y-%m-%dT%H:%M:%S%.6fZ").to_string()),
        Cell::opt_text(e.evidence.as_ref().map(|v| v.file_name.clone())),
        Cell::opt_text(e.evidence.as_ref().map(|v| v.sha256.to_hex())),
        Cell::opt_text(e.recorded_by.as_deref()),
        Cell::text(s.leaf.to_hex()),
        Cell::text(s.chain.head()),
        Cell::text(s.chain.to_hex()),
    ]
}

/// Calendar grouping of `--by`.
#[derive(Debug, Clone, Copy, ValueEnum)]
pub enum By {
    Month,
    Quarter,
    Year,
}

#[derive(Debug, Args)]
pub struct BalanceArgs {
    /// Project code (e.g. TFS)
    pub project: String,
    /// Length of each period (one row each)
    #[arg(long, value_enum, default_value_t = By::Quarter)]
    pub by: By,
    /// rr: 40 CFR 98.443 (RR-11/RR-12); iso27916: the CO2-EOR form, recycled CO2 counted once
    #[arg(long, value_enum, default_value_t = BalanceMethod::Rr)]
    pub method: BalanceMethod,
    /// Deduct only the share of the uncertainty above this threshold (e.g. 5%) [default: deduct
    /// the whole uncertainty]
    #[arg(long, value_name = "SHARE")]
    pub deduct_excess_over: Option<String>,
    #[command(flatten)]
    pub dates: DateArgs,
}

pub fn balance(ctx: &Context, a: BalanceArgs) -> Result<Report> {
    let dates = a.dates.read()?;
    let figures = ctx.open()?.read(|tx| dates.load(tx, &a.project))?;
    let grouping = Grouping::from(a.by);
    let mut report = match figures.project().method {
        Method::BasaltMineralization => super::mineralization::balance(&figures, grouping)?,
        Method::ExSituMineralization => {
            super::mineralization::carbonation_balance(&figures, grouping)?
        }
        Method::EnhancedWeathering => super::weathering::balance(&figures, grouping)?,
        Method::SalineAquifer | Method::DepletedField | Method::Eor => {
            geological_balance(&figures, grouping, &a)?
        }
    };
    if matches!(
        figures.project().method,
        Method::ExSituMineralization | Method::EnhancedWeathering
    ) {
        let deduction = deduction_rule(a.deduct_excess_over.as_deref())?;
        report = claims_tables(&figures, BalanceMethod::Rr, deduction, report)?;
    }
    if let Some(t) = report.tables.first_mut() {
        dates.mark(t, "it");
    }
    if let Some(t) = super::late::late_table(figures.listed().map(|e| (a.project.as_str(), e))) {
        report = report.table(t);
    }
    Ok(report)
}

/// The mass balance of an injection project, its leakage, claims and buffer pool.
fn geological_balance(
    figures: &ProjectFigures,
    grouping: Grouping,
    a: &BalanceArgs,
) -> Result<Report> {
    let deduction = deduction_rule(a.deduct_excess_over.as_deref())?;
    let project = figures.project();
    let lines = figures.geological(grouping, a.method);
    let by = format!("{:?}", a.by).to_lowercase();
    let mut t = match a.method {
        BalanceMethod::Rr => tables::rr_table(project, &lines, &by),
        BalanceMethod::Iso27916 => tables::iso_table(project, &lines, &by),
    };
    tables::permit_notes(&mut t, project, &lines, figures.over_permit());
    t.note("Entries spanning periods are split by days. Project emissions are reported beside storage, not deducted from it; the claims deduct them.");
    t.note(uncertainty_note(figures));
    let (assumed, n) = figures.on_assumed_fraction();
    if assumed.is_positive() {
        t.note(crate::report::meters::assumed_note(
            assumed,
            match n {
                1 => "1 entry of the mass balance".to_string(),
                n => format!("{n} entries of the mass balance"),
            },
        ));
    }
    let mut report = Report::default().table(t);
    if let Some(l) = tables::leakage_table(project, figures.listed()) {
        report = report.table(l);
    }
    if let Some(r) = tables::reversals_table(project, figures.listed()) {
        report = report.table(r);
    }
    claims_tables(figures, a.method, deduction, report)
}

/// The claims of each claim period (whatever --by shows the balance by) and, where a buffer is
/// set or a loss drawn, the buffer pool.
fn claims_tables(
    figures: &ProjectFigures,
    method: BalanceMethod,
    deduction: crate::accounting::conservative::DeductionRule,
    mut report: Report,
) -> Result<Report> {
    let (period_claims, pool, events) = figures.claim_pool(method, deduction)?;
    let mut claims = claims_table(figures, &period_claims, deduction);
    if figures.project().method == Method::EnhancedWeathering {
        let periods: Vec<_> = period_claims.iter().map(|(b, _)| *b).collect();
        super::weathering::parameter_notes(&mut claims, &figures.deductions_used(&periods)?);
    }
    for note in rock_uncertainty_notes(figures, figures.claim_period())? {
        claims.note(note);
    }
    report = report.table(claims);
    let buffered = period_claims
        .iter()
        .any(|(b, _)| figures.rules(*b, deduction).buffer_share > 0.0);
    if buffered || !events.iter().all(|e| matches!(e, PoolEvent::Claim { .. })) {
        report = report.table(pool_table(figures, &pool, &events));
    }
    Ok(report)
}
