//! A meter's day rolled up from its rows, in whole units, and the ledger entry it becomes.

use super::meter_csv::{MeterRow, Metered};
use crate::ledger::{Entry, EntryKind, Evidence, Hash, Period, Reading};
use crate::quantity::Mass;
use crate::quantity::volume::DensityMethod;
use chrono::{DateTime, NaiveDate, Utc};
use std::collections::BTreeMap;
use std::sync::Arc;

/// One meter's readings of one day. Every sum is of integers, so it does not depend on the
/// order of the rows.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct MeterDay {
    pub day: NaiveDate,
    /// Shared by every day of the meter: a file may hold a million meter-days.
    pub site: Arc<str>,
    pub meter: Arc<str>,
    pub co2: Mass,
    pub rows: u64,
    pub first_line: u64,
    pub last_line: u64,
    stream_grams: i64,
    volume_cm3: i64,
    /// The reference conditions of the day's volumes: one meter-day is one kind of reading.
    conditions: Option<Arc<str>>,
    weighted_fraction: i128,
}

/// What every entry of one import shares.
pub struct Source<'a> {
    pub project: &'a str,
    pub kind: EntryKind,
    pub file_name: &'a str,
    pub sha256: Hash,
    pub density: DensityMethod,
    pub recorded_at: DateTime<Utc>,
    /// The registry role appending (None in a ledger file).
    pub recorded_by: Option<String>,
    /// The SHA-256 in hex, as every entry's reading, key and reason name it: formatted once.
    sha256_hex: String,
}

impl<'a> Source<'a> {
    pub fn new(project: &'a str, kind: EntryKind, file_name: &'a str, sha256: Hash) -> Self {
        Source {
            project,
            kind,
            file_name,
            sha256,
            density: DensityMethod::Eos,
            recorded_at: DateTime::UNIX_EPOCH,
            recorded_by: None,
            sha256_hex: sha256.to_hex(),
        }
    }
}

impl MeterDay {
    pub fn new(day: NaiveDate, site: Arc<str>, meter: Arc<str>, line: u64) -> Self {
        MeterDay {
            day,
            site,
            meter,
            co2: Mass::ZERO,
            rows: 0,
            first_line: line,
            last_line: line,
            stream_grams: 0,
            volume_cm3: 0,
            conditions: None,
            weighted_fraction: 0,
        }
    }

    /// Why `r` cannot join this day, if it cannot: a meter-day is one kind of reading — mass,
    /// or volume at one set of reference conditions — so its sum and its mean concentration
    /// are of like quantities.
    pub fn mismatch(&self, r: &MeterRow<'_>) -> Option<String> {
        let here = match (&r.metered, &self.conditions) {
            _ if self.rows == 0 => return None,
            (Metered::StreamGrams(_), None) => return None,
            (Metered::VolumeCm3(_, c), Some(day)) if c == day => return None,
            (Metered::StreamGrams(_), Some(_)) => "mass".to_string(),
            (Metered::VolumeCm3(_, c), _) => format!("volumes at {c}"),
        };
        Some(format!(
            "meter {} on {} reads {} in earlier rows (line {}), here {here}",
            self.meter,
            self.day,
            match &self.conditions {
                Some(c) => format!("volumes at {c}"),
                None => "mass".into(),
            },
            self.first_line
        ))
    }

    /// Adds a row; None when a sum would leave the ledger's range.
    pub fn add(&mut self, r: &MeterRow<'_>) -> Option<()> {
        self.co2 = self.co2.checked_add(r.co2).filter(|m| m.within_limit())?;
        match &r.metered {
            Metered::StreamGrams(g) => {
                self.stream_grams = self.stream_grams.checked_add(*g)?;
            }
            Metered::VolumeCm3(v, c) => {
                self.volume_cm3 = self.volume_cm3.checked_add(*v)?;
                self.conditions = Some(c.clone());
            }
        }
        self.weighted_fraction = self.weighted_fraction.checked_add(r.weighted_fraction)?;
        self.rows += 1;
        self.first_line = self.first_line.min(r.line);
        self.last_line = self.last_line.max(r.line);
        Some(())
    }

    fn meter_type(&self) -> &'static str {
        if self.conditions.is_some() {
            "volumetric"
        } else {
            "mass"
        }
    }

    /// The entry's reading: the file, its lines and what the meter read that day.
    pub fn reading(&self, s: &Source<'_>) -> Reading {
        let mut r = Reading::default();
        r.push("source", "meter import");
        r.push("file", s.file_name);
        r.push("file_sha256", s.sha256_hex.as_str());
        r.push("lines", format!("{}-{}", self.first_line, self.last_line));
        r.push("readings", self.rows.to_string());
        r.push("meter_type", self.meter_type());
        if self.conditions.is_none() {
            r.push("mass", Mass::from_grams(self.stream_grams).to_string());
        }
        if let Some(c) = &self.conditions {
            r.push("volume_m3", millionths(i128::from(self.volume_cm3)));
            r.push("reference_conditions", c.as_ref());
        }
        let read = i128::from(self.stream_grams) + i128::from(self.volume_cm3);
        if read > 0 {
            // Σ read × fraction × 10⁶ over Σ read, to six decimals, rounded half to even.
            let mean = div_half_even(self.weighted_fraction, read);
            r.push("co2_fraction_mean", millionths(mean));
        }
        r.push("density_method", s.density.name());
        r
    }

    /// The meter-day as a new entry (its seq is set on append), or as a correction of entry
    /// `corrects`, giving the file as the reason. The key names the file and the meter-day, so
    /// the same file cannot add it twice.
    pub fn entry(&self, s: &Source<'_>, corrects: Option<u64>) -> Entry {
        Entry {
            project: s.project.to_string(),
            seq: 0,
            kind: s.kind,
            site: self.site.to_string(),
            period: Period::day(self.day),
            reading: self.reading(s),
            mass: self.co2,
            sign: s.kind.sign(),
            recorded_at: s.recorded_at,
            key: format!("import-{}-{}-{}", &s.sha256_hex[..16], self.meter, self.day),
            meter: Some(self.meter.to_string()),
            note: None,
            corrects,
            reason: corrects.map(|_| {
                format!(
                    "replaced by the meter export {} (SHA-256 {})",
                    s.file_name, s.sha256_hex
                )
            }),
            evidence: Some(Evidence {
                file_name: s.file_name.to_string(),
                sha256: s.sha256,
            }),
            recorded_by: s.recorded_by.clone(),
        }
    }
}

/// The meter-days as the permit check reads new entries (kind, day, grams): one entry per day,
/// its grams summed exactly, so the check holds a day's figure, not a million entries. None
/// when a day's sum leaves i64.
pub fn permit_entries(days: &[MeterDay], s: &Source<'_>) -> Option<Vec<Entry>> {
    let mut by_day: BTreeMap<NaiveDate, (&MeterDay, Mass)> = BTreeMap::new();
    for d in days {
        let (_, sum) = by_day.entry(d.day).or_insert((d, Mass::ZERO));
        *sum = sum.checked_add(d.co2)?;
    }
    Some(
        by_day
            .into_values()
            .map(|(d, mass)| Entry {
                mass,
                reading: Reading::default(),
                ..d.entry(s, None)
            })
            .collect(),
    )
}

/// `n / d` rounded half to even (d > 0).
fn div_half_even(n: i128, d: i128) -> i128 {
    let (q, r) = (n.div_euclid(d), n.rem_euclid(d));
    match (2 * r).cmp(&d) {
        std::cmp::Ordering::Greater => q + 1,
        std::cmp::Ordering::Equal if q % 2 != 0 => q + 1,
        _ => q,
    }
}

/// An integer count of millionths as a decimal with six places: 2831684659 → "2831.684659".
fn millionths(n: i128) -> String {
    let sign = if n < 0 { "-" } else { "" };
    let a = n.unsigned_abs();
    format!("{sign}{}.{:06}", a / 1_000_000, a % 1_000_000)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::accounting::metering::Basis;

    fn row(line: u64, metered: Metered, weighted: i128, grams: i64) -> MeterRow<'static> {
        MeterRow {
            line,
            day: NaiveDate::from_ymd_opt(2026, 1, 5).unwrap(),
            instant: 0,
            site: "TF-I1",
            meter: "FM-101",
            basis: Basis::Mass,
            metered,
            weighted_fraction: weighted,
            co2: Mass::from_grams(grams),
        }
    }

    #[test]
    fn sums_are_exact_and_the_mean_is_weighted_by_what_was_read() {
        let mut d = MeterDay::new(
            row(4, Metered::StreamGrams(0), 0, 0).day,
            "TF-I1".into(),
            "FM-101".into(),
            4,
        );
        // 500 g at 0.985 and 1500 g at 0.995: mean (492.5 + 1492.5) / 2000 = 0.9925.
        d.add(&row(4, Metered::StreamGrams(500), 492_500_000, 492))
            .unwrap();
        d.add(&row(2, Metered::StreamGrams(1500), 1_492_500_000, 1492))
            .unwrap();
        let s = Source::new("TFS", EntryKind::Injection, "a.csv", Hash::GENESIS);
        let r = d.reading(&s);
        assert_eq!(r.get("lines"), Some("2-4"));
        assert_eq!(r.get("co2_fraction_mean"), Some("0.992500"));
        assert_eq!(
            r.get("mass"),
            Some(Mass::from_grams(2000).to_string().as_str())
        );
        assert_eq!(d.co2.grams(), 1984);
        assert!(
            d.add(&row(5, Metered::StreamGrams(i64::MAX), 0, 1))
                .is_none()
        );
    }

    #[test]
    fn millionths_and_rounding() {
        assert_eq!(millionths(2_831_684_659), "2831.684659");
        assert_eq!(millionths(5), "0.000005");
        assert_eq!(div_half_even(5, 2), 2);
        assert_eq!(div_half_even(7, 2), 4);
        assert_eq!(div_half_even(8, 3), 3);
    }
}
