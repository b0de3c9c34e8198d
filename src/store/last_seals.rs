//! What the registry's page of operators reads: every project by operator, its last seal, and
//! the statements signed over its seals, judged again.

use super::Tx;
use crate::error::Result;
use crate::ledger::Project;
use crate::ledger::seal::Seal;
use crate::ledger::statement_check::Judged;

/// A project's last seal and its statements judged again.
pub type LastSeal = (Seal, Vec<Judged>);

impl Tx<'_> {
    /// Every project, by operator then code, with its last seal (None if never sealed).
    pub fn last_seals(&mut self) -> Result<Vec<(Project, Option<LastSeal>)>> {
        let mut projects = self.projects()?;
        projects.sort_by(|a, b| (&a.operator, &a.code).cmp(&(&b.operator, &b.code)));
        let mut rows = Vec::with_capacity(projects.len());
        for p in projects {
            let last = match self.seals(&p.code)?.pop() {
                Some(seal) => Some((seal, self.judged_statements(&p.code)?)),
                None => None,
            };
            rows.push((p, last));
        }
        Ok(rows)
    }
}
