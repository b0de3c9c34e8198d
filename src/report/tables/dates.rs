//! How a report asked at a date says so: `--through` (activity time) and `--as-of` (knowledge
//! time) in its first table's title, and how `--through` counted.

use crate::report::Table;
use chrono::{DateTime, NaiveDate, Utc};

/// Marks the first table of a report with the dates asked: its title says "activity
/// through D" and "as the ledger held `held` at T", and a note says how `--through`
/// counted.
pub fn mark_dates(
    t: &mut Table,
    as_of: Option<DateTime<Utc>>,
    through: Option<NaiveDate>,
    held: &str,
) {
    if let Some(d) = through {
        t.title += &format!(", activity through {d}");
    }
    if let Some(at) = as_of {
        t.title += &format!(
            ", as the ledger held {held} at {}",
            at.format("%Y-%m-%d %H:%M:%S UTC")
        );
    }
    if let Some(d) = through {
        t.note(format!("Activity through {d}: an entry spanning that day counts for its days up to it, split by days as periods split entries; claims take the settings in force on that day where their period ends later."));
    }
}
