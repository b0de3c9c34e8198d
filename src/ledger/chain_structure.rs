//! The rules a project's chain is held to beyond each entry's own hashes, checked as `verify`
//! walks it in seq order: a registered site on every entry (or none where its kind records
//! none), the seals' trees, the chain states recorded reconciliations name, and every imported
//! file named as some entry's evidence.

use super::reconciliation::Recorded;
use super::reconciliation_states::ChainStates;
use super::seal_check::SealCheck;
use super::unnamed_files::UnnamedFiles;
use super::{EntryKind, SealedEntry};

/// `see` is called with each entry in seq order, `finish` with the chain's length.
pub struct ChainStructure<'a> {
    project: &'a str,
    sites: Vec<String>,
    unnamed: UnnamedFiles,
    seals: SealCheck,
    states: ChainStates<'a>,
}

impl<'a> ChainStructure<'a> {
    /// The project's registered site codes, its imported files, the seqs its seals are listed
    /// at and its recorded reconciliations.
    pub fn new(
        project: &'a str,
        sites: Vec<String>,
        unnamed: UnnamedFiles,
        seal_seqs: Vec<u64>,
        records: &'a [Recorded],
    ) -> Self {
        ChainStructure {
            project,
            sites,
            unnamed,
            seals: SealCheck::new(seal_seqs),
            states: ChainStates::new(records),
        }
    }

    /// The next entry of the chain; what breaks a rule, naming the project and seq.
    pub fn see(&mut self, s: &SealedEntry) -> Result<(), String> {
        let e = &s.entry;
        let at = |what: String| format!("project {} seq {}: {what}", self.project, e.seq);
        if e.site.is_empty() {
            if e.kind != EntryKind::Seal && !e.kind.site_optional() {
                return Err(at(format!("a {} entry names no site", e.kind)));
            }
        } else if !self.sites.contains(&e.site) {
            return Err(at(format!("site {} is not registered", e.site)));
        }
        self.unnamed.see(e);
        self.seals.push(s).map_err(at)?;
        self.states
            .check(self.project, e.seq, s.chain)
            .map_err(|u| u.to_string())
    }

    /// At the walk's end, with the number of entries walked: the number of seals checked.
    pub fn finish(self, entries: u64) -> Result<usize, String> {
        let project = self.project;
        self.states
            .finish(project, entries)
            .map_err(|u| u.to_string())?;
        self.unnamed.finish(project)?;
        let seals = self
            .seals
            .finish()
            .map_err(|(seq, w)| format!("project {project} seq {seq}: {w}"))?;
        Ok(seals.len())
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::ledger::seal::Seal;
    use crate::ledger::seal::tests::seal;
    use crate::ledger::{Entry, Hash, chain};

    /// A seal entry at seq 0 of TFS, the base the test's entries are bent from.
    fn seal_entry() -> Entry {
        let empty = crate::ledger::merkle::root(&[]);
        Seal {
            root: empty,
            ..seal("2026-01", 0)
        }
        .entry("TFS")
    }

    fn walk(e: Entry, seal_seqs: Vec<u64>) -> Result<usize, String> {
        let mut c = ChainStructure::new(
            "TFS",
            vec!["TF-I1".into()],
            UnnamedFiles::new([]),
            seal_seqs,
            &[],
        );
        c.see(&chain::seal(e, Hash::GENESIS))?;
        c.finish(1)
    }

    #[test]
    fn a_site_must_be_registered_and_named_where_the_kind_needs_one() {
        assert_eq!(walk(seal_entry(), vec![0]), Ok(1));
        let unregistered = Entry {
            kind: EntryKind::Injection,
            site: "TF-I9".into(),
            ..seal_entry()
        };
        assert_eq!(
            walk(unregistered, vec![]),
            Err("project TFS seq 0: site TF-I9 is not registered".into())
        );
        let siteless = Entry {
            kind: EntryKind::Injection,
            ..seal_entry()
        };
        assert_eq!(
            walk(siteless, vec![]),
            Err("project TFS seq 0: a injection entry names no site".into())
        );
    }

    #[test]
    fn a_seal_the_list_does_not_hold_is_named_with_its_seq() {
        assert!(
            walk(seal_entry(), vec![])
                .unwrap_err()
                .starts_with("project TFS seq 0: ")
        );
    }
}
