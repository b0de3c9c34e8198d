//! A project's imported files no entry has named yet as its evidence: each must be named by
//! the end of a walk of its chain (an import whose entries were cut from the chain's end
//! leaves its file behind).

use super::{Entry, Hash};
use std::collections::HashMap;

/// The files still unnamed, by SHA-256: their import id and file name.
pub struct UnnamedFiles(HashMap<Hash, (i64, String)>);

impl UnnamedFiles {
    /// The imports (SHA-256, id, file name) of a project, none named yet.
    pub fn new(imports: impl IntoIterator<Item = (Hash, i64, String)>) -> Self {
        UnnamedFiles(
            imports
                .into_iter()
                .map(|(sha, id, name)| (sha, (id, name)))
                .collect(),
        )
    }

    /// Entry `e` of the walk names its evidence file, if it has one.
    pub fn see(&mut self, e: &Entry) {
        if let Some(ev) = &e.evidence
            && !self.0.is_empty()
        {
            self.0.remove(&ev.sha256);
        }
    }

    /// At the walk's end: the first import (by id) no entry named, if any.
    pub fn finish(self, project: &str) -> Result<(), String> {
        match self.0.into_values().min_by_key(|(id, _)| *id) {
            None => Ok(()),
            Some((id, name)) => Err(format!(
                "project {project} import {id} ({name}): no entry of the chain names this file as its evidence"
            )),
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn an_unnamed_file_is_named_by_its_import() {
        let files = UnnamedFiles::new([(Hash([1; 32]), 2, "a.csv".to_string())]);
        let e = files.finish("TFS").unwrap_err();
        assert_eq!(
            e,
            "project TFS import 2 (a.csv): no entry of the chain names this file as its evidence"
        );
        assert!(UnnamedFiles::new([]).finish("TFS").is_ok());
    }
}
