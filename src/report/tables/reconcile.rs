//! The tables `reconcile` prints: the ledger against a monitoring report line by line, each
//! year's verdict on materiality, the meter-days recomputed from their readings.

use super::reconciliations::{recorded_line, recorded_table};
use crate::accounting::balance::BalanceMethod;
use crate::accounting::materiality::{
    Bearing, Judgement, Level, Presence, Reconciliation, ReportedQuantity,
};
use crate::accounting::project_view::bearing;
use crate::ledger::reconciliation::Recorded;
use crate::ledger::{Entry, Method};
use crate::quantity::Mass;
use crate::report::names;
use crate::report::{Cell, Report, Table, columns};

/// What `reconcile` prints: the meter-days recomputed when asked for, every line, each year's
/// verdict and, when the reconciliation was recorded, its record.
pub fn reconcile_report(
    recompute: Option<Table>,
    lines: Table,
    verdicts: Table,
    recorded: Option<&Recorded>,
) -> Report {
    let mut out = Report::default();
    if let Some(t) = recompute {
        out = out.table(t);
    }
    out = out.table(lines).table(verdicts);
    if let Some(rec) = recorded {
        out = out
            .line(recorded_line(rec))
            .table(recorded_table(&rec.project, std::slice::from_ref(rec)));
    }
    out
}

/// The words a line's note gives: where the line was found and whether it counts.
pub fn line_note(presence: Presence, judgement: Judgement) -> String {
    match (presence, judgement) {
        (Presence::ReportOnly(_), Judgement::Counted) => "not in the ledger; counted".into(),
        (_, j) => j.text(),
    }
}

/// Every line of the reconciliation: the ledger's figure, the report's, and their difference.
pub fn lines_table(r: &Reconciliation, report_name: &str, project: &str) -> Table {
    let mut lines = Table::new(
        "reconciliation",
        format!("Ledger against {report_name}, project {project}"),
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
    lines
}

/// Each reporting year's misstatement against its threshold, and the verdict.
pub fn verdicts_table(
    r: &Reconciliation,
    project: &str,
    route: Method,
    method: BalanceMethod,
    basis: &str,
) -> Table {
    let mut verdicts = Table::new(
        "materiality",
        format!("Materiality by reporting year, project {project}"),
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
    verdicts.note(misstatement_rule(route, method));
    verdicts.note(format!("Threshold: {basis}."));
    verdicts
}

/// What the year's misstatement adds up, for the project's route and balance.
fn misstatement_rule(route: Method, method: BalanceMethod) -> String {
    let terms: Vec<&str> = ReportedQuantity::ALL
        .into_iter()
        .filter(|q| bearing(*q, route, method) == Bearing::Term)
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

/// The warning of a reconciliation that assessed nothing, with the exit code it ends with.
pub fn not_assessed_warning(report_name: &str, project: &str, exit: u8) -> String {
    format!(
        "not assessed: no line of {report_name} is a figure this ledger's stored tonnes of {project} rest on (exit {exit})"
    )
}

/// The imported meter-days recomputed from their raw readings, fed one entry at a time as the
/// chain is read: only those that differ, or whose readings are not found, get a row.
pub struct RecomputeTable {
    t: Table,
    checked: usize,
}

impl RecomputeTable {
    pub fn new(project: &str) -> Self {
        let t = Table::new(
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
        RecomputeTable { t, checked: 0 }
    }

    /// One imported meter-day's entry and what its readings add up to (grams and rows), if
    /// any were found.
    pub fn meter_day(&mut self, e: &Entry, meter: &str, day: &str, found: Option<(i64, i64)>) {
        self.checked += 1;
        match found {
            Some((grams, _)) if grams == e.mass.grams() => {}
            found => self.t.push(vec![
                Cell::Int(e.seq as i64),
                Cell::text(meter),
                Cell::text(day),
                Cell::Tonnes(e.mass),
                found.map_or(Cell::Empty, |(g, _)| Cell::Tonnes(Mass::from_grams(g))),
                found.map_or(Cell::Empty, |(_, rows)| Cell::Int(rows)),
                Cell::text(if found.is_some() {
                    "differs from its readings"
                } else {
                    "no readings found"
                }),
            ]),
        }
    }

    pub fn finish(mut self) -> Table {
        self.t.note(format!(
            "{} imported meter-days recomputed from their raw readings; {} differ.",
            self.checked,
            self.t.rows.len()
        ));
        self.t
    }
}

/// How the materiality level was set (as given on the command line, or the default), in words
/// a verifier's file can quote.
pub fn materiality_basis(level: &Level) -> String {
    let pct = level.policy.share * 100.0;
    match level.given.as_deref() {
        None => format!(
            "{pct:.1} % of the year's stored total, sinkbook's default: the level Regulation (EU) 2018/2067 Art. 23 sets for all but installations above 500 kt of annual emissions (its 2 % is about emissions, so it is not applied by stored tonnes); --materiality sets the programme's level"
        ),
        Some(t) => format!("{pct:.1} % of the year's stored total, set by --materiality {t}"),
    }
}
