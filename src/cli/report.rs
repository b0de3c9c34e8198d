//! `report`: a project's year as one printable HTML page, put together from the tables the
//! other commands print (project, balance, leakage, claims, buffer pool, meters, recorded
//! reconciliations) — the page states no figure of its own.

use super::Context;
use super::chart::line_chart;
use super::claims::deduction_rule;
use super::late::late_table;
use super::meters::{MetersArgs, meters};
use super::reconciliations::record_tables;
use super::reports::{BalanceArgs, By, balance};
use super::seal::seal_table;
use super::setup::{ProjectCommand, project};
use super::sign::{Judged, judge_all, statements_table};
use crate::accounting::balance::BalanceMethod;
use crate::accounting::project_view::ProjectFigures;
use crate::error::{Error, Result};
use crate::ledger::Method;
use crate::ledger::SealedEntry;
use crate::ledger::period::Grouping;
use crate::ledger::reconciliation::Recorded;
use crate::ledger::seal::{Seal, late_for};
use crate::report::html::{Page, Section, page};
use crate::report::names;
use crate::report::tables::claims::uncertainty_note;
use crate::report::{Cell, Column, Report, Table, columns};
use chrono::Datelike;
use clap::Args;
use std::path::PathBuf;

#[derive(Debug, Args)]
pub struct ReportArgs {
    /// Project code (e.g. TFS)
    pub project: String,
    /// The reporting year
    #[arg(long)]
    pub year: i32,
    /// The HTML file to write
    #[arg(long)]
    pub out: PathBuf,
}

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

fn balance_report(ctx: &Context, code: &str, method: BalanceMethod) -> Result<Report> {
    balance(
        ctx,
        BalanceArgs {
            project: code.to_string(),
            by: By::Quarter,
            method,
            deduct_excess_over: None,
            dates: Default::default(),
        },
    )
}

/// The seals and the statements signed over them (each judged again) the ledger holds of a
/// project.
struct Sealed {
    seals: Vec<(Seal, SealedEntry)>,
    statements: Vec<Judged>,
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

/// The sections of the page, in reading order.
fn sections(
    ctx: &Context,
    a: &ReportArgs,
    view: &ProjectFigures,
    sealed: Sealed,
    recorded: Vec<Recorded>,
) -> Result<Vec<Section>> {
    let code = &view.project().code;
    let registration = project(ctx, ProjectCommand::Show { code: code.clone() })?;
    let mut first = Section::new("project", "Project and permit");
    first.tables = registration.tables;

    let mut bal = Section::new("balance", "Mass balance by quarter").text(
        "Every term of the balance, the figures the balance command prints by quarter, and the cumulative tonnes against the permit.",
    );
    let mut leakage = Section::new("leakage", "Leakage events and how each was quantified");
    let mut claims = Section::new("claims", "From stored to claimable");
    let mut pool = Section::new("buffer-pool", "Buffer pool");
    let mut uncertainty = Section::new("uncertainty", "Uncertainty");
    let mut reports = vec![balance_report(ctx, code, BalanceMethod::Rr)?];
    if view.project().method == Method::Eor {
        reports.push(balance_report(ctx, code, BalanceMethod::Iso27916)?);
    }
    for (n, r) in reports.into_iter().enumerate() {
        for t in r.tables.into_iter().map(|t| within_year(t, a.year)) {
            match t.id {
                "leakage" if n == 0 => leakage.tables.push(t),
                "claims" if n == 0 => claims.tables.push(t),
                "buffer_pool" if n == 0 => pool.tables.push(t),
                "balance" => {
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
                    if let Some([figure, u, pct]) = figures.iter().find(|f| has(&f[1])) {
                        let title = format!("Uncertainty of the stored figure, {}", t.title);
                        uncertainty.tables.push(pick(
                            &t,
                            "uncertainty",
                            title,
                            &[names::PERIOD.key, figure.key, u.key, pct.key],
                        ));
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
            "No surface leakage is recorded for project {code} in {}.",
            a.year
        ));
    }
    if pool.tables.is_empty() {
        pool = pool.text("No buffer share is set and no reversal recorded: the pool is empty.");
    }
    uncertainty = uncertainty.text(uncertainty_note(view));
    let chart = line_chart(
        std::slice::from_ref(view),
        Grouping::Quarter,
        deduction_rule(None)?,
        false,
    )?;
    bal.figure = Some(
        chart
            .to_svg()
            .map_err(|e| Error::internal(format!("report chart: {e}")))?,
    );

    let mut metering = Section::new("meters", "Meters by quarter");
    metering.tables = meters(
        ctx,
        MetersArgs {
            project: code.clone(),
            year: a.year,
        },
    )?
    .tables;

    let reconciliations = reconciliation_section(code, a.year, recorded);
    let late = late_section(view, a.year);
    let seal = seal_section(code, a.year, sealed);
    Ok(vec![
        first,
        bal,
        metering,
        leakage,
        uncertainty,
        claims,
        pool,
        reconciliations,
        late,
        seal,
    ])
}

pub fn report(ctx: &Context, a: ReportArgs) -> Result<Report> {
    if !(1900..=9999).contains(&a.year) {
        return Err(Error::field(
            "--year",
            &a.year.to_string(),
            "is not a plausible reporting year",
        ));
    }
    let (view, tip, sealed, recorded) = ctx.open()?.read(|tx| {
        let view = super::view::load(tx, &a.project, None)?;
        let tip = tx.chain_tip(&a.project)?;
        let seals = tx
            .seal_entries(&a.project)?
            .into_iter()
            .map(|e| {
                Seal::from_entry(&e.entry)
                    .map(|s| (s, e))
                    .map_err(Error::ledger)
            })
            .collect::<Result<Vec<_>>>()?;
        let statements = judge_all(tx, &a.project)?;
        let recorded = tx.reconciliations(&a.project)?;
        Ok((view, tip, Sealed { seals, statements }, recorded))
    })?;
    let p = view.project();
    let page_doc = Page {
        title: format!("Annual report {}, project {} ({})", a.year, p.code, p.name),
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
            ("Reporting year".into(), a.year.to_string()),
            (
                "Written".into(),
                ctx.now.format("%Y-%m-%d %H:%M UTC").to_string(),
            ),
            ("Entries in the chain".into(), tip.0.to_string()),
            ("Chain head".into(), tip.1.to_hex()),
        ],
        sections: sections(ctx, &a, &view, sealed, recorded)?,
    };
    let html = page(&page_doc);
    std::fs::write(&a.out, &html)
        .map_err(|e| Error::field("--out", &a.out.display().to_string(), e))?;
    let mut t = Table::new(
        "report",
        "Report written",
        columns(&[names::FILE, names::SECTIONS, names::TABLES, names::BYTES]),
    );
    t.push(vec![
        Cell::text(a.out.display().to_string()),
        Cell::Int(page_doc.sections.len() as i64),
        Cell::Int(
            page_doc
                .sections
                .iter()
                .map(|s| s.tables.len())
                .sum::<usize>() as i64,
        ),
        Cell::Int(html.len() as i64),
    ]);
    Ok(Report::default().table(t))
}
