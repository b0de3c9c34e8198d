//! The ledger's own chain: one link per row of every table that is not a project's chain
//! (project, site, setting, feedstock, import, signed statement, recorded reconciliation) and
//! one per seal, naming the
//! row and its hash. A project's chain proves its entries; this chain proves that the rows
//! around them, and the projects themselves, are all still there: a project deleted with its
//! sites and entries leaves its link behind, naming it. Hashed like entries, so its head can
//! be published and checked (`verify --expect-ledger-head`).

use super::canonical::encode_link;
use super::hash::{Hash, chain_hash, leaf_hash};
use chrono::{DateTime, Utc};

/// The kind of row a link names; the name is part of the link's bytes.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, PartialOrd, Ord)]
pub enum Record {
    Project,
    Site,
    Setting,
    Feedstock,
    Import,
    Signature,
    Seal,
    Reconciliation,
}

impl Record {
    pub const ALL: [Record; 8] = [
        Record::Project,
        Record::Site,
        Record::Setting,
        Record::Feedstock,
        Record::Import,
        Record::Signature,
        Record::Seal,
        Record::Reconciliation,
    ];

    pub fn name(self) -> &'static str {
        match self {
            Record::Project => "project",
            Record::Site => "site",
            Record::Setting => "setting",
            Record::Feedstock => "feedstock",
            Record::Import => "import",
            Record::Signature => "signature",
            Record::Seal => "seal",
            Record::Reconciliation => "reconciliation",
        }
    }

    pub fn from_name(s: &str) -> Option<Record> {
        Record::ALL.into_iter().find(|r| r.name() == s)
    }

    /// How the row is named in a finding, in the words the row's own checks use.
    pub fn describe(self, project: &str, item: &str) -> String {
        match self {
            Record::Project => format!("project {project}"),
            Record::Site => format!("site {item} of project {project}"),
            Record::Setting => format!("setting {item} of project {project}"),
            Record::Feedstock => format!("feedstock {item} of project {project}"),
            Record::Import => format!("project {project} import {item}"),
            Record::Signature => format!("signature {item} of project {project}"),
            Record::Seal => format!("project {project} seq {item}"),
            Record::Reconciliation => format!("reconciliation {item} of project {project}"),
        }
    }
}

/// One link: the row it names (kind, project, the row's key within the project) and the hash
/// that row had when it was written (a seal's: its chain hash).
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct Link {
    pub seq: u64,
    pub record: Record,
    pub project: String,
    /// The row's key within its project: "" for the project itself, a site's, feedstock's code,
    /// a setting's, statement's or seal's seq, an import's id.
    pub item: String,
    pub row: Hash,
}

/// A link with its hashes, as stored.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct SealedLink {
    pub link: Link,
    pub leaf: Hash,
    pub chain: Hash,
}

/// Hashes a link onto the ledger chain whose head is `prev`.
pub fn seal_link(link: Link, prev: Hash) -> SealedLink {
    let leaf = leaf_hash(&encode_link(&link));
    SealedLink {
        chain: chain_hash(prev, leaf),
        link,
        leaf,
    }
}

/// An import row's fields, for its hash.
pub struct ImportRecord<'a> {
    pub project: &'a str,
    pub file_name: &'a str,
    pub file_sha256: Hash,
    pub kind: &'a str,
    pub row_count: u64,
    pub columns_map: &'a str,
    pub density: &'a str,
    pub byte_count: u64,
    pub imported_at: DateTime<Utc>,
}

impl ImportRecord<'_> {
    pub fn hash(&self) -> Hash {
        leaf_hash(&super::canonical::encode_import(self))
    }
}

/// Checks the stored ledger chain link by link: dense seqs from 0, each leaf and chain hash
/// recomputed, and whether a published head is among the chain's heads.
pub struct LinkWalk {
    next: u64,
    head: Hash,
    expected: Option<Hash>,
    holds_expected: bool,
}

impl LinkWalk {
    pub fn new(expected: Option<Hash>) -> Self {
        Self {
            next: 0,
            head: Hash::GENESIS,
            expected,
            holds_expected: false,
        }
    }

    /// Checks the next stored link; the finding names the link.
    pub fn step(&mut self, s: &SealedLink) -> Result<(), String> {
        let seq = self.next;
        if s.link.seq != seq {
            return Err(format!(
                "ledger link {seq}: sequence broken: expected link {seq}, found link {}",
                s.link.seq
            ));
        }
        let again = seal_link(s.link.clone(), self.head);
        if again.leaf != s.leaf {
            return Err(format!(
                "ledger link {seq}: leaf hash differs from the link's fields (it names {})",
                s.link.record.describe(&s.link.project, &s.link.item)
            ));
        }
        if again.chain != s.chain {
            return Err(format!(
                "ledger link {seq}: chain hash does not follow from the link before it"
            ));
        }
        self.head = s.chain;
        self.next += 1;
        self.holds_expected |= self.expected == Some(s.chain);
        Ok(())
    }

    /// The number of links and the head; refused when a published head is not held.
    pub fn finish(self) -> Result<(u64, Hash), String> {
        if let Some(h) = self.expected
            && !self.holds_expected
        {
            return Err(format!(
                "the ledger chain no longer holds head {} (it has {} links, head {}): \
                 links, and the rows they name, were removed or rewritten",
                h.head(),
                self.next,
                self.head.head()
            ));
        }
        Ok((self.next, self.head))
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn link(seq: u64, record: Record, item: &str) -> Link {
        Link {
            seq,
            record,
            project: "TFS".into(),
            item: item.into(),
            row: Hash([7; 32]),
        }
    }

    fn chain() -> Vec<SealedLink> {
        let mut head = Hash::GENESIS;
        [
            link(0, Record::Project, ""),
            link(1, Record::Site, "TF-I1"),
            link(2, Record::Seal, "12"),
        ]
        .into_iter()
        .map(|l| {
            let s = seal_link(l, head);
            head = s.chain;
            s
        })
        .collect()
    }

    /// The link bytes follow docs/ledger-format.md: u8 1, str "link", u64 seq, str record,
    /// str project, str item, 32 bytes row hash.
    #[test]
    fn link_bytes_as_documented() {
        let b = encode_link(&link(1, Record::Site, "TF-I1"));
        let mut want = vec![1u8];
        want.extend_from_slice(&4u32.to_le_bytes());
        want.extend_from_slice(b"link");
        want.extend_from_slice(&1u64.to_le_bytes());
        for s in ["site", "TFS", "TF-I1"] {
            want.extend_from_slice(&(s.len() as u32).to_le_bytes());
            want.extend_from_slice(s.as_bytes());
        }
        want.extend_from_slice(&[7; 32]);
        assert_eq!(b, want);
    }

    #[test]
    fn a_whole_chain_walks_and_holds_each_of_its_heads() {
        let links = chain();
        for published in &links {
            let mut w = LinkWalk::new(Some(published.chain));
            for l in &links {
                w.step(l).unwrap();
            }
            assert_eq!(w.finish().unwrap(), (3, links[2].chain));
        }
    }

    #[test]
    fn a_changed_missing_or_cut_link_is_found() {
        let mut links = chain();
        links[1].link.item = "TF-I2".into();
        let mut w = LinkWalk::new(None);
        w.step(&links[0]).unwrap();
        let e = w.step(&links[1]).unwrap_err();
        assert!(e.starts_with("ledger link 1: leaf hash differs"), "{e}");

        let links = chain();
        let mut w = LinkWalk::new(None);
        w.step(&links[0]).unwrap();
        let e = w.step(&links[2]).unwrap_err();
        assert!(e.contains("expected link 1, found link 2"), "{e}");

        // Cut at the tail: consistent, but a head published before is gone.
        let mut w = LinkWalk::new(Some(links[2].chain));
        w.step(&links[0]).unwrap();
        w.step(&links[1]).unwrap();
        let e = w.finish().unwrap_err();
        assert!(e.contains("no longer holds head"), "{e}");
    }
}
