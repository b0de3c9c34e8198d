//! One append decided from what the chain holds: the few rows its rules read (filled by the
//! store inside the write transaction) and the rules, checked in the order a refusal is named.

use super::append::{AppendError, Appended, SealRule, append, within_limit};
use super::correction::CorrectionError;
use super::entry::{Entry, SealedEntry};
use super::hash::Hash;
use super::project::{Project, Site};
use super::seal::{Replaced, Seal};
use super::tally::Tally;
use chrono::NaiveDate;

/// What the rules of one append read: O(1) rows of the project's chain.
#[derive(Debug, Clone)]
pub struct AppendReads {
    pub project: Project,
    /// The entry's site, when it names one.
    pub site: Option<Site>,
    /// The running figures at the chain tip.
    pub tally: Tally,
    pub seals: Vec<Seal>,
    /// What a correction replaces, and the entry it names.
    pub target: Option<(Replaced, Entry)>,
    /// The entry that already holds the entry's idempotency key.
    pub holder: Option<SealedEntry>,
    /// The chain tip's next seq and chain hash.
    pub tip: (u64, Hash),
}

impl AppendReads {
    /// What `admitted` takes the place of in the figures: the entry a correction names; a late
    /// correction is a difference of its own and replaces nothing it counts.
    pub fn replaced_for(&self, admitted: &Entry) -> Vec<Entry> {
        (self.target.iter())
            .filter(|_| admitted.corrects.is_some())
            .map(|t| t.1.clone())
            .collect()
    }
}

/// Why an entry cannot be appended, before or by the append's own rules.
#[derive(Debug, Clone, PartialEq, Eq)]
pub enum AdmitError {
    /// No project is registered under the entry's code.
    NoProject(String),
    /// The entry's site is not a site of its project.
    NoSuchSite { project: String, site: String },
    /// The entry a correction names cannot be corrected.
    Target(TargetError),
    /// The project's entries would sum beyond the largest mass the ledger keeps.
    Limit(AppendError),
    /// The append's own rules refuse the entry.
    Append(AppendError),
}

/// Why the entry a correction names (`seq`) cannot be replaced.
#[derive(Debug, Clone, PartialEq, Eq)]
pub enum TargetError {
    /// No such entry, or one already corrected.
    Uncorrectable { seq: u64, why: CorrectionError },
    /// A late difference against `first`: correct that one.
    LateDifference { seq: u64, first: u64 },
}

/// Appends `entry` by the rules over `reads`: the mass limit first, then site, key and seals.
pub fn admit(
    entry: Entry,
    reads: &AppendReads,
    late: bool,
    today: NaiveDate,
) -> Result<Appended, AdmitError> {
    within_limit(reads.tally.magnitude, std::slice::from_ref(&entry)).map_err(AdmitError::Limit)?;
    let rule = SealRule {
        seals: &reads.seals,
        late,
        today,
        replaced: reads.target.as_ref().map(|t| t.0),
    };
    append(
        entry,
        reads.site.as_ref(),
        reads.tip,
        reads.holder.clone(),
        rule,
    )
    .map_err(AdmitError::Append)
}
