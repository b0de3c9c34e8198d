//! A project's chain: sealing the next entry and checking a stored chain end to end.

use super::canonical::encode;
use super::entry::{Entry, SealedEntry};
use super::hash::{Hash, chain_hash, leaf_hash};
use std::fmt;

/// Hashes an entry onto the chain whose head is `prev`.
pub fn seal(entry: Entry, prev: Hash) -> SealedEntry {
    let leaf = leaf_hash(&encode(&entry));
    let chain = chain_hash(prev, leaf);
    SealedEntry { entry, leaf, chain }
}

/// The first thing found wrong in a stored chain.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct Finding {
    pub project: String,
    pub seq: u64,
    pub what: String,
}

impl fmt::Display for Finding {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        write!(
            f,
            "project {} seq {}: {}",
            self.project, self.seq, self.what
        )
    }
}

/// What a whole chain check covered.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct ChainCheck {
    pub entries: u64,
    pub head: Hash,
}

/// Checks one project's stored entries, given in seq order: dense seqs from 0, each leaf and
/// chain hash recomputed from the stored fields, each correction naming an earlier entry of the
/// same kind that nothing else has corrected.
pub fn check(project: &str, entries: &[SealedEntry]) -> Result<ChainCheck, Finding> {
    let finding = |seq: u64, what: String| Finding {
        project: project.to_string(),
        seq,
        what,
    };
    let mut prev = Hash::GENESIS;
    let mut corrected_by: std::collections::HashMap<u64, u64> = Default::default();
    for (i, s) in entries.iter().enumerate() {
        let e = &s.entry;
        let expected = i as u64;
        if e.seq != expected {
            return Err(finding(
                expected,
                format!(
                    "sequence broken: expected seq {expected}, found seq {}",
                    e.seq
                ),
            ));
        }
        if e.project != project {
            return Err(finding(e.seq, format!("entry names project {}", e.project)));
        }
        let leaf = leaf_hash(&encode(e));
        if leaf != s.leaf {
            return Err(finding(
                e.seq,
                format!(
                    "leaf hash differs from the entry's content (stored {}, recomputed {})",
                    s.leaf.head(),
                    leaf.head()
                ),
            ));
        }
        let chain = chain_hash(prev, leaf);
        if chain != s.chain {
            return Err(finding(
                e.seq,
                format!(
                    "chain hash does not follow from the entry before (stored {}, recomputed {})",
                    s.chain.head(),
                    chain.head()
                ),
            ));
        }
        if let Some(target) = e.corrects {
            if target >= e.seq {
                return Err(finding(
                    e.seq,
                    format!("corrects seq {target}, which is not earlier"),
                ));
            }
            let t = &entries[target as usize].entry;
            if t.kind != e.kind {
                return Err(finding(
                    e.seq,
                    format!("corrects seq {target} of another kind ({})", t.kind),
                ));
            }
            if let Some(first) = corrected_by.insert(target, e.seq) {
                return Err(finding(
                    e.seq,
                    format!("corrects seq {target}, already corrected by seq {first}"),
                ));
            }
        }
        prev = chain;
    }
    Ok(ChainCheck {
        entries: entries.len() as u64,
        head: prev,
    })
}
