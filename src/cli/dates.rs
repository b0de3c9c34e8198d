//! The two dates a report can be asked at, never confused: `--as-of` is knowledge time (what
//! the ledger held at the end of that day: entries, settings and registrations recorded later
//! are left out, whatever days they cover) and `--through` is activity time (what happened up
//! to and including that day, as the ledger holds it now: entries spanning it count for their
//! days up to it).

use super::inputs::optional;
use super::view::load_through;
use crate::accounting::project_view::ProjectFigures;
use crate::error::Result;
use crate::ledger::period::{end_of_day, parse_date};
use crate::report::Table;
use crate::report::tables::dates::mark_dates;
use crate::store::Tx;
use chrono::{DateTime, NaiveDate, Utc};
use clap::Args;

#[derive(Debug, Default, Args)]
pub struct DateArgs {
    /// What the ledger held at the end of this date (UTC): entries recorded later are left
    /// out, whatever days they cover (knowledge time)
    #[arg(long, value_name = "DATE")]
    pub as_of: Option<String>,
    /// Activity up to and including this date: entries spanning it count for their days up to
    /// it (activity time)
    #[arg(long, value_name = "DATE")]
    pub through: Option<String>,
}

/// `--as-of` and `--through`, read.
#[derive(Debug, Clone, Copy)]
pub struct Dates {
    pub as_of: Option<DateTime<Utc>>,
    pub through: Option<NaiveDate>,
}

impl DateArgs {
    pub fn read(&self) -> Result<Dates> {
        let date = |field, d: &Option<String>| optional(field, d.as_deref(), parse_date);
        Ok(Dates {
            as_of: date("--as-of", &self.as_of)?.map(end_of_day),
            through: date("--through", &self.through)?,
        })
    }
}

impl Dates {
    /// A project's figures at these dates.
    pub fn load(&self, tx: &mut Tx<'_>, code: &str) -> Result<ProjectFigures> {
        load_through(tx, code, self.as_of, self.through)
    }

    /// Marks the first table of a report with the dates asked (see [`mark_dates`]).
    pub fn mark(&self, t: &mut Table, held: &str) {
        mark_dates(t, self.as_of, self.through, held);
    }
}
