//! Corrections: a new entry names the entry it replaces; reports read the latest of each line.

use super::entry::{Entry, SealedEntry};

/// Why a correction cannot be recorded.
#[derive(Debug, Clone, PartialEq, Eq)]
pub enum CorrectionError {
    NoSuchSeq(u64),
    AlreadyCorrected { seq: u64, by: u64 },
}

impl std::fmt::Display for CorrectionError {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        match self {
            Self::NoSuchSeq(s) => write!(f, "there is no entry with seq {s} in this project"),
            Self::AlreadyCorrected { seq, by } => {
                write!(
                    f,
                    "seq {seq} was already corrected by seq {by}; correct seq {by} instead"
                )
            }
        }
    }
}

/// The entry a correction of `seq` would replace, checked: it exists and is the latest of its line.
pub fn target(entries: &[SealedEntry], seq: u64) -> Result<&Entry, CorrectionError> {
    let found = entries
        .get(usize::try_from(seq).unwrap_or(usize::MAX))
        .map(|s| &s.entry);
    let by = entries
        .iter()
        .find(|s| s.entry.corrects == Some(seq))
        .map(|s| s.entry.seq);
    checked_target(found, seq, by)
}

/// The rule behind [`target`], for an entry looked up by its seq: `found` is the entry at `seq`
/// and `corrected_by` the first entry that corrects it, if any.
pub fn checked_target(
    found: Option<&Entry>,
    seq: u64,
    corrected_by: Option<u64>,
) -> Result<&Entry, CorrectionError> {
    let t = found.ok_or(CorrectionError::NoSuchSeq(seq))?;
    match corrected_by {
        Some(by) => Err(CorrectionError::AlreadyCorrected { seq, by }),
        None => Ok(t),
    }
}

/// The seq of the entry that replaces each entry, if any.
pub fn superseded_by(entries: &[SealedEntry]) -> Vec<Option<u64>> {
    let mut by = vec![None; entries.len()];
    for s in entries {
        if let Some(t) = s.entry.corrects.and_then(|t| usize::try_from(t).ok())
            && let Some(slot) = by.get_mut(t)
        {
            *slot = Some(s.entry.seq);
        }
    }
    by
}

/// The entries reports count: every entry that no later entry replaces.
pub fn effective(entries: &[SealedEntry]) -> impl Iterator<Item = &Entry> {
    let by = superseded_by(entries);
    entries
        .iter()
        .zip(by)
        .filter(|(_, b)| b.is_none())
        .map(|(s, _)| &s.entry)
}
