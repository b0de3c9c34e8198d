//! The line charts `chart` and the annual page draw, and the values they plot as a table.

use crate::accounting::conservative::DeductionRule;
use crate::accounting::project_view::ProjectFigures;
use crate::error::Result;
use crate::ledger::period::{Bucket, Grouping};
use crate::report::chart::LineChart;
use crate::report::names;
use crate::report::{Cell, Table, columns};
use std::collections::BTreeSet;

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
pub fn values_table(chart: &LineChart) -> Table {
    let mut t = Table::new(
        "chart_values",
        "Cumulative tonnes plotted",
        columns(&[names::PERIOD, names::SERIES, names::CUMULATIVE_T]),
    );
    for (name, values) in &chart.series {
        for (period, v) in chart.periods.iter().zip(values) {
            t.push(vec![Cell::text(period), Cell::text(name), Cell::Tonnes(*v)]);
        }
    }
    t
}

/// The chart file written: its name, the series it draws and how many periods.
pub fn written_table(file: &str, chart: &LineChart) -> Table {
    let mut t = Table::new(
        "chart",
        "Chart written",
        columns(&[names::FILE, names::SERIES, names::PERIODS]),
    );
    t.push(vec![
        Cell::text(file),
        Cell::text(
            chart
                .series
                .iter()
                .map(|s| s.0.as_str())
                .collect::<Vec<_>>()
                .join(", "),
        ),
        Cell::Int(chart.periods.len() as i64),
    ]);
    t
}
