//! `project set`: dated changes to a project's buffer share, retention model and temporary
//! storage terms, and the table of the settings in force.

use super::Context;
use super::setup::known_project;
use crate::error::{Error, Result};
use crate::ledger::seal::admit_setting;
use crate::ledger::setting::{Setting, SettingName, in_force};
use crate::quantity::Decimal;
use crate::quantity::fraction::parse_uncertainty;
use crate::report::{Cell, Report, Table, columns};
use clap::Args;

#[derive(Debug, Args)]
pub struct ProjectSet {
    /// Project code (e.g. TFS)
    pub code: String,
    /// Share of durable tonnes withheld into the buffer pool, e.g. 10%
    #[arg(long, allow_hyphen_values = true)]
    pub buffer: Option<String>,
    /// Retention model: constant annual leak fraction, e.g. 0.01%
    #[arg(long, value_name = "FRACTION", allow_hyphen_values = true)]
    pub annual_leak: Option<String>,
    /// Retention model: horizon in years [default: 100]
    #[arg(long, value_name = "YEARS", allow_hyphen_values = true)]
    pub horizon: Option<String>,
    /// Temporary storage: years the CO2 is held (tonne-year equivalence)
    #[arg(long, value_name = "YEARS", allow_hyphen_values = true)]
    pub years_held: Option<String>,
    /// Tonne-year equivalence time [default: 55 years for a 100-year horizon, Moura-Costa & Wilson 2000]
    #[arg(long, value_name = "YEARS", allow_hyphen_values = true)]
    pub equivalence_years: Option<String>,
}

/// A share in [0, 100 %), normalised to its decimal.
fn share(field: &str, text: &str) -> Result<String> {
    parse_uncertainty(text)
        .map(|d| d.to_string())
        .map_err(|e| Error::field(field, text, e))
}

/// A positive number of years.
fn years(field: &str, text: &str) -> Result<String> {
    Decimal::parse(text)
        .ok()
        .filter(|d| d.is_positive())
        .map(|d| d.to_string())
        .ok_or_else(|| Error::field(field, text, "must be a positive number of years"))
}

pub fn set(ctx: &Context, a: ProjectSet) -> Result<Report> {
    let mut values: Vec<(SettingName, String)> = Vec::new();
    if let Some(b) = &a.buffer {
        values.push((SettingName::Buffer, share("--buffer", b)?));
    }
    if let Some(r) = &a.annual_leak {
        values.push((SettingName::AnnualLeak, share("--annual-leak", r)?));
    }
    if let Some(h) = &a.horizon {
        values.push((SettingName::Horizon, years("--horizon", h)?));
    }
    if let Some(y) = &a.years_held {
        values.push((SettingName::YearsHeld, years("--years-held", y)?));
    }
    if let Some(e) = &a.equivalence_years {
        values.push((
            SettingName::EquivalenceYears,
            years("--equivalence-years", e)?,
        ));
    }
    if values.is_empty() {
        return Err(Error::Refused(
            "nothing to set: give --buffer, --annual-leak, --horizon, --years-held or --equivalence-years".into(),
        ));
    }
    let all = ctx.open()?.write(|tx| {
        known_project(tx, &a.code)?;
        let seals = tx.seals(&a.code)?;
        admit_setting(&seals, ctx.now.date_naive(), ctx.late)
            .map_err(|e| Error::field("project set", &a.code, e))?;
        let mut all = tx.settings(&a.code)?;
        let next = all.len() as u64;
        let new: Vec<Setting> = values
            .iter()
            .cloned()
            .enumerate()
            .map(|(i, (name, value))| Setting {
                project: a.code.clone(),
                seq: next + i as u64,
                name,
                value,
                recorded_at: ctx.now,
            })
            .collect();
        tx.add_settings(&new)?;
        all.extend(new);
        Ok(all)
    })?;
    Ok(Report::default()
        .line(format!("settings of project {} recorded", a.code))
        .table(settings_table(&a.code, &all, ctx.now)))
}

/// The settings in force at `as_of`, each with when it was recorded.
pub fn settings_table(
    project: &str,
    all: &[Setting],
    as_of: chrono::DateTime<chrono::Utc>,
) -> Table {
    let mut t = Table::new(
        "settings",
        format!("Settings in force, project {project}"),
        columns(&[
            ("Setting", "setting"),
            ("Value", "value"),
            ("Recorded (UTC)", "recorded_at"),
        ]),
    );
    for name in SettingName::ALL {
        if let Some(v) = in_force(all, *name, as_of) {
            let when = all
                .iter()
                .filter(|s| s.name == *name && s.value == v && s.recorded_at <= as_of)
                .map(|s| s.recorded_at)
                .max();
            t.push(vec![
                Cell::text(name.name()),
                Cell::text(v),
                Cell::opt_text(when.map(|w| w.format("%Y-%m-%d %H:%M:%S").to_string())),
            ]);
        }
    }
    t
}
