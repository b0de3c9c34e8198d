//! Project settings that change over time: the buffer share withheld from claims, the retention
//! model, temporary storage, the claim period and the weathering deduction parameters of the
//! monitoring plan. Each change is a dated, hashed row that takes
//! effect from a date (by default the day it was recorded); a claim period uses the settings in
//! force on its last day.

use super::project::named_enum;
use crate::quantity::Decimal;
use chrono::{DateTime, NaiveDate, Utc};

named_enum! {
    /// What a setting sets.
    SettingName {
        /// Share of the durable tonnes withheld into the buffer pool (e.g. `10%`).
        Buffer => "buffer",
        /// The retention model's assumed share of the stored CO2 lost each year (e.g. `0.01%`);
        /// an assumption of the model, not a measured leak. Its stored name is kept from v1.
        AnnualLeak => "annual-leak",
        /// Horizon of the retention model, in years.
        Horizon => "horizon",
        /// Years a temporary storage holds its CO2 (tonne-year accounting).
        YearsHeld => "years-held",
        /// Equivalence time of the tonne-year method, in years.
        EquivalenceYears => "equivalence-years",
        /// The one granularity at which the project's claims are made: month, quarter or year.
        ClaimPeriod => "claim-period",
        /// Weathering: share of the cations released by strong acids, carrying no CO2.
        StrongAcid => "strong-acid",
        /// Weathering: share of the rest held on exchange sites or in new clays.
        CationRetention => "cation-retention",
        /// Weathering: share of the rest precipitated as soil carbonate.
        SecondaryCarbonate => "secondary-carbonate",
        /// Weathering: mol CO2 the ocean keeps per mol of alkalinity it receives.
        OceanEfficiency => "ocean-efficiency",
    }
}

impl SettingName {
    /// The name people read: the retention model's yearly loss is an assumption, not a leak.
    pub fn label(self) -> &'static str {
        match self {
            Self::Buffer => "buffer",
            Self::AnnualLeak => "assumed annual loss",
            Self::Horizon => "horizon",
            Self::YearsHeld => "years held",
            Self::EquivalenceYears => "equivalence years",
            Self::ClaimPeriod => "claim period",
            Self::StrongAcid => "strong-acid weathering share",
            Self::CationRetention => "cation retention share",
            Self::SecondaryCarbonate => "secondary carbonate share",
            Self::OceanEfficiency => "ocean re-equilibration efficiency",
        }
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
    /// The day it takes effect; rows written before settings had one take effect the day they
    /// were recorded.
    pub effective: Option<NaiveDate>,
    /// Where the value comes from (a monitoring plan, a measurement), kept with it; only rows
    /// with an effective date carry one.
    pub source: Option<String>,
}

impl Setting {
    /// The first day the setting is in force.
    pub fn from(&self) -> NaiveDate {
        self.effective
            .unwrap_or_else(|| self.recorded_at.date_naive())
    }

    /// The value as people give it: shares in per cent, durations in years. Shares are stored
    /// as exact decimals (0.05), so the per cent is exact too.
    pub fn shown(&self) -> String {
        let per_cent = || {
            let d = Decimal::parse(&self.value).ok()?;
            d.checked_mul(Decimal::parse("100").ok()?)
        };
        match self.name {
            SettingName::Buffer
            | SettingName::AnnualLeak
            | SettingName::StrongAcid
            | SettingName::CationRetention
            | SettingName::SecondaryCarbonate => {
                per_cent().map_or_else(|| self.value.clone(), |p| format!("{p} %"))
            }
            SettingName::Horizon | SettingName::YearsHeld | SettingName::EquivalenceYears => {
                format!("{} years", self.value)
            }
            SettingName::ClaimPeriod | SettingName::OceanEfficiency => self.value.clone(),
        }
    }

    /// Whether it takes effect before the day it was recorded.
    pub fn backdated(&self) -> bool {
        self.from() < self.recorded_at.date_naive()
    }
}

/// A row's source comes after its effective date in the row hash; a source without a date is
/// not a row the tool writes.
pub fn sourced(s: &Setting) -> Result<(), String> {
    if s.source.is_some() && s.effective.is_none() {
        return Err(format!(
            "setting {} of project {} has a source but no effective date",
            s.seq, s.project
        ));
    }
    Ok(())
}

/// The setting of `name` in force on `day`: of those in effect by then, the one with the latest
/// effective date, and of those the one recorded last.
pub fn in_force(settings: &[Setting], name: SettingName, day: NaiveDate) -> Option<&Setting> {
    settings
        .iter()
        .filter(|s| s.name == name && s.from() <= day)
        .max_by_key(|s| (s.from(), s.recorded_at, s.seq))
}

/// The value of `name` in force on `day`.
pub fn value_on(settings: &[Setting], name: SettingName, day: NaiveDate) -> Option<&str> {
    in_force(settings, name, day).map(|s| s.value.as_str())
}

#[cfg(test)]
mod tests {
    use super::*;

    fn at(name: SettingName, value: &str, recorded: &str, from: Option<&str>) -> Setting {
        Setting {
            project: "P".into(),
            seq: 0,
            name,
            value: value.into(),
            recorded_at: DateTime::parse_from_rfc3339(recorded).unwrap().to_utc(),
            effective: from.map(|d| d.parse().unwrap()),
            source: None,
        }
    }

    #[test]
    fn a_setting_is_in_force_from_its_effective_date() {
        let d = |s: &str| s.parse::<NaiveDate>().unwrap();
        let s = vec![
            at(SettingName::Buffer, "0.1", "2026-04-15T08:00:00Z", None),
            at(
                SettingName::Buffer,
                "0",
                "2026-05-01T08:00:00Z",
                Some("2026-08-01"),
            ),
        ];
        assert_eq!(value_on(&s, SettingName::Buffer, d("2026-01-31")), None);
        assert_eq!(
            value_on(&s, SettingName::Buffer, d("2026-04-15")),
            Some("0.1")
        );
        assert_eq!(
            value_on(&s, SettingName::Buffer, d("2026-07-31")),
            Some("0.1")
        );
        assert_eq!(
            value_on(&s, SettingName::Buffer, d("2026-08-01")),
            Some("0")
        );
        assert!(!s[0].backdated());
        let back = at(
            SettingName::Buffer,
            "0.1",
            "2026-04-15T08:00:00Z",
            Some("2026-01-01"),
        );
        assert!(back.backdated());
    }
}
