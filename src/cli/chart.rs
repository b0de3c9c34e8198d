//! `chart`: cumulative stored, conservative and durable tonnes by period against the permitted
//! capacity, or each project's cumulative stored tonnes for the regulator's view, as SVG.

use super::Context;
use super::claims::deduction_rule;
use super::reports::By;
use super::view::load;
use crate::error::{Error, Result};
use crate::ledger::period::Grouping;
use crate::report::Report;
use crate::report::tables::chart::{line_chart, values_table, written_table};
use clap::Args;
use std::path::PathBuf;

#[derive(Debug, Args)]
#[command(group = clap::ArgGroup::new("what").required(true).args(["project", "totals"]))]
pub struct ChartArgs {
    /// The project to chart
    pub project: Option<String>,
    /// Chart every project's cumulative stored tonnes instead
    #[arg(long)]
    pub totals: bool,
    /// The SVG file to write
    #[arg(long)]
    pub out: PathBuf,
    /// Length of each period (one row each)
    #[arg(long, value_enum, default_value_t = By::Quarter)]
    pub by: By,
    /// Deduct only the share of the uncertainty above this threshold
    #[arg(long, value_name = "SHARE")]
    pub deduct_excess_over: Option<String>,
}

pub fn chart(ctx: &Context, a: ChartArgs) -> Result<Report> {
    let grouping = Grouping::from(a.by);
    let deduction = deduction_rule(a.deduct_excess_over.as_deref())?;
    let views = ctx.open()?.read(|tx| match &a.project {
        Some(code) => Ok(vec![load(tx, code, None)?]),
        None => tx
            .projects()?
            .iter()
            .map(|p| load(tx, &p.code, None))
            .collect(),
    })?;
    let chart = line_chart(&views, grouping, deduction, a.totals)?;
    let svg = chart
        .to_svg()
        .map_err(|e| Error::internal(format!("chart: {e}")))?;
    std::fs::write(&a.out, &svg)
        .map_err(|e| Error::field("--out", &a.out.display().to_string(), e))?;
    Ok(Report::default()
        .table(written_table(&a.out.display().to_string(), &chart))
        .table(values_table(&chart)))
}
