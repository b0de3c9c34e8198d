//! Inclusion proofs an outsider can check without the ledger: one entry's canonical bytes, its
//! leaf, and the RFC 6962 audit path up to a seal's tree head (format in docs/proofs.md).

use super::SealedEntry;
use super::canonical::encode;
use super::hash::{Hash, leaf_hash};
use super::merkle::verify_inclusion;
use super::seal::Seal;
use serde::{Deserialize, Serialize};

/// The format name every proof file carries; a change of layout takes a new name.
pub const FORMAT: &str = "sinkbook-inclusion-proof-1";

/// An inclusion proof as written to its file. Hashes and bytes are lowercase hex.
#[derive(Debug, Clone, PartialEq, Eq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct InclusionProof {
    pub format: String,
    pub project: String,
    /// The seq of the seal entry whose tree head the path leads to.
    pub seal_seq: u64,
    pub period: String,
    pub tree_size: u64,
    pub root: String,
    /// The entry's seq, which is its leaf's index in the tree.
    pub leaf_index: u64,
    /// The entry's canonical bytes (docs/ledger-format.md).
    pub entry_bytes: String,
    pub leaf_hash: String,
    /// Subtree hashes from the leaf up, RFC 6962 §2.1.1's PATH(m, D[n]).
    pub audit_path: Vec<String>,
}

/// What a proof proved.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct Proven {
    pub project: String,
    pub seq: u64,
    pub tree_size: u64,
    pub root: Hash,
    pub leaf: Hash,
}

fn hex_bytes(s: &str) -> Option<Vec<u8>> {
    if !s.len().is_multiple_of(2) || !s.is_ascii() {
        return None;
    }
    (0..s.len())
        .step_by(2)
        .map(|i| u8::from_str_radix(&s[i..i + 2], 16).ok())
        .collect()
}

fn hash(name: &str, s: &str) -> Result<Hash, String> {
    Hash::from_hex(s).ok_or_else(|| format!("{name} is not 64 hex digits"))
}

/// The project and seq at the head of canonical entry bytes: `u8` version 1 or 2, `str`
/// project, `u64` seq.
fn project_and_seq(bytes: &[u8]) -> Option<(String, u64)> {
    let (&version, rest) = bytes.split_first()?;
    if version != 1 && version != 2 {
        return None;
    }
    let len = u32::from_le_bytes(rest.get(..4)?.try_into().ok()?) as usize;
    let project = std::str::from_utf8(rest.get(4..4 + len)?).ok()?;
    let seq = u64::from_le_bytes(rest.get(4 + len..12 + len)?.try_into().ok()?);
    Some((project.to_string(), seq))
}

impl InclusionProof {
    /// The proof that `entry` of `project` is a leaf of the tree `seal` holds, by its audit path.
    pub fn new(project: &str, seal: &Seal, entry: &SealedEntry, audit_path: &[Hash]) -> Self {
        let bytes = encode(&entry.entry);
        InclusionProof {
            format: FORMAT.into(),
            project: project.into(),
            seal_seq: seal.seq,
            period: seal.label.clone(),
            tree_size: seal.tree_size,
            root: seal.root.to_hex(),
            leaf_index: entry.entry.seq,
            entry_bytes: bytes.iter().map(|b| format!("{b:02x}")).collect(),
            leaf_hash: entry.leaf.to_hex(),
            audit_path: audit_path.iter().map(|h| h.to_hex()).collect(),
        }
    }

    /// Checks every hash and index: the leaf is SHA-256(0x00 || the entry's bytes), the bytes
    /// name the project and the seq given, and the audit path leads from the leaf at that index
    /// to the root of a tree of `tree_size` leaves. Says what is wrong otherwise.
    pub fn check(&self) -> Result<Proven, String> {
        if self.format != FORMAT {
            return Err(format!("format {:?} is not {FORMAT}", self.format));
        }
        let root = hash("root", &self.root)?;
        let leaf = hash("leaf_hash", &self.leaf_hash)?;
        let path = self
            .audit_path
            .iter()
            .enumerate()
            .map(|(i, h)| hash(&format!("audit_path[{i}]"), h))
            .collect::<Result<Vec<_>, _>>()?;
        let bytes = hex_bytes(&self.entry_bytes).ok_or("entry_bytes is not hex")?;
        if leaf_hash(&bytes) != leaf {
            return Err("leaf_hash is not SHA-256(0x00 || entry_bytes)".into());
        }
        match project_and_seq(&bytes) {
            Some((p, s)) if p == self.project && s == self.leaf_index => {}
            Some((p, s)) => {
                return Err(format!(
                    "entry_bytes are of project {p} seq {s}, not project {} seq {}",
                    self.project, self.leaf_index
                ));
            }
            None => return Err("entry_bytes are not a canonical entry".into()),
        }
        if self.leaf_index >= self.tree_size {
            return Err(format!(
                "leaf_index {} is outside a tree of {} leaves",
                self.leaf_index, self.tree_size
            ));
        }
        if !verify_inclusion(self.leaf_index, self.tree_size, leaf, &path, root) {
            return Err(format!(
                "the audit path does not lead from leaf {} to root {} of a tree of {} leaves",
                self.leaf_index,
                root.head(),
                self.tree_size
            ));
        }
        Ok(Proven {
            project: self.project.clone(),
            seq: self.leaf_index,
            tree_size: self.tree_size,
            root,
            leaf,
        })
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::ledger::merkle::{inclusion_proof, root};

    fn entry_bytes(project: &str, seq: u64) -> Vec<u8> {
        let mut b = vec![1];
        b.extend_from_slice(&(project.len() as u32).to_le_bytes());
        b.extend_from_slice(project.as_bytes());
        b.extend_from_slice(&seq.to_le_bytes());
        b.extend_from_slice(b"rest of the entry");
        b
    }

    fn proof(n: u64, i: u64) -> InclusionProof {
        let leaves: Vec<Hash> = (0..n).map(|s| leaf_hash(&entry_bytes("TFS", s))).collect();
        let hex = |b: &[u8]| b.iter().map(|x| format!("{x:02x}")).collect::<String>();
        InclusionProof {
            format: FORMAT.into(),
            project: "TFS".into(),
            seal_seq: n,
            period: "2026".into(),
            tree_size: n,
            root: root(&leaves).to_hex(),
            leaf_index: i,
            entry_bytes: hex(&entry_bytes("TFS", i)),
            leaf_hash: leaves[i as usize].to_hex(),
            audit_path: inclusion_proof(&leaves, i)
                .iter()
                .map(|h| h.to_hex())
                .collect(),
        }
    }

    #[test]
    fn a_proof_holds_and_every_alteration_is_named() {
        let p = proof(11, 6);
        assert_eq!(p.check().unwrap().seq, 6);
        let mut q = p.clone();
        q.leaf_index = 5;
        assert!(q.check().unwrap_err().contains("seq 6"));
        let mut q = p.clone();
        q.tree_size = 6;
        assert!(q.check().unwrap_err().contains("outside"));
        let mut q = p.clone();
        q.audit_path[1].replace_range(0..1, "f");
        if q.audit_path[1] != p.audit_path[1] {
            assert!(q.check().unwrap_err().contains("audit path"));
        }
        let mut q = p.clone();
        q.entry_bytes.push_str("00");
        assert!(q.check().unwrap_err().contains("leaf_hash"));
        let mut q = p.clone();
        q.root = "zz".into();
        assert!(q.check().unwrap_err().contains("root"));
        let mut q = p;
        q.format = "other".into();
        assert!(q.check().is_err());
    }

    proptest::proptest! {
        /// Flipping any hex digit of the root, the leaf, the bytes or the path breaks the proof.
        #[test]
        fn any_changed_digit_fails(n in 1u64..40, i in 0u64..40, field in 0usize..4, pos in 0usize..400) {
            let p = proof(n, i % n);
            let mut q = p.clone();
            let flip = |s: &mut String, pos: usize| {
                let k = pos % s.len();
                let c = s.as_bytes()[k];
                let d = if c == b'0' { "1" } else { "0" };
                s.replace_range(k..k + 1, d);
            };
            match field {
                0 => flip(&mut q.root, pos),
                1 => flip(&mut q.leaf_hash, pos),
                2 => flip(&mut q.entry_bytes, pos),
                _ if !q.audit_path.is_empty() => {
                    let k = pos % q.audit_path.len();
                    flip(&mut q.audit_path[k], pos / 7);
                }
                _ => flip(&mut q.root, pos),
            }
            proptest::prop_assert!(q.check().is_err());
        }
    }
}
