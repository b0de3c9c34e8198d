//! Project settings that change over time: the buffer share withheld from claims, the retention
//! model, and temporary storage. Each change is a dated, hashed row; the latest one recorded by a
//! given time is the one in force.

use super::project::named_enum;
use chrono::{DateTime, Utc};

named_enum! {
    /// What a setting sets.
    SettingName {
        /// Share of the durable tonnes withheld into the buffer pool (e.g. `10%`).
        Buffer => "buffer",
        /// Constant annual leak fraction of the retention model (e.g. `0.01%`).
        AnnualLeak => "annual-leak",
        /// Horizon of the retention model, in years.
        Horizon => "horizon",
        /// Years a temporary storage holds its CO2 (tonne-year accounting).
        YearsHeld => "years-held",
        /// Equivalence time of the tonne-year method, in years.
        EquivalenceYears => "equivalence-years",
    }
}

/// One recorded setting.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct Setting {
    pub project: String,
    pub seq: u64,
    pub name: SettingName,
    pub value: String,
    pub recorded_at: DateTime<Utc>,
}

/// The value of each setting in force at `as_of`: the latest recorded by then.
pub fn in_force(settings: &[Setting], name: SettingName, as_of: DateTime<Utc>) -> Option<&str> {
    settings
        .iter()
        .filter(|s| s.name == name && s.recorded_at <= as_of)
        .max_by_key(|s| (s.recorded_at, s.seq))
        .map(|s| s.value.as_str())
}
