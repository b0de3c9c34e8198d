//! `reconcile`: the ledger against an independent monitoring report, line by line, and per
//! reporting year the misstatement against materiality. Exit 4 when it is material.

use super::Context;
use super::evidence::ReadingTotal;
use super::view::load;
use crate::accounting::balance::BalanceMethod;
use crate::accounting::materiality::{
    Figure, MaterialityPolicy, Presence, ReportedQuantity, ReportingPeriod, Verdict,
    reconcile as reconcile_figures,
};
use crate::accounting::project_view::ledger_keeps;
use crate::error::{Error, Result};
use crate::import::csv_records::Records;
use crate::ledger::period::Grouping;
use crate::ledger::{Entry, EntryKind};
use crate::quantity::fraction::parse_uncertainty;
use crate::quantity::{Decimal, Mass, MassReading, MassUnit};
use crate::report::names;
use crate::report::render::tonnes_text;
use crate::report::{Cell, Report, Table, columns};
use clap::Args;
use std::collections::{BTreeSet, HashMap};
use std::path::PathBuf;

/// Exit code when a reporting year's misstatement is material.
pub const MATERIAL: u8 = 4;

#[derive(Debug, Args)]
pub struct ReconcileArgs {
    /// Project code (e.g. TFS)
    pub project: String,
    /// CSV with columns period,quantity,value,unit (period 2026, 2026-Q1 or 2026-03; quantity
    /// received, injected, produced, leakage, equipment-leak, stored, mineralized, weathering-net)
    pub report: PathBuf,
    /// Materiality threshold as a share of the year's stored total [default: 5%]
    #[arg(long)]
    pub materiality: Option<String>,
    /// Threshold for the largest projects [default: 2%]
    #[arg(long)]
    pub large_materiality: Option<String>,
    /// Annual stored total above which the large threshold applies [default: 500 kt]
    #[arg(long, value_name = "MASS")]
    pub large_above: Option<String>,
    /// Which mass balance gives the ledger's figures
    #[arg(long, value_enum, default_value_t = BalanceMethod::Rr)]
    pub method: BalanceMethod,
    /// First recompute every imported meter-day from its raw readings
    #[arg(long)]
    pub recompute: bool,
}

/// A report's figure: `1234.5 t`, `0 t`, `-3 kt` (a number and a mass unit).
fn report_mass(line: u64, value: &str, unit: &str) -> Result<Mass> {
    let bad = |why: String| Error::Refused(format!("report line {line}: {why}"));
    let n = Decimal::parse(value).map_err(|e| bad(format!("value {value:?}: {e}")))?;
    let u = MassUnit::from_symbol(unit)
        .ok_or_else(|| bad(format!("unit {unit:?} is not a mass unit")))?;
    n.checked_mul(u.grams_per_unit())
        .and_then(Decimal::round_half_even)
        .map(Mass::from_grams)
        .ok_or_else(|| bad(format!("value {value:?}: too large")))
}

fn read_report(path: &PathBuf) -> Result<Vec<Figure>> {
    let file_field =
        |e: &dyn std::fmt::Display| Error::field("REPORT", &path.display().to_string(), e);
    let file = std::fs::File::open(path).map_err(|e| file_field(&e))?;
    let mut lines = Records::new(file);
    let header: Vec<String> = match lines.next_record() {
        Some(Ok(r)) => r.fields().iter().map(|f| f.trim().to_string()).collect(),
        Some(Err(e)) => return Err(file_field(&e)),
        None => {
            return Err(file_field(
                &"is empty: a header row period,quantity,value,unit is needed",
            ));
        }
    };
    let col = |name: &str| {
        header.iter().position(|h| h == name).ok_or_else(|| {
            file_field(&format!(
                "the header has no column {name:?} (headers: {})",
                header.join(", ")
            ))
        })
    };
    let (p, q, v, u) = (
        col("period")?,
        col("quantity")?,
        col("value")?,
        col("unit")?,
    );
    let mut figures = Vec::new();
    while let Some(r) = lines.next_record() {
        let r = r.map_err(|e| file_field(&e))?;
        let f = |i: usize| r.field(i).unwrap_or("\u{fffd}").trim();
        let period: ReportingPeriod = f(p)
            .parse()
            .map_err(|e| Error::Refused(format!("report line {}: period: {e}", r.line)))?;
        let quantity: ReportedQuantity = f(q)
            .parse()
            .map_err(|e| Error::Refused(format!("report line {}: quantity: {e}", r.line)))?;
        figures.push(Figure {
            period,
            quantity,
            mass: report_mass(r.line, f(v), f(u))?,
        });
    }
    Ok(figures)
}

fn share(field: &str, text: Option<&str>, default: f64) -> Result<f64> {
    text.map_or(Ok(default), |t| {
        parse_uncertainty(t)
            .map(|d| d.to_f64())
            .map_err(|e| Error::field(field, t, e))
    })
}

pub fn reconcile(ctx: &Context, a: ReconcileArgs) -> Result<Report> {
    let defaults = MaterialityPolicy::default();
    let policy = MaterialityPolicy {
        standard: share("--materiality", a.materiality.as_deref(), defaults.standard)?,
        large: share(
            "--large-materiality",
            a.large_materiality.as_deref(),
            defaults.large,
        )?,
        large_above: match &a.large_above {
            None => defaults.large_above,
            Some(t) => MassReading::parse(t)
                .and_then(|m| m.to_mass())
                .map_err(|e| Error::field("--large-above", t, e))?,
        },
    };
    let report_figures = read_report(&a.report)?;
    if report_figures.is_empty() {
        return Err(Error::field(
            "REPORT",
            &a.report.display().to_string(),
            "holds no figures",
        ));
    }
    let (view, totals) = ctx.open()?.read(|tx| {
        let v = load(tx, &a.project, None)?;
        let recomputed = if a.recompute {
            let totals = super::evidence::reading_totals(tx, &a.project)?;
            let all = tx.entries(&a.project)?;
            Some(recompute_table(
                &a.project,
                all.iter().map(|s| &s.entry),
                &totals,
            ))
        } else {
            None
        };
        Ok((v, recomputed))
    })?;
    let mut out = Report::default();
    if let Some(t) = totals {
        out = out.table(t);
    }
    // The ledger's figures at each granularity and for each quantity the report uses, over the
    // report's years, so a period the report leaves out shows as ledger-only.
    let years: BTreeSet<i32> = report_figures.iter().map(|f| f.period.year()).collect();
    let quantities: BTreeSet<ReportedQuantity> =
        report_figures.iter().map(|f| f.quantity).collect();
    let granularities: BTreeSet<Grouping> = report_figures
        .iter()
        .map(|f| match f.period {
            ReportingPeriod::Year(_) => Grouping::Year,
            ReportingPeriod::Quarter(..) => Grouping::Quarter,
            ReportingPeriod::Month(..) => Grouping::Month,
        })
        .collect();
    let mut ledger = Vec::new();
    for g in granularities {
        ledger.extend(view.reported(g, a.method, &quantities, &years)?);
    }
    let r = reconcile_figures(&ledger, &report_figures, &policy)
        .map_err(|e| Error::field("REPORT", &a.report.display().to_string(), e))?;
    let mut lines = Table::new(
        "reconciliation",
        format!(
            "Ledger against {}, project {}",
            a.report
                .file_name()
                .map_or(String::new(), |n| n.to_string_lossy().into_owned()),
            a.project
        ),
        columns(&[
            names::PERIOD,
            names::QUANTITY,
            names::LEDGER_T,
            names::REPORT_T,
            names::DIFFERENCE_T,
            names::DIFFERENCE_PCT,
            names::NOTE,
        ]),
    );
    for l in &r.lines {
        let (ledger_cell, report_cell, note) = match l.presence {
            Presence::Both { ledger, report } => (Cell::Tonnes(ledger), Cell::Tonnes(report), ""),
            Presence::LedgerOnly(m) => (Cell::Tonnes(m), Cell::Empty, "not in the report"),
            Presence::ReportOnly(m) => (
                Cell::Empty,
                Cell::Tonnes(m),
                if ledger_keeps(l.quantity, view.project().method) {
                    "not in the ledger"
                } else {
                    "this ledger keeps no such figure"
                },
            ),
        };
        lines.push(vec![
            Cell::text(l.period.to_string()),
            Cell::text(l.quantity.key()),
            ledger_cell,
            report_cell,
            Cell::Tonnes(l.difference),
            l.difference_pct.map_or(Cell::Empty, Cell::Percent),
            Cell::text(note),
        ]);
    }
    lines.note("Difference = ledger − report; its % is of the ledger figure.");
    let mut verdicts = Table::new(
        "materiality",
        format!("Materiality by reporting year, project {}", a.project),
        columns(&[
            names::YEAR,
            names::STORED_LEDGER_T,
            names::MISSTATEMENT_T,
            names::THRESHOLD_PCT,
            names::THRESHOLD_T,
            names::VERDICT,
        ]),
    );
    let mut material = false;
    for y in &r.years {
        material |= y.verdict == Verdict::Material;
        verdicts.push(vec![
            Cell::text(y.year.to_string()),
            Cell::Tonnes(y.ledger_total),
            Cell::Tonnes(y.misstatement),
            Cell::Percent(y.threshold_share * 100.0),
            Cell::Tonnes(y.threshold),
            Cell::text(match y.verdict {
                Verdict::WithinMateriality => "within materiality",
                Verdict::Material => "MATERIAL",
            }),
        ]);
    }
    verdicts.note(format!(
        "Misstatement: the sum of |difference| over the year's stored lines (for a route that reports its weathering net or mineralized tonnes instead, those) at the finest period both sides give. Threshold: {:.1} % of the year's stored total, {:.1} % above {} t a year (Regulation (EU) 2018/2067 Art. 23).",
        policy.standard * 100.0,
        policy.large * 100.0,
        tonnes_text(policy.large_above)
    ));
    out = out.table(lines).table(verdicts);
    if material {
        out.exit_code = MATERIAL;
    }
    Ok(out)
}

/// Every imported meter-day recomputed from its raw readings.
fn recompute_table<'a>(
    project: &str,
    entries: impl Iterator<Item = &'a Entry>,
    totals: &[ReadingTotal],
) -> Table {
    let by: HashMap<(&str, &str, &str), &ReadingTotal> = totals
        .iter()
        .map(|t| {
            (
                (t.file_sha256.as_str(), t.meter.as_str(), t.day.as_str()),
                t,
            )
        })
        .collect();
    let mut t = Table::new(
        "recompute",
        format!("Imported entries recomputed from raw readings, project {project}"),
        columns(&[
            names::SEQ,
            names::METER,
            names::DAY,
            names::ENTRY_T,
            names::READINGS_T,
            names::ROWS,
            names::RESULT,
        ]),
    );
    let mut checked = 0;
    for e in entries {
        let (Some(sha), Some(meter)) = (e.reading.get("file_sha256"), e.meter.as_deref()) else {
            continue;
        };
        if e.kind == EntryKind::Survey || e.corrects.is_some() {
            continue;
        }
        checked += 1;
        let day = e.period.from.to_string();
        match by.get(&(sha, meter, day.as_str())) {
            Some(r) if r.grams == e.mass.grams() => {}
            found => t.push(vec![
                Cell::Int(e.seq as i64),
                Cell::text(meter),
                Cell::text(&day),
                Cell::Tonnes(e.mass),
                found.map_or(Cell::Empty, |r| Cell::Tonnes(Mass::from_grams(r.grams))),
                found.map_or(Cell::Empty, |r| Cell::Int(r.rows)),
                Cell::text(if found.is_some() {
                    "differs from its readings"
                } else {
                    "no readings found"
                }),
            ]),
        }
    }
    t.note(format!(
        "{checked} imported meter-days recomputed from their raw readings; {} differ.",
        t.rows.len()
    ));
    t
}
