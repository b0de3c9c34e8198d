//! The annual page's sections, put together from the tables the other commands print
//! (project, balance, leakage, claims, buffer pool, meters, recorded reconciliations, seals):
//! the page states no figure of its own.

use super::chart::line_chart;
use super::claims::uncertainty_note;
use super::late::late_table;
use super::reconciliations::record_tables;
use super::seal::seal_table;
use super::settings::settings_table;
use super::setup::{projects_table, sites_table};
use super::sign::statements_table;
use crate::accounting::conservative::DeductionRule;
use crate::accounting::project_view::ProjectFigures;
use crate::error::{Error, Result};
use crate::ledger::period::Grouping;
use crate::ledger::reconciliation::Recorded;
use crate::ledger::seal::{Seal, late_for};
use crate::ledger::setting::Setting;
use crate::ledger::statement_check::Judged;
use crate::ledger::{Hash, Project, SealedEntry, Site};
use crate::report::html::{Page, Section};
use crate::report::names;
use crate::report::{Cell, Column, Report, Table, columns};
use chrono::{DateTime, Datelike, Utc};

/// Keeps the rows of a table whose period falls in `year` (a table without a period column is
/// kept whole). An all-periods total no longer adds up to the rows kept, so it goes too.
fn within_year(mut t: Table, year: i32) -> Table {
    let Some(col) = t.columns.iter().position(|c| c.key == names::PERIOD.key) else {
        return t;
    };
    let year = year.to_string();
    let before = t.rows.len();
    let in_year = |r: &Vec<Cell>| matches!(&r[col], Cell::Text(p) if p.contains(&year));
    let total = |r: &Vec<Cell>| matches!(&r[col], Cell::Text(p) if p == "total");
    let dropped = t.rows.iter().filter(|r| !in_year(r) && !total(r)).count();
    t.rows.retain(|r| in_year(r) || (dropped == 0 && total(r)));
    if dropped > 0 {
        t.note(format!(
            "Rows of other years left out ({} of {before}), with the all-periods total.",
            before - t.rows.len()
        ));
    }
    t
}

/// Some columns of a table, as a table of their own (same cells, same labels).
fn pick(t: &Table, id: &'static str, title: String, keys: &[&str]) -> Table {
    let idx: Vec<usize> = keys
        .iter()
        .filter_map(|k| t.columns.iter().position(|c| c.key == *k))
        .collect();
    let mut out = Table::new(id, title, idx.iter().map(|&i| t.columns[i]).collect());
    for r in &t.rows {
        out.push(idx.iter().map(|&i| r[i].clone()).collect());
    }
    out
}

/// The seals and the statements signed over them (each judged again) the ledger holds of a
/// project.
pub struct Sealed {
    pub seals: Vec<(Seal, SealedEntry)>,
    pub statements: Vec<Judged>,
}

/// The late adjustments to the year's sealed periods, in their own table.
fn late_section(view: &ProjectFigures, year: i32) -> Section {
    let code = &view.project().code;
    let year_text = year.to_string();
    let late = late_table(
        view.listed()
            .filter(|e| late_for(e).is_some_and(|p| p.starts_with(&year_text)))
            .map(|e| (code.as_str(), e)),
    );
    let s = Section::new("late-adjustments", "Late adjustments");
    match late {
        Some(t) => s.table(t),
        None => s.text(format!(
            "No late adjustments: nothing was recorded into a sealed period of {code} {year}."
        )),
    }
}

/// The reconciliations recorded against the project that judged the year.
fn reconciliation_section(code: &str, year: i32, recorded: Vec<Recorded>) -> Section {
    let of_year: Vec<Recorded> = recorded.into_iter().filter(|r| r.covers(year)).collect();
    let s = Section::new("reconciliations", "Reconciliations");
    if of_year.is_empty() {
        return s.text(format!(
            "No reconciliation of {code} {year} is recorded (a verifier records one with sinkbook reconcile {code} REPORT --record)."
        ));
    }
    let mut s = s.text(
        "The reconciliations recorded against the ledger that judged this year: each names the monitoring report by its SHA-256 and the chain it was made against, and is evidence about the period, not a figure of it (it changes no entry and no seal).",
    );
    s.tables = record_tables(code, &of_year);
    s
}

/// The year's seals with their full tree heads and the statements signed over them.
fn seal_section(code: &str, year: i32, sealed: Sealed) -> Section {
    let year_seals: Vec<(Seal, SealedEntry)> = sealed
        .seals
        .into_iter()
        .filter(|(s, _)| s.period.from.year() == year)
        .collect();
    let mut seal = Section::new("seal", "Seal and signed statements");
    if year_seals.is_empty() {
        seal = seal.text(format!("Not sealed: {code} {year} carries no seal."));
    }
    for (s, _) in &year_seals {
        seal = seal.text(format!(
            "Seal seq {} closes {}: tree size {}, root {} (RFC 6962 tree head over entries 0 to {}).",
            s.seq,
            s.label,
            s.tree_size,
            s.root.to_hex(),
            s.tree_size.saturating_sub(1)
        ));
    }
    if !year_seals.is_empty() {
        seal = seal.table(seal_table(code, &year_seals));
        let over: Vec<Judged> = sealed
            .statements
            .into_iter()
            .filter(|j| {
                year_seals
                    .iter()
                    .any(|(s, _)| s.seq == j.statement.signed.seal_seq)
            })
            .collect();
        seal = if over.is_empty() {
            seal.text("Signed statements: none recorded over these seals yet.")
        } else {
            seal.text(
                "The statements signed over these seals, each signature checked again and the seal it names recomputed from the entries as the ledger holds them now.",
            )
            .table(statements_table(code, &over))
        };
    }
    seal
}

/// What the page is put together from, all read in the command's one transaction.
pub struct Parts<'a> {
    pub view: &'a ProjectFigures,
    pub sites: Vec<Site>,
    pub settings: Vec<Setting>,
    /// The balance by quarter by Subpart RR, then by ISO 27916 for an EOR project.
    pub balances: Vec<Report>,
    /// The meters of the year, as `meters` prints them.
    pub meters: Report,
    pub recorded: Vec<Recorded>,
    pub sealed: Sealed,
}

/// The page's sections for `year`, in reading order; the balance's figure is the chart of
/// cumulative tonnes by quarter.
pub fn annual_sections(parts: Parts<'_>, year: i32, now: DateTime<Utc>) -> Result<Vec<Section>> {
    let Parts { view, .. } = parts;
    let code = &view.project().code;
    let first = project_section(view.project(), &parts.sites, &parts.settings, now);
    let chart = line_chart(
        std::slice::from_ref(view),
        Grouping::Quarter,
        DeductionRule::WholeUncertainty,
        false,
    )?
    .to_svg()
    .map_err(|e| Error::internal(format!("report chart: {e}")))?;
    let [bal, leakage, uncertainty, claims, pool] =
        balance_sections(parts.balances, view, year, chart);
    Ok(vec![
        first,
        bal,
        meters_section(parts.meters),
        leakage,
        uncertainty,
        claims,
        pool,
        reconciliation_section(code, year, parts.recorded),
        late_section(view, year),
        seal_section(code, year, parts.sealed),
    ])
}

/// The project, its sites and settings, as `project show` prints them.
fn project_section(
    project: &Project,
    sites: &[Site],
    settings: &[Setting],
    now: DateTime<Utc>,
) -> Section {
    let mut s = Section::new("project", "Project and permit");
    s.tables = vec![
        projects_table(std::slice::from_ref(project)),
        sites_table(&project.code, sites),
        settings_table(&project.code, settings, now),
    ];
    s
}

/// The balance by quarter (by Subpart RR, then ISO 27916 for an EOR project) shared out into
/// the sections of the balance, leakage, uncertainty, claims and buffer pool; `chart` is the
/// balance's figure.
fn balance_sections(
    reports: Vec<Report>,
    view: &ProjectFigures,
    year: i32,
    chart: String,
) -> [Section; 5] {
    let code = &view.project().code;
    let mut bal = Section::new("balance", "Mass balance by quarter").text(
        "Every term of the balance, the figures the balance command prints by quarter, and the cumulative tonnes against the permit.",
    );
    let mut leakage = Section::new("leakage", "Leakage events and how each was quantified");
    let mut claims = Section::new("claims", "From stored to claimable");
    let mut pool = Section::new("buffer-pool", "Buffer pool");
    let mut uncertainty = Section::new("uncertainty", "Uncertainty");
    for (n, r) in reports.into_iter().enumerate() {
        for t in r.tables.into_iter().map(|t| within_year(t, year)) {
            match t.id {
                "leakage" if n == 0 => leakage.tables.push(t),
                "claims" if n == 0 => claims.tables.push(t),
                "buffer_pool" if n == 0 => pool.tables.push(t),
                "balance" => {
                    if let Some(u) = uncertainty_table(&t) {
                        uncertainty.tables.push(u);
                    }
                    bal.tables.push(t);
                }
                _ if n == 0 => bal.tables.push(t),
                _ => {}
            }
        }
    }
    if leakage.tables.is_empty() {
        leakage = leakage.text(format!(
            "No surface leakage is recorded for project {code} in {year}."
        ));
    }
    if pool.tables.is_empty() {
        pool = pool.text("No buffer share is set and no reversal recorded: the pool is empty.");
    }
    uncertainty = uncertainty.text(uncertainty_note(view));
    bal.figure = Some(chart);
    [bal, leakage, uncertainty, claims, pool]
}

/// The stored figure of a balance table and its uncertainty, as a table of their own.
fn uncertainty_table(t: &Table) -> Option<Table> {
    // Subpart RR's figure is sequestered, ISO 27916's stored.
    let figures = [
        [names::STORED_T, names::STORED_U_T, names::STORED_U_PCT],
        [
            names::SEQUESTERED_T,
            names::SEQUESTERED_U_T,
            names::SEQUESTERED_U_PCT,
        ],
    ];
    let has = |c: &Column| t.columns.iter().any(|k| k.key == c.key);
    let [figure, u, pct] = figures.iter().find(|f| has(&f[1]))?;
    let title = format!("Uncertainty of the stored figure, {}", t.title);
    Some(pick(
        t,
        "uncertainty",
        title,
        &[names::PERIOD.key, figure.key, u.key, pct.key],
    ))
}

/// The meters of the year, as `meters` prints them.
fn meters_section(meters: Report) -> Section {
    let mut s = Section::new("meters", "Meters by quarter");
    s.tables = meters.tables;
    s
}

/// The page: its facts (project, operator, method, permit, year, when written, the chain
/// reported on: `tip` its length and head) and its sections.
pub fn annual_page(
    p: &Project,
    year: i32,
    now: DateTime<Utc>,
    tip: (u64, Hash),
    sections: Vec<Section>,
) -> Page {
    Page {
        title: format!("Annual report {year}, project {} ({})", p.code, p.name),
        facts: vec![
            ("Project".into(), format!("{} — {}", p.code, p.name)),
            ("Operator".into(), p.operator.clone()),
            ("Method".into(), p.method.name().into()),
            (
                "Permit".into(),
                p.permit_ref
                    .clone()
                    .unwrap_or_else(|| "none registered".into()),
            ),
            ("Reporting year".into(), year.to_string()),
            (
                "Written".into(),
                now.format("%Y-%m-%d %H:%M UTC").to_string(),
            ),
            ("Entries in the chain".into(), tip.0.to_string()),
            ("Chain head".into(), tip.1.to_hex()),
        ],
        sections,
    }
}

/// The page written: its file, how many sections and tables, its size in bytes.
pub fn written_table(file: &str, page: &Page, bytes: usize) -> Table {
    let mut t = Table::new(
        "report",
        "Report written",
        columns(&[names::FILE, names::SECTIONS, names::TABLES, names::BYTES]),
    );
    t.push(vec![
        Cell::text(file),
        Cell::Int(page.sections.len() as i64),
        Cell::Int(page.sections.iter().map(|s| s.tables.len()).sum::<usize>() as i64),
        Cell::Int(bytes as i64),
    ]);
    t
}
