//! Checking a bundle line by line, holding only the running state: where in the order the file
//! is, the chain's last link, the tree head's stack of subtree roots and the digest so far.
//! Memory stays flat whatever the bundle's size.

use super::line::{Import, Item, Line, Trailer};
use crate::ledger::Hash;
use crate::ledger::chain::seal;
use crate::ledger::merkle::TreeBuilder;
use crate::ledger::reconciliation::{RecordRun, Recorded};
use crate::ledger::seal_check::SealCheck;
use crate::ledger::signature::Statement;
use sha2::{Digest, Sha256};

/// Where a line may stand: each kind of line after the kinds before it.
#[derive(Debug, Clone, Copy, PartialEq, Eq, PartialOrd, Ord)]
enum Stage {
    Start,
    Header,
    Project,
    Sites,
    Settings,
    Feedstocks,
    Imports,
    Entries,
    Signatures,
    Reconciliations,
    Done,
}

/// The running check of one bundle.
pub struct Checker {
    stage: Stage,
    project: String,
    lines: u64,
    digest: Sha256,
    next_seq: u64,
    prev_chain: Hash,
    tree: TreeBuilder,
    last_code: Option<String>,
    next_setting: u64,
    /// The seals the header lists, checked as the entries stream by; then how many there were.
    seals: Option<SealCheck>,
    sealed: usize,
    /// The seq of the last signature line: seqs ascend (a bundle through a seal leaves out the
    /// statements over later seals, so they need not be dense).
    last_signature: Option<u64>,
    signatures: usize,
    /// The header's version (1 has no reconciliation lines), and the run of records so far.
    version: u32,
    records: RecordRun,
    /// The import whose bytes are being read: the next part due, the bytes so far, their hash.
    import: Option<(Import, i64, i64, Sha256)>,
}

impl Default for Checker {
    fn default() -> Self {
        Checker {
            stage: Stage::Start,
            project: String::new(),
            lines: 0,
            digest: Sha256::new(),
            next_seq: 0,
            prev_chain: Hash::GENESIS,
            tree: TreeBuilder::default(),
            last_code: None,
            next_setting: 0,
            import: None,
            seals: None,
            sealed: 0,
            last_signature: None,
            signatures: 0,
            version: 0,
            records: RecordRun::default(),
        }
    }
}

impl Checker {
    /// The project the header names (empty before it).
    pub fn project(&self) -> &str {
        &self.project
    }

    /// Entries read so far, and the tree head over them.
    pub fn tree(&self) -> (u64, Hash) {
        (self.tree.size(), self.tree.root())
    }

    /// Checks the next line (its bytes without the newline) and returns what it holds.
    pub fn push(&mut self, text: &str) -> Result<Item, String> {
        if self.stage == Stage::Done {
            return Err("a line after the trailer".into());
        }
        let line = Line::parse(text)?;
        let item = line.to_item(&self.project)?;
        let stage = match &item {
            Item::Header { .. } => Stage::Header,
            Item::Project(_) => Stage::Project,
            Item::Site(_) => Stage::Sites,
            Item::Setting(_) => Stage::Settings,
            Item::Feedstock(_) => Stage::Feedstocks,
            Item::Import(_) | Item::Evidence(_) => Stage::Imports,
            Item::Entry(_) => Stage::Entries,
            Item::Signature(_) => Stage::Signatures,
            Item::Reconciliation(_) => Stage::Reconciliations,
            Item::Trailer(_) => Stage::Done,
        };
        self.order(stage, &item)?;
        match &item {
            Item::Header {
                version,
                project,
                seals,
            } => {
                self.version = *version;
                self.project = project.clone();
                self.seals = Some(SealCheck::new(seals.clone()));
            }
            Item::Project(p) if p.code != self.project => {
                return Err(format!(
                    "project {} is not the header's {}",
                    p.code, self.project
                ));
            }
            Item::Site(s) => self.ascending(&s.code)?,
            Item::Feedstock(f) => self.ascending(&f.code)?,
            Item::Setting(s) => {
                if s.seq != self.next_setting {
                    return Err(format!(
                        "setting seq {} where {} was due",
                        s.seq, self.next_setting
                    ));
                }
                self.next_setting += 1;
            }
            Item::Import(i) => {
                self.close_import()?;
                self.import = Some((i.clone(), 0, 0, Sha256::new()));
            }
            Item::Evidence(p) => {
                let Some((_, next, bytes, hash)) = &mut self.import else {
                    return Err("file bytes before any import".into());
                };
                if p.part != *next {
                    return Err(format!("part {} where part {next} was due", p.part));
                }
                hash.update(&p.bytes);
                *next += 1;
                *bytes += p.bytes.len() as i64;
            }
            Item::Entry(s) => self.link(s)?,
            Item::Signature(s) => self.signature(s)?,
            Item::Reconciliation(r) => self.reconciliation(r)?,
            Item::Trailer(t) => self.close(t)?,
            Item::Project(_) => {}
        }
        if stage != Stage::Done {
            self.digest.update(text.as_bytes());
            self.digest.update(b"\n");
            self.lines += 1;
        }
        Ok(item)
    }

    /// Refuses a line out of the bundle's order.
    fn order(&mut self, stage: Stage, item: &Item) -> Result<(), String> {
        let once = matches!(stage, Stage::Header | Stage::Project | Stage::Done);
        if stage < self.stage || (once && stage == self.stage) {
            return Err(format!("{} out of order", kind_name(item)));
        }
        let expected = match self.stage {
            Stage::Start => Some(Stage::Header),
            Stage::Header => Some(Stage::Project),
            _ => None,
        };
        if expected.is_some_and(|e| e != stage) {
            return Err(format!(
                "{} where the {} line was due",
                kind_name(item),
                if self.stage == Stage::Start {
                    "header"
                } else {
                    "project"
                }
            ));
        }
        if stage != self.stage {
            self.last_code = None;
            if self.stage == Stage::Imports {
                self.close_import()?;
            }
        }
        self.stage = stage;
        Ok(())
    }

    fn ascending(&mut self, code: &str) -> Result<(), String> {
        if self.last_code.as_deref().is_some_and(|l| code <= l) {
            return Err(format!("{code} out of order (codes ascend)"));
        }
        self.last_code = Some(code.to_string());
        Ok(())
    }

    /// The parts of an import's bytes are the file it names: its size and its SHA-256.
    fn close_import(&mut self) -> Result<(), String> {
        let Some((i, _, bytes, hash)) = self.import.take() else {
            return Ok(());
        };
        if bytes != i.byte_count {
            return Err(format!(
                "import {} holds {bytes} bytes, its byte_count says {}",
                i.file_name, i.byte_count
            ));
        }
        if Hash(hash.finalize().into()) != i.file_sha256 {
            return Err(format!(
                "import {}: its bytes differ from its file_sha256",
                i.file_name
            ));
        }
        Ok(())
    }

    /// The entry follows the one before it: dense seq, chain hash recomputed.
    fn link(&mut self, s: &crate::ledger::SealedEntry) -> Result<(), String> {
        if s.entry.seq != self.next_seq {
            return Err(format!(
                "entry seq {} where {} was due",
                s.entry.seq, self.next_seq
            ));
        }
        let again = seal(s.entry.clone(), self.prev_chain);
        if again.chain != s.chain {
            return Err(format!(
                "entry seq {} does not link to the entry before it (chain_hash)",
                s.entry.seq
            ));
        }
        if let Some(c) = &mut self.seals {
            c.push(s)
                .map_err(|w| format!("entry seq {}: {w}", s.entry.seq))?;
        }
        self.prev_chain = s.chain;
        self.tree.push(s.leaf);
        self.next_seq += 1;
        Ok(())
    }

    /// A statement over one of the bundle's seals: its seq after the one before, its ed25519
    /// signature over the signed bytes, and the seal it names holding what it signed.
    fn signature(&mut self, s: &Statement) -> Result<(), String> {
        let seq = s.seq;
        if self.last_signature.is_some_and(|l| seq <= l) {
            return Err(format!("signature seq {seq} out of order (seqs ascend)"));
        }
        s.verify()
            .map_err(|e| format!("signature seq {seq}: {e}"))?;
        let g = &s.signed;
        let seals = self.seals.as_ref().map_or(&[][..], SealCheck::checked);
        let seal = seals.iter().find(|x| x.seq == g.seal_seq).ok_or_else(|| {
            format!(
                "signature seq {seq} signs seal seq {}, which is no seal of the bundle",
                g.seal_seq
            )
        })?;
        if (seal.tree_size, seal.root, seal.label.as_str())
            != (g.tree_size, g.root, g.period.as_str())
        {
            return Err(format!(
                "signature seq {seq} signed period {}, {} entries, head {}; seal seq {} holds period {}, {} entries, head {}",
                g.period,
                g.tree_size,
                g.root.head(),
                seal.seq,
                seal.label,
                seal.tree_size,
                seal.root.head()
            ));
        }
        self.last_signature = Some(seq);
        self.signatures += 1;
        Ok(())
    }

    /// A recorded reconciliation: after the one before it (seq, previous hash), and naming a
    /// chain no longer than the bundle's, whose head it is when as long.
    fn reconciliation(&mut self, r: &Recorded) -> Result<(), String> {
        if self.version < 2 {
            return Err(
                "a reconciliation line in a version 1 bundle (they begin with version 2)".into(),
            );
        }
        self.records.push(r, r.row_hash())?;
        let seq = r.seq;
        if r.chain_size > self.next_seq
            || (r.chain_size == self.next_seq && r.chain_head != self.prev_chain)
        {
            return Err(format!(
                "reconciliation seq {seq} names a chain of {} entries with head {}, which the bundle's entries do not give",
                r.chain_size,
                r.chain_head.head()
            ));
        }
        Ok(())
    }

    /// How many recorded reconciliations the bundle holds, each checked.
    pub fn reconciliations(&self) -> u64 {
        self.records.head().0
    }

    /// How many signed statements the bundle holds, each checked.
    pub fn signatures(&self) -> usize {
        self.signatures
    }

    /// How many seals the bundle holds, each checked.
    pub fn seals(&self) -> usize {
        self.sealed
    }

    fn close(&mut self, t: &Trailer) -> Result<(), String> {
        if let Some(c) = self.seals.take() {
            let checked = c
                .finish()
                .map_err(|(seq, w)| format!("seal seq {seq}: {w}"))?;
            self.sealed = checked.len();
        }
        let now = self.summary();
        let checks = [
            (t.lines == now.lines, "lines"),
            (t.entries == now.entries, "entries"),
            (t.tree_size == now.tree_size, "tree_size"),
            (t.root == now.root, "root"),
            (t.chain_head == now.chain_head, "chain_head"),
            (t.sha256 == now.sha256, "sha256"),
        ];
        if let Some((_, field)) = checks.iter().find(|(ok, _)| !ok) {
            return Err(format!(
                "trailer {field} does not match the lines before it"
            ));
        }
        Ok(())
    }

    /// The whole bundle was read: the trailer must have come.
    pub fn finish(&self) -> Result<Trailer, String> {
        if self.stage != Stage::Done {
            return Err("the bundle ends before its trailer (cut short?)".into());
        }
        Ok(self.summary())
    }

    /// The trailer line for what was pushed so far (used by export).
    pub fn trailer(&self) -> Line {
        self.summary().to_line()
    }

    fn summary(&self) -> Trailer {
        Trailer {
            lines: self.lines,
            entries: self.next_seq,
            tree_size: self.tree.size(),
            root: self.tree.root(),
            chain_head: self.prev_chain,
            sha256: Hash(self.digest.clone().finalize().into()),
        }
    }
}

fn kind_name(item: &Item) -> &'static str {
    match item {
        Item::Header { .. } => "header",
        Item::Project(_) => "project",
        Item::Site(_) => "site",
        Item::Setting(_) => "setting",
        Item::Feedstock(_) => "feedstock",
        Item::Import(_) => "import",
        Item::Evidence(_) => "evidence",
        Item::Entry(_) => "entry",
        Item::Signature(_) => "signature",
        Item::Reconciliation(_) => "reconciliation",
        Item::Trailer(_) => "trailer",
    }
}
