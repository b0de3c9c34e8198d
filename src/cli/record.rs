//! `record` and `correct`: readings become entries, sealed onto the project's chain.

use super::setup::known_project;
use super::{Context, inputs};
use crate::accounting::leakage;
use crate::accounting::metering::{Basis, Measured, MeterInput, assumed_fraction, measure};
use crate::accounting::permit;
use crate::error::{Error, Result};
use crate::ledger::append::{AppendError, Appended, SealRule, append, content_key, within_limit};
use crate::ledger::reading_fields::{FractionBasis, SurveyFinding, checked};
use crate::ledger::seal::{Replaced, Seal, late_replaces};
use crate::ledger::tally::Tally;
use crate::ledger::{Entry, EntryKind, Period, Project, Reading, SealedEntry};
use crate::quantity::Mass;
use crate::quantity::fraction::parse_uncertainty;
use crate::quantity::volume::DensityMethod;
use crate::report::names;
use crate::report::{Cell, Report, Table, columns};
use crate::store::Tx;
use chrono::NaiveDate;
use clap::{Args, Subcommand, ValueEnum};

/// Quantity options shared by `record` and `correct`.
#[derive(Debug, Clone, Args, Default)]
pub struct QuantityArgs {
    /// Mass as metered by a mass meter, with its unit (g, kg, t, kt, Mt, lb, short_ton, long_ton)
    #[arg(
        long,
        value_name = "MASS",
        help_heading = "Quantity",
        allow_hyphen_values = true
    )]
    pub mass: Option<String>,
    /// Standard volume from a volumetric meter, with reference conditions
    /// (scf, Mscf, MMscf at 60 °F and 14.696 psia; Sm3; Nm3; or e.g. "1200 m3@15C,101.325kPa")
    #[arg(
        long,
        value_name = "VOLUME",
        help_heading = "Quantity",
        allow_hyphen_values = true
    )]
    pub volume: Option<String>,
    /// CO2 fraction, in (0, 1] or as a percentage (`98.5%`) [default: 1]
    #[arg(
        long,
        value_name = "F",
        help_heading = "Quantity",
        allow_hyphen_values = true
    )]
    pub co2_fraction: Option<String>,
    /// Basis of the CO2 fraction [default: mass for --mass, mol (volume) for --volume]
    #[arg(long, value_enum, help_heading = "Quantity")]
    pub co2_basis: Option<Basis>,
    /// How a volume becomes a mass [default: eos]
    #[arg(long, value_enum, help_heading = "Quantity")]
    pub density: Option<DensityArg>,
    /// Other gases of the stream as mole fractions, to turn a mol-basis fraction into a mass
    /// fraction with --mass (e.g. N2=0.015,Ar=0.005)
    #[arg(long, value_name = "GAS=X,…", help_heading = "Quantity")]
    pub impurities: Option<String>,
    /// Uncertainty (95 %) of this reading, e.g. 0.5% [default: the site's, or its latest calibration]
    #[arg(long, help_heading = "Quantity", allow_hyphen_values = true)]
    pub uncertainty: Option<String>,
}

#[derive(Debug, Clone, Copy, ValueEnum)]
pub enum DensityArg {
    /// Span–Wagner (1996) density at the volume's reference conditions
    Eos,
    /// 40 CFR 98.443: D = 0.0018682 t per standard m³ at 60 °F and 1 atm
    Regulatory,
}

impl From<DensityArg> for DensityMethod {
    fn from(d: DensityArg) -> DensityMethod {
        match d {
            DensityArg::Eos => DensityMethod::Eos,
            DensityArg::Regulatory => DensityMethod::Regulatory,
        }
    }
}

impl QuantityArgs {
    fn is_given(&self) -> bool {
        self.mass.is_some() || self.volume.is_some()
    }

    /// The quantity options as a reading and grams; a refusal names the option.
    fn measure(&self) -> Result<Measured> {
        measure(&self.input()).map_err(inputs::meter_error)
    }

    fn input(&self) -> MeterInput<'_> {
        MeterInput {
            mass: self.mass.as_deref(),
            volume: self.volume.as_deref(),
            co2_fraction: self.co2_fraction.as_deref(),
            co2_basis: self.co2_basis,
            density: self.density.map(DensityMethod::from),
            impurities: self.impurities.as_deref(),
            uncertainty: self.uncertainty.as_deref(),
        }
    }
}

#[derive(Debug, Subcommand)]
pub enum RecordCommand {
    /// CO2 received by custody transfer into the project
    #[command(
        after_help = "Example: sinkbook record receipt KRE --site KR-P1 --mass \"40000 t\" --from 2026-01-01 --to 2026-01-31"
    )]
    Receipt(RecordArgs),
    /// CO2 received but sent on without injection
    #[command(
        after_help = "Example: sinkbook record redelivery KRE --site KR-P1 --mass \"500 t\" --from 2026-01-01 --to 2026-01-31"
    )]
    Redelivery(RecordArgs),
    /// CO2 injected at an injection well, from its flow meter
    #[command(
        after_help = "Example: sinkbook record injection TFS --site TF-I1 --mass \"35164.5 t\" --co2-fraction 0.984 --from 2026-01-01 --to 2026-01-31"
    )]
    Injection(InjectionArgs),
    /// CO2 separated from produced fluids, per separator
    #[command(
        after_help = "Example: sinkbook record production KRE --site KR-S1 --mass \"25000 t\" --from 2026-01-01 --to 2026-01-31"
    )]
    Production(ProductionArgs),
    /// Surface leakage through a leakage pathway (a mass, or a rate over the days of the event)
    #[command(
        after_help = "Example: sinkbook record leakage TFS --site TF-M1 --pathway \"TF-M1 annulus\" --rate \"0.015 t/h\" --since-last-survey --to 2026-09-20"
    )]
    Leakage(LeakageArgs),
    /// An equipment leak or vent between a flow meter and a wellhead
    #[command(
        after_help = "Example: sinkbook record equipment-leak TFS --site TF-I1 --side injection --mass \"18.4 t\" --from 2026-05-01 --to 2026-05-31"
    )]
    EquipmentLeak(EquipmentLeakArgs),
    /// Emissions of the project's own work (energy, transport), reported beside storage
    #[command(
        after_help = "Example: sinkbook record emission KRE --site KR-C1 --mass \"2200 t\" --from 2026-01-01 --to 2026-01-31"
    )]
    Emission(EmissionArgs),
    /// A surface or well survey for leaks, with its result
    #[command(
        after_help = "Example: sinkbook record survey TFS --site TF-M1 --date 2026-06-14 --result no-leak"
    )]
    Survey(SurveyArgs),
    /// A meter calibration or verification: the uncertainty in force from its date
    #[command(
        after_help = "Example: sinkbook record calibration TFS --site TF-I2 --meter FM-201 --date 2026-08-25 --uncertainty 1.0%"
    )]
    Calibration(CalibrationArgs),
    /// A loss found after tonnes were claimed: cancels the buffer pool first, then claimable tonnes
    #[command(
        after_help = "Example: sinkbook record reversal KRE --site KR-P2 --mass \"14500 t\" --date 2026-11-24 --reason \"CO2 migration behind casing\""
    )]
    Reversal(ReversalArgs),
    /// A tracer sample at a monitoring well: injectate share and DIC, giving the mineralized fraction
    #[command(
        after_help = "Example: sinkbook record tracer-sample CRB --site CR-M1 --date 2025-06-17 --tracer-ratio 0.085 --dic-sample 27.71 --dic-background 1.62 --dic-injectate 812.0 --unit mmol/kg"
    )]
    TracerSample(super::record_rock::TracerSampleArgs),
    /// A batch of solid carbonated ex situ: dry mass fed, CO2 content before and after
    #[command(
        after_help = "Example: sinkbook record carbonation ASH --site AS-P1 --mass \"620 t\" --co2-before 1.2% --co2-after 14.5% --from 2026-01-16 --to 2026-02-15"
    )]
    Carbonation(super::record_rock::CarbonationArgs),
    /// Feedstock spread on a field
    #[command(
        after_help = "Example: sinkbook record application EVW --site EV-F1 --feedstock EVB-1 --mass \"625 t\" --date 2024-04-15"
    )]
    Application(super::record_rock::ApplicationArgs),
    /// A soil core of a field: depth, bulk density, base cations and an immobile element
    #[command(
        after_help = "Example: sinkbook record soil-sample EVW --site EV-F1 --date 2024-03-18 --depth \"0-30 cm\" --bulk-density \"1.30 t/m3\" --conc Ca=6150,Mg=3420,Na=5230,K=14800,Ti=3610 --unit mg/kg --baseline"
    )]
    SoilSample(super::record_rock::SoilSampleArgs),
}

/// Options every quantity record takes.
#[derive(Debug, Args)]
pub struct RecordArgs {
    /// Project code (e.g. TFS)
    pub project: String,
    /// The site the reading was taken at
    #[arg(long)]
    pub site: String,
    #[command(flatten)]
    pub reading: ReadingArgs,
}

/// What a quantity record says beside its project and where: the quantity, the days it
/// covers, its key, meter and note.
#[derive(Debug, Clone, Default, Args)]
pub struct ReadingArgs {
    #[command(flatten)]
    pub quantity: QuantityArgs,
    /// First day the reading covers (ISO 8601 date)
    #[arg(long, value_name = "DATE")]
    pub from: Option<String>,
    /// Last day the reading covers, included
    #[arg(long, value_name = "DATE")]
    pub to: Option<String>,
    /// Idempotency key: recording the same key again writes nothing [default: derived from the content]
    #[arg(long)]
    pub key: Option<String>,
    /// The meter's identifier
    #[arg(long, value_name = "ID")]
    pub meter: Option<String>,
    /// A note kept with the entry (free text)
    #[arg(long, value_name = "TEXT")]
    pub note: Option<String>,
}

#[derive(Debug, Args)]
pub struct InjectionArgs {
    #[command(flatten)]
    pub base: RecordArgs,
    /// Record even though it takes the project past its permit (the reports will flag it)
    #[arg(long)]
    pub over_permit: bool,
}

#[derive(Debug, Args)]
pub struct ProductionArgs {
    #[command(flatten)]
    pub base: RecordArgs,
    /// Entrained fraction X: CO2 staying in produced fluids per unit separated (CO2P = (1 + X)·ΣCO2w)
    #[arg(long, value_name = "X", default_value = "0")]
    pub entrained_fraction: String,
}

#[derive(Debug, Args)]
pub struct LeakageArgs {
    /// Project code (e.g. TFS)
    pub project: String,
    /// The site the leak is at, if the pathway is at one of the project's sites
    #[arg(long)]
    pub site: Option<String>,
    /// The leakage pathway (e.g. "TF-I1 annulus", "fault F2", "legacy well W-3")
    #[arg(long)]
    pub pathway: String,
    #[command(flatten)]
    pub reading: ReadingArgs,
    /// Average leak rate, e.g. "2.5 t/h" or "40 kg/d": emitted = rate × 24 h × days, both dates included
    #[arg(long, allow_hyphen_values = true)]
    pub rate: Option<String>,
    /// Start unknown: backdate to the later of the last survey that found no leak (of the
    /// site, or of the pathway when no site is given) and the first day of injection
    /// (EU 2018/2066 Annex IV §23 B.3)
    #[arg(long)]
    pub since_last_survey: bool,
}

#[derive(Debug, Clone, Copy, ValueEnum)]
pub enum Side {
    /// Between the injection flow meter and the injection wellhead
    Injection,
    /// Between the production wellhead and the production flow meter
    Production,
}

#[derive(Debug, Args)]
pub struct EquipmentLeakArgs {
    #[command(flatten)]
    pub base: RecordArgs,
    /// Which side of the mass balance the leak is on: injection or production
    #[arg(long, value_enum)]
    pub side: Side,
}

#[derive(Debug, Clone, Copy, ValueEnum)]
pub enum Category {
    Energy,
    Transport,
    Other,
}

#[derive(Debug, Args)]
pub struct EmissionArgs {
    #[command(flatten)]
    pub base: RecordArgs,
    /// [default: energy, or the life-cycle stage's]
    #[arg(long, value_enum)]
    pub category: Option<Category>,
    #[command(flatten)]
    pub inventory: Box<super::emission_inventory::InventoryArgs>,
}

#[derive(Debug, Clone, Copy, ValueEnum, PartialEq, Eq)]
pub enum SurveyResult {
    NoLeak,
    LeakFound,
}

#[derive(Debug, Args)]
pub struct SurveyArgs {
    /// Project code (e.g. TFS)
    pub project: String,
    /// The site the reading was taken at
    #[arg(long)]
    pub site: String,
    /// The day of it (ISO 8601 date)
    #[arg(long, value_name = "DATE")]
    pub date: String,
    /// What the survey found
    #[arg(long, value_enum)]
    pub result: SurveyResult,
    /// The pathway surveyed, if the survey covered one pathway only
    #[arg(long)]
    pub pathway: Option<String>,
    /// Idempotency key: recording the same key again writes nothing [default: derived from the content]
    #[arg(long)]
    pub key: Option<String>,
    /// A note kept with the entry (free text)
    #[arg(long, value_name = "TEXT")]
    pub note: Option<String>,
}

#[derive(Debug, Args)]
pub struct CalibrationArgs {
    /// Project code (e.g. TFS)
    pub project: String,
    /// The site the reading was taken at
    #[arg(long)]
    pub site: String,
    /// The day of it (ISO 8601 date)
    #[arg(long, value_name = "DATE")]
    pub date: String,
    /// The meter's uncertainty (95 %) found, e.g. 0.4%
    #[arg(long, allow_hyphen_values = true)]
    pub uncertainty: String,
    /// The meter's identifier
    #[arg(long, value_name = "ID")]
    pub meter: Option<String>,
    /// Idempotency key: recording the same key again writes nothing [default: derived from the content]
    #[arg(long)]
    pub key: Option<String>,
    /// A note kept with the entry (free text)
    #[arg(long, value_name = "TEXT")]
    pub note: Option<String>,
}

#[derive(Debug, Args)]
pub struct ReversalArgs {
    /// Project code (e.g. TFS)
    pub project: String,
    /// The site the CO2 was lost at, if it was lost at one of the project's sites
    #[arg(long)]
    pub site: Option<String>,
    /// The pathway the CO2 left by (e.g. "fault F2", "legacy well W-3"); --site, --pathway or both
    #[arg(long)]
    pub pathway: Option<String>,
    /// The CO2 lost, with its unit
    #[arg(long, allow_hyphen_values = true)]
    pub mass: String,
    /// The day the loss was found
    #[arg(long, value_name = "DATE")]
    pub date: String,
    /// What was lost and how it was found
    #[arg(long)]
    pub reason: String,
    /// Idempotency key: recording the same key again writes nothing [default: derived from the content]
    #[arg(long)]
    pub key: Option<String>,
}

#[derive(Debug, Clone, Args)]
pub struct CorrectArgs {
    /// Project code (e.g. TFS)
    pub project: String,
    /// The seq of the entry to replace
    pub seq: u64,
    /// Why the entry is corrected
    #[arg(long)]
    pub reason: String,
    /// Any option left out keeps the corrected entry's value
    #[command(flatten)]
    pub quantity: QuantityArgs,
    /// The site, when the corrected entry named the wrong one
    #[arg(long)]
    pub site: Option<String>,
    /// First day the corrected reading covers (ISO 8601 date)
    #[arg(long, value_name = "DATE")]
    pub from: Option<String>,
    /// Last day the corrected reading covers, included
    #[arg(long, value_name = "DATE")]
    pub to: Option<String>,
    /// Idempotency key of the correction [default: derived from the content]
    #[arg(long)]
    pub key: Option<String>,
    /// The meter's identifier, when the corrected entry named the wrong one
    #[arg(long, value_name = "ID")]
    pub meter: Option<String>,
    /// A note kept with the correction (free text)
    #[arg(long, value_name = "TEXT")]
    pub note: Option<String>,
    /// Record even though the correction takes the project past its permit
    #[arg(long)]
    pub over_permit: bool,
}

/// Reading fields that belong to the kind of entry, not to the meter: a correction of the
/// quantity keeps them.
const KIND_FIELDS: &[&str] = &[
    "entrained_fraction",
    "side",
    "pathway",
    "category",
    "result",
    "backdated_to_survey",
    "stage",
];

/// The period of an activity, both ends within the window of activity dates (up to `today`).
pub(super) fn period(from: &str, to: &str, today: NaiveDate) -> Result<Period> {
    let f = inputs::activity_date("--from", from, today)?;
    let t = inputs::activity_date("--to", to, today)?;
    Period::new(f, t).map_err(|e| Error::field("--to", to, e))
}

pub(super) fn required<'a>(v: &'a Option<String>, field: &str) -> Result<&'a str> {
    v.as_deref()
        .ok_or_else(|| Error::options(field, format!("{field} is required (ISO 8601 date)")))
}

fn optional_text(field: &str, v: &Option<String>) -> Result<()> {
    v.as_deref().map_or(Ok(()), |t| inputs::text(field, t))
}

/// An entry before its seq, key and time are set.
pub(super) fn draft(
    kind: EntryKind,
    b: &RecordArgs,
    reading: Reading,
    mass: Mass,
    period: Period,
    ctx: &Context,
) -> Result<Entry> {
    optional_text("--key", &b.reading.key)?;
    optional_text("--meter", &b.reading.meter)?;
    optional_text("--note", &b.reading.note)?;
    Ok(Entry {
        project: b.project.clone(),
        seq: 0,
        kind,
        site: b.site.clone(),
        period,
        reading,
        mass,
        sign: kind.sign(),
        recorded_at: ctx.now,
        key: String::new(),
        meter: b.reading.meter.clone(),
        note: b.reading.note.clone(),
        corrects: None,
        reason: None,
        evidence: None,
        recorded_by: None,
    })
}

pub(super) fn metered(
    kind: EntryKind,
    b: &RecordArgs,
    extra: &[(&str, String)],
    ctx: &Context,
) -> Result<Entry> {
    let m = b.reading.quantity.measure()?;
    let mut reading = m.reading;
    for (n, v) in extra {
        reading.push(n, v.clone());
    }
    let p = period(
        required(&b.reading.from, "--from")?,
        required(&b.reading.to, "--to")?,
        ctx.now.date_naive(),
    )?;
    draft(kind, b, reading, m.mass, p, ctx)
}

pub fn record(ctx: &Context, c: RecordCommand) -> Result<Report> {
    let (entry, key, over_permit) = match c {
        RecordCommand::Receipt(b) => (
            metered(EntryKind::Receipt, &b, &[], ctx)?,
            b.reading.key,
            false,
        ),
        RecordCommand::Redelivery(b) => (
            metered(EntryKind::Redelivery, &b, &[], ctx)?,
            b.reading.key,
            false,
        ),
        RecordCommand::Injection(a) => (
            metered(EntryKind::Injection, &a.base, &[], ctx)?,
            a.base.reading.key,
            a.over_permit,
        ),
        RecordCommand::Production(a) => {
            let x = crate::quantity::Decimal::parse(&a.entrained_fraction)
                .ok()
                .filter(|x| !x.to_f64().is_sign_negative() && x.to_f64() < 1.0)
                .ok_or_else(|| {
                    Error::field(
                        "--entrained-fraction",
                        &a.entrained_fraction,
                        "must be a number in [0, 1)",
                    )
                })?;
            let extra = [("entrained_fraction", x.to_string())];
            (
                metered(EntryKind::Production, &a.base, &extra, ctx)?,
                a.base.reading.key,
                false,
            )
        }
        RecordCommand::EquipmentLeak(a) => {
            let side = match a.side {
                Side::Injection => "injection",
                Side::Production => "production",
            };
            (
                metered(
                    EntryKind::EquipmentLeak,
                    &a.base,
                    &[("side", side.into())],
                    ctx,
                )?,
                a.base.reading.key,
                false,
            )
        }
        RecordCommand::Emission(a) if a.inventory.is_given() => {
            return super::emission_inventory::emission(ctx, a);
        }
        RecordCommand::Emission(a) => {
            let cat = format!("{:?}", a.category.unwrap_or(Category::Energy)).to_lowercase();
            (
                metered(EntryKind::Emission, &a.base, &[("category", cat)], ctx)?,
                a.base.reading.key,
                false,
            )
        }
        RecordCommand::Leakage(a) => return leakage_record(ctx, a),
        RecordCommand::Calibration(a) => {
            let d = inputs::activity_date("--date", &a.date, ctx.now.date_naive())?;
            let u = parse_uncertainty(&a.uncertainty)
                .map_err(|e| Error::field("--uncertainty", &a.uncertainty, e))?;
            let mut reading = Reading::default();
            reading.push("uncertainty", u.to_string());
            let b = RecordArgs {
                project: a.project,
                site: a.site,
                reading: ReadingArgs {
                    key: a.key.clone(),
                    meter: a.meter,
                    note: a.note,
                    ..Default::default()
                },
            };
            (
                draft(
                    EntryKind::Calibration,
                    &b,
                    reading,
                    Mass::ZERO,
                    Period::day(d),
                    ctx,
                )?,
                a.key,
                false,
            )
        }
        RecordCommand::Reversal(a) => {
            let d = inputs::activity_date("--date", &a.date, ctx.now.date_naive())?;
            inputs::text("--reason", &a.reason)?;
            let (m, mass) = inputs::mass("--mass", &a.mass)?;
            let mut reading = Reading::default();
            reading.push("mass", m.to_string());
            match (&a.site, &a.pathway) {
                (None, None) => {
                    return Err(Error::options(
                        "--site",
                        "say where the CO2 was lost: --site, --pathway or both",
                    ));
                }
                (_, Some(p)) => {
                    inputs::text("--pathway", p)?;
                    reading.push("pathway", p.clone());
                }
                (Some(_), None) => {}
            }
            let b = RecordArgs {
                project: a.project,
                site: a.site.unwrap_or_default(),
                reading: ReadingArgs {
                    key: a.key.clone(),
                    ..Default::default()
                },
            };
            let mut e = draft(EntryKind::Reversal, &b, reading, mass, Period::day(d), ctx)?;
            e.reason = Some(a.reason);
            (e, a.key, false)
        }
        RecordCommand::Survey(a) => {
            let d = inputs::activity_date("--date", &a.date, ctx.now.date_naive())?;
            let mut reading = Reading::default();
            reading.push(
                "result",
                if a.result == SurveyResult::NoLeak {
                    "no-leak"
                } else {
                    "leak-found"
                },
            );
            if let Some(p) = &a.pathway {
                inputs::text("--pathway", p)?;
                reading.push("pathway", p.clone());
            }
            let b = RecordArgs {
                project: a.project,
                site: a.site,
                reading: ReadingArgs {
                    key: a.key.clone(),
                    note: a.note,
                    ..Default::default()
                },
            };
            (
                draft(
                    EntryKind::Survey,
                    &b,
                    reading,
                    Mass::ZERO,
                    Period::day(d),
                    ctx,
                )?,
                a.key,
                false,
            )
        }
        RecordCommand::TracerSample(a) => return super::record_rock::tracer_sample(ctx, a),
        RecordCommand::Carbonation(a) => return super::record_rock::carbonation(ctx, a),
        RecordCommand::Application(a) => return super::record_rock::application(ctx, a),
        RecordCommand::SoilSample(a) => return super::record_rock::soil_sample(ctx, a),
    };
    commit(ctx, entry, key, over_permit)
}

/// A leak event: a metered mass, or a rate over its days; with an unknown start, backdated to
/// the last survey of the site that found no leak (Regulation (EU) 2018/2066 Annex IV §23 B.3).
fn leakage_record(ctx: &Context, a: LeakageArgs) -> Result<Report> {
    inputs::text("--pathway", &a.pathway)?;
    let b = &RecordArgs {
        project: a.project.clone(),
        site: a.site.clone().unwrap_or_default(),
        reading: a.reading.clone(),
    };
    let to = inputs::activity_date(
        "--to",
        required(&b.reading.to, "--to")?,
        ctx.now.date_naive(),
    )?;
    if a.rate.is_some() && b.reading.quantity.is_given() {
        return Err(Error::options(
            "--rate",
            "give --rate or a quantity (--mass/--volume), not both",
        ));
    }
    let given_from = match (&b.reading.from, a.since_last_survey) {
        (Some(_), true) => {
            return Err(Error::options(
                "--from",
                "give --from or --since-last-survey, not both",
            ));
        }
        (Some(f), false) => Some(inputs::activity_date("--from", f, ctx.now.date_naive())?),
        (None, true) => None,
        (None, false) => {
            return Err(Error::options(
                "--from",
                "--from is required (or --since-last-survey)",
            ));
        }
    };
    // The last survey is read in the transaction that appends, so the start it gives is the
    // one the ledger holds when the leak is written.
    commit_with(ctx, b.reading.key.clone(), false, |tx| {
        let mut extra: Vec<(&str, String)> = vec![("pathway", a.pathway.clone())];
        let from = match given_from {
            Some(from) => from,
            None => {
                let start = since_last_survey(tx, &a, to)?;
                extra.push((start.field(), start.day().to_string()));
                start.day()
            }
        };
        let period = Period::new(from, to).map_err(|e| Error::field("--to", &to.to_string(), e))?;
        let (mut reading, mass) = leak_quantity(&a, b, period)?;
        for (n, v) in extra {
            reading.push(n, v);
        }
        draft(EntryKind::Leakage, b, reading, mass, period, ctx)
    })
}

/// `--since-last-survey`: the day an unknown leak is taken to start from, read in `tx`.
fn since_last_survey(
    tx: &mut Tx<'_>,
    a: &LeakageArgs,
    to: NaiveDate,
) -> Result<leakage::LeakStart> {
    let surveyed = match &a.site {
        Some(site) => Surveyed::Site(site),
        None => Surveyed::Pathway(&a.pathway),
    };
    let (survey, injection) = leak_bounds(tx, &a.project, surveyed, to)?;
    let start = leakage::unknown_leak_start(survey, injection).ok_or_else(|| {
        Error::field(
            "--since-last-survey",
            surveyed.name(),
            format!(
                "no survey of this {} up to {to} found no leak and no injection is recorded: give --from",
                surveyed.what()
            ),
        )
    })?;
    if start.day() > to {
        return Err(Error::field(
            "--to",
            &to.to_string(),
            format!(
                "injection began on {}: a leak of what was stored cannot end before it",
                start.day()
            ),
        ));
    }
    Ok(start)
}

/// A leak's reading and grams: from `--rate` over the period's days, or a measured quantity.
fn leak_quantity(a: &LeakageArgs, b: &RecordArgs, period: Period) -> Result<(Reading, Mass)> {
    let Some(rate) = &a.rate else {
        let m = b.reading.quantity.measure()?;
        return Ok((m.reading, m.mass));
    };
    let r = leakage::LeakRate::parse(rate).map_err(|e| Error::field("--rate", rate, e))?;
    let mass = r
        .emitted(period)
        .map_err(|e| Error::field("--rate", rate, e))?;
    let mut reading = Reading::default();
    reading.push("rate", r.to_string());
    reading.push("days", period.days().to_string());
    reading.push(
        "method",
        "rate × 24 h × days (EU 2018/2066 Annex IV §23 B.3)",
    );
    Ok((reading, mass))
}

/// What a leak's last no-leak survey is looked for by: its site, or, for a leak at no site of
/// the project, its pathway (a survey that names the same pathway).
#[derive(Debug, Clone, Copy)]
enum Surveyed<'a> {
    Site(&'a str),
    Pathway(&'a str),
}

impl Surveyed<'_> {
    fn name(&self) -> &str {
        match self {
            Surveyed::Site(s) | Surveyed::Pathway(s) => s,
        }
    }

    fn what(&self) -> &'static str {
        match self {
            Surveyed::Site(_) => "site",
            Surveyed::Pathway(_) => "pathway",
        }
    }

    fn covers(&self, survey: &Entry) -> bool {
        match self {
            Surveyed::Site(s) => survey.site == *s,
            Surveyed::Pathway(p) => survey.reading.pathway() == Some(p),
        }
    }
}

/// What bounds a leak's unknown start: the latest no-leak survey of the site (or pathway) on or
/// before `to`, and the first day of the project's injection; read in one pass over the chain.
fn leak_bounds(
    tx: &mut Tx<'_>,
    project: &str,
    surveyed: Surveyed<'_>,
    to: NaiveDate,
) -> Result<(Option<NaiveDate>, Option<NaiveDate>)> {
    known_project(tx, project)?;
    let (mut survey, mut injection) = (None::<NaiveDate>, None::<NaiveDate>);
    tx.for_each_effective_entry(project, None, |s| {
        let e = &s.entry;
        match e.kind {
            EntryKind::Survey
                if surveyed.covers(e)
                    && e.period.to <= to
                    && checked(e.reading.survey_finding()) == Some(SurveyFinding::NoLeak) =>
            {
                survey = survey.max(Some(e.period.to));
            }
            EntryKind::Injection => {
                injection = Some(injection.map_or(e.period.from, |d| d.min(e.period.from)));
            }
            _ => {}
        }
        Ok(())
    })?;
    Ok((survey, injection))
}

/// The quantity of a correction: what it gives, and for the rest the corrected reading's own
/// quantity, CO2 fraction, basis and density method.
fn restated(given: &QuantityArgs, was: &Reading) -> Result<QuantityArgs> {
    let mut q = given.clone();
    if !q.is_given() {
        q.mass = was.text("mass").map(str::to_string);
        q.volume = was.text("volume").map(str::to_string);
        if !q.is_given() {
            return Err(Error::field(
                "--co2-fraction",
                q.co2_fraction.as_deref().unwrap_or(""),
                "the corrected entry has no metered quantity to apply it to: give --mass or --volume",
            ));
        }
    }
    // An assumed fraction stays assumed: the correction states none either.
    let fraction = was.text("co2_fraction").or(was.text("co2_fraction_mean"));
    let fraction = fraction.filter(|_| !assumed_fraction(was));
    q.co2_fraction = q.co2_fraction.or(fraction.map(str::to_string));
    q.co2_basis = q.co2_basis.or(match checked(was.co2_basis()) {
        Some(FractionBasis::Mol) => Some(Basis::Mol),
        Some(FractionBasis::Mass) => Some(Basis::Mass),
        None => None,
    });
    q.density = q.density.or(match was.density_method() {
        Some("regulatory") => Some(DensityArg::Regulatory),
        Some("eos") => Some(DensityArg::Eos),
        _ => None,
    });
    q.impurities = q
        .impurities
        .or(was.text("impurities_mol").map(str::to_string));
    q.uncertainty = q
        .uncertainty
        .or(was.text("uncertainty").map(str::to_string));
    Ok(q)
}

pub fn correct(ctx: &Context, a: CorrectArgs) -> Result<Report> {
    inputs::text("--reason", &a.reason)?;
    optional_text("--key", &a.key)?;
    optional_text("--meter", &a.meter)?;
    optional_text("--note", &a.note)?;
    let (key, over_permit) = (a.key.clone(), a.over_permit);
    commit_with(ctx, key, over_permit, |tx| {
        known_project(tx, &a.project)?;
        let target = tx
            .correction_target(&a.project, a.seq)?
            .map_err(|e| Error::field("seq", &a.seq.to_string(), e))?;
        corrected(ctx, a.clone(), target)
    })
}

/// The options of `correct` that restate what the `record` command of each kind takes; the
/// rest (--reason, --site, --from, --to, --key, --note) apply to every kind.
fn correctable(kind: EntryKind) -> &'static [&'static str] {
    match kind {
        EntryKind::Survey => &[],
        EntryKind::Calibration => &["--uncertainty", "--meter"],
        EntryKind::Reversal => &["--mass"],
        k if super::record_rock::is_rock_record(k) => &[],
        _ => &[
            "--mass",
            "--volume",
            "--co2-fraction",
            "--co2-basis",
            "--density",
            "--impurities",
            "--uncertainty",
            "--meter",
        ],
    }
}

/// The kind-specific options a correction gives, with their values.
fn kind_options(a: &CorrectArgs) -> Vec<(&'static str, String)> {
    let q = &a.quantity;
    let texts = [
        ("--mass", q.mass.clone()),
        ("--volume", q.volume.clone()),
        ("--co2-fraction", q.co2_fraction.clone()),
        ("--co2-basis", q.co2_basis.and_then(|b| option_value(&b))),
        ("--density", q.density.and_then(|d| option_value(&d))),
        ("--impurities", q.impurities.clone()),
        ("--uncertainty", q.uncertainty.clone()),
        ("--meter", a.meter.clone()),
    ];
    texts
        .into_iter()
        .filter_map(|(o, v)| v.map(|v| (o, v)))
        .collect()
}

/// How a value of an enumerated option is spelled on the command line.
fn option_value(v: &impl ValueEnum) -> Option<String> {
    v.to_possible_value().map(|p| p.get_name().to_string())
}

/// Refuses options that do not belong to the corrected entry's kind (a survey has no mass).
fn refuse_foreign_options(a: &CorrectArgs, target: &Entry) -> Result<()> {
    let allowed = correctable(target.kind);
    match kind_options(a)
        .into_iter()
        .find(|(o, _)| !allowed.contains(o))
    {
        None => Ok(()),
        Some((option, value)) => Err(Error::field(
            option,
            &value,
            format!(
                "does not belong to a {} entry (seq {}); a {} correction takes {}",
                target.kind,
                target.seq,
                target.kind,
                if allowed.is_empty() {
                    "none of the quantity options".to_string()
                } else {
                    allowed.join(", ")
                }
            ),
        )),
    }
}

/// The reading of a correction of a calibration or a reversal: the recorded reading with the
/// one value the options restate.
fn restated_single(a: &CorrectArgs, target: &Entry) -> Result<Option<(Reading, Mass)>> {
    let q = &a.quantity;
    let (name, value, mass) = match (target.kind, &q.uncertainty, &q.mass) {
        (EntryKind::Calibration, Some(u), _) => {
            let d = parse_uncertainty(u).map_err(|e| Error::field("--uncertainty", u, e))?;
            ("uncertainty", d.to_string(), target.mass)
        }
        (EntryKind::Reversal, _, Some(m)) => {
            let (r, mass) = inputs::mass("--mass", m)?;
            ("mass", r.to_string(), mass)
        }
        _ => return Ok(None),
    };
    let mut reading = target.reading.clone();
    match reading.0.iter_mut().find(|(n, _)| n == name) {
        Some(slot) => slot.1 = value,
        None => reading.push(name, value),
    }
    Ok(Some((reading, mass)))
}

/// The correction of `target` the options describe.
fn corrected(ctx: &Context, a: CorrectArgs, target: Entry) -> Result<Entry> {
    let restates = a.quantity.is_given() || a.quantity.co2_fraction.is_some();
    let single = if super::record_rock::is_rock_record(target.kind) && restates {
        None
    } else {
        refuse_foreign_options(&a, &target)?;
        restated_single(&a, &target)?
    };
    let (reading, mass) = if let Some(r) = single {
        r
    } else if restates {
        if super::record_rock::is_rock_record(target.kind) {
            return Err(Error::field(
                "seq",
                &a.seq.to_string(),
                format!(
                    "is a {} entry, not a metered quantity: record it again with --corrects {} --reason …",
                    target.kind, a.seq
                ),
            ));
        }
        let q = restated(&a.quantity, &target.reading)?;
        let m = q.measure()?;
        let mut reading = m.reading;
        for (n, v) in &target.reading.0 {
            if KIND_FIELDS.contains(&n.as_str()) {
                reading.push(n, v.clone());
            }
        }
        (reading, m.mass)
    } else {
        (target.reading.clone(), target.mass)
    };
    let from = a.from.unwrap_or_else(|| target.period.from.to_string());
    let to = a.to.unwrap_or_else(|| target.period.to.to_string());
    Ok(Entry {
        seq: 0,
        site: a.site.unwrap_or(target.site.clone()),
        period: period(&from, &to, ctx.now.date_naive())?,
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
    })
}

/// Appends in one immediate transaction: project and site checked, key resolved, entry sealed.
pub(super) fn commit(
    ctx: &Context,
    entry: Entry,
    key: Option<String>,
    over_permit: bool,
) -> Result<Report> {
    commit_with(ctx, key, over_permit, |_| Ok(entry.clone()))
}

/// Drafts the entry with `make` and appends it in one write transaction, so whatever `make`
/// reads (the entry a correction replaces, a field's area, a baseline) is what the append sees.
pub(super) fn commit_with(
    ctx: &Context,
    key: Option<String>,
    over_permit: bool,
    mut make: impl FnMut(&mut Tx<'_>) -> Result<Entry>,
) -> Result<Report> {
    let (outcome, warnings) = ctx.open()?.write(|tx| {
        let mut entry = make(tx)?;
        entry.recorded_by = tx.recorded_by()?;
        if over_permit {
            entry.reading.push("over_permit", "acknowledged");
        }
        entry.key = key.clone().unwrap_or_else(|| content_key(&entry));
        let project = known_project(tx, &entry.project)?;
        let site = match entry.site.as_str() {
            "" => None,
            code => Some(tx.site(&entry.project, code)?.ok_or_else(|| {
                Error::field(
                    "--site",
                    code,
                    format!("is not a site of project {}", entry.project),
                )
            })?),
        };
        let tally = tx.tally(&entry.project)?;
        let seals = tx.seals(&entry.project)?;
        let (replaced, target) = match entry.corrects {
            // Re-checked inside the write transaction, so a concurrent correction cannot slip in.
            Some(target) => {
                let (r, t) = replaced(tx, &entry.project, target, &seals)?;
                (Some(r), Some(t))
            }
            None => (None, None),
        };
        let rule = SealRule {
            seals: &seals,
            late: ctx.late,
            today: ctx.now.date_naive(),
            replaced,
        };
        within_limit(tally.magnitude, std::slice::from_ref(&entry)).map_err(|e| {
            let mass = entry.mass.to_string();
            Error::field("--mass", entry.reading.text("mass").unwrap_or(&mass), e)
        })?;
        let holder = tx.entry_by_key(&entry.project, &entry.key)?;
        let tip = tx.chain_tip(&entry.project)?;
        let outcome =
            append(entry.clone(), site.as_ref(), tip, holder, rule).map_err(|e| match e {
                AppendError::KeyTaken { .. } => Error::field("--key", &entry.key, e),
                AppendError::NoSite { .. } => Error::options("--site", format!("{e}: give --site")),
                AppendError::WrongSiteKind { .. } => Error::field("--site", &entry.site, e),
                AppendError::BeyondLimit { .. } => Error::Refused(e.to_string()),
                AppendError::Sealed(s) => {
                    Error::field("--from/--to", &entry.period.to_string(), super::sealed(&s))
                }
                AppendError::OutOfBounds(b) => inputs::out_of_bounds(&b),
            })?;
        let mut warnings = Vec::new();
        if let Appended::New(s) = &outcome {
            if matches!(
                s.entry.kind,
                EntryKind::Injection
                    | EntryKind::Production
                    | EntryKind::Leakage
                    | EntryKind::EquipmentLeak
            ) {
                let new = std::slice::from_ref(&s.entry);
                let standing = standing(tx, &project, tally, new)?;
                // A late correction is a difference of its own, replacing nothing it counts.
                let gone: Vec<Entry> = target
                    .iter()
                    .filter(|_| s.entry.corrects.is_some())
                    .cloned()
                    .collect();
                warnings = super::permit_check(&project, &standing, new, &gone, over_permit)?;
            }
            tx.append(std::slice::from_ref(s))?;
        }
        Ok((outcome, warnings))
    })?;
    let mut report = match outcome {
        Appended::New(s) => Report::default()
            .line(format!("recorded {} seq {}", s.entry.project, s.entry.seq))
            .table(recorded_table(&s)),
        Appended::Existing(s) => Report::default()
            .line(format!(
                "already recorded as {} seq {} (key {}); nothing written",
                s.entry.project, s.entry.seq, s.entry.key
            ))
            .table(recorded_table(&s)),
    };
    report.warnings = warnings;
    Ok(report)
}

/// What a correction of `target` replaces, looked up by its seq: the latest entry of its line,
/// and what it counts for now — its grams plus the late differences recorded against it since
/// its period was sealed (read only when the project has seals, since only a sealed period
/// takes late differences). Returns the replaced entry with it.
pub(super) fn replaced(
    tx: &mut Tx<'_>,
    project: &str,
    target: u64,
    seals: &[Seal],
) -> Result<(Replaced, Entry)> {
    let t = tx
        .correction_target(project, target)?
        .map_err(|e| Error::field("seq", &target.to_string(), e))?;
    if let Some(first) = late_replaces(&t) {
        return Err(Error::field(
            "seq",
            &target.to_string(),
            format!(
                "is a late difference against seq {first}; correct seq {first} again with --late"
            ),
        ));
    }
    let counted = if seals.is_empty() {
        t.mass
    } else {
        tx.late_counted(&t)?
    };
    Ok((
        Replaced {
            seq: target,
            period: t.period,
            counted,
        },
        t,
    ))
}

/// Where the project stands for its permit before `new`: cumulative stored from the chain tip's
/// running figures and, under an annual maximum, each year's injection summed in SQL.
pub(super) fn standing(
    tx: &mut Tx<'_>,
    project: &Project,
    tally: Tally,
    new: &[Entry],
) -> Result<permit::Standing> {
    let mut injected = std::collections::BTreeMap::new();
    if project.permit_annual.is_some() {
        for year in permit::years(new) {
            injected.insert(year, tx.injected_in_year(&project.code, year)?);
        }
    }
    Ok(permit::Standing {
        stored: Mass::from_grams(tally.stored),
        injected,
    })
}

fn recorded_table(s: &SealedEntry) -> Table {
    let e = &s.entry;
    let mut t = Table::new(
        "entry",
        format!("Entry {} seq {}", e.project, e.seq),
        columns(&[
            names::SEQ,
            names::KIND,
            names::SITE,
            names::PERIOD,
            names::CO2_T,
            names::CORRECTS,
            names::KEY,
            names::CHAIN_HASH,
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
