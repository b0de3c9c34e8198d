//! The file's bytes as evidence: every byte the parser reads is hashed and handed on, in parts,
//! to be kept verbatim. The SHA-256 recorded is therefore of exactly the bytes parsed, read once.

use crate::ledger::Hash;
use sha2::{Digest, Sha256};
use std::io::Read;

/// Bytes per evidence part handed to the sink.
pub const PART: usize = 1 << 20;

/// A reader that hashes what passes through it and hands it to `sink` in parts of `PART` bytes.
pub struct Witnessed<R, S> {
    inner: R,
    sha: Sha256,
    bytes: u64,
    part: Vec<u8>,
    sink: S,
    /// The sink's refusal, kept until the caller asks (a reader can only return io errors).
    failed: bool,
}

impl<R: Read, S: FnMut(Vec<u8>) -> bool> Witnessed<R, S> {
    /// `sink` returns false when it takes no more (the writer stopped).
    pub fn new(inner: R, sink: S) -> Self {
        Witnessed {
            inner,
            sha: Sha256::new(),
            bytes: 0,
            part: Vec::with_capacity(PART),
            sink,
            failed: false,
        }
    }

    /// Reads what is left, hands on the last part; the file's SHA-256 and size, or None when
    /// the sink stopped taking parts.
    pub fn finish(mut self) -> std::io::Result<Option<(Hash, u64)>> {
        std::io::copy(&mut self, &mut std::io::sink())?;
        if !self.part.is_empty() {
            let last = std::mem::take(&mut self.part);
            self.failed |= !(self.sink)(last);
        }
        Ok((!self.failed).then(|| (Hash(self.sha.finalize().into()), self.bytes)))
    }
}

impl<R: Read, S: FnMut(Vec<u8>) -> bool> Read for Witnessed<R, S> {
    fn read(&mut self, buf: &mut [u8]) -> std::io::Result<usize> {
        if self.failed {
            return Err(std::io::Error::other("the import stopped"));
        }
        let n = self.inner.read(buf)?;
        let got = &buf[..n];
        self.sha.update(got);
        self.bytes += n as u64;
        let mut rest = got;
        while !rest.is_empty() {
            let take = rest.len().min(PART - self.part.len());
            self.part.extend_from_slice(&rest[..take]);
            rest = &rest[take..];
            if self.part.len() == PART {
                let full = std::mem::replace(&mut self.part, Vec::with_capacity(PART));
                if !(self.sink)(full) {
                    self.failed = true;
                    return Err(std::io::Error::other("the import stopped"));
                }
            }
        }
        Ok(n)
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn parts_join_to_the_bytes_and_the_hash_is_theirs() {
        let data: Vec<u8> = (0..(PART * 2 + 17)).map(|i| (i % 251) as u8).collect();
        let mut parts = Vec::new();
        let mut w = Witnessed::new(&data[..], |p| {
            parts.push(p);
            true
        });
        let mut first = [0u8; 1000];
        w.read_exact(&mut first).unwrap();
        let (sha, size) = w.finish().unwrap().unwrap();
        assert_eq!(size, data.len() as u64);
        assert_eq!(sha, Hash::of(&data));
        assert_eq!(parts.len(), 3);
        assert_eq!(parts.concat(), data);
    }

    #[test]
    fn a_sink_that_stops_stops_the_reader() {
        let data = vec![7u8; PART + 1];
        let w = Witnessed::new(&data[..], |_| false);
        assert!(w.finish().is_err());
    }
}
