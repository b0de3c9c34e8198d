//! A change of a project's settings as ledger rows: each value normalised (a share, a number of
//! years), the rules a change keeps, and the rows it appends after the project's settings.

use super::project::{Method, Project};
use super::setting::{Setting, SettingName, in_force};
use crate::quantity::Decimal;
use crate::quantity::fraction::{FractionError, parse_uncertainty};
use chrono::{DateTime, NaiveDate, Utc};
use std::fmt;

/// Why a setting's value is refused.
#[derive(Debug, Clone, PartialEq, Eq)]
pub enum ValueError {
    /// A share outside [0, 100 %).
    Share(FractionError),
    /// A number of years that is not positive.
    Years,
}

impl fmt::Display for ValueError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            Self::Share(e) => e.fmt(f),
            Self::Years => f.write_str("must be a positive number of years"),
        }
    }
}

/// Why a change cannot be recorded.
#[derive(Debug, Clone, PartialEq, Eq)]
pub enum ChangeError {
    /// Weathering deductions for a project of another method.
    NotWeathering { project: String, method: Method },
    /// A new claim period once a period is sealed: claims made by another one would restate
    /// the sealed figures. `now` is the claim period in force.
    ClaimPeriodKept { given: String, now: String },
}

/// A share (buffer, assumed loss) or a number of years, normalised to its decimal.
pub fn normalised(name: SettingName, text: &str) -> Result<String, ValueError> {
    match name {
        SettingName::Horizon | SettingName::YearsHeld | SettingName::EquivalenceYears => {
            Decimal::parse(text)
                .ok()
                .filter(|d| d.is_positive())
                .map(|d| d.to_string())
                .ok_or(ValueError::Years)
        }
        _ => parse_uncertainty(text)
            .map(|d| d.to_string())
            .map_err(ValueError::Share),
    }
}

/// Checks a change of `project`'s settings `all` by `values`: deductions only for enhanced
/// weathering, and the claim period kept once the project has sealed periods.
pub fn check(
    project: &Project,
    sealed: bool,
    all: &[Setting],
    values: &[(SettingName, String)],
    deductions: bool,
) -> Result<(), ChangeError> {
    if deductions && project.method != Method::EnhancedWeathering {
        return Err(ChangeError::NotWeathering {
            project: project.code.clone(),
            method: project.method,
        });
    }
    let now = in_force(all, SettingName::ClaimPeriod, NaiveDate::MAX).map_or("year", |s| &s.value);
    match values.iter().find(|(n, _)| *n == SettingName::ClaimPeriod) {
        Some((_, v)) if sealed && v != now => Err(ChangeError::ClaimPeriodKept {
            given: v.clone(),
            now: now.to_string(),
        }),
        _ => Ok(()),
    }
}

/// The rows a change appends after the project's `all` settings, in effect from `from`.
pub fn rows(
    all: &[Setting],
    project: &str,
    values: &[(SettingName, String)],
    recorded_at: DateTime<Utc>,
    from: NaiveDate,
    source: Option<&str>,
) -> Vec<Setting> {
    let next = all.len() as u64;
    values
        .iter()
        .cloned()
        .enumerate()
        .map(|(i, (name, value))| Setting {
            project: project.to_string(),
            seq: next + i as u64,
            name,
            value,
            recorded_at,
            effective: Some(from),
            source: source.map(str::to_string),
        })
        .collect()
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::ledger::tests::project;

    #[test]
    fn shares_and_years_are_normalised_or_refused() {
        assert_eq!(normalised(SettingName::Buffer, "10%"), Ok("0.1".into()));
        assert_eq!(
            normalised(SettingName::Horizon, "0"),
            Err(ValueError::Years)
        );
        assert!(matches!(
            normalised(SettingName::AnnualLeak, "150%"),
            Err(ValueError::Share(_))
        ));
    }

    #[test]
    fn deductions_need_weathering_and_a_sealed_project_keeps_its_claim_period() {
        let p = project(Method::SalineAquifer);
        assert!(matches!(
            check(&p, false, &[], &[], true),
            Err(ChangeError::NotWeathering { .. })
        ));
        let quarter = [(SettingName::ClaimPeriod, "quarter".to_string())];
        assert_eq!(
            check(&p, true, &[], &quarter, false),
            Err(ChangeError::ClaimPeriodKept {
                given: "quarter".into(),
                now: "year".into()
            })
        );
        assert_eq!(check(&p, false, &[], &quarter, false), Ok(()));
        let rows = rows(
            &[],
            "TFS",
            &quarter,
            DateTime::UNIX_EPOCH,
            NaiveDate::MIN,
            None,
        );
        assert_eq!((rows[0].seq, rows[0].effective), (0, Some(NaiveDate::MIN)));
    }
}
