//! Permits: cumulative stored against the permitted capacity and a year's injection against an
//! annual maximum, checked before new entries are written.

use crate::accounting::balance::{BalanceMethod, balance};
use crate::error::{Error, Result};
use crate::ledger::correction::effective;
use crate::ledger::period::Grouping;
use crate::ledger::{Entry, Project, SealedEntry};
use crate::quantity::Mass;
use crate::report::render::tonnes_text;
use chrono::Datelike;
use std::collections::BTreeSet;

/// Checks the ledger as it would be with `new` appended: past 100 % of the permitted capacity,
/// or past the annual maximum, it is refused unless `over_permit` acknowledges it (the ledger
/// records what happened); past 90 % it warns. Returns the warnings.
pub fn check(
    project: &Project,
    entries: &[SealedEntry],
    new: &[Entry],
    over_permit: bool,
) -> Result<Vec<String>> {
    let replaced: std::collections::HashSet<u64> = new.iter().filter_map(|e| e.corrects).collect();
    let mut after: Vec<Entry> = effective(entries)
        .filter(|e| !replaced.contains(&e.seq))
        .cloned()
        .collect();
    after.extend_from_slice(new);
    let lines = balance(
        project,
        after.iter(),
        Grouping::Year,
        BalanceMethod::Rr,
        &|_| 0.0,
    );
    let mut warnings = Vec::new();
    let mut exceeded = Vec::new();
    if let Some(cap) = project.permit_capacity.filter(|c| c.is_positive()) {
        let stored = lines.last().map_or(Mass::ZERO, |l| l.cumulative_stored);
        let pct = 100.0 * stored.grams() as f64 / cap.grams() as f64;
        if stored > cap {
            exceeded.push(format!(
                "cumulative stored {} t would be {pct:.2} % of the permitted capacity {} t",
                tonnes_text(stored),
                tonnes_text(cap)
            ));
        } else if pct > 90.0 {
            warnings.push(format!(
                "project {} has used {pct:.2} % of its permitted capacity",
                project.code
            ));
        }
    }
    if let Some(max) = project.permit_annual {
        let years: BTreeSet<i32> = new.iter().map(|e| e.period.to.year()).collect();
        for year in years {
            let injected = lines
                .iter()
                .find(|l| l.bucket.year == year)
                .map_or(Mass::ZERO, |l| l.terms.injected);
            if injected > max {
                exceeded.push(format!(
                    "injection in {year} would be {} t, above the permitted annual maximum {} t",
                    tonnes_text(injected),
                    tonnes_text(max)
                ));
            }
        }
    }
    if !exceeded.is_empty() && !over_permit {
        return Err(Error::Refused(format!(
            "project {}: {}; nothing written (record it with --over-permit: the ledger keeps what happened, and every report flags it)",
            project.code,
            exceeded.join("; ")
        )));
    }
    warnings.extend(
        exceeded
            .into_iter()
            .map(|e| format!("recorded over the permit: {e}")),
    );
    Ok(warnings)
}
