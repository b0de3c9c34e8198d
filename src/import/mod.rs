//! Reading user files: the only module that opens them. Meter exports in CSV, streamed.

pub mod csv_lines;
pub mod meter_csv;

use crate::error::{Error, Result};
use crate::ledger::Hash;
use sha2::{Digest, Sha256};
use std::io::Read;
use std::path::Path;

/// SHA-256 and size of a file, read in blocks so memory stays flat whatever its size.
pub fn hash_file(path: &Path) -> Result<(Hash, u64)> {
    let mut f = std::fs::File::open(path)
        .map_err(|e| Error::field("FILE", &path.display().to_string(), e))?;
    let mut h = Sha256::new();
    let mut buf = vec![0u8; 1 << 16];
    let mut size = 0u64;
    loop {
        let n = f
            .read(&mut buf)
            .map_err(|e| Error::field("FILE", &path.display().to_string(), e))?;
        if n == 0 {
            break;
        }
        size += n as u64;
        h.update(&buf[..n]);
    }
    Ok((Hash(h.finalize().into()), size))
}
