//! SHA-256 hashes of entries: the leaf of one entry and the chain that links it to all before it.

use sha2::{Digest, Sha256};
use std::fmt;

/// A SHA-256 digest, shown and stored as lowercase hex.
#[derive(Clone, Copy, PartialEq, Eq, Hash)]
pub struct Hash(pub [u8; 32]);

impl Hash {
    /// The chain value before seq 0.
    pub const GENESIS: Hash = Hash([0; 32]);

    pub fn to_hex(self) -> String {
        // Written digit by digit: an import formats millions of these.
        const DIGITS: &[u8; 16] = b"0123456789abcdef";
        let mut s = String::with_capacity(64);
        for b in self.0 {
            s.push(char::from(DIGITS[usize::from(b >> 4)]));
            s.push(char::from(DIGITS[usize::from(b & 0xf)]));
        }
        s
    }

    /// Parses 64 lowercase or uppercase hex digits.
    pub fn from_hex(s: &str) -> Option<Hash> {
        if s.len() != 64 || !s.is_ascii() {
            return None;
        }
        let mut out = [0u8; 32];
        for (i, o) in out.iter_mut().enumerate() {
            *o = u8::from_str_radix(&s[2 * i..2 * i + 2], 16).ok()?;
        }
        Some(Hash(out))
    }

    /// The first 12 hex digits, enough for a person to compare by eye.
    pub fn head(self) -> String {
        self.to_hex()[..12].to_string()
    }

    /// SHA-256 of any bytes (evidence files, import files).
    pub fn of(bytes: &[u8]) -> Hash {
        Hash(Sha256::digest(bytes).into())
    }
}

impl fmt::Debug for Hash {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        write!(f, "Hash({})", self.to_hex())
    }
}

impl fmt::Display for Hash {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(&self.to_hex())
    }
}

/// leaf = SHA-256(0x00 || canonical bytes). The 0x00 prefix is RFC 6962's leaf domain, so a
/// leaf can never be confused with an interior node of a later Merkle tree over the leaves.
pub fn leaf_hash(canonical: &[u8]) -> Hash {
    let mut h = Sha256::new();
    h.update([0u8]);
    h.update(canonical);
    Hash(h.finalize().into())
}

/// chain = SHA-256(prev_chain || leaf).
pub fn chain_hash(prev: Hash, leaf: Hash) -> Hash {
    let mut h = Sha256::new();
    h.update(prev.0);
    h.update(leaf.0);
    Hash(h.finalize().into())
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn sha256_known_answers() {
        // FIPS 180-2 example "abc" — read: the standard's appendix.
        assert_eq!(
            Hash::of(b"abc").to_hex(),
            "ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad"
        );
        // RFC 6962 leaf of the empty string: SHA-256(0x00) — computed.
        assert_eq!(
            leaf_hash(b"").to_hex(),
            "6e340b9cffb37a989ca544e6bb780a2c78901d3fb33738768511a30617afa01d"
        );
    }

    #[test]
    fn hex_round_trip() {
        let h = Hash::of(b"x");
        assert_eq!(Hash::from_hex(&h.to_hex()), Some(h));
        assert_eq!(Hash::from_hex("zz"), None);
        assert_eq!(Hash::from_hex(&"é".repeat(32)), None);
    }
}
