//! Which projects a cross-project report covers: by operator (whatever its case), method and
//! permit reference (whatever its case). A filter that matches no project is refused.

use super::Project;
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
