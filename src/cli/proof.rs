//! `proof`: an inclusion proof of one entry in a seal's tree, written as JSON; `check-proof`:
//! the proof checked on its own, without any ledger (docs/proofs.md).

use super::Context;
use super::setup::known_project;
use crate::error::{Error, Result};
use crate::ledger::proof::InclusionProof;
use crate::ledger::proof_seal::{NoSeal, proving_seal};
use crate::report::Report;
use crate::report::tables::proof::{holds_line, proven_table, written_line};
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

pub fn proof(ctx: &Context, a: ProofArgs) -> Result<Report> {
    let seq = a.seq.to_string();
    let p = ctx.open()?.read(|tx| {
        known_project(tx, &a.project)?;
        let seal = proving_seal(tx.seals(&a.project)?, a.seq, a.seal).map_err(|e| match e {
            NoSeal::NotASeal(n) => Error::field("--seal", &n.to_string(), e),
            NoSeal::Unsealed => Error::field(
                "SEQ",
                &seq,
                format!("{e} (seal its period first: sinkbook seal PROJECT --period P)"),
            ),
            e => Error::field("SEQ", &seq, e),
        })?;
        tx.inclusion_proof(&a.project, &seal, a.seq)?
            .ok_or_else(|| Error::field("SEQ", &seq, "is not an entry of this project"))
    })?;
    // The proof must hold before it leaves: a stored leaf that does not match its entry's
    // bytes, or a seal that does not match the leaves, is the ledger's fault, not the reader's.
    let proven = p
        .check()
        .map_err(|w| Error::ledger(format!("project {} seq {}: {w}", a.project, a.seq)))?;
    let json = serde_json::to_string_pretty(&p).expect("a proof serializes") + "\n";
    let out = a.out.display().to_string();
    std::fs::write(&a.out, json).map_err(|e| Error::field("--out", &out, e))?;
    Ok(Report::default()
        .line(written_line(&p, &out))
        .table(proven_table(&proven, p.audit_path.len(), "written")))
}

pub fn check_proof(a: CheckProofArgs) -> Result<Report> {
    let p: InclusionProof = crate::import::read_json(&a.file)?;
    let proven = p
        .check()
        .map_err(|w| Error::ledger(format!("proof {} does not hold: {w}", a.file.display())))?;
    Ok(Report::default()
        .line(holds_line(&proven))
        .table(proven_table(&proven, p.audit_path.len(), "holds")))
}
