//! `reconcile`: the ledger against an independent monitoring report, line by line, and per
//! reporting year the misstatement against materiality. Exit 4 when it is material, 5 when
//! nothing in the report could be assessed; `--record` keeps the reconciliation in the ledger.

use super::Context;
use super::evidence::ReadingTotal;
use super::reconciliations::{RecordArgs, record, recorded_table};
use super::view::load;
use crate::accounting::balance::BalanceMethod;
use crate::accounting::materiality::{
    Figure, Granularity, Judgement, MaterialityPolicy, Presence, Reconciliation, ReportedQuantity,
    ReportingPeriod, Verdict, reconcile as reconcile_figures,
};
use crate::accounting::project_view::bearing;
use crate::error::{Error, Result};
use crate::import::csv_records::Records;
use crate::ledger::period::Grouping;
use crate::ledger::{EntryKind, Hash};
use crate::quantity::fraction::parse_uncertainty;
use crate::quantity::{Decimal, Mass, MassUnit};
use crate::report::names;
use crate::report::{Cell, Report, Table, columns};
use crate::store::Tx;
use clap::Args;
use std::collections::{BTreeSet, HashMap};
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

/// A report's figure: `1234.5 t`, `0 t`, `-3 kt` (a number and a mass unit).
fn report_mass(line: u64, value: &str, unit: &str) -> Result<Mass> {
    let bad = |why: String| Error::input(format!("report line {line}"), why);
    let n = Decimal::parse(value).map_err(|e| bad(format!("value {value:?}: {e}")))?;
    let u = MassUnit::from_symbol(unit)
        .ok_or_else(|| bad(format!("unit {unit:?} is not a mass unit")))?;
    n.checked_mul(u.grams_per_unit())
        .and_then(Decimal::round_half_even)
        .map(Mass::from_grams)
        .ok_or_else(|| bad(format!("value {value:?}: too large")))
}

/// A monitoring report as read: its figures, and the SHA-256 of its bytes (what a recorded
/// reconciliation names it by).
pub struct MonitoringReport {
    pub name: String,
    pub sha256: Hash,
    pub figures: Vec<Figure>,
}

fn read_report(path: &PathBuf) -> Result<MonitoringReport> {
    let file_field =
        |e: &dyn std::fmt::Display| Error::field("REPORT", &path.display().to_string(), e);
    // A monitoring report is a page of figures: read whole, hashed as read.
    let bytes = std::fs::read(path).map_err(|e| file_field(&e))?;
    let mut lines = Records::new(&bytes[..]);
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
            .map_err(|e| Error::input(format!("report line {}", r.line), format!("period: {e}")))?;
        let quantity: ReportedQuantity = f(q).parse().map_err(|e| {
            Error::input(format!("report line {}", r.line), format!("quantity: {e}"))
        })?;
        figures.push(Figure {
            period,
            quantity,
            mass: report_mass(r.line, f(v), f(u))?,
        });
    }
    if figures.is_empty() {
        return Err(file_field(&"holds no figures"));
    }
    Ok(MonitoringReport {
        name: path.file_name().map_or_else(
            || path.display().to_string(),
            |n| n.to_string_lossy().into_owned(),
        ),
        sha256: Hash::of(&bytes),
        figures,
    })
}

/// The materiality level and where it came from.
pub struct Level {
    pub policy: MaterialityPolicy,
    /// The share as given on the command line, or None for the default.
    pub given: Option<String>,
}

impl Level {
    fn parse(text: Option<&str>) -> Result<Level> {
        let policy = match text {
            None => MaterialityPolicy::default(),
            Some(t) => MaterialityPolicy {
                share: parse_uncertainty(t)
                    .map(|d| d.to_f64())
                    .map_err(|e| Error::field("--materiality", t, e))?,
            },
        };
        if !(policy.share > 0.0 && policy.share < 1.0) {
            return Err(Error::field(
                "--materiality",
                text.unwrap_or_default(),
                "must be above 0 % and below 100 %",
            ));
        }
        Ok(Level {
            policy,
            given: text.map(str::to_string),
        })
    }

    /// How the level was set, in words a verifier's file can quote.
    pub fn basis(&self) -> String {
        let pct = self.policy.share * 100.0;
        match &self.given {
            None => format!(
                "{pct:.1} % of the year's stored total, sinkbook's default: the level Regulation (EU) 2018/2067 Art. 23 sets for all but installations above 500 kt of annual emissions (its 2 % is about emissions, so it is not applied by stored tonnes); --materiality sets the programme's level"
            ),
            Some(t) => format!("{pct:.1} % of the year's stored total, set by --materiality {t}"),
        }
    }
}

/// The ledger against a report, inside one transaction.
pub struct Compared {
    pub reconciliation: Reconciliation,
    pub recompute: Option<Table>,
    /// Entries in the project's chain and its head when compared: the ledger state reconciled.
    pub tip: (u64, Hash),
    pub route: crate::ledger::Method,
}

fn compare(
    tx: &mut Tx<'_>,
    a: &ReconcileArgs,
    report: &MonitoringReport,
    level: &Level,
) -> Result<Compared> {
    let view = load(tx, &a.project, None)?;
    let recompute = if a.recompute {
        let totals = super::evidence::reading_totals(tx, &a.project)?;
        Some(recompute_table(tx, &a.project, &totals)?)
    } else {
        None
    };
    let tip = tx.chain_tip(&a.project)?;
    let figures = &report.figures;
    // The ledger's figures for each quantity at each granularity the report gives it by, over the
    // report's years, so a period the report leaves out shows as not reported.
    let years: BTreeSet<i32> = figures.iter().map(|f| f.period.year()).collect();
    let quantities: BTreeSet<ReportedQuantity> = figures.iter().map(|f| f.quantity).collect();
    let granularities: BTreeSet<Grouping> = figures
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
    // Only at the periods the report gives each quantity by: a report of quarterly stored and
    // yearly injected is compared on those, not on yearly stored and quarterly injected too.
    let given: BTreeSet<(ReportedQuantity, Granularity)> = figures
        .iter()
        .map(|f| (f.quantity, f.period.granularity()))
        .collect();
    ledger.retain(|f| given.contains(&(f.quantity, f.period.granularity())));
    // Each year's headline figures, the base of its threshold, whatever the report gives.
    let headlines: BTreeSet<ReportedQuantity> = [
        ReportedQuantity::Stored,
        ReportedQuantity::Mineralized,
        ReportedQuantity::WeatheringNet,
    ]
    .into();
    let totals = view.reported(Grouping::Year, a.method, &headlines, &years)?;
    let route = view.project().method;
    let reconciliation = reconcile_figures(
        &ledger,
        figures,
        &totals,
        |q| bearing(q, route, a.method),
        &level.policy,
    )
    .map_err(|e| Error::field("REPORT", &a.report.display().to_string(), e))?;
    Ok(Compared {
        reconciliation,
        recompute,
        tip,
        route,
    })
}

/// The words a line's note gives: where the line was found and whether it counts.
pub fn line_note(presence: Presence, judgement: Judgement) -> String {
    match (presence, judgement) {
        (Presence::ReportOnly(_), Judgement::Counted) => "not in the ledger; counted".into(),
        (_, j) => j.text(),
    }
}

pub fn reconcile(ctx: &Context, a: ReconcileArgs) -> Result<Report> {
    let level = Level::parse(a.materiality.as_deref())?;
    let report = read_report(&a.report)?;
    a.record.check()?;
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
    let mut out = Report::default();
    if let Some(t) = c.recompute {
        out = out.table(t);
    }
    let mut lines = Table::new(
        "reconciliation",
        format!("Ledger against {}, project {}", report.name, a.project),
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
        let (ledger_cell, report_cell) = match l.presence {
            Presence::Both { ledger, report } => (Cell::Tonnes(ledger), Cell::Tonnes(report)),
            Presence::LedgerOnly(m) => (Cell::Tonnes(m), Cell::Empty),
            Presence::ReportOnly(m) => (Cell::Empty, Cell::Tonnes(m)),
        };
        lines.push(vec![
            Cell::text(l.period.to_string()),
            Cell::text(l.quantity.key()),
            ledger_cell,
            report_cell,
            Cell::Tonnes(l.difference),
            l.difference_pct.map_or(Cell::Empty, Cell::Percent),
            Cell::text(line_note(l.presence, l.judgement)),
        ]);
    }
    lines.note("Difference = ledger − report; its % is of the ledger figure.");
    let mut verdicts = Table::new(
        "materiality",
        format!("Materiality by reporting year, project {}", a.project),
        columns(&[
            names::YEAR,
            names::STORED_LEDGER_T,
            names::COUNTED,
            names::MISSTATEMENT_T,
            names::THRESHOLD_PCT,
            names::THRESHOLD_T,
            names::VERDICT,
        ]),
    );
    for y in &r.years {
        let counted: Vec<&str> = y.counted.iter().map(|q| q.key()).collect();
        verdicts.push(vec![
            Cell::text(y.year.to_string()),
            Cell::Tonnes(y.ledger_total),
            Cell::text(counted.join(", ")),
            Cell::Tonnes(y.misstatement),
            Cell::Percent(y.threshold_share * 100.0),
            Cell::Tonnes(y.threshold),
            Cell::text(y.verdict.text()),
        ]);
    }
    verdicts.note(misstatement_rule(c.route, a.method));
    verdicts.note(format!("Threshold: {}.", level.basis()));
    out = out.table(lines).table(verdicts);
    if let Some(rec) = recorded {
        out = out
            .line(format!(
                "recorded reconciliation {} of project {} (row hash {})",
                rec.seq,
                a.project,
                rec.row_hash().to_hex()
            ))
            .table(recorded_table(&a.project, std::slice::from_ref(&rec)));
    }
    out.exit_code = match r.overall() {
        Verdict::Material => MATERIAL,
        Verdict::NotAssessed => {
            out.warnings.push(format!(
                "not assessed: no line of {} is a figure this ledger's stored tonnes of {} rest on (exit {NOT_ASSESSED})",
                report.name, a.project
            ));
            NOT_ASSESSED
        }
        Verdict::WithinMateriality => 0,
    };
    Ok(out)
}

/// What the year's misstatement adds up, for the project's route and balance.
fn misstatement_rule(route: crate::ledger::Method, method: BalanceMethod) -> String {
    let terms: Vec<&str> = ReportedQuantity::ALL
        .into_iter()
        .filter(|q| bearing(*q, route, method) == crate::accounting::materiality::Bearing::Term)
        .map(|q| q.key())
        .collect();
    let terms = if terms.is_empty() {
        String::new()
    } else {
        format!(" and the terms it is computed from ({})", terms.join(", "))
    };
    format!(
        "Misstatement: per year, the sum of |difference| over the lines counted — the stored figure (for a rock route its mineralized or net figure){terms} — at the finest period the report gives; where the stored figure and its terms cover one period the larger sum counts, since an error in a term shows in stored too. A period the report leaves out is not reported, not misstated; a year with nothing counted is not assessed."
    )
}

/// Every imported meter-day recomputed from its raw readings, the chain read row by row.
fn recompute_table(tx: &mut Tx<'_>, project: &str, totals: &[ReadingTotal]) -> Result<Table> {
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
    tx.for_each_entry(project, None, |s| {
        let e = &s.entry;
        let (Some(sha), Some(meter)) = (e.reading.text("file_sha256"), e.meter.as_deref()) else {
            return Ok(());
        };
        if e.kind == EntryKind::Survey || e.corrects.is_some() {
            return Ok(());
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
        Ok(())
    })?;
    t.note(format!(
        "{checked} imported meter-days recomputed from their raw readings; {} differ.",
        t.rows.len()
    ));
    Ok(t)
}
