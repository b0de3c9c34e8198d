//! The regulator's totals across projects: each project's totals in the order given, and the
//! line of all of them, summed exactly in whole grams.

use super::{ProjectFigures, ProjectTotals, TotalsLine, ViewError};
use crate::accounting::conservative::DeductionRule;

/// Every project's totals and the line of all of them.
#[derive(Debug, Clone, PartialEq)]
pub struct AcrossProjects {
    pub each: Vec<ProjectTotals>,
    pub all: TotalsLine,
}

/// Why the totals across projects cannot be given.
#[derive(Debug)]
pub enum AcrossError {
    /// A project's figures do not check out.
    View(ViewError),
    /// The sum leaves the range of whole grams the ledger counts in (each project stays within
    /// [`crate::quantity::Mass::LIMIT`]; many such projects need not).
    OutOfRange,
}

/// The totals of `views` under `deduction`, and their sum.
pub fn across(
    views: &[ProjectFigures],
    deduction: DeductionRule,
) -> Result<AcrossProjects, AcrossError> {
    let mut all = TotalsLine::default();
    let mut each = Vec::with_capacity(views.len());
    for v in views {
        let totals = v.totals(deduction).map_err(AcrossError::View)?;
        all = all
            .checked_add(&totals.total)
            .ok_or(AcrossError::OutOfRange)?;
        each.push(totals);
    }
    Ok(AcrossProjects { each, all })
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::accounting::project_view::{ProjectView, Registrations};
    use crate::ledger::{Entry, EntryKind, Method, Period, Project, Reading};
    use crate::quantity::Mass;
    use chrono::{DateTime, NaiveDate};

    /// A saline-aquifer project that injected `grams` in January 2026.
    fn injected(grams: i64) -> ProjectFigures {
        let project = Project::example("P", Method::SalineAquifer);
        let registrations = Registrations {
            project,
            sites: vec![],
            settings: vec![],
            feedstocks: vec![],
            evidence: vec![],
        };
        let mut view = ProjectView::new(registrations, None).unwrap();
        let day = |d| NaiveDate::from_ymd_opt(2026, 1, d).unwrap();
        let period = Period::new(day(1), day(31)).unwrap();
        let (project, site, at) = ("P".into(), "W".into(), DateTime::UNIX_EPOCH);
        let mass = Mass::from_grams(grams);
        let kind = EntryKind::Injection;
        let e = Entry::draft(kind, project, site, period, Reading::default(), mass, at);
        view.add(&e).unwrap();
        view.finish().unwrap()
    }

    #[test]
    fn the_line_of_all_adds_each_projects_total() {
        let views = [injected(5_000_000), injected(7_000_000)];
        let a = across(&views, DeductionRule::WholeUncertainty).unwrap();
        assert_eq!(a.each.len(), 2);
        assert_eq!(a.all.injected, Mass::from_grams(12_000_000));
        assert_eq!(a.all.stored.figures()[0], Mass::from_grams(12_000_000));
    }

    #[test]
    fn a_sum_past_whole_grams_is_refused_not_wrapped() {
        let views: Vec<_> = (0..10).map(|_| injected(Mass::LIMIT.grams())).collect();
        let e = across(&views, DeductionRule::WholeUncertainty).unwrap_err();
        assert!(matches!(e, AcrossError::OutOfRange), "{e:?}");
    }
}
