//! The imported entry behind a correction by hand: its line of corrections walked back by seq,
//! each entry read by index, to the entry that came from a file.

use super::Tx;
use crate::error::Result;
use crate::ledger::Entry;

impl Tx<'_> {
    /// The entry with a file that `e`'s line of corrections starts from; None when the line
    /// began by hand.
    pub fn imported_origin(&mut self, project: &str, e: &Entry) -> Result<Option<Entry>> {
        let mut at = e.corrects;
        while let Some(seq) = at {
            let Some(t) = self.entry_at(project, seq)? else {
                break;
            };
            if t.entry.evidence.is_some() {
                return Ok(Some(t.entry));
            }
            at = t.entry.corrects;
        }
        Ok(None)
    }
}
