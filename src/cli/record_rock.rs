//! `record tracer-sample | carbonation | application | soil-sample`: the field and laboratory
//! records of the rock routes, and the same readings read back for the reports. The reading
//! field names written here are the ones read back here, and nowhere else.

use super::record::{ReadingArgs, RecordArgs, commit_with, draft, period};
use super::setup::known_project;
use super::{Context, inputs};
use crate::accounting::carbonation::Carbonation;
use crate::accounting::rock_record::{
    self as rock, AreaError, CarbonationTexts, Given, RecordError, SoilTexts, TracerTexts,
};
use crate::error::{Error, Result};
use crate::ledger::baseline::{baseline_before_spreadings, spreading_before_baselines};
use crate::ledger::route_record::{self, ContextError};
use crate::ledger::{Entry, EntryKind, Period, Reading, Site};
use crate::quantity::Mass;
use crate::report::Report;
use crate::report::tables::rock_findings::{mineralized, no_uptake};
use crate::store::Tx;
use clap::Args;

/// Options every rock-route record shares: its key, a note, and what it replaces.
#[derive(Debug, Args)]
pub struct EntryOptions {
    /// Idempotency key: recording the same key again writes nothing [default: derived from the content]
    #[arg(long)]
    pub key: Option<String>,
    /// A note kept with the entry (free text)
    #[arg(long, value_name = "TEXT")]
    pub note: Option<String>,
    /// Replace an earlier entry of the same kind (a re-analysis, a corrected transcription)
    #[arg(long, value_name = "SEQ", requires = "reason")]
    pub corrects: Option<u64>,
    /// Why the entry named by --corrects is replaced
    #[arg(long, value_name = "TEXT", requires = "corrects")]
    pub reason: Option<String>,
}

#[derive(Debug, Args)]
pub struct TracerSampleArgs {
    /// Project code (e.g. TFS)
    pub project: String,
    /// The monitoring well sampled
    #[arg(long)]
    pub site: String,
    /// The day of it (ISO 8601 date)
    #[arg(long, value_name = "DATE")]
    pub date: String,
    /// X: the non-reactive tracer's concentration in the sample over that in the injectate, in (0, 1]
    #[arg(long, value_name = "X")]
    pub tracer_ratio: String,
    /// Dissolved inorganic carbon (DIC) of the sample
    #[arg(long, value_name = "C", allow_hyphen_values = true)]
    pub dic_sample: String,
    /// DIC of the formation water before injection
    #[arg(long, value_name = "C", allow_hyphen_values = true)]
    pub dic_background: String,
    /// DIC of the injected water
    #[arg(long, value_name = "C", allow_hyphen_values = true)]
    pub dic_injectate: String,
    /// Unit of the three DIC concentrations (mmol/kg, mmol/L, umol/kg, mol/kg, mg/L)
    #[arg(long, default_value = "mmol/kg")]
    pub unit: String,
    #[command(flatten)]
    pub entry: EntryOptions,
}

#[derive(Debug, Args)]
pub struct CarbonationArgs {
    /// Project code (e.g. TFS)
    pub project: String,
    /// The plant where the solid was carbonated
    #[arg(long)]
    pub site: String,
    /// Dry mass of solid fed, before carbonation (e.g. "1200 t")
    #[arg(long, value_name = "MASS")]
    pub mass: String,
    /// CO2 mass fraction of the dry feed, e.g. 1.2% or 0.012
    #[arg(long, value_name = "W", allow_hyphen_values = true)]
    pub co2_before: String,
    /// CO2 mass fraction of the dry carbonated product
    #[arg(long, value_name = "W", allow_hyphen_values = true)]
    pub co2_after: String,
    /// First day of the batch or campaign (ISO 8601 date)
    #[arg(long, value_name = "DATE")]
    pub from: String,
    /// Last day, included
    #[arg(long, value_name = "DATE")]
    pub to: String,
    /// The uptake's expanded uncertainty (95 %) as the laboratory states it for the two CO2
    /// analyses and the weighing, e.g. 4% [default: none stated; reports say so]
    #[arg(long, value_name = "U", allow_hyphen_values = true)]
    pub uncertainty: Option<String>,
    #[command(flatten)]
    pub entry: EntryOptions,
}

#[derive(Debug, Args)]
pub struct ApplicationArgs {
    /// Project code (e.g. TFS)
    pub project: String,
    /// The field spread (registered with an area)
    #[arg(long)]
    pub site: String,
    /// The feedstock's code (see `feedstock list`)
    #[arg(long)]
    pub feedstock: String,
    /// Dry mass of rock spread, e.g. "625 t"
    #[arg(long, value_name = "MASS")]
    pub mass: String,
    /// The day of it (ISO 8601 date)
    #[arg(long, value_name = "DATE")]
    pub date: String,
    #[command(flatten)]
    pub entry: EntryOptions,
}

#[derive(Debug, Args)]
pub struct SoilSampleArgs {
    /// Project code (e.g. TFS)
    pub project: String,
    /// The field cored
    #[arg(long)]
    pub site: String,
    /// The day of it (ISO 8601 date)
    #[arg(long, value_name = "DATE")]
    pub date: String,
    /// Depth interval cored, e.g. "0-30 cm"
    #[arg(long)]
    pub depth: String,
    /// Dry bulk density of the core, e.g. "1.3 t/m3"
    #[arg(long, value_name = "DENSITY")]
    pub bulk_density: String,
    /// Element concentrations: base cations and an immobile element, e.g. Ca=0.1,Mg=0.08,Na=0.05,K=0.06,Ti=0.09
    #[arg(long, value_name = "EL=C,…", allow_hyphen_values = true)]
    pub conc: String,
    /// Unit of --conc: mol/kg, mg/kg or wt%
    #[arg(long, default_value = "mol/kg")]
    pub unit: String,
    /// The field's soil before any feedstock: what later cores are read against
    #[arg(long)]
    pub baseline: bool,
    #[command(flatten)]
    pub entry: EntryOptions,
}

/// A rock-route record: its kind, where, when and how much.
struct Record<'a> {
    kind: EntryKind,
    project: &'a str,
    site: &'a str,
    mass: Mass,
    period: Period,
    options: &'a EntryOptions,
}

/// Appends the record in one write transaction once the ledger's context is checked; `more`
/// reads what else the record's rule needs, and may add to the reading.
fn record(
    ctx: &Context,
    r: Record<'_>,
    reading: &Reading,
    mut more: impl FnMut(&mut Tx<'_>, &Site, &mut Reading) -> Result<()>,
) -> Result<Report> {
    commit_with(ctx, r.options.key.clone(), false, |tx| {
        let site = context(tx, &r)?;
        let mut reading = reading.clone();
        more(tx, &site, &mut reading)?;
        entry(ctx, &r, reading)
    })
}

/// Checks what the ledger holds for the record: the project's method, the entry a correction
/// replaces, and the site. Returns the project's site.
fn context(tx: &mut Tx<'_>, r: &Record<'_>) -> Result<Site> {
    let p = known_project(tx, r.project)?;
    let target = match r.options.corrects {
        Some(seq) => Some((seq, tx.correction_target(r.project, seq)?)),
        None => None,
    };
    let site = tx.site(r.project, r.site)?;
    route_record::context(&p, r.kind, target, site).map_err(|e| match e {
        ContextError::Method { has, wants } => Error::field(
            "project",
            r.project,
            format!(
                "has method {has}; {} entries belong to {wants} projects",
                r.kind
            ),
        ),
        ContextError::Target { seq, why } => Error::field("--corrects", &seq.to_string(), why),
        ContextError::TargetKind { seq, is } => Error::field(
            "--corrects",
            &seq.to_string(),
            format!(
                "is a {is} entry; --corrects names an earlier {} entry",
                r.kind
            ),
        ),
        ContextError::NoSite => Error::field(
            "--site",
            r.site,
            format!("is not a site of project {}", r.project),
        ),
    })
}

/// The entry, drafted like any record, with its correction link.
fn entry(ctx: &Context, r: &Record<'_>, reading: Reading) -> Result<Entry> {
    let o = r.options;
    let b = RecordArgs {
        project: r.project.into(),
        site: r.site.into(),
        reading: ReadingArgs {
            key: o.key.clone(),
            note: o.note.clone(),
            ..Default::default()
        },
    };
    let mut e = draft(r.kind, &b, reading, r.mass, r.period, ctx)?;
    if let Some(reason) = &o.reason {
        inputs::text("--reason", reason)?;
    }
    e.corrects = o.corrects;
    e.reason = o.reason.clone();
    Ok(e)
}

/// A tracer campaign's sample at one monitoring well; its mineralized fraction is computed now
/// to refuse impossible input, and again by every report from the reading.
pub fn tracer_sample(ctx: &Context, a: TracerSampleArgs) -> Result<Report> {
    let date = inputs::activity_date("--date", &a.date, ctx.now.date_naive())?;
    let (reading, found) = rock::tracer_sample(&TracerTexts {
        tracer_ratio: &a.tracer_ratio,
        dic_sample: &a.dic_sample,
        dic_background: &a.dic_background,
        dic_injectate: &a.dic_injectate,
        unit: &a.unit,
    })?;
    let r = Record {
        kind: EntryKind::TracerSample,
        project: &a.project,
        site: &a.site,
        mass: Mass::ZERO,
        period: Period::day(date),
        options: &a.entry,
    };
    let report = record(ctx, r, &reading, |_, _, _| Ok(()))?;
    Ok(mineralized(report, &found))
}

/// The option that gives each value of a rock record.
fn option(given: Given) -> &'static str {
    match given {
        Given::TracerRatio => "--tracer-ratio",
        Given::DicSample => "--dic-sample",
        Given::DicBackground => "--dic-background",
        Given::DicInjectate => "--dic-injectate",
        Given::DicUnit | Given::ConcUnit => "--unit",
        Given::FedMass => "--mass",
        Given::Co2Before => "--co2-before",
        Given::Co2After => "--co2-after",
        Given::Uncertainty => "--uncertainty",
        Given::Depth => "--depth",
        Given::BulkDensity => "--bulk-density",
        Given::Conc => "--conc",
    }
}

impl From<RecordError> for Error {
    fn from(e: RecordError) -> Error {
        match e {
            RecordError::Value { given, text, why } => Error::field(option(given), &text, why),
            RecordError::Check(e) => e.into(),
            RecordError::Unreadable(why) => Error::internal(why),
        }
    }
}

/// A carbonation batch: the uptake is what the entry stores.
pub fn carbonation(ctx: &Context, a: CarbonationArgs) -> Result<Report> {
    let texts = CarbonationTexts {
        mass: &a.mass,
        co2_before: &a.co2_before,
        co2_after: &a.co2_after,
        uncertainty: a.uncertainty.as_deref(),
    };
    let (mut reading, result, period) =
        rock::carbonation(&texts, || period(&a.from, &a.to, ctx.now.date_naive()))?;
    let (mass, finding) = match result {
        Carbonation::Uptake { co2, .. } => (co2, None),
        Carbonation::NoUptake { released, .. } => (Mass::ZERO, Some(no_uptake(released))),
    };
    if let Some(f) = &finding {
        reading.push("finding", f.clone());
    }
    let r = Record {
        kind: EntryKind::Carbonation,
        project: &a.project,
        site: &a.site,
        mass,
        period,
        options: &a.entry,
    };
    let mut report = record(ctx, r, &reading, |_, _, _| Ok(()))?;
    report.warnings.extend(finding);
    Ok(report)
}

/// Feedstock spread on a field: no CO2 of its own (0 g); the rock's mass is in the reading.
pub fn application(ctx: &Context, a: ApplicationArgs) -> Result<Report> {
    let date = inputs::activity_date("--date", &a.date, ctx.now.date_naive())?;
    let rock = inputs::mass("--mass", &a.mass)?;
    let r = Record {
        kind: EntryKind::Application,
        project: &a.project,
        site: &a.site,
        mass: Mass::ZERO,
        period: Period::day(date),
        options: &a.entry,
    };
    record(ctx, r, &Reading::default(), |tx, site, reading| {
        *reading = rock::application(&a.feedstock, (&rock.0, rock.1), site).map_err(|e| {
            let why = match e {
                AreaError::Missing => {
                    "has no area: register the field with --area (e.g. \"12.5 ha\")".into()
                }
                AreaError::Unreadable(why) => why,
            };
            Error::field("--site", &site.code, why)
        })?;
        spreadable(tx, &a, date)
    })
}

/// The feedstock is registered and no baseline core of the field is dated on or after the
/// spreading.
fn spreadable(tx: &mut Tx<'_>, a: &ApplicationArgs, date: chrono::NaiveDate) -> Result<()> {
    tx.feedstock(&a.project, &a.feedstock)?.ok_or_else(|| {
        Error::field(
            "--feedstock",
            &a.feedstock,
            format!(
                "is not a feedstock of project {} (see `sinkbook feedstock list {}`)",
                a.project, a.project
            ),
        )
    })?;
    let cores = tx.effective_at_site(&a.project, EntryKind::SoilSample, &a.site)?;
    spreading_before_baselines(&cores, date).map_err(|b| {
        Error::field(
            "--date",
            &a.date,
            format!(
                "field {} has a baseline soil sample of {} (seq {}); a baseline is soil before any feedstock",
                a.site, b.date, b.seq
            ),
        )
    })
}

/// A soil core: its depth, bulk density and elements, checked; a baseline may not follow feedstock.
pub fn soil_sample(ctx: &Context, a: SoilSampleArgs) -> Result<Report> {
    let date = inputs::activity_date("--date", &a.date, ctx.now.date_naive())?;
    let reading = rock::soil_sample(&SoilTexts {
        depth: &a.depth,
        bulk_density: &a.bulk_density,
        unit: &a.unit,
        conc: &a.conc,
        baseline: a.baseline,
    })?;
    let r = Record {
        kind: EntryKind::SoilSample,
        project: &a.project,
        site: &a.site,
        mass: Mass::ZERO,
        period: Period::day(date),
        options: &a.entry,
    };
    record(ctx, r, &reading, |tx, _, _| {
        if !a.baseline {
            return Ok(());
        }
        let spread = tx.effective_at_site(&a.project, EntryKind::Application, &a.site)?;
        baseline_before_spreadings(&spread, date).map_err(|first| {
            Error::field(
                "--baseline",
                &a.date,
                format!(
                    "field {} received feedstock on {} (seq {}); a baseline is soil before any feedstock",
                    a.site, first.date, first.seq
                ),
            )
        })
    })
}
