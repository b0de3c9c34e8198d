//! The start of a leak recorded `since the last survey`: the last survey of its site (or its
//! pathway) that found no leak, or the start of injection, gathered in one pass over the
//! project's effective entries (Regulation (EU) 2018/2066 Annex IV §23 B.3).

use super::leakage::{LeakStart, unknown_leak_start};
use crate::ledger::reading_fields::{SurveyFinding, checked};
use crate::ledger::{Entry, EntryKind};
use chrono::NaiveDate;

/// What a leak's last no-leak survey is looked for by: its site, or, for a leak at no site of
/// the project, its pathway (a survey that names the same pathway).
#[derive(Debug, Clone, Copy)]
pub enum Surveyed<'a> {
    Site(&'a str),
    Pathway(&'a str),
}

impl Surveyed<'_> {
    pub fn name(&self) -> &str {
        match self {
            Surveyed::Site(s) | Surveyed::Pathway(s) => s,
        }
    }

    pub fn what(&self) -> &'static str {
        match self {
            Surveyed::Site(_) => "site",
            Surveyed::Pathway(_) => "pathway",
        }
    }

    fn covers(&self, survey: &Entry) -> bool {
        match self {
            Surveyed::Site(s) => survey.site == *s,
            Surveyed::Pathway(p) => survey.reading.pathway() == Some(p),
        }
    }
}

/// Why a leak's start cannot be taken from the last survey.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum StartError {
    /// No survey up to the leak's end found no leak, and no injection is recorded.
    Unbounded,
    /// Injection began after the leak's end: what was stored cannot leak before it.
    AfterEnd { began: NaiveDate },
}

/// What bounds the unknown start of a leak ending on `to`: the latest no-leak survey of the
/// site (or pathway) on or before `to`, and the first day of the project's injection.
#[derive(Debug, Clone)]
pub struct LeakBounds<'a> {
    surveyed: Surveyed<'a>,
    to: NaiveDate,
    survey: Option<NaiveDate>,
    injection: Option<NaiveDate>,
}

impl<'a> LeakBounds<'a> {
    pub fn new(surveyed: Surveyed<'a>, to: NaiveDate) -> Self {
        LeakBounds {
            surveyed,
            to,
            survey: None,
            injection: None,
        }
    }

    /// Takes in one effective entry of the project.
    pub fn add(&mut self, e: &Entry) {
        match e.kind {
            EntryKind::Survey
                if self.surveyed.covers(e)
                    && e.period.to <= self.to
                    && checked(e.reading.survey_finding()) == Some(SurveyFinding::NoLeak) =>
            {
                self.survey = self.survey.max(Some(e.period.to));
            }
            EntryKind::Injection => {
                let from = e.period.from;
                self.injection = Some(self.injection.map_or(from, |d| d.min(from)));
            }
            _ => {}
        }
    }

    /// The day the leak is taken to start from.
    pub fn start(&self) -> Result<LeakStart, StartError> {
        let start = unknown_leak_start(self.survey, self.injection).ok_or(StartError::Unbounded)?;
        if start.day() > self.to {
            return Err(StartError::AfterEnd { began: start.day() });
        }
        Ok(start)
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::ledger::Period;

    fn day(d: u32) -> NaiveDate {
        NaiveDate::from_ymd_opt(2026, 3, d).unwrap()
    }

    fn entry(kind: EntryKind, site: &str, from: u32, to: u32, reading: &[(&str, &str)]) -> Entry {
        let mut e = crate::accounting::restatement::tests::entry(kind, reading, 0);
        e.site = site.into();
        e.period = Period::new(day(from), day(to)).unwrap();
        e
    }

    #[test]
    fn the_latest_clear_survey_of_the_site_up_to_the_end_is_the_start() {
        let mut b = LeakBounds::new(Surveyed::Site("TF-M1"), day(20));
        b.add(&entry(EntryKind::Injection, "TF-I1", 1, 5, &[]));
        b.add(&entry(
            EntryKind::Survey,
            "TF-M1",
            8,
            8,
            &[("result", "no-leak")],
        ));
        b.add(&entry(
            EntryKind::Survey,
            "TF-M1",
            12,
            12,
            &[("result", "leak-found")],
        ));
        b.add(&entry(
            EntryKind::Survey,
            "TF-M2",
            15,
            15,
            &[("result", "no-leak")],
        ));
        b.add(&entry(
            EntryKind::Survey,
            "TF-M1",
            25,
            25,
            &[("result", "no-leak")],
        ));
        assert_eq!(b.start(), Ok(LeakStart::LastClearSurvey(day(8))));
    }

    #[test]
    fn without_a_survey_injection_bounds_it_and_nothing_is_unbounded() {
        let mut b = LeakBounds::new(Surveyed::Pathway("fault F2"), day(10));
        assert_eq!(b.start(), Err(StartError::Unbounded));
        b.add(&entry(EntryKind::Injection, "TF-I1", 12, 14, &[]));
        assert_eq!(b.start(), Err(StartError::AfterEnd { began: day(12) }));
        let mut b = LeakBounds::new(Surveyed::Pathway("fault F2"), day(20));
        b.add(&entry(EntryKind::Injection, "TF-I1", 12, 14, &[]));
        b.add(&entry(EntryKind::Injection, "TF-I1", 3, 4, &[]));
        assert_eq!(b.start(), Ok(LeakStart::InjectionBegan(day(3))));
    }
}
