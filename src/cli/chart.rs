//! `chart`: cumulative stored, conservative and durable tonnes by period against the permitted
//! capacity, or each project's cumulative stored tonnes for the regulator's view, as SVG.

use super::Context;
use super::claims::{ProjectView, deduction_rule};
use crate::accounting::balance::BalanceMethod;
use crate::accounting::claims::claims;
use crate::accounting::conservative::DeductionRule;
use crate::error::{Error, Result};
use crate::ledger::period::{Bucket, Grouping};
use crate::quantity::Mass;
use crate::report::chart::LineChart;
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
    #[arg(long, value_enum, default_value_t = ChartBy::Quarter)]
    pub by: ChartBy,
    /// Deduct only the share of the uncertainty above this threshold
    #[arg(long, value_name = "SHARE")]
    pub deduct_excess_over: Option<String>,
}

/// Running sums of a series, aligned to `periods` (a period a project lacks keeps its sum).
fn cumulative(periods: &[Bucket], values: &[(Bucket, Mass)]) -> Vec<Mass> {
    let mut sum = Mass::ZERO;
    periods
        .iter()
        .map(|p| {
            sum += values.iter().filter(|(b, _)| b == p).map(|(_, m)| *m).sum();
            sum
        })
        .collect()
}

pub fn chart(ctx: &Context, a: ChartArgs) -> Result<Report> {
    let grouping = match a.by {
        ChartBy::Month => Grouping::Month,
        ChartBy::Quarter => Grouping::Quarter,
        ChartBy::Year => Grouping::Year,
    };
    let deduction = deduction_rule(a.deduct_excess_over.as_deref())?;
    let views = ctx.open()?.read(|tx| match &a.project {
        Some(code) => Ok(vec![ProjectView::load(tx, code, None)?]),
        None => tx
            .projects()?
            .iter()
            .map(|p| ProjectView::load(tx, &p.code, None))
            .collect(),
    })?;
    let chart = line_chart(&views, grouping, deduction, a.totals);
    let svg = chart
        .to_svg()
        .map_err(|e| Error::Refused(format!("chart: {e}")))?;
    std::fs::write(&a.out, &svg)
        .map_err(|e| Error::field("--out", &a.out.display().to_string(), e))?;
    let mut t = Table::new(
        "chart",
        "Chart written",
        columns(&[
            ("File", "file"),
            ("Series", "series"),
            ("Periods", "periods"),
        ]),
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
    Ok(Report::default().table(t))
}

/// Cumulative stored, conservative and durable tonnes of one project against its permit, or
/// each project's cumulative stored tonnes (`totals`).
pub fn line_chart(
    views: &[ProjectView],
    grouping: Grouping,
    deduction: DeductionRule,
    totals: bool,
) -> LineChart {
    let lines: Vec<_> = views
        .iter()
        .map(|v| v.balance(grouping, BalanceMethod::Rr))
        .collect();
    let periods: Vec<Bucket> = lines
        .iter()
        .flatten()
        .map(|l| l.bucket)
        .collect::<BTreeSet<_>>()
        .into_iter()
        .collect();
    let labels: Vec<String> = periods.iter().map(ToString::to_string).collect();
    if totals {
        LineChart {
            title: "Cumulative stored CO2 by project".into(),
            periods: labels,
            series: views
                .iter()
                .zip(&lines)
                .map(|(v, ls)| {
                    let stored: Vec<(Bucket, Mass)> =
                        ls.iter().map(|l| (l.bucket, l.stored)).collect();
                    (v.project.code.clone(), cumulative(&periods, &stored))
                })
                .collect(),
            capacity: None,
        }
    } else {
        let (v, ls) = (&views[0], &lines[0]);
        let c = claims(ls, &v.rules(deduction));
        let pick = |f: &dyn Fn(&crate::accounting::permanence::Claim) -> Mass| -> Vec<Mass> {
            cumulative(
                &periods,
                &c.iter().map(|(b, cl)| (*b, f(cl))).collect::<Vec<_>>(),
            )
        };
        LineChart {
            title: format!(
                "Cumulative CO2, project {} ({})",
                v.project.code, v.project.name
            ),
            periods: labels,
            series: vec![
                ("stored".into(), pick(&|c| c.stored)),
                ("conservative".into(), pick(&|c| c.conservative)),
                ("durable".into(), pick(&|c| c.durable)),
            ],
            capacity: v.project.permit_capacity,
        }
    }
}
