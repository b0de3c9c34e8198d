//! The tables of recorded reconciliations: each record's lines and years, and the run of records.

use crate::ledger::reconciliation::Recorded;
use crate::quantity::Mass;
use crate::report::names;
use crate::report::{Cell, Table, columns};

/// The line saying a reconciliation was recorded.
pub fn recorded_line(r: &Recorded) -> String {
    format!(
        "recorded reconciliation {} of project {} (row hash {})",
        r.seq,
        r.project,
        r.row_hash().to_hex()
    )
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
