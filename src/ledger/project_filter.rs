//! Which projects a cross-project report covers: by operator (whatever its case), method and
//! permit reference (whatever its case). A filter that matches no project is refused.

use super::Project;
use chrono::{DateTime, Utc};
use std::collections::BTreeSet;

/// The filters given; None lets every project through.
pub struct ProjectFilter<'a> {
    pub operator: Option<&'a str>,
    pub method: Option<&'a str>,
    pub permit: Option<&'a str>,
}

/// A filter that matches no project: the values the ledger knows instead.
pub struct NoMatch {
    /// `operator` or `permit`.
    pub filter: &'static str,
    pub given: String,
    pub known: Vec<String>,
}

impl ProjectFilter<'_> {
    pub fn admits(&self, p: &Project) -> bool {
        self.operator
            .is_none_or(|o| o.eq_ignore_ascii_case(&p.operator))
            && self.method.is_none_or(|m| m == p.method.name())
            && self.permit.is_none_or(|r| {
                p.permit_ref
                    .as_ref()
                    .is_some_and(|p| p.eq_ignore_ascii_case(r))
            })
    }

    /// The projects a report covers: those the filters admit and, for a report as the ledger
    /// held it at `as_of`, registered by then; refused when a filter matches no project at all.
    pub fn chosen(
        &self,
        projects: Vec<Project>,
        as_of: Option<DateTime<Utc>>,
    ) -> Result<Vec<Project>, NoMatch> {
        if let Some(n) = self.unmatched(&projects) {
            return Err(n);
        }
        let held = |p: &Project| as_of.is_none_or(|t| p.registered_at <= t);
        Ok(projects
            .into_iter()
            .filter(|p| held(p) && self.admits(p))
            .collect())
    }

    /// The first filter (operator, then permit) that no project of `projects` matches.
    pub fn unmatched(&self, projects: &[Project]) -> Option<NoMatch> {
        unmatched(projects, "operator", self.operator, |p| {
            Some(p.operator.as_str())
        })
        .or_else(|| unmatched(projects, "permit", self.permit, |p| p.permit_ref.as_deref()))
    }
}

fn unmatched(
    projects: &[Project],
    filter: &'static str,
    given: Option<&str>,
    value: impl Fn(&Project) -> Option<&str>,
) -> Option<NoMatch> {
    let given = given?;
    let known: BTreeSet<&str> = projects.iter().filter_map(&value).collect();
    if known.iter().any(|k| k.eq_ignore_ascii_case(given)) {
        return None;
    }
    Some(NoMatch {
        filter,
        given: given.to_string(),
        known: known.into_iter().map(str::to_string).collect(),
    })
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::ledger::Method;

    fn project(code: &str, operator: &str, registered: &str) -> Project {
        Project {
            code: code.into(),
            name: code.into(),
            method: Method::SalineAquifer,
            operator: operator.into(),
            permit_ref: None,
            permit_capacity: None,
            permit_annual: None,
            registered_at: registered.parse().unwrap(),
        }
    }

    #[test]
    fn a_report_at_a_date_covers_the_admitted_projects_registered_by_then() {
        let projects = vec![
            project("A", "North", "2026-01-01T00:00:00Z"),
            project("B", "north", "2026-06-01T00:00:00Z"),
            project("C", "South", "2026-01-01T00:00:00Z"),
        ];
        let filter = ProjectFilter {
            operator: Some("NORTH"),
            method: None,
            permit: None,
        };
        let as_of = "2026-03-01T00:00:00Z".parse().ok();
        let codes = |ps: Vec<Project>| ps.into_iter().map(|p| p.code).collect::<Vec<_>>();
        let chosen = filter.chosen(projects.clone(), as_of).ok().unwrap();
        assert_eq!(codes(chosen), ["A"]);
        assert_eq!(
            codes(filter.chosen(projects, None).ok().unwrap()),
            ["A", "B"]
        );
    }

    #[test]
    fn a_filter_matching_no_project_is_refused_with_the_known_values() {
        let projects = vec![project("A", "North", "2026-01-01T00:00:00Z")];
        let filter = ProjectFilter {
            operator: Some("West"),
            method: None,
            permit: None,
        };
        let Err(n) = filter.chosen(projects, None) else {
            panic!("a filter matching nothing is refused");
        };
        assert_eq!((n.filter, n.given.as_str()), ("operator", "West"));
        assert_eq!(n.known, ["North"]);
    }
}
