//! The command line: parse with clap, call the core and the store, hand a report back.
//! The clock is read once per command, by the caller, and passed in.

mod bundle;
mod chart;
mod claims;
mod convert;
mod dates;
mod demo;
mod density;
mod evidence;
mod import;
mod import_write;
mod inputs;
mod meters;
mod potential;
mod proof;
mod reconcile;
mod reconciliations;
mod record;
mod registry;
mod report;
mod reports;
mod seal;
mod settings;
mod setup;
mod shell;
mod sign;
mod totals;
mod verify;
mod view;

mod emission_inventory;
mod feedstock;
mod mineralization;
mod record_rock;
mod weathering;

use crate::accounting::permit;
use crate::error::Result;
/// The bars of long commands, drawn by report/ (`progress::bytes`, `progress::entries`).
use crate::report::progress;
use crate::report::{Format, Report};
use crate::store::{Store, Wait};
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
    after_help = "Exit codes: 0 ok · 1 input or request refused · 2 usage · 3 ledger inconsistent or tampered · 4 reconciliation material · 5 reconciliation not assessed\n\nExample: sinkbook demo"
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
    /// How long a write waits for another writer (a long import) to finish: 500ms, 30s, 2m;
    /// reads never wait
    #[arg(long, global = true, value_name = "DURATION", default_value = crate::store::wait::DEFAULT)]
    pub wait: String,
    #[command(subcommand)]
    pub command: Command,
}

#[derive(Debug, Subcommand)]
pub enum Command {
    /// Create a ledger file (or confirm that one exists)
    #[command(after_help = "Example: sinkbook --db tfs.db init")]
    Init,
    /// Register and list storage projects
    #[command(subcommand)]
    #[command(after_help = "Example: sinkbook project list")]
    Project(setup::ProjectCommand),
    /// Register and list wells, fields and plants of a project
    #[command(subcommand)]
    #[command(after_help = "Example: sinkbook site list TFS")]
    Site(setup::SiteCommand),
    /// Record a measured quantity as a new ledger entry
    #[command(subcommand)]
    #[command(
        after_help = "Example: sinkbook record injection TFS --site TF-I1 --meter FM-101 --mass \"35164.5 t\" --co2-fraction 0.984 --from 2026-01-01 --to 2026-01-31"
    )]
    Record(record::RecordCommand),
    /// Record a correction: a new entry that replaces an earlier one
    #[command(
        after_help = "Example: sinkbook correct TFS 0 --reason \"meter FM-101 recalibrated\" --mass \"35160.2 t\""
    )]
    Correct(record::CorrectArgs),
    /// List every entry of a project with its reading and hash
    #[command(after_help = "Example: sinkbook entries TFS")]
    Entries(reports::EntriesArgs),
    /// Injected and stored tonnes by period, cumulative, and permit use
    #[command(after_help = "Example: sinkbook balance TFS --by quarter")]
    Balance(reports::BalanceArgs),
    /// Import a meter export (CSV): its bytes kept as evidence, one entry per meter per day
    #[command(after_help = "Example: sinkbook import TFS sample-projects/tfs-meters-2026.csv")]
    Import(import::ImportArgs),
    /// The imported readings behind one meter-day, re-read from the kept files
    #[command(after_help = "Example: sinkbook readings TFS --meter FM-101 --day 2026-02-10")]
    Readings(evidence::ReadingsArgs),
    /// Per meter and quarter of a year: quantity read, CO2 concentration, meter type, conversion
    #[command(after_help = "Example: sinkbook meters TFS --year 2026")]
    Meters(meters::MetersArgs),
    /// Reconcile the ledger with an independent monitoring report; exit 4 when material, 5 when nothing could be assessed
    #[command(
        after_help = "Example: sinkbook reconcile TFS sample-projects/tfs-monitoring-report-2026.csv --record --by \"Thistlemoor Verification Partners\""
    )]
    Reconcile(reconcile::ReconcileArgs),
    /// The reconciliations recorded against a project: report, lines, verdicts, who and when
    #[command(after_help = "Example: sinkbook reconciliations TFS --year 2026")]
    Reconciliations(reconciliations::ReconciliationsArgs),
    /// Chart cumulative stored, conservative and durable tonnes against the permit (SVG)
    #[command(after_help = "Example: sinkbook chart TFS --out tfs.svg")]
    Chart(chart::ChartArgs),
    /// Totals across projects: stored, conservative, durable, buffer, claimable, reversed, headroom
    #[command(after_help = "Example: sinkbook totals --by year")]
    Totals(totals::TotalsArgs),
    /// A project's year as one printable HTML page: balance, meters, leakage, claims, seal
    #[command(after_help = "Example: sinkbook report TFS --year 2026 --out tfs-2026.html")]
    Report(report::ReportArgs),
    /// A project's record as one portable file: export, check without a ledger, load
    #[command(subcommand)]
    #[command(after_help = "Example: sinkbook bundle export TFS --out tfs.bundle")]
    Bundle(bundle::BundleCommand),
    /// Recompute every hash and check the ledger's structure
    #[command(after_help = "Example: sinkbook verify")]
    Verify(verify::VerifyArgs),
    /// Convert masses, gas volumes and species (CaCO3, C, minerals) to CO2 and back
    #[command(after_help = "Example: sinkbook convert \"1000 short_ton\" --to t")]
    Convert(convert::ConvertArgs),
    /// CO2 density, phase and compressibility factor by the Span–Wagner equation of state
    #[command(
        after_help = "Example: sinkbook density --temperature \"40 C\" --pressure \"10 MPa\""
    )]
    Density(density::DensityArgs),
    /// CO2 uptake potential of a rock (oxide composition) or a mineral (formula)
    #[command(after_help = "Example: sinkbook potential --mineral Mg2SiO4")]
    Potential(potential::PotentialArgs),
    /// Build a fresh ledger from the sample projects: an overview, or every table with --full
    Demo(demo::DemoArgs),
    /// A completion script for bash, zsh or fish
    Completions(shell::CompletionsArgs),
    /// The manual page (roff, for man)
    Manual(shell::ManualArgs),
    /// Register and list the feedstocks (crushed rock) of an enhanced-weathering project
    #[command(subcommand)]
    #[command(after_help = "Example: sinkbook feedstock list EVW")]
    Feedstock(feedstock::FeedstockCommand),
    /// CO2 injected into basalt split by tracer campaigns into mineralized and still dissolved
    #[command(after_help = "Example: sinkbook mineralization CRB --by year")]
    Mineralization(mineralization::MineralizationArgs),
    /// Per field and soil campaign: applied, dissolved fraction, gross CO2, deductions, emissions, net
    #[command(after_help = "Example: sinkbook weathering EVW")]
    Weathering(weathering::WeatheringArgs),
    /// Close a reporting period: record the tree head over every entry and the period's figures
    #[command(after_help = "Example: sinkbook seal TFS --period 2026")]
    Seal(seal::SealArgs),
    /// Write an inclusion proof of one entry in a seal's tree (JSON, docs/proofs.md)
    #[command(after_help = "Example: sinkbook proof TFS 12 --seal 2026 --out proof.json")]
    Proof(proof::ProofArgs),
    /// Check an inclusion proof without any ledger: exit 0 when it holds, 3 when it does not
    #[command(after_help = "Example: sinkbook check-proof proof.json")]
    CheckProof(proof::CheckProofArgs),
    /// The shared registry on PostgreSQL: its login roles, its operators and their projects
    #[command(
        subcommand,
        after_help = "Example: sinkbook --db postgres://postgres@127.0.0.1/registry registry role add audit_vera --verifier"
    )]
    Registry(registry::RegistryCommand),
    /// Make and show ed25519 keys for signing statements
    #[command(
        subcommand,
        after_help = "Example: sinkbook key new --out operator.key"
    )]
    Key(sign::KeyCommand),
    /// Sign a statement over a sealed period's tree head, as operator or verifier
    #[command(
        after_help = "Example: sinkbook sign TFS --period 2026 --role verifier --key verifier.key --statement \"Reviewed against the monitoring report\""
    )]
    Sign(sign::SignArgs),
    /// The signed statements of a project: key, signature, and whether the seal still matches
    #[command(after_help = "Example: sinkbook statements TFS")]
    Statements(sign::StatementsArgs),
}

/// Everything a command needs besides its arguments.
pub struct Context {
    pub db: PathBuf,
    pub now: DateTime<Utc>,
    /// `--late`: admit what falls in a sealed period as a late adjustment.
    pub late: bool,
    /// `--wait`: how long a write waits for another writer.
    pub wait: Wait,
}

impl Context {
    pub fn open(&self) -> Result<Store> {
        Store::open(&self.db, self.wait)
    }
}

/// Runs one parsed command.
pub fn run(cli: Cli, now: DateTime<Utc>) -> Result<Report> {
    let db = cli.db.clone();
    let format = cli.format;
    let ctx = Context {
        db: db.clone().unwrap_or_else(|| PathBuf::from(DEFAULT_DB)),
        now,
        late: cli.late,
        wait: Wait::parse(&cli.wait)?,
    };
    match cli.command {
        Command::Init => setup::init(&ctx),
        Command::Project(c) => setup::project(&ctx, c),
        Command::Site(c) => setup::site(&ctx, c),
        Command::Record(c) => record::record(&ctx, c),
        Command::Correct(a) => record::correct(&ctx, a),
        Command::Entries(a) => reports::entries(&ctx, a, format),
        Command::Balance(a) => reports::balance(&ctx, a),
        Command::Import(a) => import::import(&ctx, a),
        Command::Readings(a) => evidence::readings(&ctx, a),
        Command::Meters(a) => meters::meters(&ctx, a),
        Command::Reconcile(a) => reconcile::reconcile(&ctx, a),
        Command::Reconciliations(a) => reconciliations::reconciliations(&ctx, a),
        Command::Chart(a) => chart::chart(&ctx, a),
        Command::Totals(a) => totals::totals(&ctx, a),
        Command::Report(a) => report::report(&ctx, a),
        Command::Bundle(c) => bundle::bundle(&ctx, c),
        Command::Verify(a) => verify::verify(&ctx, a),
        Command::Convert(a) => convert::convert(a),
        Command::Density(a) => density::density(a),
        Command::Potential(a) => potential::potential(a),
        Command::Demo(a) => demo::demo(db.as_deref(), a, now),
        Command::Completions(a) => shell::completions(a),
        Command::Manual(a) => shell::manual(a),
        Command::Feedstock(c) => feedstock::feedstock(&ctx, c),
        Command::Mineralization(a) => mineralization::mineralization(&ctx, a),
        Command::Weathering(a) => weathering::weathering(&ctx, a),
        Command::Seal(a) => seal::seal(&ctx, a),
        Command::Proof(a) => proof::proof(&ctx, a),
        Command::CheckProof(a) => proof::check_proof(a),
        Command::Registry(c) => registry::registry(&ctx, c),
        Command::Key(c) => sign::key(c),
        Command::Sign(a) => sign::sign(&ctx, a),
        Command::Statements(a) => sign::statements(&ctx, a),
    }
}

/// The permit's check of an append, said for people: its notices as warnings; a limit passed
/// without `--over-permit` refused, saying how to record it anyway.
fn permit_check(
    project: &crate::ledger::Project,
    standing: &permit::Standing,
    new: &[crate::ledger::Entry],
    replaced: &[crate::ledger::Entry],
    over_permit: bool,
) -> Result<Vec<String>> {
    use crate::report::tables::permit::{exceeded_line, notice_line};
    match permit::check(project, standing, new, replaced, over_permit) {
        Ok(notices) => Ok(notices
            .iter()
            .map(|n| notice_line(&project.code, n))
            .collect()),
        Err(e) => Err(crate::error::Error::Refused(format!(
            "{}; nothing written (record it with --over-permit: the ledger keeps what happened, and every report flags it)",
            exceeded_line(&e)
        ))),
    }
}

/// A sealed period's refusal with what the command line offers instead.
fn sealed(e: &crate::ledger::seal::SealRefusal) -> String {
    use crate::ledger::seal::SealRefusal;
    match e {
        SealRefusal::Sealed { .. } => {
            format!("{e} (give --late to record it as a late adjustment dated now)")
        }
        SealRefusal::NoLateDifference { .. } => {
            format!("{e}; record the new reading with --late instead")
        }
        SealRefusal::Backdated { .. } => format!("{e}: give a --from after it"),
        SealRefusal::TodaySealed { .. } | SealRefusal::Overlap { .. } => e.to_string(),
    }
}

/// Runs one line of arguments (as after `sinkbook`) against a given ledger; the demo's scripts
/// go through the same parser and commands as a person typing them.
pub fn run_line(words: &[String], db: &Path, now: DateTime<Utc>) -> Result<Report> {
    let argv = std::iter::once("sinkbook".to_string()).chain(words.iter().cloned());
    let mut cli = Cli::try_parse_from(argv).map_err(|e| {
        crate::error::Error::Usage(e.to_string().lines().next().unwrap_or("").to_string())
    })?;
    cli.db = Some(db.to_path_buf());
    run(cli, now)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn a_script_line_that_does_not_parse_is_a_usage_error_wherever_it_stands() {
        let words = ["record".to_string(), "nonsense".to_string()];
        let e = run_line(&words, Path::new("never-opened.db"), Utc::now()).unwrap_err();
        assert_eq!(e.exit_code(), 2, "{e}");
        let at = e.at("tfs.sinkbook line 3");
        assert_eq!(at.exit_code(), 2);
        assert!(at.to_string().starts_with("tfs.sinkbook line 3: "), "{at}");
    }
}
