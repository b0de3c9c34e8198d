//! Meter exports as CSV: a header row naming the columns, one reading per row. Each row is
//! validated and converted to grams of CO2 on its own; a bad row is reported with its line.

use crate::accounting::metering::Basis;
use crate::error::{Error, Result};
use crate::quantity::mass::round_half_even_f64;
use crate::quantity::volume::{DensityMethod, StandardVolume};
use crate::quantity::{Decimal, Fraction, MassUnit};
use chrono::{DateTime, NaiveDate};
use std::collections::HashMap;
use std::fmt;
use std::path::Path;

use super::csv_lines::{CsvError, Lines};

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

/// A row refused, with its line in the file.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct RowError {
    pub line: u64,
    pub why: String,
}

impl fmt::Display for RowError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        write!(f, "line {}: {}", self.line, self.why)
    }
}

/// One accepted reading: where it came from and the grams of CO2 it comes to.
#[derive(Debug, Clone, PartialEq)]
pub struct MeterRow {
    pub line: u64,
    /// The row as written in the file.
    pub raw: String,
    /// The meter's own day: the date of the timestamp in the offset it was written with.
    pub day: NaiveDate,
    pub site: String,
    pub meter: String,
    pub basis: Basis,
    pub volumetric: bool,
    /// What the meter read before the CO2 fraction: grams of stream (mass meters) or standard m³.
    pub read: f64,
    /// The CO2 fraction as a number, to weight a day's mean concentration.
    pub fraction: f64,
    pub grams: i64,
}

/// How one unit of a column's unit text becomes CO2: exact grams for a mass, kg from a density
/// for a standard volume. Worked out once per distinct unit text.
#[derive(Debug, Clone)]
enum UnitFactor {
    Mass(Decimal),
    Volume { kg_per_unit: f64, m3_per_unit: f64 },
}

struct Converter {
    density: DensityMethod,
    units: HashMap<String, std::result::Result<UnitFactor, String>>,
}

impl Converter {
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
                let m = v.mass(density).map_err(|e| format!("unit {unit:?}: {e}"))?;
                Ok(UnitFactor::Volume {
                    kg_per_unit: m.kg,
                    m3_per_unit: m.m3,
                })
            })
            .clone()
    }
}

/// A timestamp with its offset (RFC 3339, `T` or space) or a bare date; the meter's day.
fn day_of(text: &str) -> std::result::Result<NaiveDate, String> {
    if let Ok(t) = DateTime::parse_from_rfc3339(text) {
        return Ok(t.date_naive());
    }
    if let Ok(d) = NaiveDate::parse_from_str(text, "%Y-%m-%d") {
        return Ok(d);
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

fn convert(
    line: u64,
    raw: &str,
    fields: [&str; 7],
    conv: &mut Converter,
) -> std::result::Result<MeterRow, String> {
    let [taken_at, site, quantity, unit, co2_fraction, basis, meter] = fields;
    if raw.contains('\0') {
        return Err("the row holds a NUL character".into());
    }
    let day = day_of(taken_at)?;
    if site.is_empty() {
        return Err("site is empty".into());
    }
    let q = Decimal::parse(quantity).map_err(|e| format!("quantity {quantity:?}: {e}"))?;
    if q.to_f64() < 0.0 {
        return Err(format!("quantity {quantity:?}: must not be negative"));
    }
    let f =
        Fraction::parse(co2_fraction).map_err(|e| format!("co2_fraction {co2_fraction:?}: {e}"))?;
    let factor = conv.factor(unit)?;
    let volumetric = matches!(factor, UnitFactor::Volume { .. });
    let basis = match (basis, volumetric) {
        ("", false) | ("mass", false) => Basis::Mass,
        ("", true) | ("mol", true) => Basis::Mol,
        ("mol", false) => {
            return Err(format!(
                "basis \"mol\" with mass unit {unit:?}: a mass reading needs its CO2 mass fraction (or record it with --impurities)"
            ));
        }
        ("mass", true) => {
            return Err(format!(
                "basis \"mass\" with volume unit {unit:?}: a volumetric reading's CO2 fraction is by volume (mol)"
            ));
        }
        (other, _) => return Err(format!("basis {other:?}: use mass or mol")),
    };
    let read = match factor {
        UnitFactor::Mass(g) => q.checked_mul(g).map_or(f64::INFINITY, Decimal::to_f64),
        UnitFactor::Volume { m3_per_unit, .. } => q.to_f64() * m3_per_unit,
    };
    let grams = match factor {
        UnitFactor::Mass(g) => q
            .checked_mul(g)
            .and_then(|x| x.checked_mul(f.value()))
            .and_then(Decimal::round_half_even)
            .ok_or_else(|| format!("quantity {quantity:?}: too large"))?,
        UnitFactor::Volume { kg_per_unit, .. } => {
            let g = q.to_f64() * kg_per_unit * 1000.0 * f.to_f64();
            if !g.is_finite() || g > 9.0e18 {
                return Err(format!("quantity {quantity:?}: too large"));
            }
            round_half_even_f64(g)
        }
    };
    Ok(MeterRow {
        line,
        raw: raw.to_string(),
        day,
        site: site.to_string(),
        meter: if meter.is_empty() {
            site.to_string()
        } else {
            meter.to_string()
        },
        basis,
        volumetric,
        read,
        fraction: f.to_f64(),
        grams,
    })
}

/// Streams the rows of `path` to `each`, in file order; `progress` gets the bytes read so far.
/// A row that cannot be read or converted is passed as a RowError; a file whose header lacks a
/// column is refused as a whole.
pub fn for_each_row(
    path: &Path,
    columns: &ColumnMap,
    density: DensityMethod,
    mut each: impl FnMut(std::result::Result<MeterRow, RowError>) -> Result<()>,
    mut progress: impl FnMut(u64),
) -> Result<()> {
    let file_field = |e: &dyn fmt::Display| Error::field("FILE", &path.display().to_string(), e);
    let file = std::fs::File::open(path).map_err(|e| file_field(&e))?;
    let mut lines = Lines::new(std::io::BufReader::with_capacity(1 << 16, file));
    let headers: Vec<String> = match lines.next_record() {
        None => return Err(file_field(&"is empty: a header row is needed")),
        Some(Err(e)) => return Err(file_field(&e)),
        Some(Ok(r)) => r.fields().iter().map(|h| h.trim().to_string()).collect(),
    };
    let find = |ours: &str| headers.iter().position(|h| *h == columns.0[ours]);
    let mut index = [0usize; 7];
    for (i, col) in REQUIRED.iter().enumerate() {
        index[i] = find(col).ok_or_else(|| {
            file_field(&format!(
                "the header has no column {:?} for {col} (headers: {}; map others with --columns {col}=NAME)",
                columns.0[*col],
                headers.join(", ")
            ))
        })?;
    }
    for (i, col) in OPTIONAL.iter().enumerate() {
        index[5 + i] = find(col).unwrap_or(usize::MAX);
    }
    let mut conv = Converter {
        density,
        units: HashMap::new(),
    };
    let mut n = 0u64;
    while let Some(record) = lines.next_record() {
        let record = match record {
            Ok(r) => r,
            Err(CsvError::Io(e)) => return Err(file_field(&e)),
            Err(
                e @ (CsvError::Encoding { line }
                | CsvError::UnclosedQuote { line }
                | CsvError::AfterQuote { line }),
            ) => {
                each(Err(RowError {
                    line,
                    why: format!("unreadable CSV: {e}"),
                }))?;
                continue;
            }
        };
        let get = |i: usize| record.field(i).trim();
        let fields = index.map(get);
        each(
            convert(record.line, &record.raw, fields, &mut conv).map_err(|why| RowError {
                line: record.line,
                why,
            }),
        )?;
        n += 1;
        if n.is_multiple_of(65_536) {
            progress(lines.bytes);
        }
    }
    Ok(())
}

#[cfg(test)]
mod tests {
    use super::*;

    fn conv() -> Converter {
        Converter {
            density: DensityMethod::Eos,
            units: HashMap::new(),
        }
    }

    fn row(fields: [&str; 7]) -> std::result::Result<MeterRow, String> {
        convert(2, "", fields, &mut conv())
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
        assert_eq!(r.grams, 1_231_742_500);
        assert_eq!(r.day, NaiveDate::from_ymd_opt(2026, 1, 5).unwrap());
        assert_eq!(r.basis, Basis::Mass);
    }

    #[test]
    fn days_follow_the_written_offset() {
        assert_eq!(
            day_of("2026-01-05T23:30:00-05:00").unwrap(),
            NaiveDate::from_ymd_opt(2026, 1, 5).unwrap()
        );
        assert_eq!(
            day_of("2026-01-05 23:30:00Z").unwrap(),
            NaiveDate::from_ymd_opt(2026, 1, 5).unwrap()
        );
        assert_eq!(
            day_of("2026-01-05").unwrap(),
            NaiveDate::from_ymd_opt(2026, 1, 5).unwrap()
        );
        assert!(
            day_of("2026-01-05T06:00:00")
                .unwrap_err()
                .contains("no UTC offset")
        );
        assert!(day_of("05/01/2026").is_err());
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
        let mut c = Converter {
            density: DensityMethod::Regulatory,
            units: HashMap::new(),
        };
        let r = convert(
            3,
            "",
            ["2026-01-05", "W", "100", "Mscf", "0.99", "", ""],
            &mut c,
        )
        .unwrap();
        let expected = 100.0 * 1000.0 * 0.028316846592 * 1.8682 * 1000.0 * 0.99;
        assert_eq!(r.grams, round_half_even_f64(expected));
        assert!(r.volumetric);
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
