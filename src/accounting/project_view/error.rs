//! Why a project's figures cannot be given: a stored value that no longer decodes (the ledger is
//! inconsistent), or evidence the route's method cannot read.

use crate::accounting::tracer::TracerError;
use crate::accounting::weathering::campaign::CampaignError;
use crate::ledger::EntryKind;
use std::fmt;

#[derive(Debug, Clone, PartialEq)]
pub enum ViewError {
    /// A stored reading that does not decode into the fields its kind records.
    Undecodable {
        project: String,
        seq: u64,
        kind: EntryKind,
        what: String,
    },
    /// The evidence read before the fold (calibrations, tracer samples) is not what the fold
    /// met among the entries: the ledger changed under the read, or its rows disagree.
    EvidenceDiffers { project: String, what: String },
    /// A registered feedstock whose stored analysis no longer reads.
    Feedstock {
        project: String,
        code: String,
        what: String,
    },
    /// A project setting whose stored value no longer reads, or no longer applies.
    Setting { project: String, what: String },
    /// The soil campaigns cannot be read with the settings given.
    Campaign(CampaignError),
    /// The tracer campaigns cannot be applied.
    Tracer(TracerError),
}

impl ViewError {
    /// Whether the error says the ledger itself is inconsistent (rather than the evidence
    /// falling short of what the method needs).
    pub fn is_inconsistency(&self) -> bool {
        match self {
            ViewError::Undecodable { .. }
            | ViewError::EvidenceDiffers { .. }
            | ViewError::Feedstock { .. }
            | ViewError::Setting { .. } => true,
            ViewError::Campaign(e) => matches!(e, CampaignError::UnknownFeedstock { .. }),
            ViewError::Tracer(_) => false,
        }
    }
}

impl fmt::Display for ViewError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            ViewError::Undecodable {
                project,
                seq,
                kind,
                what,
            } => write!(
                f,
                "project {project} seq {seq}: stored {kind} reading: {what}"
            ),
            ViewError::EvidenceDiffers { project, what } => write!(
                f,
                "project {project}: the calibrations and tracer samples read by kind differ from its chain at {what}"
            ),
            ViewError::Feedstock {
                project,
                code,
                what,
            } => write!(f, "feedstock {code} of project {project}: {what}"),
            ViewError::Setting { project, what } => {
                write!(f, "settings of project {project}: {what}")
            }
            ViewError::Campaign(e) => write!(f, "{e}"),
            ViewError::Tracer(e) => write!(f, "{e}"),
        }
    }
}

impl std::error::Error for ViewError {}
