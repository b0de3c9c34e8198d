//! A meter-day counts once: a planned meter-day the ledger already counts is refused, or, when
//! the file is to replace the earlier export, becomes a correction of the entry it replaces.

use super::meter_day::MeterDay;
use crate::ledger::Entry;
use chrono::NaiveDate;
use std::collections::HashMap;

/// A meter-day of the file that an earlier entry already covers.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct Overlap {
    pub meter: String,
    pub day: NaiveDate,
    pub seq: u64,
    /// The file the earlier entry came from, when it was imported.
    pub earlier_file: Option<String>,
}

impl std::fmt::Display for Overlap {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        write!(
            f,
            "meter {} on {} is seq {}",
            self.meter, self.day, self.seq
        )?;
        match &self.earlier_file {
            Some(file) => write!(f, " (from {file})"),
            None => write!(f, " (recorded by hand)"),
        }
    }
}

/// The meter-days the ledger counts now, by (meter, day): the entry that counts each.
pub type Covered = HashMap<(String, NaiveDate), (u64, Option<String>)>;

/// The first and last day of a plan's meter-days; None for a plan of none.
pub fn span(days: &[MeterDay]) -> Option<(NaiveDate, NaiveDate)> {
    let first = days.iter().map(|d| d.day).min()?;
    Some((first, days.iter().map(|d| d.day).max()?))
}

/// Which entry each of a plan's meter-days replaces. Without `replace`, any meter-day already
/// covered refuses the file (all the overlaps are returned, in day order); with it, each covered
/// one is to be a correction of the entry that counts it.
pub fn corrections(
    days: &[MeterDay],
    covered: &Covered,
    replace: bool,
) -> Result<Vec<Option<u64>>, Vec<Overlap>> {
    if covered.is_empty() {
        // A first import of these days: nothing to look up a million times.
        return Ok(vec![None; days.len()]);
    }
    let found: Vec<Option<&(u64, Option<String>)>> = days
        .iter()
        .map(|d| covered.get(&(d.meter.to_string(), d.day)))
        .collect();
    if !replace && found.iter().any(Option::is_some) {
        return Err(days
            .iter()
            .zip(&found)
            .filter_map(|(d, f)| {
                f.map(|(seq, file)| Overlap {
                    meter: d.meter.to_string(),
                    day: d.day,
                    seq: *seq,
                    earlier_file: file.clone(),
                })
            })
            .collect());
    }
    Ok(found.iter().map(|f| f.map(|(seq, _)| *seq)).collect())
}

/// An effective entry recorded by hand over an imported meter-day: it no longer equals the
/// readings of the file behind the line.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct HandCorrection {
    pub seq: u64,
    pub meter: String,
    pub day: NaiveDate,
    /// The imported entry the line started from, and its file.
    pub imported_seq: u64,
    pub file: String,
}

impl HandCorrection {
    /// Whether `e` may be one: an entry without a file that corrects another.
    pub fn candidate(e: &Entry) -> bool {
        e.evidence.is_none() && e.corrects.is_some()
    }

    /// `hand`, a correction by hand of a line that began with `imported`.
    pub fn of(hand: &Entry, imported: &Entry) -> HandCorrection {
        HandCorrection {
            seq: hand.seq,
            meter: hand.meter.clone().unwrap_or_default(),
            day: hand.period.from,
            imported_seq: imported.seq,
            file: imported
                .evidence
                .as_ref()
                .map_or_else(String::new, |ev| ev.file_name.clone()),
        }
    }
}

impl std::fmt::Display for HandCorrection {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        write!(
            f,
            "meter {} on {}: seq {} is a correction by hand of imported seq {}, so it no longer equals the readings of {}",
            self.meter, self.day, self.seq, self.imported_seq, self.file
        )
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn day(d: u32, meter: &str) -> MeterDay {
        MeterDay::new(
            NaiveDate::from_ymd_opt(2026, 2, d).unwrap(),
            "TF-I1".into(),
            meter.into(),
            d as u64 + 1,
        )
    }

    #[test]
    fn a_covered_meter_day_is_refused_or_corrected() {
        let days = [day(1, "FM-101"), day(2, "FM-101"), day(2, "FM-102")];
        let mut covered = Covered::new();
        covered.insert(
            (
                "FM-101".into(),
                NaiveDate::from_ymd_opt(2026, 2, 2).unwrap(),
            ),
            (7, Some("feb.csv".into())),
        );
        let refused = corrections(&days, &covered, false).unwrap_err();
        assert_eq!(refused.len(), 1);
        assert_eq!(
            refused[0].to_string(),
            "meter FM-101 on 2026-02-02 is seq 7 (from feb.csv)"
        );
        assert_eq!(
            corrections(&days, &covered, true).unwrap(),
            [None, Some(7), None]
        );
    }
}
