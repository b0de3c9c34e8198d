//! `record` and `correct`: readings become entries, sealed onto the project's chain.

use super::setup::known_project;
use super::{Context, QuantityArgs, inputs};
use crate::error::{Error, Result};
use crate::ledger::append::{Appended, append, content_key};
use crate::ledger::correction;
use crate::ledger::{Entry, EntryKind, Period, Reading, SealedEntry};
use crate::quantity::{Fraction, Mass};
use crate::report::{Cell, Report, Table, columns};
use clap::{Args, Subcommand};

#[derive(Debug, Subcommand)]
pub enum RecordCommand {
    /// CO2 injected at an injection well, from its flow meter
    Injection(RecordArgs),
}

/// Options every record takes.
#[derive(Debug, Args)]
pub struct RecordArgs {
    pub project: String,
    /// The site the reading was taken at
    #[arg(long)]
    pub site: String,
    #[command(flatten)]
    pub quantity: QuantityArgs,
    /// First day the reading covers (ISO 8601 date)
    #[arg(long, value_name = "DATE")]
    pub from: String,
    /// Last day the reading covers, included
    #[arg(long, value_name = "DATE")]
    pub to: String,
    /// Idempotency key: recording the same key again writes nothing [default: derived from the content]
    #[arg(long)]
    pub key: Option<String>,
    /// The meter's identifier
    #[arg(long, value_name = "ID")]
    pub meter: Option<String>,
    #[arg(long, value_name = "TEXT")]
    pub note: Option<String>,
}

#[derive(Debug, Args)]
pub struct CorrectArgs {
    pub project: String,
    /// The seq of the entry to replace
    pub seq: u64,
    /// Why the entry is corrected
    #[arg(long)]
    pub reason: String,
    /// Any option left out keeps the corrected entry's value
    #[command(flatten)]
    pub quantity: QuantityArgs,
    #[arg(long)]
    pub site: Option<String>,
    #[arg(long, value_name = "DATE")]
    pub from: Option<String>,
    #[arg(long, value_name = "DATE")]
    pub to: Option<String>,
    #[arg(long)]
    pub key: Option<String>,
    #[arg(long, value_name = "ID")]
    pub meter: Option<String>,
    #[arg(long, value_name = "TEXT")]
    pub note: Option<String>,
}

/// A mass-meter reading: the mass as metered and its CO2 mass fraction, exactly multiplied.
fn mass_reading(mass_text: &str, fraction_text: &str) -> Result<(Reading, Mass)> {
    let (m, _) = inputs::mass("--mass", mass_text)?;
    let f: Fraction = inputs::fraction("--co2-fraction", fraction_text)?;
    let grams = m
        .grams_exact()
        .ok()
        .and_then(|g| g.checked_mul(f.value()))
        .and_then(|g| g.round_half_even())
        .ok_or_else(|| Error::field("--mass", mass_text, "too large for the ledger"))?;
    let mut r = Reading::default();
    r.push("meter_type", "mass");
    r.push("mass", m.to_string());
    r.push("co2_fraction", f.to_string());
    r.push("co2_basis", "mass");
    Ok((r, Mass::from_grams(grams)))
}

fn period(from: &str, to: &str) -> Result<Period> {
    let f = inputs::date("--from", from)?;
    let t = inputs::date("--to", to)?;
    Period::new(f, t).map_err(|e| Error::field("--to", to, e))
}

fn optional_text(field: &str, v: &Option<String>) -> Result<()> {
    v.as_deref().map_or(Ok(()), |t| inputs::text(field, t))
}

pub fn record(ctx: &Context, c: RecordCommand) -> Result<Report> {
    let RecordCommand::Injection(a) = c;
    let kind = EntryKind::Injection;
    let mass_text = a.quantity.mass.as_deref().ok_or_else(|| {
        Error::Refused(
            "--mass is required: the metered mass with its unit, e.g. --mass \"1250.5 t\"".into(),
        )
    })?;
    let (reading, mass) =
        mass_reading(mass_text, a.quantity.co2_fraction.as_deref().unwrap_or("1"))?;
    let period = period(&a.from, &a.to)?;
    optional_text("--key", &a.key)?;
    optional_text("--meter", &a.meter)?;
    optional_text("--note", &a.note)?;
    let entry = Entry {
        project: a.project,
        seq: 0,
        kind,
        site: a.site,
        period,
        reading,
        mass,
        sign: kind.sign(),
        recorded_at: ctx.now,
        key: String::new(),
        meter: a.meter,
        note: a.note,
        corrects: None,
        reason: None,
        evidence: None,
    };
    commit(ctx, entry, a.key)
}

pub fn correct(ctx: &Context, a: CorrectArgs) -> Result<Report> {
    inputs::text("--reason", &a.reason)?;
    optional_text("--key", &a.key)?;
    optional_text("--meter", &a.meter)?;
    optional_text("--note", &a.note)?;
    let mut store = ctx.open()?;
    let target = store.read(|tx| {
        known_project(tx, &a.project)?;
        let all = tx.entries(&a.project)?;
        correction::target(&all, a.seq)
            .cloned()
            .map_err(|e| Error::field("seq", &a.seq.to_string(), e))
    })?;
    let mass_text = a
        .quantity
        .mass
        .clone()
        .or_else(|| target.reading.get("mass").map(str::to_string));
    let fraction_text = a
        .quantity
        .co2_fraction
        .clone()
        .or_else(|| target.reading.get("co2_fraction").map(str::to_string));
    let (reading, mass) = match (mass_text, fraction_text) {
        (Some(m), f) => mass_reading(&m, f.as_deref().unwrap_or("1"))?,
        (None, _) => (target.reading.clone(), target.mass),
    };
    let from = a.from.unwrap_or_else(|| target.period.from.to_string());
    let to = a.to.unwrap_or_else(|| target.period.to.to_string());
    let entry = Entry {
        seq: 0,
        site: a.site.unwrap_or(target.site.clone()),
        period: period(&from, &to)?,
        reading,
        mass,
        recorded_at: ctx.now,
        key: String::new(),
        meter: a.meter.or(target.meter.clone()),
        note: a.note.or(target.note.clone()),
        corrects: Some(target.seq),
        reason: Some(a.reason),
        evidence: None,
        ..target
    };
    commit(ctx, entry, a.key)
}

/// Appends in one immediate transaction: project and site checked, key resolved, entry sealed.
fn commit(ctx: &Context, mut entry: Entry, key: Option<String>) -> Result<Report> {
    entry.key = key.unwrap_or_else(|| content_key(&entry));
    let outcome = ctx.open()?.write(|tx| {
        known_project(tx, &entry.project)?;
        let site = tx.site(&entry.project, &entry.site)?.ok_or_else(|| {
            Error::field(
                "--site",
                &entry.site,
                format!("is not a site of project {}", entry.project),
            )
        })?;
        if let Some(target) = entry.corrects {
            // Re-checked inside the write transaction, so a concurrent correction cannot slip in.
            let all = tx.entries(&entry.project)?;
            correction::target(&all, target)
                .map_err(|e| Error::field("seq", &target.to_string(), e))?;
        }
        let holder = tx.entry_by_key(&entry.project, &entry.key)?;
        let tip = tx.chain_tip(&entry.project)?;
        let outcome = append(entry.clone(), &site, tip, holder).map_err(|e| match e {
            crate::ledger::append::AppendError::KeyTaken { .. } => {
                Error::field("--key", &entry.key, e)
            }
            _ => Error::field("--site", &entry.site, e),
        })?;
        if let Appended::New(s) = &outcome {
            tx.append(std::slice::from_ref(s))?;
        }
        Ok(outcome)
    })?;
    Ok(match outcome {
        Appended::New(s) => Report::default()
            .line(format!("recorded {} seq {}", s.entry.project, s.entry.seq))
            .table(recorded_table(&s)),
        Appended::Existing(s) => Report::default()
            .line(format!(
                "already recorded as {} seq {} (key {}); nothing written",
                s.entry.project, s.entry.seq, s.entry.key
            ))
            .table(recorded_table(&s)),
    })
}

fn recorded_table(s: &SealedEntry) -> Table {
    let e = &s.entry;
    let mut t = Table::new(
        "entry",
        format!("Entry {} seq {}", e.project, e.seq),
        columns(&[
            ("Seq", "seq"),
            ("Kind", "kind"),
            ("Site", "site"),
            ("Period", "period"),
            ("CO2 (t)", "co2_t"),
            ("Replaces", "corrects"),
            ("Key", "key"),
            ("Chain head", "chain_hash"),
        ]),
    );
    t.push(vec![
        Cell::Int(e.seq as i64),
        Cell::text(e.kind.name()),
        Cell::text(&e.site),
        Cell::text(e.period.to_string()),
        Cell::Tonnes(e.mass),
        e.corrects.map_or(Cell::Empty, |c| Cell::Int(c as i64)),
        Cell::text(&e.key),
        Cell::text(s.chain.to_hex()),
    ]);
    t
}
