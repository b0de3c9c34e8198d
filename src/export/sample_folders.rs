//! The demo's folders: the sample files written out for its scripts (`$SAMPLES`), a folder
//! for the key files it makes (`$KEYS`, private to the user, removed when the demo ends), and
//! one for the report pages (`$REPORTS`, kept, so they can be opened after the demo).

use crate::error::{Error, Result, StoreKind};
use crate::import::script::{SAMPLES, script_lines};

fn io(e: std::io::Error) -> Error {
    Error::store(
        StoreKind::System,
        format!("demo: could not write the sample files: {e}"),
    )
}

/// A folder for a demo ledger that is not kept, removed when it drops.
pub fn passing_folder() -> Result<tempfile::TempDir> {
    tempfile::tempdir().map_err(io)
}

pub struct Folders {
    samples: tempfile::TempDir,
    keys: tempfile::TempDir,
    reports: tempfile::TempDir,
}

impl Folders {
    /// The three folders, the sample files written into the first.
    pub fn new() -> Result<Folders> {
        let dir = |prefix: &str, private: bool| {
            let mut b = tempfile::Builder::new();
            b.prefix(prefix);
            #[cfg(unix)]
            if private {
                use std::os::unix::fs::PermissionsExt;
                b.permissions(std::fs::Permissions::from_mode(0o700));
            }
            #[cfg(not(unix))]
            let _ = private;
            b.tempdir().map_err(io)
        };
        let folders = Folders {
            samples: dir("sinkbook-demo-samples-", false)?,
            keys: dir("sinkbook-demo-keys-", true)?,
            reports: dir("sinkbook-demo-reports-", false)?,
        };
        for (name, text) in SAMPLES {
            std::fs::write(folders.samples.path().join(name), text).map_err(io)?;
        }
        Ok(folders)
    }

    /// A script's word with the folders in place of their names.
    pub fn substitute(&self, word: &str) -> String {
        let shown = |d: &tempfile::TempDir| d.path().display().to_string();
        word.replace("$SAMPLES", &shown(&self.samples))
            .replace("$KEYS", &shown(&self.keys))
            .replace("$REPORTS", &shown(&self.reports))
    }

    /// Hands `run` every command line of the sample scripts in order, split into words with
    /// the folders in place; a failure names the script and its line.
    pub fn run_scripts(&self, mut run: impl FnMut(&[String]) -> Result<()>) -> Result<()> {
        for (name, text) in SAMPLES.iter().filter(|(n, _)| n.ends_with(".sinkbook")) {
            for (n, line) in script_lines(text) {
                let words = shlex::split(&self.substitute(line))
                    .ok_or_else(|| Error::Usage(format!("{name} line {n}: unbalanced quotes")))?;
                run(&words).map_err(|e| e.at(&format!("{name} line {n}")))?;
            }
        }
        Ok(())
    }

    /// Keeps the report folder and names the pages in it.
    pub fn keep_reports(self) -> Result<Vec<String>> {
        let dir = self.reports.keep();
        let mut pages: Vec<String> = std::fs::read_dir(&dir)
            .map_err(io)?
            .map(|e| e.map(|e| e.path().display().to_string()).map_err(io))
            .collect::<Result<_>>()?;
        pages.sort();
        Ok(pages)
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn every_sample_is_written_and_named_through_its_folder() {
        let folders = Folders::new().unwrap();
        for (name, text) in SAMPLES {
            let path = folders.substitute(&format!("$SAMPLES/{name}"));
            assert_eq!(std::fs::read_to_string(path).unwrap(), *text);
        }
        let mut lines = 0;
        folders
            .run_scripts(|words| {
                lines += 1;
                assert!(!words.iter().any(|w| w.contains("$SAMPLES")), "{words:?}");
                Ok(())
            })
            .unwrap();
        assert!(lines > 0);
        assert!(folders.keep_reports().unwrap().is_empty());
    }
}
