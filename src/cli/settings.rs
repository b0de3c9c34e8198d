//! `project set`: dated changes to a project's buffer share, retention model, temporary
//! storage terms, claim period and weathering deduction parameters, each taking effect from a
//! day with the source it rests on, and the table of the settings in force.

use super::Context;
use super::reports::By;
use super::setup::known_project;
use super::weathering::DeductionValues;
use crate::accounting::project_view::deduction_setting;
use crate::error::{Error, Result};
use crate::ledger::period::parse_date;
use crate::ledger::seal::admit_setting;
use crate::ledger::setting::SettingName;
use crate::ledger::setting_change::{ChangeError, check, normalised, rows};
use crate::report::Report;
use crate::report::tables::settings::settings_table;
use clap::Args;

#[derive(Debug, Args)]
pub struct ProjectSet {
    /// Project code (e.g. TFS)
    pub code: String,
    /// Share of durable tonnes withheld into the buffer pool, e.g. 10%
    #[arg(long, allow_hyphen_values = true)]
    pub buffer: Option<String>,
    /// Retention model: the share of the stored CO2 assumed lost each year, e.g. 0.01% (a
    /// modelling assumption, not a measured leak; record measured leaks with `record leakage`)
    #[arg(
        long,
        value_name = "FRACTION",
        alias = "annual-leak",
        allow_hyphen_values = true
    )]
    pub assumed_annual_loss: Option<String>,
    /// Retention model: horizon in years [default: 100]
    #[arg(long, value_name = "YEARS", allow_hyphen_values = true)]
    pub horizon: Option<String>,
    /// Temporary storage: years the CO2 is held (tonne-year equivalence)
    #[arg(long, value_name = "YEARS", allow_hyphen_values = true)]
    pub years_held: Option<String>,
    /// Tonne-year equivalence time [default: 55 years for a 100-year horizon, Moura-Costa & Wilson 2000]
    #[arg(long, value_name = "YEARS", allow_hyphen_values = true)]
    pub equivalence_years: Option<String>,
    /// The one granularity of the project's claims, buffer pool and totals [default: year]
    #[arg(long, value_enum, value_name = "PERIOD")]
    pub claim_period: Option<By>,
    /// Enhanced weathering: the deduction parameters of net removal the project's claims use
    #[command(flatten)]
    pub deductions: DeductionValues,
    /// Where the values set come from (a monitoring plan, a measurement), kept with them and
    /// shown beside them; required with the deduction parameters
    #[arg(long, value_name = "TEXT", allow_hyphen_values = true)]
    pub source: Option<String>,
    /// The day these settings take effect (YYYY-MM-DD); before today only where no sealed period
    /// lies between it and today [default: the day recorded]
    #[arg(long, value_name = "DATE")]
    pub from: Option<String>,
}

pub fn set(ctx: &Context, a: ProjectSet) -> Result<Report> {
    let given = [
        (SettingName::Buffer, "--buffer", &a.buffer),
        (
            SettingName::AnnualLeak,
            "--assumed-annual-loss",
            &a.assumed_annual_loss,
        ),
        (SettingName::Horizon, "--horizon", &a.horizon),
        (SettingName::YearsHeld, "--years-held", &a.years_held),
        (
            SettingName::EquivalenceYears,
            "--equivalence-years",
            &a.equivalence_years,
        ),
    ];
    let mut values: Vec<(SettingName, String)> = Vec::new();
    for (name, option, text) in given {
        if let Some(t) = text {
            let v = normalised(name, t).map_err(|e| Error::field(option, t, e))?;
            values.push((name, v));
        }
    }
    if let Some(p) = a.claim_period {
        let name = format!("{p:?}").to_lowercase();
        values.push((SettingName::ClaimPeriod, name));
    }
    let deductions = a.deductions.given()?;
    for (deduction, _, _, v) in &deductions {
        values.push((deduction_setting(*deduction), v.to_string()));
    }
    if values.is_empty() {
        return Err(Error::options(
            "--buffer",
            "nothing to set: give --buffer, --assumed-annual-loss, --horizon, --years-held, --equivalence-years, --claim-period or a deduction parameter (--strong-acid, --cation-retention, --secondary-carbonate, --ocean-efficiency)",
        ));
    }
    if let Some(s) = &a.source {
        super::inputs::text("--source", s)?;
    } else if let Some((_, option, text, _)) = deductions.first() {
        return Err(Error::field(
            option,
            text,
            "needs --source: say where the parameter comes from (the monitoring plan, a measurement)",
        ));
    }
    let today = ctx.now.date_naive();
    let from = super::inputs::optional("--from", a.from.as_deref(), parse_date)?.unwrap_or(today);
    let all = ctx.open()?.write(|tx| {
        let project = known_project(tx, &a.code)?;
        let seals = tx.seals(&a.code)?;
        admit_setting(&seals, from, today, ctx.late)
            .map_err(|e| Error::field("--from", &from.to_string(), super::sealed(&e)))?;
        let mut all = tx.settings(&a.code)?;
        let sealed = !seals.is_empty();
        check(&project, sealed, &all, &values, !deductions.is_empty()).map_err(|e| match e {
            ChangeError::NotWeathering { project, method } => {
                let (option, text) = deductions.first().map_or(("", ""), |d| (d.1, d.2));
                Error::field(
                    option,
                    text,
                    format!("is a weathering deduction; project {project} has method {method}"),
                )
            }
            ChangeError::ClaimPeriodKept { given, now } => Error::field(
                "--claim-period",
                &given,
                format!(
                    "the project has sealed periods, claimed by {now}; the claim period cannot change"
                ),
            ),
        })?;
        let new = rows(&all, &a.code, &values, ctx.now, from, a.source.as_deref());
        tx.add_settings(&new)?;
        all.extend(new);
        Ok(all)
    })?;
    Ok(Report::default()
        .line(format!("settings of project {} recorded", a.code))
        .table(settings_table(&a.code, &all, ctx.now)))
}
