//! `chart`: cumulative stored, conservative and durable tonnes by period against the permitted
//! capacity, or each project's cumulative stored tonnes for the regulator's view, as SVG.

use super::Context;
use super::claims::deduction_rule;
use super::view::load;
use crate::accounting::conservative::DeductionRule;
use crate::accounting::project_view::ProjectFigures;
use crate::error::{Error, Result};
use crate::ledger::period::{Bucket, Grouping};
use crate::report::chart::LineChart;
use crate::report::names;
use crate::report::{Report, Table, columns};
use clap::{Args, ValueEnum};
use std::collections::BTreeSet;
use std::path::PathBuf;

#[derive(Debug, Clone, Copy, ValueEnum)]
pub enum ChartBy {
    Month,
    Quarter,
    Year,
}

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
    #[arg(long, value_enum, default_value_t = ChartBy::Quarter)]
    pub by: ChartBy,
    /// Deduct only the share of the uncertainty above this threshold
    #[arg(long, value_name = "SHARE")]
    pub deduct_excess_over: Option<String>,
}

pub fn chart(ctx: &Context, a: ChartArgs) -> Result<Report> {
    let grouping = match a.by {
        ChartBy::Month => Grouping::Month,
        ChartBy::Quarter => Grouping::Quarter,
        ChartBy::Year => Grouping::Year,
    };
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
    let mut t = Table::new(
        "chart",
        "Chart written",
        columns(&[names::FILE, names::SERIES, names::PERIODS]),
    );
    t.push(vec![
        crate::report::Cell::text(a.out.display().to_string()),
        crate::report::Cell::text(
            chart
                .series
                .iter()
                .map(|s| s.0.as_str())
                .collect::<Vec<_>>()
                .join(", "),
        ),
        crate::report::Cell::Int(chart.periods.len() as i64),
    ]);
    Ok(Report::default().table(t).table(values_table(&chart)))
}

/// Cumulative stored, conservative and durable tonnes of one project against its permit, or
/// each project's cumulative stored tonnes (`totals`).
pub fn line_chart(
    views: &[ProjectFigures],
    grouping: Grouping,
    deduction: DeductionRule,
    totals: bool,
) -> Result<LineChart> {
    let mut periods = BTreeSet::new();
    for v in views {
        periods.extend(v.periods(grouping)?);
    }
    let periods: Vec<Bucket> = periods.into_iter().collect();
    let labels: Vec<String> = periods.iter().map(ToString::to_string).collect();
    Ok(if totals {
        LineChart {
            title: "Cumulative stored CO2 by project".into(),
            periods: labels,
            series: views
                .iter()
                .map(|v| v.stored_series(grouping, &periods))
                .collect::<std::result::Result<_, _>>()?,
            capacity: None,
        }
    } else {
        let v = &views[0];
        LineChart {
            title: format!(
                "Cumulative CO2, project {} ({})",
                v.project().code,
                v.project().name
            ),
            periods: labels,
            series: v.claim_series(grouping, &periods, deduction)?,
            capacity: v.project().permit_capacity,
        }
    })
}

/// The values plotted, period by period, so a program can read what the picture shows.
fn values_table(chart: &LineChart) -> Table {
    let mut t = Table::new(
        "chart_values",
        "Cumulative tonnes plotted",
        columns(&[names::PERIOD, names::SERIES, names::CUMULATIVE_T]),
    );
    for (name, values) in &chart.series {
        for (period, v) in chart.periods.iter().zip(values) {
            t.push(vec![
                crate::report::Cell::text(period),
                crate::report::Cell::text(name),
                crate::report::Cell::Tonnes(*v),
            ]);
        }
    }
    t
}
