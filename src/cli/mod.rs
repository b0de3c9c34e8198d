//! The command line: parse with clap, call the core and the store, hand a report back.
//! The clock is read once per command, by the caller, and passed in.

mod bundle;
mod bundle_load;
mod chart;
mod claims;
mod convert;
mod demo;
mod density;
mod evidence;
mod import;
mod inputs;
mod meters;
mod potential;
mod progress;
mod proof;
mod reconcile;
mod record;
mod report;
mod reports;
mod seal;
mod settings;
mod setup;
mod sign;
mod totals;
mod verify;
mod view;

mod emission_inventory;
mod feedstock;
mod mineralization;
mod record_rock;
mod rock_inputs;
mod weathering;

use crate::error::Result;
use crate::report::{Format, Report};
use crate::store::Store;
use chrono::{DateTime, Utc};
use clap::{Parser, Subcommand};
use std::path::{Path, PathBuf};

/// The ledger used when neither --db nor SINKBOOK_DB names one.
pub const DEFAULT_DB: &str = "sinkbook.db";

#[derive(Debug, Parser)]
#[command(
    name = "sinkbook",
    version,
    about = "An append-only, tamper-evident ledger of CO2 stored underground and in rock",
    after_help = "Exit codes: 0 ok · 1 input or request refused · 2 usage · 3 ledger inconsistent or tampered · 4 reconciliation material"
)]
pub struct Cli {
    /// The ledger file [default: sinkbook.db in the working directory]
    #[arg(long, global = true, env = "SINKBOOK_DB", value_name = "PATH")]
    pub db: Option<PathBuf>,
    /// Tables for people, or JSON / CSV with unit-carrying field names for programs
    #[arg(long, global = true, value_enum, default_value_t = Format::Table)]
    pub format: Format,
    /// Record an entry, correction or setting dated inside a sealed period as a late adjustment
    /// dated now, naming the sealed period (the sealed figures stay as sealed)
    #[arg(long, global = true)]
    pub late: bool,
    /// Tables at full width even at a terminal (by default they fit its width or COLUMNS)
    #[arg(long, global = true)]
    pub wide: bool,
    #[command(subcommand)]
    pub command: Command,
}

#[derive(Debug, Subcommand)]
pub enum Command {
    /// Create a ledger file (or confirm that one exists)
    Init,
    /// Register and list storage projects
    #[command(subcommand)]
    Project(setup::ProjectCommand),
    /// Register and list wells, fields and plants of a project
    #[command(subcommand)]
    Site(setup::SiteCommand),
    /// Record a measured quantity as a new ledger entry
    #[command(subcommand)]
    Record(record::RecordCommand),
    /// Record a correction: a new entry that replaces an earlier one
    Correct(record::CorrectArgs),
    /// List every entry of a project with its reading and hash
    Entries(reports::EntriesArgs),
    /// Injected and stored tonnes by period, cumulative, and permit use
    Balance(reports::BalanceArgs),
    /// Import a meter export (CSV): its bytes kept as evidence, one entry per meter per day
    Import(import::ImportArgs),
    /// The imported readings behind one meter-day, re-read from the kept files
    Readings(evidence::ReadingsArgs),
    /// Per meter and quarter of a year: quantity read, CO2 concentration, meter type, conversion
    Meters(meters::MetersArgs),
    /// Reconcile the ledger with an independent monitoring report; exit 4 when material
    Reconcile(reconcile::ReconcileArgs),
    /// Chart cumulative stored, conservative and durable tonnes against the permit (SVG)
    Chart(chart::ChartArgs),
    /// Totals across projects: stored, conservative, durable, buffer, claimable, reversed, headroom
    Totals(totals::TotalsArgs),
    /// A project's year as one printable HTML page: balance, meters, leakage, claims, seal
    Report(report::ReportArgs),
    /// A project's record as one portable file: export, check without a ledger, load
    #[command(subcommand)]
    Bundle(bundle::BundleCommand),
    /// Recompute every hash and check the ledger's structure
    Verify(verify::VerifyArgs),
    /// Convert masses, gas volumes and species (CaCO3, C, minerals) to CO2 and back
    Convert(convert::ConvertArgs),
    /// CO2 density, phase and compressibility factor by the Span–Wagner equation of state
    Density(density::DensityArgs),
    /// CO2 uptake potential of a rock (oxide composition) or a mineral (formula)
    Potential(potential::PotentialArgs),
    /// Build a fresh ledger from the sample projects: an overview, or every table with --full
    Demo(demo::DemoArgs),
    /// Register and list the feedstocks (crushed rock) of an enhanced-weathering project
    #[command(subcommand)]
    Feedstock(feedstock::FeedstockCommand),
    /// CO2 injected into basalt split by tracer campaigns into mineralized and still dissolved
    Mineralization(mineralization::MineralizationArgs),
    /// Per field and soil campaign: applied, dissolved fraction, gross CO2, deductions, emissions, net
    Weathering(weathering::WeatheringArgs),
    /// Close a reporting period: record the tree head over every entry and the period's figures
    Seal(seal::SealArgs),
    /// Write an inclusion proof of one entry in a seal's tree (JSON, docs/proofs.md)
    Proof(proof::ProofArgs),
    /// Check an inclusion proof without any ledger: exit 0 when it holds, 3 when it does not
    CheckProof(proof::CheckProofArgs),
    /// Make and show ed25519 keys for signing statements
    #[command(subcommand)]
    Key(sign::KeyCommand),
    /// Sign a statement over a sealed period's tree head, as operator or verifier
    Sign(sign::SignArgs),
    /// The signed statements of a project: key, signature, and whether the seal still matches
    Statements(sign::StatementsArgs),
}

/// Everything a command needs besides its arguments.
pub struct Context {
    pub db: PathBuf,
    pub now: DateTime<Utc>,
    /// `--late`: admit what falls in a sealed period as a late adjustment.
    pub late: bool,
}

impl Context {
    pub fn open(&self) -> Result<Store> {
        Store::open(&self.db)
    }
}

/// Runs one parsed command.
pub fn run(cli: Cli, now: DateTime<Utc>) -> Result<Report> {
    let db = cli.db.clone();
    let ctx = Context {
        db: db.clone().unwrap_or_else(|| PathBuf::from(DEFAULT_DB)),
        now,
        late: cli.late,
    };
    match cli.command {
        Command::Init => setup::init(&ctx),
        Command::Project(c) => setup::project(&ctx, c),
        Command::Site(c) => setup::site(&ctx, c),
        Command::Record(c) => record::record(&ctx, c),
        Command::Correct(a) => record::correct(&ctx, a),
        Command::Entries(a) => reports::entries(&ctx, a),
        Command::Balance(a) => reports::balance(&ctx, a),
        Command::Import(a) => import::import(&ctx, a),
        Command::Readings(a) => evidence::readings(&ctx, a),
        Command::Meters(a) => meters::meters(&ctx, a),
        Command::Reconcile(a) => reconcile::reconcile(&ctx, a),
        Command::Chart(a) => chart::chart(&ctx, a),
        Command::Totals(a) => totals::totals(&ctx, a),
        Command::Report(a) => report::report(&ctx, a),
        Command::Bundle(c) => bundle::bundle(&ctx, c),
        Command::Verify(a) => verify::verify(&ctx, a),
        Command::Convert(a) => convert::convert(a),
        Command::Density(a) => density::density(a),
        Command::Potential(a) => potential::potential(a),
        Command::Demo(a) => demo::demo(db.as_deref(), a, now),
        Command::Feedstock(c) => feedstock::feedstock(&ctx, c),
        Command::Mineralization(a) => mineralization::mineralization(&ctx, a),
        Command::Weathering(a) => weathering::weathering(&ctx, a),
        Command::Seal(a) => seal::seal(&ctx, a),
        Command::Proof(a) => proof::proof(&ctx, a),
        Command::CheckProof(a) => proof::check_proof(a),
        Command::Key(c) => sign::key(c),
        Command::Sign(a) => sign::sign(&ctx, a),
        Command::Statements(a) => sign::statements(&ctx, a),
    }
}

/// Runs one line of arguments (as after `sinkbook`) against a given ledger; the demo's scripts
/// go through the same parser and commands as a person typing them.
pub fn run_line(words: &[String], db: &Path, now: DateTime<Utc>) -> Result<Report> {
    let argv = std::iter::once("sinkbook".to_string()).chain(words.iter().cloned());
    let mut cli = Cli::try_parse_from(argv).map_err(|e| {
        crate::error::Error::Refused(e.to_string().lines().next().unwrap_or("").to_string())
    })?;
    cli.db = Some(db.to_path_buf());
    run(cli, now)
}
