//! Seals: an entry that closes a reporting period with the RFC 6962 tree head over every entry
//! before it and the period's figures as reported. Once a period is sealed, anything dated in it
//! is refused, or recorded as a late adjustment dated in the current period that names the
//! sealed one, so the sealed figures never change.

use super::entry::{Entry, EntryKind, Reading};
use super::hash::Hash;
use super::period::Period;
use super::reading_fields::checked;
use crate::quantity::Mass;
use chrono::{DateTime, NaiveDate, Utc};
use std::fmt;

/// The figures a seal fixes: what the period's reports stated when it was sealed.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
pub struct Figures {
    pub stored: Mass,
    pub conservative: Mass,
    pub claimable: Mass,
}

/// A seal as its entry holds it.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct Seal {
    pub seq: u64,
    /// The period as given: `2026`, `2026-Q1` or `2026-03`.
    pub label: String,
    pub period: Period,
    /// Leaves under the head: the entries with seq 0 .. tree_size − 1.
    pub tree_size: u64,
    pub root: Hash,
    pub figures: Figures,
    pub recorded_at: DateTime<Utc>,
}

/// Parses a reporting period: a year (`2026`), a quarter (`2026-Q1`) or a month (`2026-03`).
pub fn parse_period(text: &str) -> Result<(String, Period), String> {
    let bad = || "is not a year (2026), a quarter (2026-Q1) or a month (2026-03)".to_string();
    let t = text.trim();
    let (year, rest) = t.split_once('-').unwrap_or((t, ""));
    if year.len() != 4 || !year.bytes().all(|b| b.is_ascii_digit()) {
        return Err(bad());
    }
    let y: i32 = year.parse().map_err(|_| bad())?;
    let (first, last) = match rest {
        "" => (1, 12),
        q if q.len() == 2 && q.starts_with('Q') => match q[1..].parse::<u32>() {
            Ok(n @ 1..=4) => (3 * n - 2, 3 * n),
            _ => return Err(bad()),
        },
        m if m.len() == 2 && m.bytes().all(|b| b.is_ascii_digit()) => match m.parse::<u32>() {
            Ok(n @ 1..=12) => (n, n),
            _ => return Err(bad()),
        },
        _ => return Err(bad()),
    };
    let from = NaiveDate::from_ymd_opt(y, first, 1).ok_or_else(bad)?;
    let after = if last == 12 {
        NaiveDate::from_ymd_opt(y + 1, 1, 1)
    } else {
        NaiveDate::from_ymd_opt(y, last + 1, 1)
    };
    let to = after.and_then(|d| d.pred_opt()).ok_or_else(bad)?;
    Ok((t.to_string(), Period { from, to }))
}

impl Seal {
    /// The entry that records this seal (its seq is given by the append).
    pub fn entry(&self, project: &str) -> Entry {
        let mut reading = Reading::default();
        reading.push("period", &self.label);
        reading.push("tree_size", self.tree_size.to_string());
        reading.push("root", self.root.to_hex());
        reading.push("stored_g", self.figures.stored.grams().to_string());
        reading.push(
            "conservative_g",
            self.figures.conservative.grams().to_string(),
        );
        reading.push("claimable_g", self.figures.claimable.grams().to_string());
        let mut e = Entry::draft(
            EntryKind::Seal,
            project.to_string(),
            String::new(),
            self.period,
            reading,
            Mass::ZERO,
            self.recorded_at,
        );
        e.seq = self.seq;
        e.key = format!("seal-{}", self.label);
        e
    }

    /// Reads a seal back from its entry; a field that does not read is named.
    pub fn from_entry(e: &Entry) -> Result<Seal, String> {
        let field = |name: &str| {
            e.reading
                .get(name)
                .ok_or_else(|| format!("seal entry has no {name}"))
        };
        let int = |name: &str| -> Result<i64, String> {
            field(name)?
                .parse::<i64>()
                .map_err(|_| format!("seal {name} is not a whole number"))
        };
        let label = field("period")?.to_string();
        let (_, period) = parse_period(&label).map_err(|e| format!("seal period {label:?} {e}"))?;
        if period != e.period {
            return Err(format!("seal period {label} differs from the entry's days"));
        }
        let root = Hash::from_hex(field("root")?).ok_or("seal root is not 64 hex digits")?;
        Ok(Seal {
            seq: e.seq,
            label,
            period,
            tree_size: u64::try_from(int("tree_size")?).map_err(|_| "seal tree_size < 0")?,
            root,
            figures: Figures {
                stored: Mass::from_grams(int("stored_g")?),
                conservative: Mass::from_grams(int("conservative_g")?),
                claimable: Mass::from_grams(int("claimable_g")?),
            },
            recorded_at: e.recorded_at,
        })
    }
}

fn overlaps(a: Period, b: Period) -> bool {
    a.from <= b.to && b.from <= a.to
}

/// The seal whose period shares a day with `p`, if any.
pub fn covering(seals: &[Seal], p: Period) -> Option<&Seal> {
    seals.iter().find(|s| overlaps(s.period, p))
}

/// Why something dated in a sealed period was not recorded.
#[derive(Debug, Clone, PartialEq, Eq)]
pub enum SealRefusal {
    /// Dated in a sealed period and not given as late.
    Sealed {
        label: String,
        seq: u64,
        days: Period,
    },
    /// Given as late, but today also falls in a sealed period.
    TodaySealed { label: String, seq: u64 },
    /// Late corrections are kept as differences, which only grams read straight from a meter
    /// allow; entries that reports recompute from their readings cannot take one.
    NoLateDifference { kind: EntryKind },
    /// A new seal would overlap one recorded before.
    Overlap { label: String, seq: u64 },
    /// A setting would take effect inside a sealed period.
    Backdated {
        from: NaiveDate,
        label: String,
        seq: u64,
    },
}

impl fmt::Display for SealRefusal {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            Self::Sealed { label, seq, days } => write!(
                f,
                "{days} falls in period {label}, sealed by seq {seq}; nothing written"
            ),
            Self::TodaySealed { label, seq } => write!(
                f,
                "today falls in period {label}, sealed by seq {seq}, so a late adjustment has no open period to go to"
            ),
            Self::NoLateDifference { kind } => write!(
                f,
                "a late correction of a {kind} entry cannot be kept as a difference (its reports recompute it from the reading)"
            ),
            Self::Overlap { label, seq } => {
                write!(f, "overlaps period {label}, sealed by seq {seq}")
            }
            Self::Backdated { from, label, seq } => write!(
                f,
                "would take effect from {from}, inside period {label} sealed by seq {seq}; a setting never reaches back into a sealed period, not even as a late adjustment"
            ),
        }
    }
}

/// The kinds whose grams are the metered quantity itself, so a late correction can be kept as
/// the difference it makes.
fn takes_late_difference(kind: EntryKind) -> bool {
    matches!(
        kind,
        EntryKind::Injection
            | EntryKind::Receipt
            | EntryKind::Redelivery
            | EntryKind::Production
            | EntryKind::Leakage
            | EntryKind::EquipmentLeak
            | EntryKind::Emission
            | EntryKind::Reversal
    )
}

/// What a late correction replaces: the entry it names and what that entry counts for now
/// (its grams plus the late differences recorded against it before).
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct Replaced {
    pub seq: u64,
    pub period: Period,
    pub counted: Mass,
}

/// Admits an entry (a record, or a correction of `replaced`) against the project's seals. Outside
/// every sealed period it is kept as it is. Inside one it is refused unless `late`; a late entry
/// is dated `today`, names the sealed period and keeps its own days in its reading, and a late
/// correction becomes the difference it makes (its grams less what the replaced entry counts
/// for), so the sealed period's figures stay as they were sealed.
pub fn admit(
    seals: &[Seal],
    mut entry: Entry,
    replaced: Option<Replaced>,
    late: bool,
    today: NaiveDate,
) -> Result<Entry, SealRefusal> {
    let hit =
        covering(seals, entry.period).or_else(|| replaced.and_then(|r| covering(seals, r.period)));
    let Some(seal) = hit else {
        return Ok(entry);
    };
    if !late {
        return Err(SealRefusal::Sealed {
            label: seal.label.clone(),
            seq: seal.seq,
            days: replaced.map_or(entry.period, |r| r.period),
        });
    }
    if let Some(open) = covering(seals, Period::day(today)) {
        return Err(SealRefusal::TodaySealed {
            label: open.label.clone(),
            seq: open.seq,
        });
    }
    entry.reading.push("late_for", &seal.label);
    entry
        .reading
        .push("late_from", entry.period.from.to_string());
    entry.reading.push("late_to", entry.period.to.to_string());
    if let Some(r) = replaced {
        if !takes_late_difference(entry.kind) {
            return Err(SealRefusal::NoLateDifference { kind: entry.kind });
        }
        entry.reading.push("late_replaces", r.seq.to_string());
        entry
            .reading
            .push("late_replaced_g", r.counted.grams().to_string());
        entry.mass = entry.mass - r.counted;
        entry.corrects = None;
    }
    entry.period = Period::day(today);
    Ok(entry)
}

/// Admits a setting taking effect `from` a day, recorded `today`. One backdated reaches into
/// every day from its date to today, so none of them may be sealed; one taking effect today or
/// later is refused in a sealed period as an entry would be.
pub fn admit_setting(
    seals: &[Seal],
    from: NaiveDate,
    today: NaiveDate,
    late: bool,
) -> Result<(), SealRefusal> {
    if from < today {
        return match covering(seals, Period { from, to: today }) {
            None => Ok(()),
            Some(s) => Err(SealRefusal::Backdated {
                from,
                label: s.label.clone(),
                seq: s.seq,
            }),
        };
    }
    match covering(seals, Period::day(from)) {
        None => Ok(()),
        Some(s) if late => Err(SealRefusal::TodaySealed {
            label: s.label.clone(),
            seq: s.seq,
        }),
        Some(s) => Err(SealRefusal::Sealed {
            label: s.label.clone(),
            seq: s.seq,
            days: Period::day(from),
        }),
    }
}

/// Whether an entry is a late adjustment, and of which sealed period.
pub fn late_for(e: &Entry) -> Option<&str> {
    e.reading.late_for()
}

/// The seq a late correction replaces, if the entry is one.
pub fn late_replaces(e: &Entry) -> Option<u64> {
    checked(e.reading.late_replaces())
}

/// Checks a new seal's period against the seals before it.
pub fn check_new(seals: &[Seal], period: Period) -> Result<(), SealRefusal> {
    match covering(seals, period) {
        Some(s) => Err(SealRefusal::Overlap {
            label: s.label.clone(),
            seq: s.seq,
        }),
        None => Ok(()),
    }
}

#[cfg(test)]
pub(crate) mod tests {
    use super::*;

    fn d(s: &str) -> NaiveDate {
        super::super::period::parse_date(s).unwrap()
    }

    /// A seal of period `label` at `seq` over `seq` entries, with made-up root and figures.
    pub(crate) fn seal(label: &str, seq: u64) -> Seal {
        let (label, period) = parse_period(label).unwrap();
        Seal {
            seq,
            label,
            period,
            tree_size: seq,
            root: Hash::of(b"r"),
            figures: Figures {
                stored: Mass::from_grams(10),
                conservative: Mass::from_grams(9),
                claimable: Mass::from_grams(8),
            },
            recorded_at: DateTime::UNIX_EPOCH,
        }
    }

    fn injection(from: &str, to: &str, grams: i64) -> Entry {
        let mut e = seal("2026", 0).entry("TFS");
        e.kind = EntryKind::Injection;
        e.site = "TF-I1".into();
        e.reading = Reading::default();
        e.period = Period::new(d(from), d(to)).unwrap();
        e.mass = Mass::from_grams(grams);
        e.sign = crate::ledger::Sign::Adds;
        e
    }

    #[test]
    fn periods_parse_to_their_days() {
        let p = |s| parse_period(s).map(|(_, p)| (p.from.to_string(), p.to.to_string()));
        assert_eq!(p("2026"), Ok(("2026-01-01".into(), "2026-12-31".into())));
        assert_eq!(p("2026-Q1"), Ok(("2026-01-01".into(), "2026-03-31".into())));
        assert_eq!(p("2026-Q4"), Ok(("2026-10-01".into(), "2026-12-31".into())));
        assert_eq!(p("2028-02"), Ok(("2028-02-01".into(), "2028-02-29".into())));
        for bad in [
            "26",
            "2026-Q5",
            "2026-Q0",
            "2026-13",
            "2026-1",
            "2026-03-01",
            "",
            "x026",
        ] {
            assert!(parse_period(bad).is_err(), "{bad}");
        }
    }

    #[test]
    fn a_seal_reads_back_from_its_entry() {
        let s = seal("2026-Q2", 7);
        let mut e = s.entry("TFS");
        assert_eq!(Seal::from_entry(&e), Ok(s));
        e.reading.0[2].1 = "zz".into();
        assert!(Seal::from_entry(&e).unwrap_err().contains("root"));
    }

    #[test]
    fn entries_in_sealed_periods_are_refused_or_late() {
        let seals = [seal("2026", 40)];
        let today = d("2027-02-10");
        let outside = injection("2027-01-01", "2027-01-31", 5);
        assert_eq!(
            admit(&seals, outside.clone(), None, false, today),
            Ok(outside)
        );

        let inside = injection("2026-12-20", "2027-01-05", 5);
        let refused = admit(&seals, inside.clone(), None, false, today).unwrap_err();
        assert!(
            refused.to_string().contains("sealed by seq 40"),
            "{refused}"
        );

        let late = admit(&seals, inside, None, true, today).unwrap();
        assert_eq!(late.period, Period::day(today));
        assert_eq!(late_for(&late), Some("2026"));
        assert_eq!(
            late.reading
                .day("late_from")
                .map(|d| d.map(|d| d.to_string())),
            Ok(Some("2026-12-20".into()))
        );
        assert_eq!(late.mass, Mass::from_grams(5));

        let sealed_today = [seal("2027-02", 50)];
        let e = injection("2027-02-01", "2027-02-05", 5);
        assert!(matches!(
            admit(&sealed_today, e, None, true, today),
            Err(SealRefusal::TodaySealed { .. })
        ));
    }

    #[test]
    fn a_late_correction_is_the_difference_it_makes() {
        let seals = [seal("2026", 40)];
        let today = d("2027-02-10");
        let mut fix = injection("2026-03-01", "2026-03-31", 900);
        fix.corrects = Some(3);
        let replaced = Replaced {
            seq: 3,
            period: fix.period,
            counted: Mass::from_grams(1000),
        };
        assert!(admit(&seals, fix.clone(), Some(replaced), false, today).is_err());
        let late = admit(&seals, fix.clone(), Some(replaced), true, today).unwrap();
        assert_eq!(late.mass, Mass::from_grams(-100));
        assert_eq!(late.corrects, None);
        assert_eq!(late_replaces(&late), Some(3));
        // Moving a sealed entry's days out of the sealed period is still a late correction.
        fix.period = Period::day(d("2027-01-02"));
        assert!(admit(&seals, fix.clone(), Some(replaced), false, today).is_err());
        fix.kind = EntryKind::SoilSample;
        assert_eq!(
            admit(&seals, fix, Some(replaced), true, today),
            Err(SealRefusal::NoLateDifference {
                kind: EntryKind::SoilSample
            })
        );
    }

    #[test]
    fn seals_do_not_overlap() {
        let seals = [seal("2026-Q1", 10)];
        assert!(check_new(&seals, parse_period("2026-Q2").unwrap().1).is_ok());
        assert!(check_new(&seals, parse_period("2026-03").unwrap().1).is_err());
        assert!(check_new(&seals, parse_period("2026").unwrap().1).is_err());
    }
}
