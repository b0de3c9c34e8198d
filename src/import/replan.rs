//! An imported file read again from the bytes the ledger keeps, with the options it was
//! imported with, as it was read then; a kept file that no longer hashes to its recorded
//! SHA-256 is a ledger inconsistency.

use crate::error::{Error, Result};
use crate::import::meter_csv::ColumnMap;
use crate::import::plan::{Options, Plan, plan};
use crate::ledger::recompute::ReadingTotal;
use crate::ledger::{EntryKind, Site};
use crate::quantity::volume::DensityMethod;
use crate::store::StoredImport;
use chrono::NaiveDate;
use std::collections::HashMap;
use std::io::Read;

/// Re-reads import `i` of `project` as it was read when imported; a kept file that no longer
/// hashes to its recorded SHA-256 is a ledger inconsistency.
pub fn replan(
    bytes: impl Read,
    project: &str,
    sites: &HashMap<String, Site>,
    i: &StoredImport,
    watch: Option<(&str, NaiveDate)>,
) -> Result<Plan> {
    let bad = |what: String| {
        Error::ledger(format!(
            "project {project} import {} ({}): {what}",
            i.id, i.file_name
        ))
    };
    let kind = EntryKind::from_name(&i.kind)
        .ok_or_else(|| bad(format!("kind {:?} is not an entry kind", i.kind)))?;
    let density = match i.density.as_str() {
        "eos" => DensityMethod::Eos,
        "regulatory" => DensityMethod::Regulatory,
        other => return Err(bad(format!("density method {other:?} is not known"))),
    };
    let columns =
        ColumnMap::parse(Some(&i.columns)).map_err(|e| bad(format!("column map: {e}")))?;
    let opts = Options {
        file_name: &i.file_name,
        project,
        kind,
        columns: &columns,
        density,
        sites,
        watch,
    };
    let p = plan(bytes, &opts, |_| true).map_err(|e| bad(e.to_string()))?;
    if p.sha256.to_hex() != i.sha256 {
        return Err(bad(format!(
            "its kept bytes hash to {}, not the recorded {}",
            p.sha256.head(),
            short(&i.sha256)
        )));
    }
    Ok(p)
}

/// What a re-read plan's meter-days add up to, each a total of file `sha256`'s readings.
pub fn plan_totals<'p>(p: &'p Plan, sha256: &'p str) -> impl Iterator<Item = ReadingTotal> + 'p {
    p.days.iter().map(move |d| ReadingTotal {
        file_sha256: sha256.to_string(),
        meter: d.meter.to_string(),
        day: d.day.to_string(),
        grams: d.co2.grams(),
        rows: d.rows as i64,
    })
}

fn short(hex: &str) -> &str {
    hex.get(..12).unwrap_or(hex)
}
