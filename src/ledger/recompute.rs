//! Imported meter-days recomputed (`reconcile --recompute`): each entry that counts one
//! meter's day of an imported file — not a survey, not a correction — against what the kept
//! file's readings of that meter-day add up to when read again.

use super::{Entry, EntryKind};
use std::collections::HashMap;

/// What one kept file's readings of one meter-day add up to, read again from its bytes.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct ReadingTotal {
    pub file_sha256: String,
    pub meter: String,
    pub day: String,
    pub grams: i64,
    pub rows: i64,
}

/// An imported meter-day's entry recomputed: its meter and day, and its readings' grams and
/// rows when they were found.
#[derive(Debug, PartialEq, Eq)]
pub struct Recomputed<'e> {
    pub meter: &'e str,
    pub day: String,
    pub found: Option<(i64, i64)>,
}

/// The totals by (file SHA-256, meter, day), which the entries are looked up in as the chain
/// streams by.
pub struct Recompute<'a> {
    by: HashMap<(&'a str, &'a str, &'a str), &'a ReadingTotal>,
}

impl<'a> Recompute<'a> {
    pub fn new(totals: &'a [ReadingTotal]) -> Self {
        let by = totals
            .iter()
            .map(|t| {
                (
                    (t.file_sha256.as_str(), t.meter.as_str(), t.day.as_str()),
                    t,
                )
            })
            .collect();
        Recompute { by }
    }

    /// Entry `e` recomputed, when it counts a meter-day of an imported file.
    pub fn entry<'e>(&self, e: &'e Entry) -> Option<Recomputed<'e>> {
        let (Some(sha), Some(meter)) = (e.reading.text("file_sha256"), e.meter.as_deref()) else {
            return None;
        };
        if e.kind == EntryKind::Survey || e.corrects.is_some() {
            return None;
        }
        let day = e.period.from.to_string();
        let found = self
            .by
            .get(&(sha, meter, day.as_str()))
            .map(|r| (r.grams, r.rows));
        Some(Recomputed { meter, day, found })
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::ledger::seal::tests::seal;

    /// An injection of meter FM-1 on 2026-01-01 from the file with SHA-256 "ab".
    fn imported() -> Entry {
        let mut e = Entry {
            kind: EntryKind::Injection,
            meter: Some("FM-1".into()),
            ..seal("2026-01", 0).entry("TFS")
        };
        e.reading.push("file_sha256", "ab");
        e
    }

    #[test]
    fn an_imported_meter_day_is_found_by_file_meter_and_day() {
        let totals = [ReadingTotal {
            file_sha256: "ab".into(),
            meter: "FM-1".into(),
            day: "2026-01-01".into(),
            grams: 7,
            rows: 2,
        }];
        let r = Recompute::new(&totals);
        let e = imported();
        let found = r.entry(&e).unwrap();
        assert_eq!((found.meter, found.found), ("FM-1", Some((7, 2))));
        let other_file = Recompute::new(&[]);
        assert_eq!(other_file.entry(&e).unwrap().found, None);
        let correction = Entry {
            corrects: Some(0),
            ..imported()
        };
        assert_eq!(r.entry(&correction), None);
        let by_hand = Entry {
            meter: None,
            ..imported()
        };
        assert_eq!(r.entry(&by_hand), None);
    }
}
