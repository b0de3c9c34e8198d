//! RFC 6962 Merkle tree heads over a project's entry leaves, with inclusion (audit path) and
//! consistency proofs and their verification (RFC 6962 §2.1; RFC 9162 §2.1.3–2.1.4 give the
//! verification steps followed here). Leaves are the chain's leaf hashes, already
//! SHA-256(0x00 || canonical bytes); interior nodes are SHA-256(0x01 || left || right).
//!
//! Every proof is a list of subtree hashes over ranges of leaves that depend on the sizes and the
//! index only, so a proof can be built from a stream of leaves (`RangeHashes`) without holding
//! the tree, and a root from a stack of subtree roots (`TreeBuilder`), O(log n) memory.

use super::hash::Hash;
use sha2::{Digest, Sha256};
use std::ops::Range;

/// SHA-256(0x01 || left || right): an interior node.
pub fn node(left: Hash, right: Hash) -> Hash {
    let mut h = Sha256::new();
    h.update([1u8]);
    h.update(left.0);
    h.update(right.0);
    Hash(h.finalize().into())
}

/// MTH of the empty tree: SHA-256 of the empty string.
pub fn empty_root() -> Hash {
    Hash::of(b"")
}

/// The largest power of two strictly below `n` (n ≥ 2).
fn split(n: u64) -> u64 {
    debug_assert!(n >= 2);
    1 << (63 - (n - 1).leading_zeros())
}

/// MTH(D[n]) of leaf hashes held in memory.
pub fn root(leaves: &[Hash]) -> Hash {
    let mut b = TreeBuilder::default();
    for l in leaves {
        b.push(*l);
    }
    b.root()
}

/// A tree head computed from leaves pushed one by one: a stack of the roots of complete
/// subtrees, at most one per power of two, so memory is O(log n).
#[derive(Debug, Clone, Default)]
pub struct TreeBuilder {
    /// (leaf count, root) of complete subtrees, left to right, sizes strictly decreasing.
    stack: Vec<(u64, Hash)>,
    size: u64,
}

impl TreeBuilder {
    pub fn push(&mut self, leaf: Hash) {
        self.size += 1;
        let mut top = (1u64, leaf);
        while let Some(&(n, h)) = self.stack.last() {
            if n != top.0 {
                break;
            }
            self.stack.pop();
            top = (2 * n, node(h, top.1));
        }
        self.stack.push(top);
    }

    pub fn size(&self) -> u64 {
        self.size
    }

    /// MTH of the leaves pushed so far. The right-hand subtrees fold in from the right, which is
    /// RFC 6962's split at the largest power of two below n.
    pub fn root(&self) -> Hash {
        let mut it = self.stack.iter().rev();
        match it.next() {
            None => empty_root(),
            Some(&(_, last)) => it.fold(last, |acc, &(_, h)| node(h, acc)),
        }
    }
}

/// The leaf ranges whose subtree hashes make the audit path of leaf `index` in a tree of
/// `size` leaves, in proof order (RFC 6962 §2.1.1, PATH(m, D[n])).
pub fn inclusion_ranges(index: u64, size: u64) -> Vec<Range<u64>> {
    let mut out = Vec::new();
    if index < size {
        path(index, 0, size, &mut out);
    }
    out
}

fn path(m: u64, lo: u64, hi: u64, out: &mut Vec<Range<u64>>) {
    let n = hi - lo;
    if n <= 1 {
        return;
    }
    let k = split(n);
    if m < k {
        path(m, lo, lo + k, out);
        out.push(lo + k..hi);
    } else {
        path(m - k, lo + k, hi, out);
        out.push(lo..lo + k);
    }
}

/// The leaf ranges whose subtree hashes make the consistency proof between the first `old`
/// leaves and the first `new` (RFC 6962 §2.1.2, PROOF(m, D[n])); empty when `old` is 0 or equal
/// to `new`, which need no proof.
pub fn consistency_ranges(old: u64, new: u64) -> Vec<Range<u64>> {
    let mut out = Vec::new();
    if 0 < old && old < new {
        subproof(old, 0, new, true, &mut out);
    }
    out
}

fn subproof(m: u64, lo: u64, hi: u64, whole: bool, out: &mut Vec<Range<u64>>) {
    let n = hi - lo;
    if m == n {
        if !whole {
            out.push(lo..hi);
        }
        return;
    }
    let k = split(n);
    if m <= k {
        subproof(m, lo, lo + k, whole, out);
        out.push(lo + k..hi);
    } else {
        subproof(m - k, lo + k, hi, false, out);
        out.push(lo..lo + k);
    }
}

/// The hashes of given leaf ranges, collected from leaves streamed in order: one builder per
/// range, alive while the stream is inside it.
pub struct RangeHashes {
    wanted: Vec<(Range<u64>, TreeBuilder)>,
    next: u64,
}

impl RangeHashes {
    pub fn new(ranges: Vec<Range<u64>>) -> Self {
        RangeHashes {
            wanted: ranges
                .into_iter()
                .map(|r| (r, TreeBuilder::default()))
                .collect(),
            next: 0,
        }
    }

    /// The next leaf of the stream (index 0, 1, 2, …).
    pub fn push(&mut self, leaf: Hash) {
        for (r, b) in &mut self.wanted {
            if r.contains(&self.next) {
                b.push(leaf);
            }
        }
        self.next += 1;
    }

    /// The hashes in the order of the ranges; None while any range is still incomplete.
    pub fn finish(self) -> Option<Vec<Hash>> {
        self.wanted
            .into_iter()
            .map(|(r, b)| (b.size() == r.end - r.start).then(|| b.root()))
            .collect()
    }
}

/// Hashes of `ranges` over leaves held in memory.
fn hashes_of(leaves: &[Hash], ranges: Vec<Range<u64>>) -> Vec<Hash> {
    ranges
        .into_iter()
        .map(|r| root(&leaves[r.start as usize..r.end as usize]))
        .collect()
}

/// The audit path of leaf `index` in the tree of all `leaves`.
pub fn inclusion_proof(leaves: &[Hash], index: u64) -> Vec<Hash> {
    hashes_of(leaves, inclusion_ranges(index, leaves.len() as u64))
}

/// The consistency proof from the tree of the first `old` leaves to the tree of all `leaves`.
pub fn consistency_proof(leaves: &[Hash], old: u64) -> Vec<Hash> {
    hashes_of(leaves, consistency_ranges(old, leaves.len() as u64))
}

/// Shifts `fn_` and `sn` right together until `fn_`'s lowest bit is set or it is 0.
fn shift_to_set_bit(fn_: &mut u64, sn: &mut u64) {
    while *fn_ & 1 == 0 && *fn_ != 0 {
        *fn_ >>= 1;
        *sn >>= 1;
    }
}

/// Whether `path` proves that `leaf` is leaf `index` of the tree of `size` leaves whose head is
/// `root` (RFC 9162 §2.1.3.2).
pub fn verify_inclusion(index: u64, size: u64, leaf: Hash, path: &[Hash], root: Hash) -> bool {
    if index >= size {
        return false;
    }
    let (mut fn_, mut sn) = (index, size - 1);
    let mut r = leaf;
    for &p in path {
        if sn == 0 {
            return false;
        }
        if fn_ & 1 == 1 || fn_ == sn {
            r = node(p, r);
            shift_to_set_bit(&mut fn_, &mut sn);
        } else {
            r = node(r, p);
        }
        fn_ >>= 1;
        sn >>= 1;
    }
    sn == 0 && r == root
}

/// Whether `proof` shows that the tree of `old` leaves with head `old_root` is a prefix of the
/// tree of `new` leaves with head `new_root` (RFC 9162 §2.1.4.2). Equal sizes need an empty
/// proof and equal heads; an empty old tree is a prefix of any tree.
pub fn verify_consistency(
    old: u64,
    new: u64,
    old_root: Hash,
    new_root: Hash,
    proof: &[Hash],
) -> bool {
    if old > new {
        return false;
    }
    if old == new {
        return proof.is_empty() && old_root == new_root;
    }
    if old == 0 {
        return proof.is_empty() && old_root == empty_root();
    }
    let mut path: Vec<Hash> = Vec::with_capacity(proof.len() + 1);
    if old.is_power_of_two() {
        path.push(old_root);
    }
    path.extend_from_slice(proof);
    let Some((&first, rest)) = path.split_first() else {
        return false;
    };
    let (mut fn_, mut sn) = (old - 1, new - 1);
    while fn_ & 1 == 1 {
        fn_ >>= 1;
        sn >>= 1;
    }
    let (mut fr, mut sr) = (first, first);
    for &c in rest {
        if sn == 0 {
            return false;
        }
        if fn_ & 1 == 1 || fn_ == sn {
            fr = node(c, fr);
            sr = node(c, sr);
            shift_to_set_bit(&mut fn_, &mut sn);
        } else {
            sr = node(sr, c);
        }
        fn_ >>= 1;
        sn >>= 1;
    }
    fr == old_root && sr == new_root && sn == 0
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::ledger::hash::leaf_hash;

    /// RFC 6962 reference inputs (hex) and the roots of the first n of them, as the project's
    /// shared references list them: the tree-head definition read in RFC 6962 §2.1, the roots
    /// computed from it and matching the public reference test vectors.
    const INPUTS: [&str; 8] = [
        "",
        "00",
        "10",
        "2021",
        "3031",
        "40414243",
        "5051525354555657",
        "606162636465666768696a6b6c6d6e6f",
    ];
    const ROOTS: [&str; 8] = [
        "6e340b9cffb37a989ca544e6bb780a2c78901d3fb33738768511a30617afa01d",
        "fac54203e7cc696cf0dfcb42c92a1d9dbaf70ad9e621f4bd8d98662f00e3c125",
        "aeb6bcfe274b70a14fb067a5e5578264db0fa9b51af5e0ba159158f329e06e77",
        "d37ee418976dd95753c1c73862b9398fa2a2cf9b4ff0fdfe8b30cd95209614b7",
        "4e3bbb1f7b478dcfe71fb631631519a3bca12c9aefca1612bfce4c13a86264d4",
        "76e67dadbcdf1e10e1b74ddc608abd2f98dfb16fbce75277b5232a127f2087ef",
        "ddb89be403809e325750d3d263cd78929c2942b7942a34b77e122c9594a74c8c",
        "5dc9da79a70659a9ad559cb701ded9a2ab9d823aad2f4960cfe370eff4604328",
    ];

    fn unhex(s: &str) -> Vec<u8> {
        (0..s.len())
            .step_by(2)
            .map(|i| u8::from_str_radix(&s[i..i + 2], 16).unwrap())
            .collect()
    }

    fn leaves() -> Vec<Hash> {
        INPUTS.iter().map(|i| leaf_hash(&unhex(i))).collect()
    }

    fn roots() -> Vec<Hash> {
        ROOTS.iter().map(|r| Hash::from_hex(r).unwrap()).collect()
    }

    /// The tree head by the recursive definition, independent of the builder.
    fn mth(d: &[Hash]) -> Hash {
        match d.len() {
            0 => empty_root(),
            1 => d[0],
            n => {
                let k = split(n as u64) as usize;
                node(mth(&d[..k]), mth(&d[k..]))
            }
        }
    }

    #[test]
    fn rfc_6962_roots() {
        let (l, r) = (leaves(), roots());
        // MTH({}) = SHA-256("") — read: RFC 6962 §2.1.
        assert_eq!(
            empty_root().to_hex(),
            "e3b0c44298fc1c149afbf4c8996fb92427ae41e4649b934ca495991b7852b855"
        );
        for n in 1..=8 {
            assert_eq!(root(&l[..n]), r[n - 1], "n = {n}");
            assert_eq!(mth(&l[..n]), r[n - 1], "n = {n}");
        }
    }

    #[test]
    fn rfc_6962_every_inclusion_proof_up_to_8() {
        let (l, r) = (leaves(), roots());
        for n in 1..=8u64 {
            for i in 0..n {
                let p = inclusion_proof(&l[..n as usize], i);
                assert!(
                    verify_inclusion(i, n, l[i as usize], &p, r[n as usize - 1]),
                    "leaf {i} of {n}"
                );
                // Any other leaf, index or size fails with the same path.
                let other = l[((i + 1) % n) as usize];
                if n > 1 {
                    assert!(!verify_inclusion(i, n, other, &p, r[n as usize - 1]));
                    assert!(!verify_inclusion(
                        (i + 1) % n,
                        n,
                        l[i as usize],
                        &p,
                        r[n as usize - 1]
                    ));
                }
                assert!(!verify_inclusion(
                    n,
                    n,
                    l[i as usize],
                    &p,
                    r[n as usize - 1]
                ));
            }
        }
    }

    #[test]
    fn rfc_6962_every_consistency_pair_up_to_8() {
        let (l, r) = (leaves(), roots());
        for n in 1..=8u64 {
            for m in 1..=n {
                let p = consistency_proof(&l[..n as usize], m);
                let (rm, rn) = (r[m as usize - 1], r[n as usize - 1]);
                assert!(verify_consistency(m, n, rm, rn, &p), "{m} → {n}");
                if m < n {
                    assert!(!p.is_empty());
                    assert!(
                        !verify_consistency(m, n, rn, rn, &p),
                        "{m} → {n} wrong old head"
                    );
                    assert!(
                        !verify_consistency(m, n, rm, rm, &p),
                        "{m} → {n} wrong new head"
                    );
                }
            }
        }
        // RFC 6962 §2.1.3's example tree of 7 leaves (from memory, not re-read here): the audit
        // path of d0 is [b, h, l] (leaf d1, the subtree d2..d3, the subtree d4..d6) and
        // PROOF(3, D[7]) is [c, d, g, l] (leaf d2, leaf d3, the subtree d0..d1, the subtree d4..d6).
        assert_eq!(inclusion_ranges(0, 7), vec![1..2, 2..4, 4..7]);
        assert_eq!(consistency_ranges(3, 7), vec![2..3, 3..4, 0..2, 4..7]);
    }

    #[test]
    fn streamed_hashes_match_the_tree() {
        let l = leaves();
        for n in 1..=8u64 {
            for m in 1..=n {
                let mut s = RangeHashes::new(consistency_ranges(m, n));
                for x in &l[..n as usize] {
                    s.push(*x);
                }
                assert_eq!(s.finish().unwrap(), consistency_proof(&l[..n as usize], m));
            }
        }
        let mut short = RangeHashes::new(vec![0..3, 3..4]);
        short.push(l[0]);
        assert_eq!(short.finish(), None);
    }

    fn chain_leaves(n: usize) -> Vec<Hash> {
        (0..n)
            .map(|i| leaf_hash(&(i as u64).to_le_bytes()))
            .collect()
    }

    proptest::proptest! {
        /// Any single bit flipped in any hash of an inclusion proof or the root, a dropped hash,
        /// or a neighbouring index makes the proof fail. (A path does not fix the tree size on
        /// its own: sizes whose paths have the same shape share it, so the size is bound by the
        /// signed or sealed head the root comes with.)
        #[test]
        fn tampered_inclusion_proofs_fail(n in 1usize..300, i in 0usize..300, pick in 0usize..64, bit in 0u8..8, byte in 0usize..32) {
            let l = chain_leaves(n);
            let i = (i % n) as u64;
            let rt = root(&l);
            let mut p = inclusion_proof(&l, i);
            proptest::prop_assert!(verify_inclusion(i, n as u64, l[i as usize], &p, rt));
            proptest::prop_assert!(!verify_inclusion(i ^ 1, n as u64, l[i as usize], &p, rt) || (i ^ 1) == i);
            let mut bad_root = rt;
            bad_root.0[byte] ^= 1 << bit;
            proptest::prop_assert!(!verify_inclusion(i, n as u64, l[i as usize], &p, bad_root));
            if !p.is_empty() {
                let k = pick % p.len();
                p[k].0[byte] ^= 1 << bit;
                proptest::prop_assert!(!verify_inclusion(i, n as u64, l[i as usize], &p, rt));
                p[k].0[byte] ^= 1 << bit;
                p.pop();
                proptest::prop_assert!(!verify_inclusion(i, n as u64, l[i as usize], &p, rt));
            }
        }

        /// The same for consistency proofs: a flipped bit, a dropped or an extra hash fails.
        #[test]
        fn tampered_consistency_proofs_fail(n in 2usize..300, m in 1usize..300, pick in 0usize..64, bit in 0u8..8, byte in 0usize..32) {
            let l = chain_leaves(n);
            let m = 1 + (m % (n - 1)) as u64;
            let (rm, rn) = (root(&l[..m as usize]), root(&l));
            let mut p = consistency_proof(&l, m);
            proptest::prop_assert!(verify_consistency(m, n as u64, rm, rn, &p));
            let k = pick % p.len();
            p[k].0[byte] ^= 1 << bit;
            proptest::prop_assert!(!verify_consistency(m, n as u64, rm, rn, &p));
            p[k].0[byte] ^= 1 << bit;
            let mut longer = p.clone();
            longer.push(rn);
            proptest::prop_assert!(!verify_consistency(m, n as u64, rm, rn, &longer));
            p.pop();
            proptest::prop_assert!(!verify_consistency(m, n as u64, rm, rn, &p));
        }
    }
}
