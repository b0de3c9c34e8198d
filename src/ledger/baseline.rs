//! A field's baseline soil core is its soil before any feedstock: no baseline may be dated on
//! or after a spreading of the field, whichever of the two is recorded first.

use super::entry::Entry;
use chrono::NaiveDate;

/// The recorded entry a new record's date conflicts with: its date and seq.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct Conflict {
    pub date: NaiveDate,
    pub seq: u64,
}

impl Conflict {
    fn of(e: &Entry) -> Conflict {
        Conflict {
            date: e.period.from,
            seq: e.seq,
        }
    }
}

/// A spreading on `date` is refused by the field's first baseline core (in seq order) dated
/// on or after it; `cores` are the field's effective soil samples.
pub fn spreading_before_baselines(cores: &[Entry], date: NaiveDate) -> Result<(), Conflict> {
    match cores
        .iter()
        .filter(|e| e.reading.flag("baseline"))
        .find(|e| e.period.from >= date)
    {
        Some(b) => Err(Conflict::of(b)),
        None => Ok(()),
    }
}

/// A baseline core on `date` is refused by the field's earliest spreading on or before it;
/// `spread` are the field's effective applications.
pub fn baseline_before_spreadings(spread: &[Entry], date: NaiveDate) -> Result<(), Conflict> {
    match spread
        .iter()
        .filter(|e| e.period.from <= date)
        .min_by_key(|e| e.period.from)
    {
        Some(first) => Err(Conflict::of(first)),
        None => Ok(()),
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::ledger::tests::fixture;
    use crate::ledger::{EntryKind, Period, Reading};

    fn day(s: &str) -> NaiveDate {
        NaiveDate::parse_from_str(s, "%Y-%m-%d").unwrap()
    }

    fn on(seq: u64, kind: EntryKind, date: &str, baseline: bool) -> Entry {
        let mut reading = Reading::default();
        if baseline {
            reading.push("baseline", "yes");
        }
        Entry {
            kind,
            period: Period::day(day(date)),
            reading,
            ..fixture(seq)
        }
    }

    #[test]
    fn a_spreading_may_not_come_on_or_before_a_baseline() {
        let cores = [
            on(1, EntryKind::SoilSample, "2026-03-01", false),
            on(2, EntryKind::SoilSample, "2026-03-10", true),
            on(3, EntryKind::SoilSample, "2026-03-20", true),
        ];
        assert_eq!(
            spreading_before_baselines(&cores, day("2026-03-21")),
            Ok(())
        );
        assert_eq!(
            spreading_before_baselines(&cores, day("2026-03-11")).map_err(|c| c.seq),
            Err(3)
        );
        assert_eq!(
            spreading_before_baselines(&cores, day("2026-03-10")),
            Err(Conflict {
                date: day("2026-03-10"),
                seq: 2
            })
        );
        assert_eq!(
            spreading_before_baselines(&cores, day("2026-01-01")).map_err(|c| c.seq),
            Err(2)
        );
    }

    #[test]
    fn a_baseline_may_not_follow_the_first_spreading() {
        let spread = [
            on(4, EntryKind::Application, "2026-05-01", false),
            on(5, EntryKind::Application, "2026-04-01", false),
        ];
        assert_eq!(
            baseline_before_spreadings(&spread, day("2026-03-31")),
            Ok(())
        );
        assert_eq!(
            baseline_before_spreadings(&spread, day("2026-06-01")),
            Err(Conflict {
                date: day("2026-04-01"),
                seq: 5
            })
        );
    }
}
