//! A project's signed statements judged again from the ledger: each signature over its bytes,
//! and the seal it names still standing over the leaves the chain holds before it; the seals
//! beside their entries, as the annual page lists them with their statements.

use super::Tx;
use crate::error::{Error, Result};
use crate::ledger::merkle::TreeBuilder;
use crate::ledger::seal::Seal;
use crate::ledger::signature::Statement;
use crate::ledger::statement_check::{Judged, judged, seal_stands};
use crate::ledger::{Hash, SealedEntry};

impl Tx<'_> {
    /// Every statement of a project judged: the signature over its bytes, and the seal it names —
    /// still in the chain, with the tree size and root signed, and that root still the head of the
    /// leaves before it.
    pub fn judged_statements(&mut self, project: &str) -> Result<Vec<Judged>> {
        let statements = self.signatures(project)?;
        if statements.is_empty() {
            return Ok(Vec::new());
        }
        let seals = self.seals(project)?;
        let heads = self.heads_at(project, &seals)?;
        Ok(statements
            .into_iter()
            .map(|s| {
                let seal = seal_stands(&s, &seals, &heads);
                judged(s, seal)
            })
            .collect())
    }

    /// A project's seals, each beside the entry it was read from.
    pub fn seals_with_entries(&mut self, project: &str) -> Result<Vec<(Seal, SealedEntry)>> {
        self.seal_entries(project)?
            .into_iter()
            .map(|e| {
                Seal::from_entry(&e.entry)
                    .map(|s| (s, e))
                    .map_err(Error::ledger)
            })
            .collect()
    }

    /// Adds the statement `signed` makes of the seq a new statement of `project` takes: after
    /// the last one held (a copy loaded through a seal may lack some between).
    pub fn add_next_statement(
        &mut self,
        project: &str,
        signed: impl FnOnce(u64) -> Statement,
    ) -> Result<Statement> {
        let seq = self.signatures(project)?.last().map_or(0, |s| s.seq + 1);
        let s = signed(seq);
        self.add_signature(&s)?;
        Ok(s)
    }

    /// The tree head of the leaves before each seal, recomputed as the chain streams by.
    fn heads_at(&mut self, project: &str, seals: &[Seal]) -> Result<Vec<(u64, Hash)>> {
        let mut tree = TreeBuilder::default();
        let mut heads = Vec::new();
        self.for_each_entry(project, None, |s| {
            if seals.iter().any(|x| x.tree_size == tree.size()) {
                heads.push((tree.size(), tree.root()));
            }
            tree.push(s.leaf);
            Ok(())
        })?;
        Ok(heads)
    }
}
