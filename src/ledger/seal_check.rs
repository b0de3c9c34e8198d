//! Checking a project's seals while its entries stream past in seq order, in memory that grows
//! with the number of seals and the log of the chain's length, never with the chain.

use super::entry::{EntryKind, SealedEntry};
use super::merkle::{RangeHashes, TreeBuilder, consistency_ranges, verify_consistency};
use super::seal::Seal;

/// Each seal must cover exactly the entries before it (tree size = its seq), hold the root
/// recomputed from their leaves, and extend the seal before it: an RFC 6962 consistency proof,
/// built from the same stream, shows the earlier tree is a prefix of the later.
pub struct SealCheck {
    tree: TreeBuilder,
    /// The seqs of the seal entries, as the ledger lists them, ascending.
    expected: Vec<u64>,
    /// One proof under construction per consecutive pair of seals.
    proofs: Vec<Option<RangeHashes>>,
    seals: Vec<Seal>,
}

impl SealCheck {
    /// `seal_seqs`: where the ledger says the seals are, ascending.
    pub fn new(seal_seqs: Vec<u64>) -> SealCheck {
        let proofs = seal_seqs
            .windows(2)
            .map(|w| Some(RangeHashes::new(consistency_ranges(w[0], w[1]))))
            .collect();
        SealCheck {
            tree: TreeBuilder::default(),
            expected: seal_seqs,
            proofs,
            seals: Vec::new(),
        }
    }

    /// The next entry of the chain (already checked against its own hashes).
    pub fn push(&mut self, s: &SealedEntry) -> Result<(), String> {
        if s.entry.kind == EntryKind::Seal {
            self.seal(s)?;
        }
        self.tree.push(s.leaf);
        for p in self.proofs.iter_mut().flatten() {
            p.push(s.leaf);
        }
        Ok(())
    }

    fn seal(&mut self, s: &SealedEntry) -> Result<(), String> {
        let seq = s.entry.seq;
        let seal = Seal::from_entry(&s.entry)?;
        let n = self.seals.len();
        if self.expected.get(n) != Some(&seq) {
            return Err("a seal entry the ledger's list of seals does not hold".into());
        }
        if seal.tree_size != seq {
            return Err(format!(
                "seal covers {} entries, but {seq} come before it",
                seal.tree_size
            ));
        }
        let root = self.tree.root();
        if root != seal.root {
            return Err(format!(
                "seal root {} differs from the tree head recomputed from the leaves ({})",
                seal.root.head(),
                root.head()
            ));
        }
        if let Some(before) = self.seals.last() {
            let proof = self.proofs[n - 1]
                .take()
                .and_then(RangeHashes::finish)
                .ok_or("consistency proof could not be built")?;
            if !verify_consistency(
                before.tree_size,
                seal.tree_size,
                before.root,
                seal.root,
                &proof,
            ) {
                return Err(format!(
                    "the tree of seal seq {} is not a prefix of this seal's tree",
                    before.seq
                ));
            }
        }
        self.seals.push(seal);
        Ok(())
    }

    /// The seals checked so far.
    pub fn checked(&self) -> &[Seal] {
        &self.seals
    }

    /// The seals checked; an error when a listed seal never came past.
    pub fn finish(self) -> Result<Vec<Seal>, (u64, String)> {
        match self.expected.get(self.seals.len()) {
            Some(&missing) => Err((missing, "listed as a seal but is not one".into())),
            None => Ok(self.seals),
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::ledger::chain;
    use crate::ledger::entry::{Entry, Reading};
    use crate::ledger::hash::Hash;
    use crate::ledger::merkle::root;
    use crate::ledger::period::{Period, parse_date};
    use crate::ledger::seal::{Figures, parse_period};
    use crate::quantity::Mass;
    use chrono::DateTime;

    fn injection(seq: u64) -> Entry {
        let day = Period::day(parse_date("2026-01-02").unwrap());
        let mass = Mass::from_grams(seq as i64 + 1);
        let (project, site) = ("TFS".into(), "TF-I1".into());
        let mut e = Entry::draft(
            EntryKind::Injection,
            project,
            site,
            day,
            Reading::default(),
            mass,
            DateTime::UNIX_EPOCH,
        );
        e.seq = seq;
        e.key = format!("k{seq}");
        e
    }

    /// A chain of `n` entries with a seal at each seq of `at`; `bend` alters a seal before it is
    /// hashed, as someone rewriting the chain from there on would.
    fn chain_with_seals(n: u64, at: &[u64], bend: impl Fn(&mut Seal)) -> Vec<SealedEntry> {
        let mut out: Vec<SealedEntry> = Vec::new();
        let mut prev = Hash::GENESIS;
        let labels = ["2026-01", "2026-02", "2026-03"];
        for seq in 0..n {
            let e = match at.iter().position(|&a| a == seq) {
                Some(i) => {
                    let (label, period) = parse_period(labels[i]).unwrap();
                    let leaves: Vec<Hash> = out.iter().map(|s| s.leaf).collect();
                    let mut s = Seal {
                        seq,
                        label,
                        period,
                        tree_size: seq,
                        root: root(&leaves),
                        figures: Figures::default(),
                        recorded_at: DateTime::UNIX_EPOCH,
                    };
                    bend(&mut s);
                    s.entry("TFS")
                }
                None => injection(seq),
            };
            let s = chain::seal(e, prev);
            prev = s.chain;
            out.push(s);
        }
        out
    }

    fn run(entries: &[SealedEntry], listed: Vec<u64>) -> Result<usize, String> {
        let mut c = SealCheck::new(listed);
        for s in entries {
            c.push(s)?;
        }
        c.finish().map(|s| s.len()).map_err(|(_, w)| w)
    }

    #[test]
    fn honest_seals_pass_and_bent_ones_are_named() {
        let at = [3, 7, 12];
        assert_eq!(run(&chain_with_seals(15, &at, |_| ()), at.to_vec()), Ok(3));
        let bad_root = chain_with_seals(15, &at, |s| {
            if s.seq == 7 {
                s.root = Hash::of(b"other");
            }
        });
        assert!(run(&bad_root, at.to_vec()).unwrap_err().contains("root"));
        let bad_size = chain_with_seals(15, &at, |s| {
            if s.seq == 12 {
                s.tree_size = 11;
            }
        });
        assert!(
            run(&bad_size, at.to_vec())
                .unwrap_err()
                .contains("covers 11")
        );
        let honest = chain_with_seals(15, &at, |_| ());
        assert!(run(&honest, vec![3, 12]).is_err(), "an unlisted seal");
        assert!(
            run(&honest, vec![3, 7, 12, 14]).is_err(),
            "a listed seal that is none"
        );
    }
}
