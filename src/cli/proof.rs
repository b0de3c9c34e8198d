//! `proof`: an inclusion proof of one entry in a seal's tree, written as JSON; `check-proof`:
//! the proof checked on its own, without any ledger (docs/proofs.md).

use super::Context;
use super::setup::known_project;
use crate::error::{Error, Result};
use crate::ledger::merkle::{RangeHashes, inclusion_ranges};
use crate::ledger::proof::InclusionProof;
use crate::ledger::seal::Seal;
use crate::report::Report;
use crate::report::tables::proof::proven_table;
use clap::Args;
use std::path::PathBuf;

#[derive(Debug, Args)]
pub struct ProofArgs {
    /// Project code (e.g. TFS)
    pub project: String,
    /// The entry to prove
    pub seq: u64,
    /// The seq of the seal whose tree head the proof leads to [default: the latest seal that
    /// covers the entry]
    #[arg(long, value_name = "N")]
    pub seal: Option<u64>,
    /// The JSON file to write
    #[arg(long, value_name = "FILE")]
    pub out: PathBuf,
}

#[derive(Debug, Args)]
pub struct CheckProofArgs {
    /// A proof written by `sinkbook proof`
    pub file: PathBuf,
}

/// The seal the proof leads to: the one asked for, or the latest whose tree holds the entry.
fn chosen(seals: Vec<Seal>, seq: u64, asked: Option<u64>) -> Result<Seal> {
    let found = match asked {
        Some(n) => seals.into_iter().find(|s| s.seq == n).ok_or_else(|| {
            Error::field("--seal", &n.to_string(), "is not the seq of a seal of this project")
        })?,
        None => seals.into_iter().rev().find(|s| s.tree_size > seq).ok_or_else(|| {
            Error::field(
                "SEQ",
                &seq.to_string(),
                "is under no seal yet (seal its period first: sinkbook seal PROJECT --period P)",
            )
        })?,
    };
    if seq >= found.tree_size {
        return Err(Error::field(
            "SEQ",
            &seq.to_string(),
            format!(
                "comes after seal seq {}, whose tree holds seq 0 to {}",
                found.seq,
                found.tree_size.saturating_sub(1)
            ),
        ));
    }
    Ok(found)
}

pub fn proof(ctx: &Context, a: ProofArgs) -> Result<Report> {
    let p = ctx.open()?.read(|tx| {
        known_project(tx, &a.project)?;
        let seal = chosen(tx.seals(&a.project)?, a.seq, a.seal)?;
        let mut path = RangeHashes::new(inclusion_ranges(a.seq, seal.tree_size));
        let mut entry = None;
        tx.for_each_entry(&a.project, None, |s| {
            if s.entry.seq < seal.tree_size {
                path.push(s.leaf);
                if s.entry.seq == a.seq {
                    entry = Some(s.clone());
                }
            }
            Ok(())
        })?;
        let entry = entry.ok_or_else(|| {
            Error::field("SEQ", &a.seq.to_string(), "is not an entry of this project")
        })?;
        let audit_path = path.finish().ok_or_else(|| {
            Error::ledger(format!(
                "project {} has fewer entries than seal seq {} covers",
                a.project, seal.seq
            ))
        })?;
        Ok(InclusionProof::new(&a.project, &seal, &entry, &audit_path))
    })?;
    // The proof must hold before it leaves: a stored leaf that does not match its entry's
    // bytes, or a seal that does not match the leaves, is the ledger's fault, not the reader's.
    let proven = p
        .check()
        .map_err(|w| Error::ledger(format!("project {} seq {}: {w}", a.project, a.seq)))?;
    let json = serde_json::to_string_pretty(&p).expect("a proof serializes") + "\n";
    std::fs::write(&a.out, json)
        .map_err(|e| Error::field("--out", &a.out.display().to_string(), e))?;
    Ok(Report::default()
        .line(format!(
            "wrote the inclusion proof of {} seq {} under seal seq {} ({} period {}) to {}",
            a.project,
            a.seq,
            p.seal_seq,
            a.project,
            p.period,
            a.out.display()
        ))
        .table(proven_table(&proven, p.audit_path.len(), "written")))
}

pub fn check_proof(a: CheckProofArgs) -> Result<Report> {
    let p: InclusionProof = crate::import::read_json(&a.file)?;
    let proven = p
        .check()
        .map_err(|w| Error::ledger(format!("proof {} does not hold: {w}", a.file.display())))?;
    Ok(Report::default()
        .line(format!(
            "the proof holds: {} seq {} is leaf {} of the tree of {} entries with head {}",
            proven.project, proven.seq, proven.seq, proven.tree_size, proven.root
        ))
        .table(proven_table(&proven, p.audit_path.len(), "holds")))
}
