//! `bundle export | check | load`: a project's record as one portable file, checked without a
//! ledger, loaded into another ledger only as the same history or its extension.

use super::Context;
use super::setup::known_project;
use crate::bundle::line::{EvidencePart, Import, Trailer};
use crate::bundle::{Checker, Item, Line};
use crate::error::{Error, Result};
use crate::import::bundle_file::each_line;
use crate::ledger::SealedEntry;
use crate::report::Report;
use crate::report::tables::bundle::counted;
use crate::report::tables::bundle::summary_table;
use crate::store::Tx;
use chrono::{DateTime, Utc};
use clap::{Args, Subcommand};
use std::io::Write;
use std::path::{Path, PathBuf};

#[derive(Debug, Subcommand)]
pub enum BundleCommand {
    /// Write a project's registration, settings, imported files, entries, signed statements and recorded reconciliations to one file
    #[command(
        after_help = "Example: sinkbook bundle export TFS --out tfs-2026.bundle --through-seal 738"
    )]
    Export(ExportArgs),
    /// Check every hash, the chain, the seals, the signatures and the tree head of a bundle, without a ledger (exit 3 if damaged)
    #[command(after_help = "Example: sinkbook bundle check tfs.bundle")]
    Check {
        /// The bundle file to check
        file: PathBuf,
    },
    /// Load a bundle into the ledger at --db: a new project, or the extension of the copy held
    #[command(after_help = "Example: sinkbook --db registry.db bundle load tfs.bundle")]
    Load {
        /// The bundle file to load
        file: PathBuf,
    },
}

#[derive(Debug, Args)]
pub struct ExportArgs {
    /// Project code (e.g. TFS)
    pub project: String,
    /// The bundle file to write
    #[arg(long)]
    pub out: PathBuf,
    /// Stop at the seal entry with this seq: its entries 0 to N, the registrations recorded by
    /// the seal's time, the statements signed over the seals it holds
    #[arg(long, value_name = "N")]
    pub through_seal: Option<u64>,
}

pub fn bundle(ctx: &Context, c: BundleCommand) -> Result<Report> {
    match c {
        BundleCommand::Export(a) => export(ctx, a),
        BundleCommand::Check { file } => check(&file),
        BundleCommand::Load { file } => super::bundle_load::load(ctx, &file),
    }
}

/// Lines written through the checker, so an export is checked as it is written.
struct Writer {
    checker: Checker,
    out: std::io::BufWriter<tempfile::NamedTempFile>,
    name: String,
}

impl Writer {
    fn put(&mut self, line: &Line) -> Result<()> {
        let text = line.to_text();
        self.checker
            .push(text.trim_end_matches('\n'))
            .map_err(|e| Error::ledger(format!("the ledger does not export whole: {e}")))?;
        self.out
            .write_all(text.as_bytes())
            .map_err(|e| Error::field("--out", &self.name, e))
    }
}

fn export(ctx: &Context, a: ExportArgs) -> Result<Report> {
    let name = a.out.display().to_string();
    let dir = match a.out.parent() {
        Some(d) if !d.as_os_str().is_empty() => d.to_path_buf(),
        _ => PathBuf::from("."),
    };
    // Written beside the target and renamed at the end, so a failed export leaves no file.
    let tmp = tempfile::NamedTempFile::new_in(&dir).map_err(|e| Error::field("--out", &name, e))?;
    let mut w = Writer {
        checker: Checker::default(),
        out: std::io::BufWriter::new(tmp),
        name: name.clone(),
    };
    let code = a.project.clone();
    ctx.open()?.read(|tx| {
        let p = known_project(tx, &code)?;
        let all = tx.seal_entries(&code)?;
        let (last, until) = stop_at(&all, a.through_seal, &code)?;
        // Registrations as they stood when the seal was recorded.
        let by = |t: chrono::DateTime<chrono::Utc>| until.is_none_or(|u| t <= u);
        let seals: Vec<u64> = all
            .iter()
            .map(|s| s.entry.seq)
            .filter(|&s| s <= last)
            .collect();
        w.put(&Line::header(&code, &seals))?;
        w.put(&Line::project(&p))?;
        for s in tx.sites(&code)?.iter().filter(|s| by(s.registered_at)) {
            w.put(&Line::site(s))?;
        }
        for s in tx.settings(&code)?.iter().take_while(|s| by(s.recorded_at)) {
            w.put(&Line::setting(s))?;
        }
        for f in tx.feedstocks(&code)?.iter().filter(|f| by(f.registered_at)) {
            w.put(&Line::feedstock(f))?;
        }
        write_imports(&mut w, tx, &code, &by)?;
        tx.each_entry_through(&code, last, |s| w.put(&Line::entry(&s)))?;
        for s in tx.signatures(&code)? {
            if seals.contains(&s.signed.seal_seq) {
                w.put(&Line::signature(&s))?;
            }
        }
        // The reconciliations recorded by the seal's time, over the entries the bundle holds.
        for r in tx
            .reconciliations(&code)?
            .iter()
            .take_while(|r| by(r.recorded_at) && r.chain_size <= last.saturating_add(1))
        {
            w.put(&Line::reconciliation(r))?;
        }
        Ok(())
    })?;
    let trailer = w.checker.trailer();
    w.put(&trailer)?;
    persist(w.out, &a.out, &name)?;
    let t = w.checker.finish().map_err(Error::ledger)?;
    Ok(Report::default().table(summary_table("Bundle written", &name, &code, &t, "written")))
}

/// Where an export stops: the last seq it holds and the time registrations are taken at (the
/// seal's), or the whole chain.
fn stop_at(
    all: &[SealedEntry],
    asked: Option<u64>,
    code: &str,
) -> Result<(u64, Option<DateTime<Utc>>)> {
    Ok(match asked {
        None => (u64::MAX, None),
        Some(n) => {
            let seal = all.iter().find(|s| s.entry.seq == n).ok_or_else(|| {
                let seqs: Vec<String> = all.iter().map(|s| s.entry.seq.to_string()).collect();
                Error::field(
                    "--through-seal",
                    &n.to_string(),
                    format!(
                        "is not the seq of a seal of project {code} (its seals: {})",
                        if seqs.is_empty() {
                            "none".to_string()
                        } else {
                            seqs.join(", ")
                        }
                    ),
                )
            })?;
            (n, Some(seal.entry.recorded_at))
        }
    })
}

/// Each imported file registered by the export's time, followed by its bytes.
fn write_imports(
    w: &mut Writer,
    tx: &mut Tx<'_>,
    code: &str,
    by: &dyn Fn(DateTime<Utc>) -> bool,
) -> Result<()> {
    for i in tx.bundle_imports(code)? {
        if !by(i.imported_at) {
            continue;
        }
        let import = Import {
            file_name: i.file_name,
            file_sha256: i.file_sha256,
            kind: i.kind,
            row_count: i.row_count,
            columns_map: i.columns_map,
            density: i.density,
            byte_count: i.byte_count,
            imported_at: i.imported_at,
        };
        w.put(&import.to_line())?;
        // One part in memory at a time.
        for part in 0..tx.evidence_parts(i.id)? {
            let bytes = tx.evidence_part(i.id, part)?.unwrap_or_default();
            w.put(&EvidencePart { part, bytes }.to_line())?;
        }
    }
    Ok(())
}

/// The written file made readable, synced and renamed onto `path`.
fn persist(
    out: std::io::BufWriter<tempfile::NamedTempFile>,
    path: &Path,
    name: &str,
) -> Result<()> {
    let tmp = out
        .into_inner()
        .map_err(|e| Error::field("--out", name, e.error()))?;
    // A bundle is for sending: readable by others like any file written (a temporary file is
    // created for its owner only).
    #[cfg(unix)]
    {
        use std::os::unix::fs::PermissionsExt;
        tmp.as_file()
            .set_permissions(std::fs::Permissions::from_mode(0o644))
            .map_err(|e| Error::field("--out", name, e))?;
    }
    tmp.as_file()
        .sync_all()
        .map_err(|e| Error::field("--out", name, e))?;
    tmp.persist(path)
        .map_err(|e| Error::field("--out", name, e.error))?;
    Ok(())
}

/// What a whole bundle was found to hold.
pub struct Checked {
    pub project: String,
    pub trailer: Trailer,
    pub seals: usize,
    pub signatures: usize,
    pub reconciliations: u64,
}

/// Reads a bundle through the checker, handing each checked line's value to `f`.
pub fn read_checked(path: &Path, mut f: impl FnMut(&Item) -> Result<()>) -> Result<Checked> {
    let name = path.display().to_string();
    let mut checker = Checker::default();
    each_line(path, |n, text| {
        let item = checker
            .push(text)
            .map_err(|e| Error::ledger(format!("bundle {name} line {n}: {e}")))?;
        f(&item)
    })?;
    let t = checker
        .finish()
        .map_err(|e| Error::ledger(format!("bundle {name}: {e}")))?;
    Ok(Checked {
        project: checker.project().to_string(),
        trailer: t,
        seals: checker.seals(),
        signatures: checker.signatures(),
        reconciliations: checker.reconciliations(),
    })
}

fn check(file: &Path) -> Result<Report> {
    let c = read_checked(file, |_| Ok(()))?;
    let mut table = summary_table(
        "Bundle check",
        &file.display().to_string(),
        &c.project,
        &c.trailer,
        &format!(
            "whole: {}, {}, {}",
            counted(c.seals, "seal"),
            counted(c.signatures, "signed statement"),
            counted(c.reconciliations as usize, "reconciliation")
        ),
    );
    table.note("Checked: every line in its one spelling and in order; every registration, entry and statement against its hash; seqs dense from 0; each chain hash recomputed; each imported file's bytes against its SHA-256; every seal's tree head recomputed from the leaves before it and an RFC 6962 consistency proof from each seal to the next; every statement's ed25519 signature over its bytes and the seal it names holding the tree head it signed; every recorded reconciliation's row hash, each naming the one before it; the RFC 6962 tree head over the entries' leaves; the digest of every line before the trailer.");
    Ok(Report::default().table(table))
}
