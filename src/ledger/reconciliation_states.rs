//! The chain states recorded reconciliations name, found again as `verify` walks the chain: a
//! record names a chain length and head, which the chain must have had.

use super::Hash;
use super::reconciliation::Recorded;

/// A record naming a chain state the chain never had.
#[derive(Debug)]
pub struct UnseenState {
    pub project: String,
    pub seq: u64,
    pub chain_size: u64,
    pub chain_head: Hash,
}

impl std::fmt::Display for UnseenState {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        write!(
            f,
            "project {}: reconciliations row seq {} names a chain of {} entries with head {}, which the chain never had",
            self.project,
            self.seq,
            self.chain_size,
            self.chain_head.head()
        )
    }
}

/// `check` is called with each entry's seq and chain hash, `finish` with the chain's length.
pub struct ChainStates<'a> {
    records: &'a [Recorded],
}

impl<'a> ChainStates<'a> {
    pub fn new(records: &'a [Recorded]) -> Self {
        ChainStates { records }
    }

    pub fn check(&self, project: &str, seq: u64, chain: Hash) -> Result<(), UnseenState> {
        match self
            .records
            .iter()
            .find(|r| r.chain_size == seq + 1 && r.chain_head != chain)
        {
            Some(r) => Err(self.wrong(project, r)),
            None => Ok(()),
        }
    }

    pub fn finish(&self, project: &str, entries: u64) -> Result<(), UnseenState> {
        match self.records.iter().find(|r| {
            r.chain_size > entries || (r.chain_size == 0 && r.chain_head != Hash::GENESIS)
        }) {
            Some(r) => Err(self.wrong(project, r)),
            None => Ok(()),
        }
    }

    fn wrong(&self, project: &str, r: &Recorded) -> UnseenState {
        UnseenState {
            project: project.to_string(),
            seq: r.seq,
            chain_size: r.chain_size,
            chain_head: r.chain_head,
        }
    }
}
