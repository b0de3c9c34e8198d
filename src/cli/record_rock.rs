//! `record tracer-sample | carbonation | application | soil-sample`: the field and laboratory
//! records of the rock routes, and the same readings read back for the reports. The reading
//! field names written here are the ones read back here, and nowhere else.

use super::record::{ReadingArgs, RecordArgs, commit_with, draft};
use super::rock_inputs as ri;
use super::setup::known_project;
use super::{Context, inputs};
use crate::accounting::carbonation::Carbonation;
use crate::accounting::rock_record::{
    CarbonationTexts, Given, RecordError, SoilTexts, TracerTexts,
    carbonation as carbonation_reading, soil_sample as soil_sample_reading,
    tracer_sample as tracer_sample_reading,
};
use crate::accounting::tracer::Mineralized;
use crate::error::{Error, Result};
use crate::ledger::{Entry, EntryKind, Method, Period, Reading, Site};
use crate::quantity::Mass;
use crate::quantity::area::Area;
use crate::report::Report;
use crate::store::Tx;
use chrono::NaiveDate;
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

/// Checks what the ledger holds for a record of `kind`: the project's method, the site, and
/// the entry a correction replaces. Returns the project's site.
fn context(
    tx: &mut Tx<'_>,
    project: &str,
    site: &str,
    kind: EntryKind,
    method: Method,
    corrects: Option<u64>,
) -> Result<Site> {
    {
        let p = known_project(tx, project)?;
        if p.method != method {
            return Err(Error::field(
                "project",
                project,
                format!(
                    "has method {}; {kind} entries belong to {method} projects",
                    p.method
                ),
            ));
        }
        if let Some(seq) = corrects {
            let t = tx
                .correction_target(project, seq)?
                .map_err(|e| Error::field("--corrects", &seq.to_string(), e))?;
            if t.kind != kind {
                return Err(Error::field(
                    "--corrects",
                    &seq.to_string(),
                    format!(
                        "is a {} entry; --corrects names an earlier {kind} entry",
                        t.kind
                    ),
                ));
            }
        }
        tx.site(project, site)?.ok_or_else(|| {
            Error::field(
                "--site",
                site,
                format!("is not a site of project {project}"),
            )
        })
    }
}

/// The entry, drafted like any record, with its correction link.
fn entry(
    ctx: &Context,
    kind: EntryKind,
    (project, site): (&str, &str),
    reading: Reading,
    (mass, period): (Mass, Period),
    o: &EntryOptions,
) -> Result<Entry> {
    let b = RecordArgs {
        project: project.into(),
        site: site.into(),
        reading: ReadingArgs {
            key: o.key.clone(),
            note: o.note.clone(),
            ..Default::default()
        },
    };
    let mut e = draft(kind, &b, reading, mass, period, ctx)?;
    if let Some(r) = &o.reason {
        inputs::text("--reason", r)?;
    }
    e.corrects = o.corrects;
    e.reason = o.reason.clone();
    Ok(e)
}

/// A tracer campaign's sample at one monitoring well; its mineralized fraction is computed now
/// to refuse impossible input, and again by every report from the reading.
pub fn tracer_sample(ctx: &Context, a: TracerSampleArgs) -> Result<Report> {
    let kind = EntryKind::TracerSample;
    let date = inputs::activity_date("--date", &a.date, ctx.now.date_naive())?;
    let (reading, found) = tracer_sample_reading(&TracerTexts {
        tracer_ratio: &a.tracer_ratio,
        dic_sample: &a.dic_sample,
        dic_background: &a.dic_background,
        dic_injectate: &a.dic_injectate,
        unit: &a.unit,
    })?;
    let mut report = commit_with(ctx, a.entry.key.clone(), false, |tx| {
        context(
            tx,
            &a.project,
            &a.site,
            kind,
            Method::BasaltMineralization,
            a.entry.corrects,
        )?;
        entry(
            ctx,
            kind,
            (&a.project, &a.site),
            reading.clone(),
            (Mass::ZERO, Period::day(date)),
            &a.entry,
        )
    })?;
    match found {
        Mineralized::Fraction { f, .. } => {
            report.lines.push(format!("mineralized fraction {f:.4}"));
        }
        Mineralized::OutOfRange { f, why } => report.warnings.push(format!(
            "mineralized fraction {f:.4} is outside [0, 1]: {why}; recorded as measured, reported as a finding"
        )),
    }
    Ok(report)
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
            RecordError::Check(e) => ri::refused(&e, &[]),
            RecordError::Unreadable(why) => Error::internal(why),
        }
    }
}

/// A carbonation batch: the uptake is what the entry stores.
pub fn carbonation(ctx: &Context, a: CarbonationArgs) -> Result<Report> {
    let kind = EntryKind::Carbonation;
    let texts = CarbonationTexts {
        mass: &a.mass,
        co2_before: &a.co2_before,
        co2_after: &a.co2_after,
        uncertainty: a.uncertainty.as_deref(),
    };
    let (mut reading, result, period) = carbonation_reading(&texts, || {
        Period::new(
            inputs::activity_date("--from", &a.from, ctx.now.date_naive())?,
            inputs::activity_date("--to", &a.to, ctx.now.date_naive())?,
        )
        .map_err(|e| Error::field("--to", &a.to, e))
    })?;
    let (mass, finding) = match result {
        Carbonation::Uptake { co2, .. } => (co2, None),
        Carbonation::NoUptake { released, .. } => (
            Mass::ZERO,
            Some(format!(
                "no uptake: the solid lost {} t CO2, counted as an emission of this batch; nothing counted as stored",
                crate::report::render::tonnes_text(released)
            )),
        ),
    };
    if let Some(f) = &finding {
        reading.push("finding", f.clone());
    }
    let mut report = commit_with(ctx, a.entry.key.clone(), false, |tx| {
        context(
            tx,
            &a.project,
            &a.site,
            kind,
            Method::ExSituMineralization,
            a.entry.corrects,
        )?;
        entry(
            ctx,
            kind,
            (&a.project, &a.site),
            reading.clone(),
            (mass, period),
            &a.entry,
        )
    })?;
    if let Some(f) = finding {
        report.warnings.push(f);
    }
    Ok(report)
}

/// A field's area in m², or a refusal naming the field.
pub fn field_area(site: &Site) -> Result<f64> {
    let area = site.area.as_deref().ok_or_else(|| {
        Error::field(
            "--site",
            &site.code,
            "has no area: register the field with --area (e.g. \"12.5 ha\")",
        )
    })?;
    Area::parse(area)
        .map(|a| a.m2())
        .map_err(|e| Error::field("--site", &site.code, e))
}

/// Feedstock spread on a field: no CO2 of its own (0 g); the rock's mass is in the reading.
pub fn application(ctx: &Context, a: ApplicationArgs) -> Result<Report> {
    let kind = EntryKind::Application;
    let date = inputs::activity_date("--date", &a.date, ctx.now.date_naive())?;
    let (rock, rock_g) = inputs::mass("--mass", &a.mass)?;
    commit_with(ctx, a.entry.key.clone(), false, |tx| {
        let site = context(
            tx,
            &a.project,
            &a.site,
            kind,
            Method::EnhancedWeathering,
            a.entry.corrects,
        )?;
        let area = if site.kind == crate::ledger::SiteKind::Field {
            Some(field_area(&site)?)
        } else {
            None
        };
        spreadable(tx, &a, date)?;
        let mut reading = Reading::default();
        reading.push("feedstock", a.feedstock.clone());
        reading.push("mass", rock.to_string());
        if let Some(m2) = area {
            reading.push("rate", format!("{:.2} t/ha", rock_g.tonnes() / (m2 / 1e4)));
        }
        entry(
            ctx,
            kind,
            (&a.project, &a.site),
            reading,
            (Mass::ZERO, Period::day(date)),
            &a.entry,
        )
    })
}

/// The feedstock is registered and no baseline core of the field is dated on or after the
/// spreading.
fn spreadable(tx: &mut Tx<'_>, a: &ApplicationArgs, date: NaiveDate) -> Result<()> {
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
    if let Some(b) = cores
        .iter()
        .filter(|e| e.reading.flag("baseline"))
        .find(|e| e.period.from >= date)
    {
        return Err(Error::field(
            "--date",
            &a.date,
            format!(
                "field {} has a baseline soil sample of {} (seq {}); a baseline is soil before any feedstock",
                a.site, b.period.from, b.seq
            ),
        ));
    }
    Ok(())
}

/// No feedstock was spread on the field on or before a baseline core's date.
fn before_any_feedstock(tx: &mut Tx<'_>, a: &SoilSampleArgs, date: NaiveDate) -> Result<()> {
    let spread = tx.effective_at_site(&a.project, EntryKind::Application, &a.site)?;
    match spread
        .iter()
        .filter(|e| e.period.from <= date)
        .min_by_key(|e| e.period.from)
    {
        Some(first) => Err(Error::field(
            "--baseline",
            &a.date,
            format!(
                "field {} received feedstock on {} (seq {}); a baseline is soil before any feedstock",
                a.site, first.period.from, first.seq
            ),
        )),
        None => Ok(()),
    }
}

/// A soil core: its depth, bulk density and elements, checked; a baseline may not follow feedstock.
pub fn soil_sample(ctx: &Context, a: SoilSampleArgs) -> Result<Report> {
    let kind = EntryKind::SoilSample;
    let date = inputs::activity_date("--date", &a.date, ctx.now.date_naive())?;
    let reading = soil_sample_reading(&SoilTexts {
        depth: &a.depth,
        bulk_density: &a.bulk_density,
        unit: &a.unit,
        conc: &a.conc,
        baseline: a.baseline,
    })?;
    commit_with(ctx, a.entry.key.clone(), false, |tx| {
        context(
            tx,
            &a.project,
            &a.site,
            kind,
            Method::EnhancedWeathering,
            a.entry.corrects,
        )?;
        if a.baseline {
            before_any_feedstock(tx, &a, date)?;
        }
        entry(
            ctx,
            kind,
            (&a.project, &a.site),
            reading.clone(),
            (Mass::ZERO, Period::day(date)),
            &a.entry,
        )
    })
}
