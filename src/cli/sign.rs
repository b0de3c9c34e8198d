//! `key`: ed25519 keys in files only their owner may read; `sign`: a statement signed over a
//! seal's tree head; `statements`: the statements of a project, each judged again.

use super::Context;
use super::seal::record_seal;
use super::setup::known_project;
use crate::error::{Error, Result, StoreKind};
use crate::export::{KeyFileError, new_key_file};
use crate::ledger::seal::parse_period;
use crate::ledger::signature::{Role, Signed, parse_key_file, sign as sign_with};
use crate::ledger::statement_check::judged;
use crate::report::Report;
use crate::report::tables::sign::{
    key_table, new_key_line, signed_line, statements_table, unsealed_why,
};
use clap::{Args, Subcommand, ValueEnum};
use std::path::{Path, PathBuf};

#[derive(Debug, Subcommand)]
pub enum KeyCommand {
    /// Make a new ed25519 key in a file only its owner can read (0600); never overwrites
    #[command(after_help = "Example: sinkbook key new --out operator.key")]
    New {
        /// The key file to create (refused if it exists)
        #[arg(long, value_name = "FILE")]
        out: PathBuf,
    },
    /// Print a key file's public key and fingerprint
    #[command(after_help = "Example: sinkbook key show operator.key")]
    Show {
        /// The key file to read
        file: PathBuf,
    },
}

#[derive(Debug, Clone, Copy, ValueEnum)]
pub enum RoleArg {
    /// The project's operator
    Operator,
    /// An independent verifier
    Verifier,
}

impl RoleArg {
    pub fn role(self) -> Role {
        match self {
            RoleArg::Operator => Role::Operator,
            RoleArg::Verifier => Role::Verifier,
        }
    }
}

#[derive(Debug, Args)]
pub struct SignArgs {
    /// The project code
    pub project: String,
    /// The sealed period the statement is about (2026, 2026-Q1, 2026-03); an operator signing an
    /// unsealed period seals it first
    #[arg(long, value_name = "PERIOD")]
    pub period: String,
    /// Who signs: the project's operator, or an independent verifier (only on a sealed period)
    #[arg(long, value_enum)]
    pub role: RoleArg,
    /// The key file (from `sinkbook key new`)
    #[arg(long, value_name = "FILE")]
    pub key: PathBuf,
    /// What the signer states about the period
    #[arg(long, value_name = "TEXT")]
    pub statement: String,
}

#[derive(Debug, Args)]
pub struct StatementsArgs {
    /// The project code
    pub project: String,
}

/// Why `key new` refuses a file that is there.
const KEPT: &str = "already exists; a key file is never overwritten";

pub fn key(c: KeyCommand) -> Result<Report> {
    match c {
        KeyCommand::New { out } => {
            let shown = out.display().to_string();
            let public = new_key_file(&out).map_err(|e| match e {
                KeyFileError::NoRandomness(e) => Error::store(
                    StoreKind::System,
                    format!("no randomness for a new key: {e}"),
                ),
                KeyFileError::Exists => Error::field("--out", &shown, KEPT),
                KeyFileError::File(e) => Error::field("--out", &shown, e),
            })?;
            Ok(Report::default()
                .line(new_key_line(&out))
                .table(key_table(&public, &out)))
        }
        KeyCommand::Show { file } => {
            let key = read_key(&file)?;
            Ok(Report::default().table(key_table(&key.verifying_key().to_bytes(), &file)))
        }
    }
}

fn read_key(path: &Path) -> Result<ed25519_dalek::SigningKey> {
    let text = crate::import::read_text(path)?;
    parse_key_file(&text).map_err(|e| Error::field("--key", &path.display().to_string(), e))
}

pub fn sign(ctx: &Context, a: SignArgs) -> Result<Report> {
    let (label, period) =
        parse_period(&a.period).map_err(|e| Error::field("--period", &a.period, e))?;
    let key = read_key(&a.key)?;
    super::inputs::statement("--statement", &a.statement)?;
    let role = a.role.role();
    let s = ctx.open()?.write(|tx| {
        known_project(tx, &a.project)?;
        let seal = match tx.seals(&a.project)?.into_iter().find(|s| s.label == label) {
            Some(s) => s,
            None if role == Role::Operator => record_seal(tx, ctx, &a.project, &label, period)?.0,
            None => {
                let why = unsealed_why(&a.project, &label);
                return Err(Error::field("--period", &a.period, why));
            }
        };
        let signed = Signed::over(seal, &a.project, role, &a.statement, ctx.now);
        tx.add_next_statement(&a.project, |seq| sign_with(seq, signed, &key))
    })?;
    Ok(Report::default()
        .line(signed_line(&a.project, &s))
        .table(statements_table(&a.project, &[judged(s, Ok(()))])))
}

pub fn statements(ctx: &Context, a: StatementsArgs) -> Result<Report> {
    let judged = ctx.open()?.read(|tx| {
        known_project(tx, &a.project)?;
        tx.judged_statements(&a.project)
    })?;
    Ok(Report::default().table(statements_table(&a.project, &judged)))
}
