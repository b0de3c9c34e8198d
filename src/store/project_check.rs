//! One project checked for `verify`: its rows read back (sites, settings, feedstocks, imported
//! files hashed again), its chain walked under the ledger's structural rules, its signed
//! statements judged again, and a chain head published earlier found in it.

use super::Tx;
use crate::error::{Error, Result};
use crate::ledger::chain_structure::ChainStructure;
use crate::ledger::unnamed_files::UnnamedFiles;
use crate::ledger::{Hash, Project};

/// What one project's check covered: its sites, seals, signed statements and recorded
/// reconciliations, and the chain's length and head.
pub struct ProjectChecked {
    pub sites: usize,
    pub seals: usize,
    pub statements: usize,
    pub reconciliations: usize,
    pub entries: u64,
    pub head: Hash,
}

impl Tx<'_> {
    /// The entries of `projects` together, as their chain tips count them: a progress bar's
    /// length only (a tip that does not read back is the walk's to name).
    pub fn entries_of(&mut self, projects: &[Project]) -> u64 {
        let tip = |p: &Project| self.chain_tip(&p.code).map_or(0, |(next, _)| next);
        projects.iter().map(tip).sum()
    }

    /// Checks project `code`, calling `walked` once per entry as the chain streams by; the
    /// chain must still hold `expected`, which also catches entries removed from its end.
    pub fn check_project(
        &mut self,
        code: &str,
        expected: Option<Hash>,
        mut walked: impl FnMut(),
    ) -> Result<ProjectChecked> {
        let sites = self.sites(code)?;
        self.settings(code)?;
        self.feedstocks(code)?;
        let imports = self.check_evidence(code)?;
        let unnamed = UnnamedFiles::new(
            imports
                .into_iter()
                .filter_map(|i| Some((Hash::from_hex(&i.sha256)?, i.id, i.file_name))),
        );
        let listed = self
            .seal_entries(code)?
            .iter()
            .map(|s| s.entry.seq)
            .collect();
        let reconciliations = self.reconciliations(code)?;
        let codes = sites.iter().map(|s| s.code.clone()).collect();
        let mut structure = ChainStructure::new(code, codes, unnamed, listed, &reconciliations);
        let mut holds_expected = false;
        let c = self.walk_chain(code, None, |row| {
            walked();
            structure.see(row.sealed).map_err(Error::ledger)?;
            holds_expected |= expected == Some(row.sealed.chain);
            Ok(())
        })?;
        let seals = structure.finish(c.entries).map_err(Error::ledger)?;
        let statements = self.judged_statements(code)?;
        for j in &statements {
            if let Err(w) = j.signature.as_ref().and(j.seal.as_ref()) {
                return Err(Error::ledger(format!(
                    "project {code} statement {}: {w}",
                    j.statement.seq
                )));
            }
        }
        if let Some(h) = expected
            && !holds_expected
        {
            return Err(Error::ledger(format!(
                "project {code}: the chain no longer holds head {} (it has {} entries, head {})",
                h.head(),
                c.entries,
                c.head.head()
            )));
        }
        Ok(ProjectChecked {
            sites: sites.len(),
            seals,
            statements: statements.len(),
            reconciliations: reconciliations.len(),
            entries: c.entries,
            head: c.head,
        })
    }
}
