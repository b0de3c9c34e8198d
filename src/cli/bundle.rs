//! `bundle export | check | load`: a project's record as one portable file, checked without a
//! ledger, loaded into another ledger only as the same history or its extension.

use super::Context;
use super::setup::known_project;
use crate::bundle::stop::stop_at;
use crate::bundle::{Checker, Line};
use crate::error::{Error, Result};
use crate::import::bundle_file::read_checked;
use crate::report::Report;
use crate::report::tables::bundle::{checked_table, summary_table};
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
        let stop = stop_at(&tx.seal_entries(&code)?, a.through_seal, &code).map_err(|why| {
            let n = a.through_seal.map(|n| n.to_string()).unwrap_or_default();
            Error::field("--through-seal", &n, why)
        })?;
        tx.export_bundle(&p, &stop, &mut |line| w.put(line))
    })?;
    let trailer = w.checker.trailer();
    w.put(&trailer)?;
    persist(w.out, &a.out, &name)?;
    let t = w.checker.finish().map_err(Error::ledger)?;
    Ok(Report::default().table(summary_table("Bundle written", &name, &code, &t, "written")))
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

fn check(file: &Path) -> Result<Report> {
    let c = read_checked(file, |_| Ok(()))?;
    Ok(Report::default().table(checked_table(&file.display().to_string(), &c)))
}
