//! Signed statements over a seal's tree head: an operator's or a verifier's ed25519 signature
//! over the project, the seal's tree size and root, the role, the statement and the time. Kept in
//! their own append-only, hashed table, so signing never writes into the operator's chain.

use super::canonical::encode_statement;
use super::hash::Hash;
use super::project::named_enum;
use chrono::{DateTime, Utc};
use ed25519_dalek::{Signature, Signer, SigningKey, VerifyingKey};

named_enum! {
    /// Who signs.
    Role {
        Operator => "operator",
        Verifier => "verifier",
    }
}

/// What a signature covers (encoded by `canonical::encode_statement`).
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct Signed {
    pub project: String,
    pub seal_seq: u64,
    pub period: String,
    pub tree_size: u64,
    pub root: Hash,
    pub role: Role,
    pub statement: String,
    pub signed_at: DateTime<Utc>,
}

impl Signed {
    /// What `role` states at `signed_at` over `seal` of `project`: its period, tree size and
    /// root beside the statement.
    pub fn over(
        seal: super::seal::Seal,
        project: &str,
        role: Role,
        statement: &str,
        signed_at: DateTime<Utc>,
    ) -> Signed {
        Signed {
            project: project.to_string(),
            seal_seq: seal.seq,
            period: seal.label,
            tree_size: seal.tree_size,
            root: seal.root,
            role,
            statement: statement.to_string(),
            signed_at,
        }
    }
}

/// A statement as stored: what was signed, the public key and the signature.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct Statement {
    pub seq: u64,
    pub signed: Signed,
    pub public_key: [u8; 32],
    pub signature: [u8; 64],
}

/// The first line of a key file; the second is the 32-byte ed25519 secret seed in hex.
pub const KEY_FILE_HEADER: &str = "sinkbook ed25519 secret key v1";

/// A key file's text for a secret seed.
pub fn key_file_text(seed: &[u8; 32]) -> String {
    let hex: String = seed.iter().map(|b| format!("{b:02x}")).collect();
    format!("{KEY_FILE_HEADER}\n{hex}\n")
}

/// The public key of a secret seed.
pub fn public_key(seed: &[u8; 32]) -> [u8; 32] {
    SigningKey::from_bytes(seed).verifying_key().to_bytes()
}

/// The signing key a key file holds.
pub fn parse_key_file(text: &str) -> Result<SigningKey, String> {
    let mut lines = text.lines();
    if lines.next() != Some(KEY_FILE_HEADER) {
        return Err(format!(
            "is not a sinkbook key file (first line is not {KEY_FILE_HEADER:?})"
        ));
    }
    let seed = lines
        .next()
        .and_then(Hash::from_hex)
        .ok_or("holds no 64-hex-digit secret key on its second line")?;
    Ok(SigningKey::from_bytes(&seed.0))
}

/// A short name for a public key: the first 16 hex digits of its SHA-256, in groups of four.
pub fn fingerprint(public_key: &[u8; 32]) -> String {
    let hex = Hash::of(public_key).to_hex();
    [&hex[0..4], &hex[4..8], &hex[8..12], &hex[12..16]].join(":")
}

pub fn hex(bytes: &[u8]) -> String {
    bytes.iter().map(|b| format!("{b:02x}")).collect()
}

/// Signs `signed` with `key`.
pub fn sign(seq: u64, signed: Signed, key: &SigningKey) -> Statement {
    let signature = key.sign(&encode_statement(&signed)).to_bytes();
    Statement {
        seq,
        signed,
        public_key: key.verifying_key().to_bytes(),
        signature,
    }
}

impl Statement {
    /// Whether the signature is the key's over the signed bytes (strict ed25519: no weak keys,
    /// no malleable signatures).
    pub fn verify(&self) -> Result<(), String> {
        let key = VerifyingKey::from_bytes(&self.public_key)
            .map_err(|_| "public key is not an ed25519 point".to_string())?;
        key.verify_strict(
            &encode_statement(&self.signed),
            &Signature::from_bytes(&self.signature),
        )
        .map_err(|_| "signature does not verify over the statement".to_string())
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn unhex<const N: usize>(s: &str) -> [u8; N] {
        let v: Vec<u8> = (0..s.len())
            .step_by(2)
            .map(|i| u8::from_str_radix(&s[i..i + 2], 16).unwrap())
            .collect();
        v.try_into().unwrap()
    }

    /// RFC 8032 §7.1, TEST 1 (empty message). Read through a verbatim quotation of the RFC's
    /// text in published code, not from the RFC document itself.
    #[test]
    fn rfc_8032_test_1() {
        let key = SigningKey::from_bytes(&unhex(
            "9d61b19deffd5a60ba844af492ec2cc44449c5697b326919703bac031cae7f60",
        ));
        assert_eq!(
            hex(&key.verifying_key().to_bytes()),
            "d75a980182b10ab7d54bfed3c964073a0ee172f3daa62325af021a68f707511a"
        );
        assert_eq!(
            hex(&key.sign(b"").to_bytes()),
            "e5564300c360ac729086e2cc806e828a84877f1eb8e5d974d873e065224901555fb8821590a33bacc61e39701cf9b46bd25bf5f0595bbe24655141438e7a100b"
        );
    }

    fn signed() -> Signed {
        Signed {
            project: "TFS".into(),
            seal_seq: 738,
            period: "2026".into(),
            tree_size: 738,
            root: Hash::of(b"root"),
            role: Role::Verifier,
            statement: "Reviewed the 2026 monitoring report; no material misstatement.".into(),
            signed_at: DateTime::from_timestamp_micros(1_800_000_000_000_000).unwrap(),
        }
    }

    #[test]
    fn round_trip_and_every_field_is_covered() {
        let key = SigningKey::from_bytes(&[7u8; 32]);
        let s = sign(0, signed(), &key);
        assert_eq!(s.verify(), Ok(()));
        let alter: [fn(&mut Signed); 8] = [
            |x| x.project = "KRE".into(),
            |x| x.seal_seq += 1,
            |x| x.period = "2026-Q4".into(),
            |x| x.tree_size -= 1,
            |x| x.root = Hash::of(b"other"),
            |x| x.role = Role::Operator,
            |x| x.statement.push('.'),
            |x| x.signed_at += chrono::Duration::microseconds(1),
        ];
        for f in alter {
            let mut t = s.clone();
            f(&mut t.signed);
            assert!(t.verify().is_err(), "{:?}", t.signed);
        }
        let mut t = s.clone();
        t.signature[10] ^= 1;
        assert!(t.verify().is_err());
        let mut t = s;
        t.public_key = SigningKey::from_bytes(&[8u8; 32])
            .verifying_key()
            .to_bytes();
        assert!(t.verify().is_err());
    }

    #[test]
    fn key_files_round_trip() {
        let text = key_file_text(&[9u8; 32]);
        let key = parse_key_file(&text).unwrap();
        assert_eq!(key.to_bytes(), [9u8; 32]);
        assert!(parse_key_file("hello\n00").is_err());
        assert!(parse_key_file(&format!("{KEY_FILE_HEADER}\nabc\n")).is_err());
        assert_eq!(fingerprint(&[0u8; 32]).len(), 19);
    }
}
