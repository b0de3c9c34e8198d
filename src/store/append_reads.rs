//! The reads of one append as ledger values: its project and site, the chain tip's figures, the
//! seals, what a correction replaces, the key's holder and the tip, all in the write
//! transaction that appends, so the rules see what the append writes onto.

use super::Tx;
use crate::error::Result;
use crate::ledger::Entry;
use crate::ledger::admission::{AdmitError, AppendReads, TargetError};
use crate::ledger::seal::{Replaced, Seal, late_replaces};
use std::collections::{BTreeMap, BTreeSet};

/// A read that the entry's rules refuse, or the value read.
type Checked<T> = std::result::Result<T, AdmitError>;

impl Tx<'_> {
    /// Everything the rules of appending `entry` read; a missing project, site or correctable
    /// target is the rule's refusal, read no further.
    pub fn append_reads(&mut self, entry: &Entry) -> Result<Checked<AppendReads>> {
        let code = &entry.project;
        let Some(project) = self.project(code)? else {
            return Ok(Err(AdmitError::NoProject(code.clone())));
        };
        let site = match entry.site.as_str() {
            "" => None,
            s => match self.site(code, s)? {
                Some(site) => Some(site),
                None => {
                    return Ok(Err(AdmitError::NoSuchSite {
                        project: code.clone(),
                        site: s.to_string(),
                    }));
                }
            },
        };
        let tally = self.tally(code)?;
        let seals = self.seals(code)?;
        let target = match entry.corrects {
            Some(seq) => match self.replaced(code, seq, &seals)? {
                Ok(t) => Some(t),
                Err(e) => return Ok(Err(AdmitError::Target(e))),
            },
            None => None,
        };
        let holder = self.entry_by_key(code, &entry.key)?;
        let tip = self.chain_tip(code)?;
        Ok(Ok(AppendReads {
            project,
            site,
            tally,
            seals,
            target,
            holder,
            tip,
        }))
    }

    /// What a correction of `seq` replaces: the latest entry of its line, and what it counts for
    /// now — its grams plus the late differences recorded against it since its period was sealed
    /// (read only when the project has seals, since only a sealed period takes late differences).
    pub fn replaced(
        &mut self,
        project: &str,
        seq: u64,
        seals: &[Seal],
    ) -> Result<std::result::Result<(Replaced, Entry), TargetError>> {
        let t = match self.correction_target(project, seq)? {
            Ok(t) => t,
            Err(why) => return Ok(Err(TargetError::Uncorrectable { seq, why })),
        };
        if let Some(first) = late_replaces(&t) {
            return Ok(Err(TargetError::LateDifference { seq, first }));
        }
        let counted = if seals.is_empty() {
            t.mass
        } else {
            self.late_counted(&t)?
        };
        let replaced = Replaced {
            seq,
            period: t.period,
            counted,
        };
        Ok(Ok((replaced, t)))
    }

    /// Each year's injection summed in SQL, for the years an append's entries end in.
    pub fn injected_in_years(
        &mut self,
        project: &str,
        years: BTreeSet<i32>,
    ) -> Result<BTreeMap<i32, crate::quantity::Mass>> {
        years
            .into_iter()
            .map(|y| Ok((y, self.injected_in_year(project, y)?)))
            .collect()
    }
}
