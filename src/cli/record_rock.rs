//! `record tracer-sample | carbonation | application | soil-sample`: the field and laboratory
//! records of the rock routes, and the same readings read back for the reports. The reading
//! field names written here are the ones read back here, and nowhere else.

use super::record::{ReadingArgs, RecordArgs, commit_with, draft};
use super::rock_inputs::{self as ri, DENSITY, Measure};
use super::setup::known_project;
use super::{Context, inputs};
use crate::accounting::carbonation::{Carbonation, uptake};
use crate::accounting::project_view::evidence;
use crate::accounting::tracer::{Mineralized, TracerError, mineralized_fraction};
use crate::accounting::weathering::composition::{SoilAnalysis, Unit};
use crate::error::{Error, Result};
use crate::ledger::{Entry, EntryKind, Method, Period, Reading, Site};
use crate::quantity::Mass;
use crate::quantity::area::Area;
use crate::quantity::fraction::parse_uncertainty;
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

/// The units a DIC may be reported in; the mass balance is a ratio, so any one unit will do
/// as long as all three concentrations share it.
const DIC_UNITS: &[&str] = &["mmol/kg", "mmol/L", "umol/kg", "µmol/kg", "mol/kg", "mg/L"];

/// No soil is denser than its minerals; quartz, the densest common one, is 2.65 t/m³
/// (common practice).
const MAX_SOIL_DENSITY_KG_M3: f64 = 2650.0;

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
    let x = ri::number("--tracer-ratio", &a.tracer_ratio)?;
    let dic = [
        ("--dic-sample", &a.dic_sample),
        ("--dic-background", &a.dic_background),
        ("--dic-injectate", &a.dic_injectate),
    ]
    .map(|(option, text)| ri::number(option, text));
    let [sample, background, injectate] = dic;
    let (sample, background, injectate) = (sample?, background?, injectate?);
    if !DIC_UNITS.contains(&a.unit.as_str()) {
        return Err(Error::field(
            "--unit",
            &a.unit,
            format!("is not a DIC unit (use {})", DIC_UNITS.join(", ")),
        ));
    }
    let mut reading = Reading::default();
    reading.push("tracer_ratio", x.to_string());
    reading.push("dic_sample", sample.to_string());
    reading.push("dic_background", background.to_string());
    reading.push("dic_injectate", injectate.to_string());
    reading.push("dic_unit", a.unit.clone());
    let sample = evidence::tracer_sample(&reading).map_err(Error::internal)?;
    let found = mineralized_fraction(&sample).map_err(|e| tracer_refusal(&e, &a))?;
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

fn tracer_refusal(e: &TracerError, a: &TracerSampleArgs) -> Error {
    match e {
        TracerError::Input(e) => ri::refused(
            e,
            &[
                ("tracer_sample", "--tracer-ratio", &a.tracer_ratio),
                (
                    "tracer_sample/tracer_injectate",
                    "--tracer-ratio",
                    &a.tracer_ratio,
                ),
                ("dic_sample", "--dic-sample", &a.dic_sample),
                ("dic_background", "--dic-background", &a.dic_background),
                ("dic_injectate", "--dic-injectate", &a.dic_injectate),
            ],
        ),
        other => Error::field("--tracer-ratio", &a.tracer_ratio, other),
    }
}

/// A carbonation batch: the uptake is what the entry stores.
pub fn carbonation(ctx: &Context, a: CarbonationArgs) -> Result<Report> {
    let kind = EntryKind::Carbonation;
    let (fed, fed_g) = inputs::mass("--mass", &a.mass)?;
    let before = ri::share("--co2-before", &a.co2_before)?;
    let after = ri::share("--co2-after", &a.co2_after)?;
    let u = a
        .uncertainty
        .as_deref()
        .map(|u| parse_uncertainty(u).map_err(|e| Error::field("--uncertainty", u, e)))
        .transpose()?;
    let period = Period::new(
        inputs::activity_date("--from", &a.from, ctx.now.date_naive())?,
        inputs::activity_date("--to", &a.to, ctx.now.date_naive())?,
    )
    .map_err(|e| Error::field("--to", &a.to, e))?;
    let result = uptake(fed_g.tonnes(), before.to_f64(), after.to_f64()).map_err(|e| {
        ri::refused(
            &e,
            &[
                ("fed_t", "--mass", &a.mass),
                ("w_before", "--co2-before", &a.co2_before),
                ("w_after", "--co2-after", &a.co2_after),
                ("uptake_g", "--mass", &a.mass),
            ],
        )
    })?;
    let mut reading = Reading::default();
    reading.push("fed_mass", fed.to_string());
    reading.push("co2_before", before.to_string());
    reading.push("co2_after", after.to_string());
    reading.push("basis", "dry");
    if let Some(u) = u {
        reading.push("uncertainty", u.to_string());
    }
    reading.push(
        "method",
        "uptake = M(w_after − w_before)/(1 − w_after), CO2-free solid conserved",
    );
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

fn conc_unit(text: &str) -> std::result::Result<Unit, String> {
    Unit::from_name(text)
        .ok_or_else(|| "is not a concentration unit (use mol/kg, mg/kg or wt%)".into())
}

fn soil_density(option: &str, text: &str) -> Result<Measure> {
    let m = ri::measure(option, text, DENSITY, true)?;
    if m.base > MAX_SOIL_DENSITY_KG_M3 {
        return Err(Error::field(
            option,
            text,
            "must be at most 2.65 t/m3, the density of quartz: no soil is denser",
        ));
    }
    Ok(m)
}

/// A soil core: its depth, bulk density and elements, checked; a baseline may not follow feedstock.
pub fn soil_sample(ctx: &Context, a: SoilSampleArgs) -> Result<Report> {
    let kind = EntryKind::SoilSample;
    let date = inputs::activity_date("--date", &a.date, ctx.now.date_naive())?;
    let (depth, _) = ri::depth("--depth", &a.depth)?;
    let rho = soil_density("--bulk-density", &a.bulk_density)?;
    let unit = conc_unit(&a.unit).map_err(|e| Error::field("--unit", &a.unit, e))?;
    let conc = ri::pairs("--conc", &a.conc)?;
    let (conc_text, values) = (ri::pair_texts(&conc), ri::pair_numbers(&conc));
    SoilAnalysis::new(&values, unit).map_err(|e| Error::field("--conc", &a.conc, e))?;
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
        let mut reading = Reading::default();
        reading.push("depth", depth.clone());
        reading.push("bulk_density", rho.to_string());
        reading.push("conc_unit", unit.name());
        for (n, v) in conc_text.iter().cloned() {
            reading.push(&n, v);
        }
        if a.baseline {
            reading.push("baseline", "yes");
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
