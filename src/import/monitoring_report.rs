//! A monitoring report: the figures an independent report gives, one per CSV line, read with
//! the file's line numbers and hashed as read.

use super::csv_records::Records;
use crate::accounting::materiality::{Figure, ReportedQuantity, ReportingPeriod};
use crate::error::{Error, Result};
use crate::ledger::Hash;
use crate::quantity::{Decimal, Mass, MassUnit};
use std::path::Path;

/// A report's figure: `1234.5 t`, `0 t`, `-3 kt` (a number and a mass unit).
fn report_mass(line: u64, value: &str, unit: &str) -> Result<Mass> {
    let bad = |why: String| Error::input(format!("report line {line}"), why);
    let n = Decimal::parse(value).map_err(|e| bad(format!("value {value:?}: {e}")))?;
    let u = MassUnit::from_symbol(unit)
        .ok_or_else(|| bad(format!("unit {unit:?} is not a mass unit")))?;
    n.checked_mul(u.grams_per_unit())
        .and_then(Decimal::round_half_even)
        .map(Mass::from_grams)
        .ok_or_else(|| bad(format!("value {value:?}: too large")))
}

/// A monitoring report as read: its figures, and the SHA-256 of its bytes (what a recorded
/// reconciliation names it by).
pub struct MonitoringReport {
    pub name: String,
    pub sha256: Hash,
    pub figures: Vec<Figure>,
}

/// Reads the monitoring report at `path` (columns period, quantity, value, unit in any order);
/// a bad line is refused naming it.
pub fn read(path: &Path) -> Result<MonitoringReport> {
    let file_field =
        |e: &dyn std::fmt::Display| Error::field("REPORT", &path.display().to_string(), e);
    // A monitoring report is a page of figures: read whole, hashed as read.
    let bytes = std::fs::read(path).map_err(|e| file_field(&e))?;
    let mut lines = Records::new(&bytes[..]);
    let header: Vec<String> = match lines.next_record() {
        Some(Ok(r)) => r.fields().iter().map(|f| f.trim().to_string()).collect(),
        Some(Err(e)) => return Err(file_field(&e)),
        None => {
            return Err(file_field(
                &"is empty: a header row period,quantity,value,unit is needed",
            ));
        }
    };
    let col = |name: &str| {
        header.iter().position(|h| h == name).ok_or_else(|| {
            file_field(&format!(
                "the header has no column {name:?} (headers: {})",
                header.join(", ")
            ))
        })
    };
    let (p, q, v, u) = (
        col("period")?,
        col("quantity")?,
        col("value")?,
        col("unit")?,
    );
    let mut figures = Vec::new();
    while let Some(r) = lines.next_record() {
        let r = r.map_err(|e| file_field(&e))?;
        let f = |i: usize| r.field(i).unwrap_or("\u{fffd}").trim();
        let period: ReportingPeriod = f(p)
            .parse()
            .map_err(|e| Error::input(format!("report line {}", r.line), format!("period: {e}")))?;
        let quantity: ReportedQuantity = f(q).parse().map_err(|e| {
            Error::input(format!("report line {}", r.line), format!("quantity: {e}"))
        })?;
        figures.push(Figure {
            period,
            quantity,
            mass: report_mass(r.line, f(v), f(u))?,
        });
    }
    if figures.is_empty() {
        return Err(file_field(&"holds no figures"));
    }
    Ok(MonitoringReport {
        name: path.file_name().map_or_else(
            || path.display().to_string(),
            |n| n.to_string_lossy().into_owned(),
        ),
        sha256: Hash::of(&bytes),
        figures,
    })
}
