//! A project's chain: sealing the next entry and checking a stored chain as it is read, one
//! entry at a time, so no reader has to hold the chain in memory.

use super::canonical::encode;
use super::entry::{Entry, EntryKind, SealedEntry};
use super::hash::{Hash, chain_hash, leaf_hash};
use chrono::{DateTime, Utc};
use std::fmt;

/// Hashes an entry onto the chain whose head is `prev`.
pub fn seal(entry: Entry, prev: Hash) -> SealedEntry {
    let leaf = leaf_hash(&encode(&entry));
    let chain = chain_hash(prev, leaf);
    SealedEntry { entry, leaf, chain }
}

/// Refuses entries to be appended after `last` (the chain's last seq and its recorded_at) that
/// were recorded before it or before the entry ahead of them: recorded_at never decreases along
/// a chain, whatever clock the writer was given (`SINKBOOK_NOW` included).
pub fn in_time_order(
    project: &str,
    last: Option<(u64, DateTime<Utc>)>,
    new: &[SealedEntry],
) -> Result<(), String> {
    let mut before = last;
    for s in new {
        if let Some((seq, at)) = before
            && s.entry.recorded_at < at
        {
            return Err(format!(
                "recorded_at {} is before the chain tip's recorded_at {} (project {project} seq {seq}): \
                 a chain's recorded times never run backwards; nothing written",
                rfc3339(s.entry.recorded_at),
                rfc3339(at)
            ));
        }
        before = Some((s.entry.seq, s.entry.recorded_at));
    }
    Ok(())
}

fn rfc3339(t: DateTime<Utc>) -> String {
    t.to_rfc3339_opts(chrono::SecondsFormat::AutoSi, true)
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

/// What the store looked up, by index, about the entry a correction names: the kind of that
/// entry (None when there is no such entry) and the first entry that corrects it.
#[derive(Debug, Clone, Copy, Default, PartialEq, Eq)]
pub struct Target {
    pub kind: Option<EntryKind>,
    pub first_corrector: Option<u64>,
}

/// Checks one project's stored entries as they arrive in seq order: dense seqs from 0, each
/// leaf and chain hash recomputed from the stored fields, recorded_at never decreasing, each
/// correction naming an earlier entry of the same kind that nothing else corrected first.
pub struct ChainWalk {
    project: String,
    next_seq: u64,
    head: Hash,
    last_recorded: Option<DateTime<Utc>>,
}

impl ChainWalk {
    pub fn new(project: &str) -> Self {
        Self {
            project: project.to_string(),
            next_seq: 0,
            head: Hash::GENESIS,
            last_recorded: None,
        }
    }

    fn finding(&self, seq: u64, what: String) -> Finding {
        Finding {
            project: self.project.clone(),
            seq,
            what,
        }
    }

    /// Checks the next stored entry; `target` is what the store found about the entry it
    /// corrects (ignored when it corrects nothing).
    pub fn step(&mut self, s: &SealedEntry, target: Target) -> Result<(), Finding> {
        let e = &s.entry;
        let expected = self.next_seq;
        if e.seq != expected {
            return Err(self.finding(
                expected,
                format!(
                    "sequence broken: expected seq {expected}, found seq {}",
                    e.seq
                ),
            ));
        }
        if e.project != self.project {
            return Err(self.finding(e.seq, format!("entry names project {}", e.project)));
        }
        let leaf = leaf_hash(&encode(e));
        if leaf != s.leaf {
            return Err(self.finding(
                e.seq,
                format!(
                    "leaf hash differs from the entry's content (stored {}, recomputed {})",
                    s.leaf.head(),
                    leaf.head()
                ),
            ));
        }
        let chain = chain_hash(self.head, leaf);
        if chain != s.chain {
            return Err(self.finding(
                e.seq,
                format!(
                    "chain hash does not follow from the entry before (stored {}, recomputed {})",
                    s.chain.head(),
                    chain.head()
                ),
            ));
        }
        if let Some(before) = self.last_recorded
            && e.recorded_at < before
        {
            return Err(self.finding(
                e.seq,
                format!(
                    "recorded_at {} is earlier than the entry before it ({})",
                    e.recorded_at.to_rfc3339(),
                    before.to_rfc3339()
                ),
            ));
        }
        if let Some(t) = e.corrects {
            self.check_correction(e, t, target)?;
        }
        self.next_seq += 1;
        self.head = chain;
        self.last_recorded = Some(e.recorded_at);
        Ok(())
    }

    fn check_correction(&self, e: &Entry, t: u64, target: Target) -> Result<(), Finding> {
        if t >= e.seq {
            return Err(self.finding(e.seq, format!("corrects seq {t}, which is not earlier")));
        }
        match target.kind {
            None => Err(self.finding(e.seq, format!("corrects seq {t}, which is not stored"))),
            Some(k) if k != e.kind => {
                Err(self.finding(e.seq, format!("corrects seq {t} of another kind ({k})")))
            }
            _ => match target.first_corrector {
                Some(first) if first != e.seq => Err(self.finding(
                    e.seq,
                    format!("corrects seq {t}, already corrected by seq {first}"),
                )),
                _ => Ok(()),
            },
        }
    }

    /// The entries checked and the head they lead to.
    pub fn finish(self) -> ChainCheck {
        ChainCheck {
            entries: self.next_seq,
            head: self.head,
        }
    }
}
