//! What a line holds, as ledger values, and the values that are the bundle's own (an
//! import, a part of its bytes, the trailer).

use super::{Line, time_text};
use crate::ledger::Hash;
use crate::ledger::feedstock::Feedstock;
use crate::ledger::reconciliation::Recorded;
use crate::ledger::setting::Setting;
use crate::ledger::signature::Statement;
use crate::ledger::{Project, SealedEntry, Site};
use chrono::{DateTime, Utc};

/// What a line holds, as ledger values checked against their stored hashes.
#[derive(Debug, Clone, PartialEq)]
pub enum Item {
    Header {
        version: u32,
        project: String,
        seals: Vec<u64>,
    },
    Project(Project),
    Site(Site),
    Setting(Setting),
    Feedstock(Feedstock),
    Import(Import),
    Evidence(EvidencePart),
    /// An entry as stored, its leaf hash checked against its content (the chain link is the
    /// reader's to check: it needs the entry before).
    Entry(SealedEntry),
    /// A statement whose row hash is its content's (its signature and the seal it names are the
    /// checker's to judge).
    Signature(Statement),
    /// A recorded reconciliation whose row hash is its content's (the run of records is the
    /// checker's to follow).
    Reconciliation(Recorded),
    Trailer(Trailer),
}

/// An imported file as a bundle names it (the ledger's own id for it stays in the ledger).
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct Import {
    pub file_name: String,
    pub file_sha256: Hash,
    pub kind: String,
    pub row_count: i64,
    /// How the file was read (`--columns` as given, the density method), so it re-reads alike.
    pub columns_map: String,
    pub density: String,
    pub byte_count: i64,
    pub imported_at: DateTime<Utc>,
}

/// One part of the bytes of the import before it.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct EvidencePart {
    pub part: i64,
    pub bytes: Vec<u8>,
}

#[derive(Debug, Clone, PartialEq, Eq)]
pub struct Trailer {
    pub lines: u64,
    pub entries: u64,
    pub tree_size: u64,
    pub root: Hash,
    pub chain_head: Hash,
    pub sha256: Hash,
}

impl Import {
    pub fn to_line(&self) -> Line {
        Line::Import {
            file_name: self.file_name.clone(),
            file_sha256: self.file_sha256.to_hex(),
            kind: self.kind.clone(),
            row_count: self.row_count,
            columns_map: self.columns_map.clone(),
            density: self.density.clone(),
            byte_count: self.byte_count,
            imported_at: time_text(self.imported_at),
        }
    }
}

impl EvidencePart {
    pub fn to_line(&self) -> Line {
        let mut hex = String::with_capacity(self.bytes.len() * 2);
        for b in &self.bytes {
            hex.push(char::from(HEX[usize::from(b >> 4)]));
            hex.push(char::from(HEX[usize::from(b & 15)]));
        }
        Line::Evidence {
            part: self.part,
            bytes: hex,
        }
    }
}

const HEX: &[u8; 16] = b"0123456789abcdef";

/// Lowercase hex to bytes.
pub(super) fn unhex(s: &str) -> Result<Vec<u8>, String> {
    let digit = |c: u8| HEX.iter().position(|&h| h == c).map(|d| d as u8);
    if !s.len().is_multiple_of(2) {
        return Err("bytes: an odd number of hex digits".into());
    }
    s.as_bytes()
        .chunks(2)
        .map(|p| match (digit(p[0]), digit(p[1])) {
            (Some(h), Some(l)) => Ok(h << 4 | l),
            _ => Err("bytes: not lowercase hex".to_string()),
        })
        .collect()
}

/// Lowercase hex of exactly N bytes.
pub(super) fn fixed<const N: usize>(field: &str, s: &str) -> Result<[u8; N], String> {
    unhex(s)
        .map_err(|e| format!("{field}: {e}"))?
        .try_into()
        .map_err(|_| format!("{field}: not {N} bytes"))
}

impl Trailer {
    pub fn to_line(&self) -> Line {
        Line::Trailer {
            lines: self.lines,
            entries: self.entries,
            tree_size: self.tree_size,
            root: self.root.to_hex(),
            chain_head: self.chain_head.to_hex(),
            sha256: self.sha256.to_hex(),
        }
    }
}
