//! `bundle export | check | load`: a project's record as one portable file, checked without a
//! ledger, loaded into another ledger only as the same history or its extension.

use super::Context;
use super::setup::known_project;
use crate::bundle::Item;
use crate::bundle::stop::stop_at;
use crate::error::{Error, Result};
use crate::export::bundle_file::{BundleFile, Unwritten};
use crate::import::bundle_file::read_checked;
use crate::report::Report;
use crate::report::tables::bundle::{checked_table, loaded_table, summary_table};
use crate::store::BundleLoader;
use clap::{Args, Subcommand};
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
        BundleCommand::Check { file } => {
            let c = read_checked(&file, |_| Ok(()))?;
            Ok(Report::default().table(checked_table(&file.display().to_string(), &c)))
        }
        BundleCommand::Load { file } => load(ctx, &file),
    }
}

fn export(ctx: &Context, a: ExportArgs) -> Result<Report> {
    let name = a.out.display().to_string();
    let unwritten = |e| match e {
        Unwritten::Line(e) => Error::ledger(format!("the ledger does not export whole: {e}")),
        Unwritten::Bundle(e) => Error::ledger(e),
        Unwritten::File(e) => Error::field("--out", &name, e),
    };
    let mut w = BundleFile::create(&a.out).map_err(unwritten)?;
    let code = a.project.clone();
    ctx.open()?.read(|tx| {
        let p = known_project(tx, &code)?;
        let stop = stop_at(&tx.seal_entries(&code)?, a.through_seal, &code).map_err(|why| {
            let n = a.through_seal.map(|n| n.to_string()).unwrap_or_default();
            Error::field("--through-seal", &n, why)
        })?;
        tx.export_bundle(&p, &stop, &mut |line| w.put(line).map_err(unwritten))
    })?;
    let t = w.finish().map_err(unwritten)?;
    Ok(Report::default().table(summary_table("Bundle written", &name, &code, &t, "written")))
}

/// A checked bundle into the ledger at `--db`, in one transaction (the rules of an extension
/// are `store::BundleLoader`'s).
fn load(ctx: &Context, file: &Path) -> Result<Report> {
    // A first reading checks the whole file and learns its size, which the consistency proof
    // needs before the entries stream by; the second, inside the transaction, checks it all
    // again while writing, so a file changed in between writes nothing.
    let first = read_checked(file, |_| Ok(()))?.trailer;
    let mut store = ctx.open()?;
    let (project, trailer, new) = store.write(|tx| {
        let mut loader = BundleLoader::new(tx, first.entries)?;
        let mut code = String::new();
        let c = read_checked(file, |item| {
            if let Item::Header { project, .. } = item {
                code = project.clone();
            }
            loader.item(tx, &code, item)
        })?;
        if c.trailer != first {
            return Err(Error::ledger(format!(
                "bundle {} changed while it was being loaded; nothing written",
                file.display()
            )));
        }
        Ok((c.project, c.trailer, loader.added()))
    })?;
    let file = file.display().to_string();
    Ok(Report::default().table(loaded_table(&file, &project, &trailer, &new)))
}
