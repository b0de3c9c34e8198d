//! What `verify` reads from the ledger, streamed: the ledger chain walked link by link, and
//! every imported file's kept bytes hashed again.

use super::{StoredImport, Tx};
use crate::error::{Error, Result, StoreKind};
use crate::ledger::Hash;
use crate::ledger::ledger_chain::{LinkWalk, Record};
use sha2::{Digest, Sha256};
use std::io::Read;

impl Tx<'_> {
    /// The ledger chain walked link by link (every link's hashes; with `only`, the rows of that
    /// project) and every linked table searched for a row no link names. Returns the number of
    /// links and the ledger head.
    pub fn check_ledger_chain(
        &mut self,
        only: Option<&str>,
        expected: Option<Hash>,
    ) -> Result<(u64, Hash)> {
        let mut walk = LinkWalk::new(expected);
        let mut next = 0;
        loop {
            let page = self.links_from(next)?;
            if page.is_empty() {
                break;
            }
            for s in &page {
                walk.step(s).map_err(Error::ledger)?;
                next = s.link.seq + 1;
                let l = &s.link;
                if only.is_some_and(|p| p != l.project) {
                    continue;
                }
                let row = l.record.describe(&l.project, &l.item);
                match self.linked_row(l.record, &l.project, &l.item)? {
                    None => {
                        return Err(Error::ledger(format!(
                            "ledger link {}: {row} is gone: the ledger no longer holds the row it links",
                            l.seq
                        )));
                    }
                    Some(h) if h != l.row => {
                        return Err(Error::ledger(format!(
                            "ledger link {}: {row} is not the row linked (its hash {} differs from the link's {})",
                            l.seq,
                            h.head(),
                            l.row.head()
                        )));
                    }
                    Some(_) => {}
                }
            }
        }
        for record in Record::ALL {
            if let Some((project, item)) = self.unlinked(record, only)? {
                return Err(Error::ledger(format!(
                    "{} is in no ledger link: written outside sinkbook, or its link was removed",
                    record.describe(&project, &item)
                )));
            }
        }
        walk.finish().map_err(Error::ledger)
    }

    /// Checks each import of `project`: its kept bytes hash to the SHA-256 recorded and their size
    /// is the size recorded. Returns the imports checked, whose files the chain must name (verify
    /// sees that on its walk, without a scan of the chain per file).
    pub fn check_evidence(&mut self, project: &str) -> Result<Vec<StoredImport>> {
        let imports = self.imports(project)?;
        for i in &imports {
            let bad = |what: String| {
                Error::ledger(format!(
                    "project {project} import {} ({}): {what}",
                    i.id, i.file_name
                ))
            };
            let mut sha = Sha256::new();
            let mut bytes = 0u64;
            let mut reader = self.evidence(i.id);
            let mut buf = vec![0u8; 1 << 16];
            loop {
                let n = reader
                    .read(&mut buf)
                    .map_err(|e| Error::store(StoreKind::Other, e.to_string()))?;
                if n == 0 {
                    break;
                }
                sha.update(&buf[..n]);
                bytes += n as u64;
            }
            let got = Hash(sha.finalize().into());
            if got.to_hex() != i.sha256 || i64::try_from(bytes).ok() != Some(i.bytes) {
                return Err(bad(format!(
                    "its kept bytes ({bytes} bytes, SHA-256 {}) are not the file imported ({} bytes, SHA-256 {})",
                    got.head(),
                    i.bytes,
                    i.sha256.get(..12).unwrap_or(&i.sha256)
                )));
            }
        }
        Ok(imports)
    }
}
