//! A reconciliation as the ledger records it: every line and year in grams and words, so the
//! record reads back without the monitoring report.

use super::{Judgement, Presence, Reconciliation};
use crate::ledger::reconciliation::{RecordedLine, RecordedYear};

/// Every line of `r`, a figure a side lacks left out, each with the words `note` gives it.
pub fn recorded_lines(
    r: &Reconciliation,
    note: impl Fn(Presence, Judgement) -> String,
) -> Vec<RecordedLine> {
    r.lines
        .iter()
        .map(|l| RecordedLine {
            period: l.period.to_string(),
            quantity: l.quantity.key().into(),
            ledger_g: (!matches!(l.presence, Presence::ReportOnly(_)))
                .then(|| l.presence.ledger().grams()),
            report_g: (!matches!(l.presence, Presence::LedgerOnly(_)))
                .then(|| l.presence.report().grams()),
            difference_g: l.difference.grams(),
            note: note(l.presence, l.judgement),
        })
        .collect()
}

/// Every year of `r` with its verdict.
pub fn recorded_years(r: &Reconciliation) -> Vec<RecordedYear> {
    r.years
        .iter()
        .map(|y| RecordedYear {
            year: y.year,
            stored_g: y.ledger_total.grams(),
            counted: y
                .counted
                .iter()
                .map(|q| q.key())
                .collect::<Vec<_>>()
                .join(", "),
            misstatement_g: y.misstatement.grams(),
            threshold_g: y.threshold.grams(),
            verdict: y.verdict.text().into(),
        })
        .collect()
}
