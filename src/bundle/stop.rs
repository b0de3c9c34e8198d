//! Where an export stops: at a seal the user names (its entries and the registrations recorded
//! by its time), or at the chain's end.

use crate::ledger::SealedEntry;
use chrono::{DateTime, Utc};

/// The last seq a bundle holds, the time registrations are taken at (None: all), and the
/// seals it holds.
pub struct Stop {
    pub last: u64,
    pub until: Option<DateTime<Utc>>,
    pub seals: Vec<u64>,
}

impl Stop {
    /// Whether a row recorded at `t` was held when the export's seal was recorded.
    pub fn holds(&self, t: DateTime<Utc>) -> bool {
        self.until.is_none_or(|u| t <= u)
    }
}

/// The stop for `asked` among a project's seal entries `all`; the error says why the seq is
/// not a seal of project `code`.
pub fn stop_at(all: &[SealedEntry], asked: Option<u64>, code: &str) -> Result<Stop, String> {
    let (last, until) = match asked {
        None => (u64::MAX, None),
        Some(n) => {
            let seal = all.iter().find(|s| s.entry.seq == n).ok_or_else(|| {
                let seqs: Vec<String> = all.iter().map(|s| s.entry.seq.to_string()).collect();
                format!(
                    "is not the seq of a seal of project {code} (its seals: {})",
                    if seqs.is_empty() {
                        "none".to_string()
                    } else {
                        seqs.join(", ")
                    }
                )
            })?;
            (n, Some(seal.entry.recorded_at))
        }
    };
    let seals = all
        .iter()
        .map(|s| s.entry.seq)
        .filter(|&s| s <= last)
        .collect();
    Ok(Stop { last, until, seals })
}
