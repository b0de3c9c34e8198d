//! A project's bundle read out of the ledger line by line, in the bundle's order, one entry
//! and one part of a kept file in memory at a time.

use super::Tx;
use crate::bundle::Line;
use crate::bundle::line::EvidencePart;
use crate::bundle::stop::Stop;
use crate::error::Result;
use crate::ledger::Project;

impl Tx<'_> {
    /// Hands `put` every line of project `p`'s bundle up to `stop`, but the trailer.
    pub fn export_bundle(
        &mut self,
        p: &Project,
        stop: &Stop,
        put: &mut dyn FnMut(&Line) -> Result<()>,
    ) -> Result<()> {
        let code = &p.code;
        put(&Line::header(code, &stop.seals))?;
        put(&Line::project(p))?;
        for s in self
            .sites(code)?
            .iter()
            .filter(|s| stop.holds(s.registered_at))
        {
            put(&Line::site(s))?;
        }
        for s in self
            .settings(code)?
            .iter()
            .take_while(|s| stop.holds(s.recorded_at))
        {
            put(&Line::setting(s))?;
        }
        for f in self
            .feedstocks(code)?
            .iter()
            .filter(|f| stop.holds(f.registered_at))
        {
            put(&Line::feedstock(f))?;
        }
        self.export_imports(code, stop, put)?;
        self.each_entry_through(code, stop.last, |s| put(&Line::entry(&s)))?;
        for s in self.signatures(code)? {
            if stop.seals.contains(&s.signed.seal_seq) {
                put(&Line::signature(&s))?;
            }
        }
        // The reconciliations recorded by the seal's time, over the entries the bundle holds.
        for r in self.reconciliations(code)?.iter().take_while(|r| {
            stop.holds(r.recorded_at) && r.chain_size <= stop.last.saturating_add(1)
        }) {
            put(&Line::reconciliation(r))?;
        }
        Ok(())
    }

    /// Each imported file registered by the export's time, followed by its bytes.
    fn export_imports(
        &mut self,
        code: &str,
        stop: &Stop,
        put: &mut dyn FnMut(&Line) -> Result<()>,
    ) -> Result<()> {
        for i in self.bundle_imports(code)? {
            if !stop.holds(i.imported_at) {
                continue;
            }
            put(&i.line().to_line())?;
            // One part in memory at a time.
            for part in 0..self.evidence_parts(i.id)? {
                let bytes = self.evidence_part(i.id, part)?.unwrap_or_default();
                put(&EvidencePart { part, bytes }.to_line())?;
            }
        }
        Ok(())
    }
}
