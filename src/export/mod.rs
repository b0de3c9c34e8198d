//! Files written for people and programs to keep or send on — a bundle, a key — each created
//! whole or not at all, so a failed command leaves no half-written file behind; a key file is
//! readable by its owner only and never overwrites a file. The demo's folders are written here
//! too (sample_folders.rs).

pub mod bundle_file;
pub mod sample_folders;

use crate::ledger::signature::{key_file_text, public_key};
use std::io::{BufWriter, Write};
use std::path::{Path, PathBuf};
use tempfile::NamedTempFile;

/// A file written beside its target and renamed onto it once complete.
pub struct WholeFile {
    out: BufWriter<NamedTempFile>,
    path: PathBuf,
}

impl WholeFile {
    /// Starts the file that is to become `path`, in the same directory (a rename never crosses
    /// file systems).
    pub fn create(path: &Path) -> std::io::Result<WholeFile> {
        let dir = match path.parent() {
            Some(d) if !d.as_os_str().is_empty() => d.to_path_buf(),
            _ => PathBuf::from("."),
        };
        Ok(WholeFile {
            out: BufWriter::new(NamedTempFile::new_in(&dir)?),
            path: path.to_path_buf(),
        })
    }

    pub fn write(&mut self, bytes: &[u8]) -> std::io::Result<()> {
        self.out.write_all(bytes)
    }

    /// The file made readable, synced and renamed onto its path.
    pub fn persist(self) -> std::io::Result<()> {
        let tmp = self.out.into_inner().map_err(|e| e.into_error())?;
        // For sending: readable by others like any file written (a temporary file is created
        // for its owner only).
        #[cfg(unix)]
        {
            use std::os::unix::fs::PermissionsExt;
            tmp.as_file()
                .set_permissions(std::fs::Permissions::from_mode(0o644))?;
        }
        tmp.as_file().sync_all()?;
        tmp.persist(&self.path).map_err(|e| e.error)?;
        Ok(())
    }
}

/// Why a new key file was not written.
#[derive(Debug)]
pub enum KeyFileError {
    /// The system gave no randomness for the secret.
    NoRandomness(getrandom::Error),
    /// A file is there already: a key file never overwrites one.
    Exists,
    File(std::io::Error),
}

/// A new ed25519 secret seed from the system's randomness, written to `path` as a key file
/// only its owner may read; returns the seed's public key.
pub fn new_key_file(path: &Path) -> Result<[u8; 32], KeyFileError> {
    let mut seed = [0u8; 32];
    getrandom::fill(&mut seed).map_err(KeyFileError::NoRandomness)?;
    write_private(path, &key_file_text(&seed)).map_err(|e| match e.kind() {
        std::io::ErrorKind::AlreadyExists => KeyFileError::Exists,
        _ => KeyFileError::File(e),
    })?;
    Ok(public_key(&seed))
}

/// Creates `path` with mode 0600 holding `text`, refusing one that exists (`AlreadyExists`):
/// a secret is readable by its owner only and never overwrites a file.
fn write_private(path: &Path, text: &str) -> std::io::Result<()> {
    let mut o = std::fs::OpenOptions::new();
    o.write(true).create_new(true);
    #[cfg(unix)]
    std::os::unix::fs::OpenOptionsExt::mode(&mut o, 0o600);
    o.open(path)?.write_all(text.as_bytes())
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn a_whole_file_appears_only_when_persisted_and_a_private_one_never_overwrites() {
        let dir = tempfile::tempdir().unwrap();
        let path = dir.path().join("out.txt");
        let mut f = WholeFile::create(&path).unwrap();
        f.write(b"abc").unwrap();
        assert!(!path.exists());
        f.persist().unwrap();
        assert_eq!(std::fs::read(&path).unwrap(), b"abc");
        let err = write_private(&path, "x").unwrap_err();
        assert_eq!(err.kind(), std::io::ErrorKind::AlreadyExists);
        let key = dir.path().join("k");
        write_private(&key, "secret").unwrap();
        #[cfg(unix)]
        {
            use std::os::unix::fs::PermissionsExt;
            let mode = std::fs::metadata(&key).unwrap().permissions().mode();
            assert_eq!(mode & 0o777, 0o600);
        }
    }
}
