//! `mineralization`: how much of the CO2 injected into basalt has turned to rock, campaign by
//! campaign and period by period.

use super::Context;
use super::reports::By;
use super::view::load;
use crate::accounting::project_view::ProjectFigures;
use crate::error::{Error, Result};
use crate::ledger::Method;
use crate::ledger::period::Grouping;
use crate::report::Report;
use crate::report::tables::mineralization::{campaigns_table, period_table, samples_table};
use clap::Args;

impl From<By> for Grouping {
    fn from(by: By) -> Grouping {
        match by {
            By::Month => Grouping::Month,
            By::Quarter => Grouping::Quarter,
            By::Year => Grouping::Year,
        }
    }
}

#[derive(Debug, Args)]
pub struct MineralizationArgs {
    /// Project code (e.g. TFS)
    pub project: String,
    /// Length of each period (one row each)
    #[arg(long, value_enum, default_value_t = By::Quarter)]
    pub by: By,
}

/// A project of `method`, with its figures, or a refusal naming the project.
pub fn route_project(
    ctx: &Context,
    code: &str,
    method: Method,
    command: &str,
) -> Result<ProjectFigures> {
    let figures = ctx.open()?.read(|tx| load(tx, code, None))?;
    let p = figures.project();
    if p.method != method {
        return Err(Error::field(
            "project",
            code,
            format!(
                "has method {}; `{command}` reads {method} projects",
                p.method
            ),
        ));
    }
    Ok(figures)
}

pub fn mineralization(ctx: &Context, a: MineralizationArgs) -> Result<Report> {
    let figures = route_project(
        ctx,
        &a.project,
        Method::BasaltMineralization,
        "mineralization",
    )?;
    Ok(Report::default()
        .table(samples_table(&figures))
        .table(campaigns_table(&figures))
        .table(period_table(&figures, a.by.into())?))
}
