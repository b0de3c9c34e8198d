//! Loading a checked bundle into the ledger: a project the ledger lacks is added whole; a
//! project it holds is extended only when an RFC 6962 consistency proof, built from the
//! bundle's leaves, shows the held entries are the bundle's first ones, and every registration
//! held is the bundle's too. Anything else writes nothing (the command's transaction).

use super::{BundleImport, NewImport, Tx};
use crate::bundle::Item;
use crate::bundle::line::Import;
use crate::error::{Error, Result};
use crate::ledger::feedstock::Feedstock;
use crate::ledger::merkle::{RangeHashes, TreeBuilder, consistency_ranges, verify_consistency};
use crate::ledger::reconciliation::Recorded;
use crate::ledger::setting::Setting;
use crate::ledger::signature::Statement;
use crate::ledger::{Hash, Project, SealedEntry, Site};

/// What the ledger already holds of the bundle's project.
struct Held {
    project: Project,
    sites: Vec<Site>,
    settings: Vec<Setting>,
    feedstocks: Vec<Feedstock>,
    imports: Vec<BundleImport>,
    signatures: Vec<Statement>,
    reconciliations: Vec<Recorded>,
    entries: u64,
    root: Hash,
}

/// Loading state: what is held, what was matched, rows waiting to be written.
pub struct BundleLoader {
    size: u64,
    held: Option<Held>,
    matched_sites: usize,
    matched_feedstocks: usize,
    matched_imports: usize,
    matched_signatures: usize,
    matched_reconciliations: usize,
    next_import_id: i64,
    /// The import being read: its id in this ledger (None: already held, its bytes skipped).
    import: Option<(Option<i64>, Import)>,
    entries: Vec<SealedEntry>,
    proof: RangeHashes,
    new_entries: u64,
    new_signatures: u64,
    new_reconciliations: u64,
}

fn not_extension(project: &str, what: impl std::fmt::Display) -> Error {
    Error::ledger(format!(
        "bundle of project {project} is not an extension of the ledger's copy: {what}; nothing written"
    ))
}

/// Whether the ledger's copy already holds this registration (then it must be the same), or
/// it is new to the ledger.
fn already_held<T: PartialEq>(
    held: Option<Option<&T>>,
    new: &T,
    code: &str,
    what: impl FnOnce() -> String,
) -> Result<bool> {
    match held.flatten() {
        Some(x) if x != new => Err(not_extension(code, format!("{} differs", what()))),
        Some(_) => Ok(true),
        None => Ok(false),
    }
}

/// What a load added: entries, signed statements, recorded reconciliations.
pub struct BundleAdded {
    pub entries: u64,
    pub signatures: u64,
    pub reconciliations: u64,
}

impl BundleLoader {
    /// A loader for a bundle of `size` entries, its imports numbered after the ledger's.
    pub fn new(tx: &mut Tx<'_>, size: u64) -> Result<Self> {
        Ok(BundleLoader {
            size,
            held: None,
            matched_sites: 0,
            matched_feedstocks: 0,
            matched_imports: 0,
            matched_signatures: 0,
            matched_reconciliations: 0,
            next_import_id: tx.next_import_id()?,
            import: None,
            entries: Vec::new(),
            proof: RangeHashes::new(Vec::new()),
            new_entries: 0,
            new_signatures: 0,
            new_reconciliations: 0,
        })
    }

    /// What the load has added so far.
    pub fn added(&self) -> BundleAdded {
        BundleAdded {
            entries: self.new_entries,
            signatures: self.new_signatures,
            reconciliations: self.new_reconciliations,
        }
    }

    fn held_project(tx: &mut Tx<'_>, code: &str) -> Result<Option<Held>> {
        let Some(project) = tx.project(code)? else {
            return Ok(None);
        };
        let mut tree = TreeBuilder::default();
        tx.each_entry(code, |s| {
            tree.push(s.leaf);
            Ok(())
        })?;
        Ok(Some(Held {
            sites: tx.sites(code)?,
            settings: tx.settings(code)?,
            feedstocks: tx.feedstocks(code)?,
            imports: tx.bundle_imports(code)?,
            signatures: tx.signatures(code)?,
            reconciliations: tx.reconciliations(code)?,
            project,
            entries: tree.size(),
            root: tree.root(),
        }))
    }

    /// One checked line of the bundle of project `code`: matched against what is held, or
    /// written.
    pub fn item(&mut self, tx: &mut Tx<'_>, code: &str, item: &Item) -> Result<()> {
        if !matches!(item, Item::Evidence(_)) {
            self.close_import(tx, code)?;
        }
        match item {
            Item::Header { project, .. } => self.header(tx, project)?,
            Item::Project(p) => match &self.held {
                Some(h) if &h.project != p => {
                    return Err(not_extension(code, "the project's registration differs"));
                }
                Some(_) => {}
                None => tx.add_project(p)?,
            },
            Item::Site(s) => {
                let held = self
                    .held
                    .as_ref()
                    .map(|h| h.sites.iter().find(|x| x.code == s.code));
                if already_held(held, s, code, || format!("site {}", s.code))? {
                    self.matched_sites += 1;
                } else {
                    tx.add_site(s)?;
                }
            }
            Item::Setting(s) => {
                let held = self.held.as_ref().map(|h| h.settings.get(s.seq as usize));
                if !already_held(held, s, code, || format!("setting {}", s.seq))? {
                    tx.add_settings(std::slice::from_ref(s))?;
                }
            }
            Item::Feedstock(f) => {
                let held = self
                    .held
                    .as_ref()
                    .map(|h| h.feedstocks.iter().find(|x| x.code == f.code));
                if already_held(held, f, code, || format!("feedstock {}", f.code))? {
                    self.matched_feedstocks += 1;
                } else {
                    tx.add_feedstock(f)?;
                }
            }
            Item::Import(i) => self.open_import(code, i)?,
            Item::Evidence(p) => {
                if let Some((Some(id), _)) = &self.import {
                    tx.add_evidence(*id, p.part, &p.bytes)?;
                }
            }
            Item::Entry(s) => self.entry(tx, s)?,
            Item::Signature(s) => self.signature(tx, code, s)?,
            Item::Reconciliation(r) => self.reconciliation(tx, code, r)?,
            Item::Trailer(t) => {
                tx.append(&self.entries)?;
                self.entries.clear();
                self.finish(code, t.root)?;
            }
        }
        Ok(())
    }

    /// The header: what the ledger holds of the project already, and the consistency ranges to check.
    fn header(&mut self, tx: &mut Tx<'_>, project: &str) -> Result<()> {
        self.held = Self::held_project(tx, project)?;
        if let Some(h) = &self.held
            && h.entries > self.size
        {
            return Err(Error::Refused(format!(
                "bundle of project {project}: the ledger already holds {} entries, the bundle {}; an older bundle extends nothing",
                h.entries, self.size
            )));
        }
        let ranges = consistency_ranges(self.held.as_ref().map_or(0, |h| h.entries), self.size);
        self.proof = RangeHashes::new(ranges);
        Ok(())
    }

    /// An entry: into the proof, and appended (in batches) when the ledger does not hold it.
    fn entry(&mut self, tx: &mut Tx<'_>, s: &SealedEntry) -> Result<()> {
        self.proof.push(s.leaf);
        if s.entry.seq >= self.held.as_ref().map_or(0, |h| h.entries) {
            self.entries.push(s.clone());
            self.new_entries += 1;
            if self.entries.len() >= 1_000 {
                tx.append(&self.entries)?;
                self.entries.clear();
            }
        }
        Ok(())
    }

    /// A statement: the entries before it appended first, since it names its seal entry.
    fn signature(&mut self, tx: &mut Tx<'_>, code: &str, s: &Statement) -> Result<()> {
        // A statement names its seal entry: the entries go in first.
        tx.append(&self.entries)?;
        self.entries.clear();
        let held = self
            .held
            .as_ref()
            .map(|h| h.signatures.iter().find(|x| x.seq == s.seq));
        if already_held(held, s, code, || format!("signature {}", s.seq))? {
            self.matched_signatures += 1;
        } else {
            tx.add_signature(s)?;
            self.new_signatures += 1;
        }
        Ok(())
    }

    /// A recorded reconciliation: the entries before it appended first.
    fn reconciliation(&mut self, tx: &mut Tx<'_>, code: &str, r: &Recorded) -> Result<()> {
        tx.append(&self.entries)?;
        self.entries.clear();
        let held = self
            .held
            .as_ref()
            .map(|h| h.reconciliations.get(r.seq as usize));
        if already_held(held, r, code, || format!("reconciliation {}", r.seq))? {
            self.matched_reconciliations += 1;
        } else {
            tx.add_reconciliation(r)?;
            self.new_reconciliations += 1;
        }
        Ok(())
    }

    fn open_import(&mut self, code: &str, i: &Import) -> Result<()> {
        let held = self
            .held
            .as_ref()
            .and_then(|h| h.imports.iter().find(|x| x.file_sha256 == i.file_sha256));
        let id = match held {
            Some(x) => {
                if &x.line() != i {
                    return Err(not_extension(
                        code,
                        format!("import {} differs", i.file_name),
                    ));
                }
                self.matched_imports += 1;
                None
            }
            None => {
                self.next_import_id += 1;
                Some(self.next_import_id - 1)
            }
        };
        self.import = Some((id, i.clone()));
        Ok(())
    }

    /// Writes the import row after its bytes, as `import` does.
    fn close_import(&mut self, tx: &mut Tx<'_>, code: &str) -> Result<()> {
        let Some((Some(id), i)) = self.import.take() else {
            return Ok(());
        };
        tx.add_import(&NewImport {
            id,
            project: code,
            file_name: &i.file_name,
            sha256: i.file_sha256,
            bytes: u64::try_from(i.byte_count).unwrap_or_default(),
            kind: &i.kind,
            columns: &i.columns_map,
            density: &i.density,
            rows: i.row_count,
            at: i.imported_at,
        })
    }

    /// Everything held was in the bundle, and the held entries are its prefix.
    fn finish(&mut self, code: &str, root: Hash) -> Result<()> {
        let Some(h) = &self.held else {
            return Ok(());
        };
        let missing = [
            (
                h.sites.len() != self.matched_sites,
                "a site the ledger holds",
            ),
            (
                h.feedstocks.len() != self.matched_feedstocks,
                "a feedstock the ledger holds",
            ),
            (
                h.imports.len() != self.matched_imports,
                "an import the ledger holds",
            ),
            (
                h.signatures.len() != self.matched_signatures,
                "a signed statement the ledger holds",
            ),
            (
                h.reconciliations.len() != self.matched_reconciliations,
                "a reconciliation the ledger holds",
            ),
        ];
        if let Some((_, what)) = missing.iter().find(|(m, _)| *m) {
            return Err(not_extension(code, format!("the bundle lacks {what}")));
        }
        let proof = std::mem::replace(&mut self.proof, RangeHashes::new(Vec::new()))
            .finish()
            .ok_or_else(|| not_extension(code, "the bundle's entries end early"))?;
        if !verify_consistency(h.entries, self.size, h.root, root, &proof) {
            return Err(not_extension(
                code,
                format!(
                    "no consistency proof from the ledger's {} entries (tree head {}) to the bundle's {} (tree head {}): the histories fork",
                    h.entries,
                    h.root.head(),
                    self.size,
                    root.head()
                ),
            ));
        }
        Ok(())
    }
}
