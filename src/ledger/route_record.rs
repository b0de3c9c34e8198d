//! What a record of one storage route needs of the ledger before it is appended (a tracer
//! sample, a carbonation batch, a spreading, a soil core): a project of the route's method, a
//! correction naming an earlier entry of the same kind, and the site registered.

use super::correction::CorrectionError;
use super::entry::{Entry, EntryKind};
use super::project::{Method, Project, Site};

/// Why a route's record does not fit what the ledger holds.
#[derive(Debug, Clone, PartialEq, Eq)]
pub enum ContextError {
    /// Entries of the kind belong to projects of method `wants`; the project's is `has`.
    Method { has: Method, wants: Method },
    /// The entry a correction names (`seq`) cannot be corrected.
    Target { seq: u64, why: CorrectionError },
    /// The entry a correction names (`seq`) is of another kind, `is`.
    TargetKind { seq: u64, is: EntryKind },
    /// The project has no such site.
    NoSite,
}

/// The method of the projects that keep entries of `kind`, for the kinds of one route only.
pub fn route_method(kind: EntryKind) -> Option<Method> {
    match kind {
        EntryKind::TracerSample => Some(Method::BasaltMineralization),
        EntryKind::Carbonation => Some(Method::ExSituMineralization),
        EntryKind::Application | EntryKind::SoilSample => Some(Method::EnhancedWeathering),
        _ => None,
    }
}

/// The record's site, when a record of `kind` fits: `project` is of the kind's route (when it
/// has one), the correction's `target` (its seq and what the ledger holds there) is of the same
/// kind, and `site` is registered; checked in that order.
pub fn context(
    project: &Project,
    kind: EntryKind,
    target: Option<(u64, Result<Entry, CorrectionError>)>,
    site: Option<Site>,
) -> Result<Site, ContextError> {
    if let Some(wants) = route_method(kind)
        && wants != project.method
    {
        return Err(ContextError::Method {
            has: project.method,
            wants,
        });
    }
    if let Some((seq, target)) = target {
        let t = target.map_err(|why| ContextError::Target { seq, why })?;
        if t.kind != kind {
            return Err(ContextError::TargetKind { seq, is: t.kind });
        }
    }
    site.ok_or(ContextError::NoSite)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::ledger::SiteKind;
    use crate::ledger::tests::{fixture, project};
    use chrono::DateTime;

    fn well() -> Site {
        Site {
            project: "CRB".into(),
            code: "CR-M1".into(),
            kind: SiteKind::MonitoringWell,
            area: None,
            uncertainty: None,
            registered_at: DateTime::UNIX_EPOCH,
        }
    }

    fn entry(kind: EntryKind) -> Entry {
        Entry { kind, ..fixture(3) }
    }

    #[test]
    fn a_record_fits_its_route_its_correction_and_its_site() {
        let sample = EntryKind::TracerSample;
        assert_eq!(route_method(sample), Some(Method::BasaltMineralization));
        assert_eq!(route_method(EntryKind::Injection), None);
        let basalt = project(Method::BasaltMineralization);
        let same = Some((3, Ok(entry(EntryKind::TracerSample))));
        assert_eq!(context(&basalt, sample, same, Some(well())), Ok(well()));
        assert_eq!(
            context(&project(Method::Eor), sample, None, Some(well())),
            Err(ContextError::Method {
                has: Method::Eor,
                wants: Method::BasaltMineralization
            })
        );
        let other = Some((3, Ok(entry(EntryKind::Injection))));
        assert_eq!(
            context(&basalt, sample, other, Some(well())),
            Err(ContextError::TargetKind {
                seq: 3,
                is: EntryKind::Injection
            })
        );
        let gone = Some((9, Err(CorrectionError::NoSuchSeq(9))));
        assert!(matches!(
            context(&basalt, sample, gone, None),
            Err(ContextError::Target { seq: 9, .. })
        ));
        assert_eq!(
            context(&basalt, sample, None, None),
            Err(ContextError::NoSite)
        );
    }
}
