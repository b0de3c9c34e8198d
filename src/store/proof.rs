//! An inclusion proof read from the ledger: the entry and the audit path to a seal's tree
//! head, gathered in one stream of the project's chain.

use super::Tx;
use crate::error::{Error, Result};
use crate::ledger::merkle::{RangeHashes, inclusion_ranges};
use crate::ledger::proof::InclusionProof;
use crate::ledger::seal::Seal;

impl Tx<'_> {
    /// The proof that entry `seq` of `project` is a leaf of `seal`'s tree; None when the
    /// project has no such entry.
    pub fn inclusion_proof(
        &mut self,
        project: &str,
        seal: &Seal,
        seq: u64,
    ) -> Result<Option<InclusionProof>> {
        let mut path = RangeHashes::new(inclusion_ranges(seq, seal.tree_size));
        let mut entry = None;
        self.for_each_entry(project, None, |s| {
            if s.entry.seq < seal.tree_size {
                path.push(s.leaf);
                if s.entry.seq == seq {
                    entry = Some(s.clone());
                }
            }
            Ok(())
        })?;
        let Some(entry) = entry else {
            return Ok(None);
        };
        let audit_path = path.finish().ok_or_else(|| {
            Error::ledger(format!(
                "project {project} has fewer entries than seal seq {} covers",
                seal.seq
            ))
        })?;
        Ok(Some(InclusionProof::new(
            project,
            seal,
            &entry,
            &audit_path,
        )))
    }
}
