//! `import`'s summary: the line saying what was imported, and the table by meter.

use crate::import::overlap::Overlap;
use crate::import::plan::Plan;
use crate::import::summary::Summary;
use crate::report::names;
use crate::report::{Cell, Report, Table, columns};
use crate::store::ImportSummary;

/// The line saying a file was imported before (as import `earlier`), and nothing was written.
pub fn already_line(
    file_name: &str,
    project: &str,
    plan: &Plan,
    earlier: &ImportSummary,
) -> String {
    format!(
        "{file_name} (SHA-256 {}) was already imported into {} on {} as import {} ({} rows); nothing written",
        plan.sha256.head(),
        project,
        earlier.imported_at.format("%Y-%m-%d %H:%M:%S UTC"),
        earlier.id,
        earlier.rows
    )
}

/// What an import reports: the line saying what it made, the table by meter, and for stderr
/// the permit's `warnings` and every row skipped.
pub fn imported_report(
    file_name: &str,
    project: &str,
    import_id: i64,
    plan: &Plan,
    summary: Summary,
    mut warnings: Vec<String>,
) -> Report {
    warnings.extend(plan.bad.iter().map(|b| format!("skipped {b}")));
    let mut report = Report::default()
        .line(summary_line(file_name, project, import_id, plan, &summary))
        .table(summary_table(summary, project));
    report.warnings = warnings;
    report
}

/// The line above the table: the file, its hash, readings and entries, what was replaced and
/// skipped.
fn summary_line(
    file_name: &str,
    project: &str,
    import_id: i64,
    plan: &Plan,
    summary: &Summary,
) -> String {
    let (entries, replaced) = (summary.entries, summary.replaced);
    let mut s = format!(
        "imported {file_name} (SHA-256 {}) into {project} as import {import_id}: {} readings → {entries} entries",
        plan.sha256.head(),
        plan.accepted,
    );
    if replaced > 0 {
        s.push_str(&format!(" ({replaced} replacing earlier meter-days)"));
    }
    if !plan.bad.is_empty() {
        let lines = plan.bad_lines();
        s.push_str(&format!(", {} bad rows skipped", plan.bad.len()));
        if lines as usize > plan.bad.len() {
            s.push_str(&format!(" ({lines} lines)"));
        }
    }
    s
}

/// Per meter: the days, readings and CO2 the import recorded, and the seqs they took.
fn summary_table(summary: Summary, project: &str) -> Table {
    let mut t = Table::new(
        "import",
        format!("Import into project {project}, by meter"),
        columns(&[
            names::METER,
            names::SITE,
            names::FIRST_DAY,
            names::LAST_DAY,
            names::DAYS,
            names::READINGS,
            names::CO2_T,
            names::SEQ_RANGE,
        ]),
    );
    for ((meter, site), m) in summary.by {
        t.push(vec![
            Cell::text(meter.to_string()),
            Cell::text(site.to_string()),
            Cell::text(m.first.to_string()),
            Cell::text(m.last.to_string()),
            Cell::Int(m.days as i64),
            Cell::Int(m.readings as i64),
            Cell::Tonnes(m.mass),
            Cell::text(format!("{}–{}", m.seqs.0, m.seqs.1)),
        ]);
    }
    t.note("Each entry is one meter's day: the sum of its readings' grams, each reading converted and rounded on its own. The file's bytes are kept as they were read, with their SHA-256, so every reading can be read again by its line.");
    t
}

/// Bad rows or overlaps listed in a one-line refusal before "and N more".
const LISTED: usize = 20;

/// The first items of a refusal's list, joined, and how many more there are.
fn listed<T: ToString>(items: &[T]) -> String {
    let shown: Vec<String> = items.iter().take(LISTED).map(ToString::to_string).collect();
    let more = if items.len() > LISTED {
        format!("; and {} more", items.len() - LISTED)
    } else {
        String::new()
    };
    format!("{}{more}", shown.join("; "))
}

/// " taking N lines" when the bad rows span more lines than rows.
fn taking(plan: &Plan) -> String {
    let lines = plan.bad_lines();
    if lines as usize > plan.bad.len() {
        format!(" taking {lines} lines")
    } else {
        String::new()
    }
}

/// Why a file with bad rows is refused when they are not to be skipped.
pub fn bad_rows_why(plan: &Plan) -> String {
    let n = plan.bad.len();
    format!(
        "{n} bad row{}{}, nothing written (fix them, or import the rest with --skip-bad): {}",
        if n == 1 { "" } else { "s" },
        taking(plan),
        listed(&plan.bad)
    )
}

/// Why a file with no good reading is refused.
pub fn no_readings_why(plan: &Plan) -> String {
    format!(
        "has no readings to import ({} bad rows skipped{}); nothing written",
        plan.bad.len(),
        taking(plan)
    )
}

/// Why a file whose meter-days the ledger counts already is refused.
pub fn counted_why(file_name: &str, overlaps: &[Overlap]) -> String {
    let n = overlaps.len();
    format!(
        "{file_name}: {n} meter-day{} already counted in the ledger, nothing written (a meter-day counts once: if this file replaces the earlier export, import it with --replace): {}",
        if n == 1 { " is" } else { "s are" },
        listed(overlaps)
    )
}
