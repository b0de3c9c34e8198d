//! SHA-256 hashes of entries: the leaf of one entry and the chain that links it to all before it.

use sha2::{Digest, Sha256};
use std::fmt;

/// A SHA-256 digest, shown and stored as lowercase hex.
#[derive(Clone, Copy, PartialEq, Eq, Hash)]
pub struct Hash(pub [u8; 32]);

impl Hash {
    /// The chain value before seq 0.
    pub const GENESIS: Hash = Hash([0; 32]);

    /// Lowercase hex, digit by digit from a table (every entry row stores three of these, so
    /// reports and verify write and read millions).
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
        let digits: &[u8; 64] = s.as_bytes().try_into().ok()?;
        let mut out = [0u8; 32];
        let mut bad = 0;
        for (o, pair) in out.iter_mut().zip(digits.chunks_exact(2)) {
            let (hi, lo) = (
                HEX_VALUE[usize::from(pair[0])],
                HEX_VALUE[usize::from(pair[1])],
            );
            bad |= hi | lo;
            *o = hi << 4 | lo;
        }
        (bad < 16).then_some(Hash(out))
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

/// Each byte's value as a hex digit, or `NOT_HEX`: a table, since every entry row read holds
/// three digests to decode.
const NOT_HEX: u8 = 0xff;
const HEX_VALUE: [u8; 256] = {
    let mut t = [NOT_HEX; 256];
    let mut i = 0;
    while i < 10 {
        t[b'0' as usize + i] = i as u8;
        i += 1;
    }
    let mut i = 0;
    while i < 6 {
        t[b'a' as usize + i] = 10 + i as u8;
        t[b'A' as usize + i] = 10 + i as u8;
        i += 1;
    }
    t
};

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
        assert_eq!(Hash::from_hex(&h.to_hex().to_uppercase()), Some(h));
        assert_eq!(Hash::from_hex(&format!("{}g", &h.to_hex()[1..])), None);
        assert_eq!(Hash::from_hex(&format!("+{}", &h.to_hex()[1..])), None);
    }
}
