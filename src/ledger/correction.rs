//! Corrections: a new entry names the entry it replaces; reports read the latest of each line.

use super::entry::{Entry, Reading, SealedEntry};
use super::period::Period;
use crate::quantity::Mass;
use chrono::{DateTime, Utc};

/// What a correction says beside its reading: each value left out is the corrected entry's.
#[derive(Debug, Clone, Default)]
pub struct Restating {
    pub site: Option<String>,
    pub meter: Option<String>,
    pub note: Option<String>,
    pub reason: String,
}

/// The correction of `target`: a new entry of its kind that names it, covering `period` with
/// the reading and grams restated, `r`'s values where given and the target's otherwise. It
/// keeps no evidence: a file's bytes stand behind the entry they came with, not its correction.
pub fn correction(
    target: Entry,
    period: Period,
    (reading, mass): (Reading, Mass),
    r: Restating,
    recorded_at: DateTime<Utc>,
) -> Entry {
    Entry {
        seq: 0,
        site: r.site.unwrap_or(target.site.clone()),
        period,
        reading,
        mass,
        recorded_at,
        key: String::new(),
        meter: r.meter.or(target.meter.clone()),
        note: r.note.or(target.note.clone()),
        corrects: Some(target.seq),
        reason: Some(r.reason),
        evidence: None,
        ..target
    }
}

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

#[cfg(test)]
mod tests {
    use super::*;
    use crate::ledger::EntryKind;
    use crate::ledger::period::parse_date;

    #[test]
    fn a_correction_names_its_target_and_carries_over_what_it_does_not_restate() {
        let day = |s| Period::day(parse_date(s).unwrap());
        let mut target = Entry::draft(
            EntryKind::Injection,
            "TFS".into(),
            "TF-I1".into(),
            day("2026-01-05"),
            Reading::default(),
            Mass::from_grams(5),
            DateTime::UNIX_EPOCH,
        );
        (target.seq, target.meter, target.note) = (3, Some("FM-101".into()), Some("n".into()));
        target.key = "k".into();
        let r = Restating {
            note: Some("read again".into()),
            reason: "recalibrated".into(),
            ..Restating::default()
        };
        let now = DateTime::UNIX_EPOCH + chrono::Duration::days(1);
        let read = (Reading::default(), Mass::from_grams(7));
        let c = correction(target, day("2026-01-06"), read, r, now);
        assert_eq!((c.corrects, c.seq, c.key.as_str()), (Some(3), 0, ""));
        assert_eq!(
            (c.site.as_str(), c.meter.as_deref()),
            ("TF-I1", Some("FM-101"))
        );
        assert_eq!(c.note.as_deref(), Some("read again"));
        assert_eq!(c.reason.as_deref(), Some("recalibrated"));
        assert_eq!(
            (c.mass, c.recorded_at, c.kind),
            (Mass::from_grams(7), now, EntryKind::Injection)
        );
    }
}
