//! A meter-day counts once: a planned meter-day the ledger already counts is refused, or, when
//! the file is to replace the earlier export, becomes a correction of the entry it replaces.

use super::meter_day::{MeterDay, Source};
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

/// The entries a plan's meter-days become. Without `replace`, any meter-day already covered
/// refuses the file (all the overlaps are returned, in day order); with it, each covered one
/// becomes a correction of the entry that counts it, giving the file as the reason.
pub fn entries(
    days: &[MeterDay],
    source: &Source<'_>,
    covered: &Covered,
    replace: bool,
) -> Result<Vec<Entry>, Vec<Overlap>> {
    let overlaps: Vec<Overlap> = days
        .iter()
        .filter_map(|d| {
            covered
                .get(&(d.meter.clone(), d.day))
                .map(|(seq, file)| Overlap {
                    meter: d.meter.clone(),
                    day: d.day,
                    seq: *seq,
                    earlier_file: file.clone(),
                })
        })
        .collect();
    if !overlaps.is_empty() && !replace {
        return Err(overlaps);
    }
    let reason = format!(
        "replaced by the meter export {} (SHA-256 {})",
        source.file_name,
        source.sha256.to_hex()
    );
    Ok(days
        .iter()
        .map(|d| {
            let mut e = d.entry(source);
            if let Some((seq, _)) = covered.get(&(d.meter.clone(), d.day)) {
                e.corrects = Some(*seq);
                e.reason = Some(reason.clone());
            }
            e
        })
        .collect())
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::ledger::{EntryKind, Hash};
    use crate::quantity::volume::DensityMethod;

    fn day(d: u32, meter: &str) -> MeterDay {
        MeterDay::new(
            NaiveDate::from_ymd_opt(2026, 2, d).unwrap(),
            "TF-I1",
            meter,
            d as u64 + 1,
        )
    }

    fn source() -> Source<'static> {
        Source {
            project: "TFS",
            kind: EntryKind::Injection,
            file_name: "feb-resent.csv",
            sha256: Hash::GENESIS,
            density: DensityMethod::Eos,
            recorded_at: chrono::DateTime::UNIX_EPOCH,
        }
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
        let refused = entries(&days, &source(), &covered, false).unwrap_err();
        assert_eq!(refused.len(), 1);
        assert_eq!(
            refused[0].to_string(),
            "meter FM-101 on 2026-02-02 is seq 7 (from feb.csv)"
        );
        let new = entries(&days, &source(), &covered, true).unwrap();
        assert_eq!(
            new.iter().map(|e| e.corrects).collect::<Vec<_>>(),
            [None, Some(7), None]
        );
        assert!(
            new[1]
                .reason
                .as_deref()
                .unwrap()
                .contains("feb-resent.csv (SHA-256 0000")
        );
        assert_eq!(new[0].reason, None);
    }
}
