//! A seal appended to a project's chain: it takes the next seq, and its entry names the
//! registry role that wrote it.

use super::Tx;
use crate::error::Result;
use crate::ledger::seal::Seal;
use crate::ledger::{Entry, SealedEntry, chain};

impl Tx<'_> {
    /// Appends the seal `at_seq` makes of the chain tip's next seq.
    pub fn append_seal(
        &mut self,
        project: &str,
        at_seq: impl FnOnce(u64) -> Result<Seal>,
    ) -> Result<(Seal, SealedEntry)> {
        let (next, head) = self.chain_tip(project)?;
        let seal = at_seq(next)?;
        let entry = Entry {
            recorded_by: self.recorded_by()?,
            ..seal.entry(project)
        };
        let s = chain::seal(entry, head);
        self.append(std::slice::from_ref(&s))?;
        Ok((seal, s))
    }
}
