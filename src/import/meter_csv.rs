//! Meter exports as CSV: a header row naming the columns, one reading per row. Each row is
//! validated and converted to grams of CO2 on its own; a bad row is reported with its lines.

use super::csv_records::Record;
use crate::accounting::metering::{Basis, co2_of_stream_kg, co2_of_stream_mass};
use crate::error::{Error, Result};
use crate::quantity::mass::round_half_even_f64;
use crate::quantity::volume::{DensityMethod, StandardVolume, VolumeError};
use crate::quantity::{Decimal, Fraction, Mass, MassUnit};
use chrono::{DateTime, NaiveDate};
use std::collections::HashMap;
use std::fmt;
use std::sync::Arc;

/// The columns sinkbook reads, by their default header names.
const REQUIRED: [&str; 5] = ["timestamp", "site", "quantity", "unit", "co2_fraction"];
const OPTIONAL: [&str; 2] = ["basis", "meter"];

/// Which header names the file uses for sinkbook's columns.
#[derive(Debug, Clone)]
pub struct ColumnMap(HashMap<String, String>);

impl ColumnMap {
    /// From `--columns timestamp=Time,site=Well`: every column not named keeps its default name.
    pub fn parse(text: Option<&str>) -> Result<ColumnMap> {
        let mut map: HashMap<String, String> = REQUIRED
            .iter()
            .chain(&OPTIONAL)
            .map(|c| (c.to_string(), c.to_string()))
            .collect();
        for part in text
            .unwrap_or("")
            .split(',')
            .filter(|p| !p.trim().is_empty())
        {
            let (ours, theirs) = part.split_once('=').ok_or_else(|| {
                Error::field("--columns", part, "write OURS=THEIRS, e.g. quantity=Flow")
            })?;
            let ours = ours.trim();
            if !map.contains_key(ours) {
                return Err(Error::field(
                    "--columns",
                    part,
                    format!(
                        "{ours:?} is not a column (use {})",
                        REQUIRED
                            .iter()
                            .chain(&OPTIONAL)
                            .copied()
                            .collect::<Vec<_>>()
                            .join(", ")
                    ),
                ));
            }
            map.insert(ours.to_string(), theirs.trim().to_string());
        }
        Ok(ColumnMap(map))
    }
}

/// A row refused, with the lines it took in the file.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct RowError {
    pub line: u64,
    pub last_line: u64,
    pub why: String,
}

impl RowError {
    pub fn at(line: u64, why: impl Into<String>) -> Self {
        RowError {
            line,
            last_line: line,
            why: why.into(),
        }
    }

    /// Lines of the file the refused row took.
    pub fn lines(&self) -> u64 {
        self.last_line - self.line + 1
    }
}

impl fmt::Display for RowError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        if self.last_line > self.line {
            write!(f, "lines {}–{}: {}", self.line, self.last_line, self.why)
        } else {
            write!(f, "line {}: {}", self.line, self.why)
        }
    }
}

/// What a meter read before the CO2 fraction, in whole units so a day's sum is exact.
#[derive(Debug, Clone, PartialEq, Eq)]
pub enum Metered {
    /// Grams of stream, from a mass meter.
    StreamGrams(i64),
    /// Cubic centimetres of gas at the unit's reference conditions (as the ledger writes
    /// them), from a volumetric meter.
    VolumeCm3(i64, Arc<str>),
}

/// One accepted reading: where it came from and the grams of CO2 it comes to. Borrows its
/// names from the record it was read from.
#[derive(Debug, Clone, PartialEq)]
pub struct MeterRow<'a> {
    pub line: u64,
    /// The meter's own day: the date of the timestamp in the offset it was written with.
    pub day: NaiveDate,
    /// The instant read, in nanoseconds since 1970 (UTC), to find a reading given twice.
    pub instant: i64,
    pub site: &'a str,
    pub meter: &'a str,
    pub basis: Basis,
    pub metered: Metered,
    /// The metered quantity × CO2 fraction × 10⁶, in the units of `metered`: the weight of
    /// the row in its day's mean concentration.
    pub weighted_fraction: i128,
    pub co2: Mass,
}

/// How one unit of a column's unit text becomes CO2: exact grams for a mass, kg from a density
/// for a standard volume. Worked out once per distinct unit text.
#[derive(Debug, Clone)]
enum UnitFactor {
    Mass(Decimal),
    Volume {
        kg_per_unit: f64,
        m3_per_unit: f64,
        conditions: Arc<str>,
    },
}

/// Turns the fields of a row into a reading, caching each unit's factor.
pub struct Converter {
    density: DensityMethod,
    units: HashMap<String, std::result::Result<UnitFactor, String>>,
}

impl Converter {
    pub fn new(density: DensityMethod) -> Self {
        Converter {
            density,
            units: HashMap::new(),
        }
    }

    fn factor(&mut self, unit: &str) -> std::result::Result<UnitFactor, String> {
        if let Some(f) = self.units.get(unit) {
            return f.clone();
        }
        let density = self.density;
        self.units
            .entry(unit.to_string())
            .or_insert_with(|| {
                if let Some(u) = MassUnit::from_symbol(unit) {
                    return Ok(UnitFactor::Mass(u.grams_per_unit()));
                }
                let v = StandardVolume::parse(&format!("1 {unit}"))
                    .map_err(|e| format!("unit {unit:?}: {e}"))?;
                let m = v.mass(density).map_err(|e| match e {
                    VolumeError::RegulatoryNeedsStandard(_) => {
                        format!("unit {unit:?}: {e} (import it with --density eos)")
                    }
                    e => format!("unit {unit:?}: {e}"),
                })?;
                Ok(UnitFactor::Volume {
                    kg_per_unit: m.kg,
                    m3_per_unit: m.m3,
                    conditions: v.conditions.to_string().into(),
                })
            })
            .clone()
    }

    /// Converts one row's fields (timestamp, site, quantity, unit, co2_fraction, basis, meter).
    pub fn row<'a>(
        &mut self,
        line: u64,
        fields: [&'a str; 7],
    ) -> std::result::Result<MeterRow<'a>, String> {
        let [taken_at, site, quantity, unit, co2_fraction, basis, meter] = fields;
        if fields.iter().any(|f| f.contains('\0')) {
            return Err("the row holds a NUL character".into());
        }
        let (day, instant) = taken(taken_at)?;
        if site.is_empty() {
            return Err("site is empty".into());
        }
        crate::ledger::bounds::text(meter, crate::ledger::bounds::TEXT_MAX)
            .map_err(|e| format!("meter {:?}: {e}", crate::ledger::bounds::shown(meter)))?;
        let q = Decimal::parse(quantity).map_err(|e| format!("quantity {quantity:?}: {e}"))?;
        if q.to_f64() < 0.0 {
            return Err(format!("quantity {quantity:?}: must not be negative"));
        }
        let f = Fraction::parse(co2_fraction)
            .map_err(|e| format!("co2_fraction {co2_fraction:?}: {e}"))?;
        let factor = self.factor(unit)?;
        let basis = row_basis(basis, unit, matches!(factor, UnitFactor::Volume { .. }))?;
        let too_large = || format!("quantity {quantity:?}: too large");
        let (metered, weight, co2) = match factor {
            UnitFactor::Mass(g) => {
                let stream = q.checked_mul(g).ok_or_else(too_large)?;
                let grams = stream.round_half_even().ok_or_else(too_large)?;
                let co2 = co2_of_stream_mass(stream, f).ok_or_else(too_large)?;
                (Metered::StreamGrams(grams), stream.to_f64(), co2)
            }
            UnitFactor::Volume {
                kg_per_unit,
                m3_per_unit,
                conditions,
            } => {
                let cm3 = whole(q.to_f64() * m3_per_unit * 1e6).ok_or_else(too_large)?;
                let co2 = co2_of_stream_kg(q.to_f64() * kg_per_unit, f).ok_or_else(too_large)?;
                (Metered::VolumeCm3(cm3, conditions), cm3 as f64, co2)
            }
        };
        Ok(MeterRow {
            line,
            day,
            instant,
            site,
            meter: if meter.is_empty() { site } else { meter },
            basis,
            metered,
            weighted_fraction: (weight * f.to_f64() * 1e6).round_ties_even() as i128,
            co2,
        })
    }
}

/// A whole number from a converted quantity, when it is within the ledger's range.
fn whole(x: f64) -> Option<i64> {
    (x.is_finite() && x.abs() < 9.0e18).then(|| round_half_even_f64(x))
}

/// The basis column against the unit: mass units take mass fractions, volumes mole fractions.
fn row_basis(basis: &str, unit: &str, volumetric: bool) -> std::result::Result<Basis, String> {
    match (basis, volumetric) {
        ("" | "mass", false) => Ok(Basis::Mass),
        ("" | "mol", true) => Ok(Basis::Mol),
        ("mol", false) => Err(format!(
            "basis \"mol\" with mass unit {unit:?}: a mass reading needs its CO2 mass fraction (or record it with --impurities)"
        )),
        ("mass", true) => Err(format!(
            "basis \"mass\" with volume unit {unit:?}: a volumetric reading's CO2 fraction is by volume (mol)"
        )),
        (other, _) => Err(format!("basis {other:?}: use mass or mol")),
    }
}

/// A timestamp with its offset (RFC 3339, `T` or space) or a bare date: the meter's day and
/// the instant (a bare date is its midnight UTC).
fn taken(text: &str) -> std::result::Result<(NaiveDate, i64), String> {
    let out_of_range = || format!("timestamp {text:?} is outside 1677–2262");
    if let Ok(t) = DateTime::parse_from_rfc3339(text) {
        let nanos = t.timestamp_nanos_opt().ok_or_else(out_of_range)?;
        return Ok((t.date_naive(), nanos));
    }
    if let Ok(d) = NaiveDate::parse_from_str(text, "%Y-%m-%d") {
        let nanos = d
            .and_time(chrono::NaiveTime::MIN)
            .and_utc()
            .timestamp_nanos_opt()
            .ok_or_else(out_of_range)?;
        return Ok((d, nanos));
    }
    if chrono::NaiveDateTime::parse_from_str(text, "%Y-%m-%dT%H:%M:%S").is_ok()
        || chrono::NaiveDateTime::parse_from_str(text, "%Y-%m-%d %H:%M:%S").is_ok()
    {
        return Err(format!(
            "timestamp {text:?} has no UTC offset (write e.g. {text}Z or {text}+01:00)"
        ));
    }
    Err(format!(
        "timestamp {text:?} is not an RFC 3339 time or an ISO 8601 date"
    ))
}

/// Where each of sinkbook's columns sits in a file, from its header row.
#[derive(Debug, Clone, Copy)]
pub struct Layout([usize; 7]);

impl Layout {
    /// Finds the columns in `headers`; a required one missing refuses the file.
    pub fn find(headers: &[String], columns: &ColumnMap) -> std::result::Result<Layout, String> {
        let headers: Vec<&str> = headers.iter().map(|h| h.trim()).collect();
        let find = |ours: &str| headers.iter().position(|h| *h == columns.0[ours]);
        let mut index = [usize::MAX; 7];
        for (i, col) in REQUIRED.iter().enumerate() {
            index[i] = find(col).ok_or_else(|| {
                format!(
                    "the header has no column {:?} for {col} (headers: {}; map others with --columns {col}=NAME)",
                    columns.0[*col],
                    headers.join(", ")
                )
            })?;
        }
        for (i, col) in OPTIONAL.iter().enumerate() {
            index[5 + i] = find(col).unwrap_or(usize::MAX);
        }
        Ok(Layout(index))
    }

    /// The row's fields in sinkbook's order, trimmed; a field that is not UTF-8 refuses it.
    pub fn fields<'r>(&self, r: &'r Record) -> std::result::Result<[&'r str; 7], String> {
        let mut out = [""; 7];
        for (slot, &i) in out.iter_mut().zip(&self.0) {
            *slot = r.field(i).ok_or("the row is not UTF-8 text")?.trim();
        }
        Ok(out)
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn row(fields: [&str; 7]) -> std::result::Result<MeterRow<'_>, String> {
        Converter::new(DensityMethod::Eos).row(2, fields)
    }

    fn day(text: &str) -> std::result::Result<NaiveDate, String> {
        taken(text).map(|(d, _)| d)
    }

    #[test]
    fn mass_rows_are_exact() {
        let r = row([
            "2026-01-05T06:00:00+01:00",
            "TF-I1",
            "1250.5",
            "t",
            "0.985",
            "",
            "FM-101",
        ])
        .unwrap();
        assert_eq!(r.co2.grams(), 1_231_742_500);
        assert_eq!(r.metered, Metered::StreamGrams(1_250_500_000));
        assert_eq!(r.weighted_fraction, 1_231_742_500_000_000);
        assert_eq!(r.day, NaiveDate::from_ymd_opt(2026, 1, 5).unwrap());
        assert_eq!(r.basis, Basis::Mass);
    }

    #[test]
    fn days_follow_the_written_offset() {
        assert_eq!(
            day("2026-01-05T23:30:00-05:00").unwrap(),
            NaiveDate::from_ymd_opt(2026, 1, 5).unwrap()
        );
        assert_eq!(
            day("2026-01-05 23:30:00Z").unwrap(),
            NaiveDate::from_ymd_opt(2026, 1, 5).unwrap()
        );
        assert_eq!(
            day("2026-01-05").unwrap(),
            NaiveDate::from_ymd_opt(2026, 1, 5).unwrap()
        );
        assert!(
            day("2026-01-05T06:00:00")
                .unwrap_err()
                .contains("no UTC offset")
        );
        assert!(day("05/01/2026").is_err());
        assert_eq!(
            taken("2026-01-05T01:00:00+01:00").unwrap().1,
            taken("2026-01-05").unwrap().1
        );
    }

    #[test]
    fn refused_rows_say_why() {
        let bad = |f: [&str; 7], needle: &str| {
            let e = row(f).unwrap_err();
            assert!(e.contains(needle), "{e}");
        };
        bad(
            ["2026-01-05", "W", "1,250.5", "t", "1", "", ""],
            "commas are refused",
        );
        bad(
            ["2026-01-05", "W", "12,5", "t", "1", "", ""],
            "commas are refused",
        );
        bad(
            ["2026-01-05", "W", "-1", "t", "1", "", ""],
            "must not be negative",
        );
        bad(
            ["2026-01-05", "W", "1", "stone", "1", "", ""],
            "unit \"stone\"",
        );
        bad(
            ["2026-01-05", "W", "1", "t", "1.5", "", ""],
            "co2_fraction \"1.5\"",
        );
        bad(
            ["2026-01-05", "W", "1", "t", "0.9", "mol", ""],
            "basis \"mol\" with mass unit",
        );
        bad(
            ["2026-01-05", "W", "1", "Mscf", "0.9", "mass", ""],
            "basis \"mass\" with volume unit",
        );
        bad(["2026-01-05", "", "1", "t", "1", "", ""], "site is empty");
        bad(
            ["2026-01-05", "W", "1", "m3", "1", "", ""],
            "reference conditions",
        );
    }

    #[test]
    fn volume_rows_use_the_density_once_per_unit() {
        let mut c = Converter::new(DensityMethod::Regulatory);
        let r = c
            .row(3, ["2026-01-05", "W", "100", "Mscf", "0.99", "", ""])
            .unwrap();
        let expected = 100.0 * 1000.0 * 0.028316846592 * 1.8682 * 1000.0 * 0.99;
        assert_eq!(r.co2.grams(), round_half_even_f64(expected));
        // 100 Mscf = 2831.6846592 m³ exactly, in cm³.
        assert_eq!(
            r.metered,
            Metered::VolumeCm3(2_831_684_659, "288.706 K, 101.325 kPa".into())
        );
        assert_eq!(c.units.len(), 1);
    }

    #[test]
    fn columns_map() {
        let m = ColumnMap::parse(Some("quantity=Flow, site=Well")).unwrap();
        assert_eq!(m.0["quantity"], "Flow");
        assert_eq!(m.0["unit"], "unit");
        assert!(ColumnMap::parse(Some("volume=V")).is_err());
        assert!(ColumnMap::parse(Some("volume")).is_err());
    }
}
