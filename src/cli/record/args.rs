//! The options of `record`: one subcommand per entry kind, and the quantity and reading options
//! they share.

use crate::accounting::metering::{Basis, Measured, MeterInput, measure};
use crate::cli::inputs;
use crate::error::Result;
use crate::quantity::volume::DensityMethod;
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
    pub(super) fn is_given(&self) -> bool {
        self.mass.is_some() || self.volume.is_some()
    }

    /// The quantity options as a reading and grams; a refusal names the option.
    pub(super) fn measure(&self) -> Result<Measured> {
        measure(&self.input()).map_err(inputs::meter_error)
    }

    pub(super) fn input(&self) -> MeterInput<'_> {
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
    TracerSample(crate::cli::record_rock::TracerSampleArgs),
    /// A batch of solid carbonated ex situ: dry mass fed, CO2 content before and after
    #[command(
        after_help = "Example: sinkbook record carbonation ASH --site AS-P1 --mass \"620 t\" --co2-before 1.2% --co2-after 14.5% --from 2026-01-16 --to 2026-02-15"
    )]
    Carbonation(crate::cli::record_rock::CarbonationArgs),
    /// Feedstock spread on a field
    #[command(
        after_help = "Example: sinkbook record application EVW --site EV-F1 --feedstock EVB-1 --mass \"625 t\" --date 2024-04-15"
    )]
    Application(crate::cli::record_rock::ApplicationArgs),
    /// A soil core of a field: depth, bulk density, base cations and an immobile element
    #[command(
        after_help = "Example: sinkbook record soil-sample EVW --site EV-F1 --date 2024-03-18 --depth \"0-30 cm\" --bulk-density \"1.30 t/m3\" --conc Ca=6150,Mg=3420,Na=5230,K=14800,Ti=3610 --unit mg/kg --baseline"
    )]
    SoilSample(crate::cli::record_rock::SoilSampleArgs),
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
    pub inventory: Box<crate::cli::emission_inventory::InventoryArgs>,
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
