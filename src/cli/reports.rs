//! `entries` and `balance`: what the ledger holds, and what it adds up to.

use super::Context;
use super::setup::known_project;
use crate::accounting::balance::balance as compute_balance;
use crate::error::Result;
use crate::ledger::correction::{effective, superseded_by};
use crate::ledger::period::Grouping;
use crate::report::{Cell, Report, Table, columns};
use clap::{Args, ValueEnum};

#[derive(Debug, Args)]
pub struct EntriesArgs {
    pub project: String,
}

pub fn entries(ctx: &Context, a: EntriesArgs) -> Result<Report> {
    let all = ctx.open()?.read(|tx| {
        known_project(tx, &a.project)?;
        tx.entries(&a.project)
    })?;
    let by = superseded_by(&all);
    let mut t = Table::new(
        "entries",
        format!("Entries, project {}", a.project),
        columns(&[
            ("Seq", "seq"),
            ("Kind", "kind"),
            ("Site", "site"),
            ("Period", "period"),
            ("", "period_from"),
            ("", "period_to"),
            ("Reading", "reading"),
            ("CO2 (t)", "co2_t"),
            ("", "co2_g"),
            ("Effect", "sign"),
            ("Replaces", "corrects"),
            ("Replaced by", "corrected_by"),
            ("", "reason"),
            ("", "key"),
            ("", "meter"),
            ("", "note"),
            ("", "recorded_at"),
            ("", "evidence_name"),
            ("", "evidence_sha256"),
            ("", "leaf_hash"),
            ("Chain head", "chain_head"),
            ("", "chain_hash"),
        ]),
    );
    for (s, by) in all.iter().zip(&by) {
        let e = &s.entry;
        t.push(vec![
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
            Cell::text(s.leaf.to_hex()),
            Cell::text(s.chain.head()),
            Cell::text(s.chain.to_hex()),
        ]);
    }
    if by.iter().any(Option::is_some) {
        t.note("Entries with a \"Replaced by\" seq are kept for the record; reports count the entry that replaces them.");
    }
    Ok(Report::default().table(t))
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
    pub project: String,
    #[arg(long, value_enum, default_value_t = By::Quarter)]
    pub by: By,
}

pub fn balance(ctx: &Context, a: BalanceArgs) -> Result<Report> {
    let (project, all) = ctx.open()?.read(|tx| {
        let p = known_project(tx, &a.project)?;
        Ok((p, tx.entries(&a.project)?))
    })?;
    let grouping = match a.by {
        By::Month => Grouping::Month,
        By::Quarter => Grouping::Quarter,
        By::Year => Grouping::Year,
    };
    let lines = compute_balance(&project, effective(&all), grouping);
    let mut t = Table::new(
        "balance",
        format!(
            "Storage balance by {}, project {}",
            format!("{:?}", a.by).to_lowercase(),
            project.code
        ),
        columns(&[
            ("Period", "period"),
            ("Injected (t)", "injected_t"),
            ("Stored (t)", "stored_t"),
            ("Cumulative injected (t)", "cumulative_injected_t"),
            ("Cumulative stored (t)", "cumulative_stored_t"),
            ("Permit used (%)", "permit_used_pct"),
        ]),
    );
    for l in &lines {
        t.push(vec![
            Cell::text(l.bucket.to_string()),
            Cell::Tonnes(l.injected),
            Cell::Tonnes(l.stored),
            Cell::Tonnes(l.cumulative_injected),
            Cell::Tonnes(l.cumulative_stored),
            l.permit_used_pct.map_or(Cell::Empty, Cell::Percent),
        ]);
    }
    match project.permit_capacity {
        Some(c) => t.note(format!(
            "Permitted capacity {} t{}.",
            crate::report::render::tonnes_text(c),
            project
                .permit_ref
                .as_deref()
                .map(|r| format!(" under permit {r}"))
                .unwrap_or_default()
        )),
        None => t.note("No permitted capacity registered for this project."),
    }
    t.note("Stored equals injected: no losses are recorded against this project. Entries spanning periods are split by days.");
    Ok(Report::default().table(t))
}
