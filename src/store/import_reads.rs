//! What an import reads of the ledger beside its file, as ledger values: the project's sites by
//! code (which the planner and the re-reading of kept files look rows' sites up in), the
//! meter-days counted already, and the entries its corrections replace.

use super::Tx;
use crate::error::{Error, Result};
use crate::ledger::{Entry, Site};
use chrono::NaiveDate;
use std::collections::HashMap;

/// A meter-day counted: ((meter, day), (seq, evidence file)).
type CountedDay = ((String, NaiveDate), (u64, Option<String>));

impl Tx<'_> {
    /// The project's sites, by code.
    pub fn sites_by_code(&mut self, project: &str) -> Result<HashMap<String, Site>> {
        Ok(self
            .sites(project)?
            .into_iter()
            .map(|s| (s.code.clone(), s))
            .collect())
    }

    /// The meter-days of `span` (first and last day; None for none) that effective entries of
    /// `kind` count already, as ((meter, day), (seq of the entry counting it, the file it came
    /// from if imported)).
    pub fn counted_days(
        &mut self,
        project: &str,
        kind: &str,
        span: Option<(NaiveDate, NaiveDate)>,
    ) -> Result<Vec<CountedDay>> {
        let mut counted = Vec::new();
        let Some((from, to)) = span else {
            return Ok(counted);
        };
        for c in self.covered_days(project, kind, from, to)? {
            let day = NaiveDate::parse_from_str(&c.day, "%Y-%m-%d").map_err(|_| {
                Error::ledger(format!(
                    "project {project} seq {}: period_from {:?} is not a date",
                    c.seq, c.day
                ))
            })?;
            counted.push(((c.meter, day), (c.seq as u64, c.evidence_name)));
        }
        Ok(counted)
    }

    /// The entries at `seqs`, which an import's effective meter-days named to be replaced.
    pub fn replaced_entries(
        &mut self,
        project: &str,
        seqs: impl IntoIterator<Item = u64>,
    ) -> Result<Vec<Entry>> {
        seqs.into_iter()
            .map(|t| match self.entry_at(project, t)? {
                Some(s) => Ok(s.entry),
                None => Err(Error::ledger(format!(
                    "project {project} has no seq {t}, which an effective meter-day named"
                ))),
            })
            .collect()
    }
}
