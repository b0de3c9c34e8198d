//! `record emission` by life-cycle stage: quarrying, grinding, transport and spreading
//! computed from their inputs and factors (or a given `--mass` tagged with its stage). The
//! reading records every input, every factor with its source or edition, and the working.

use super::Context;
use super::record::{
    Category, EmissionArgs, RecordArgs, commit, commit_with, draft, metered, period, required,
};
use crate::accounting::inventory::{Given, Inputs, InventoryError, StageError, stage_reading};
pub use crate::accounting::inventory::{GrindingMethod, Stage, TransportMode};
use crate::accounting::rock_record::{AreaError, field_area};
use crate::error::{Error, Result};
use crate::ledger::EntryKind;
use crate::quantity::area::Area;
use crate::report::Report;
use crate::store::Tx;
use clap::Args;

/// The record's category when none is given: transport's own, energy for the rest.
fn category(stage: Stage) -> Category {
    match stage {
        Stage::Transport => Category::Transport,
        Stage::Quarrying | Stage::Grinding | Stage::Spreading => Category::Energy,
    }
}

/// The life-cycle options of `record emission`.
#[derive(Debug, Args, Default)]
#[command(next_help_heading = "Life-cycle inventory")]
pub struct InventoryArgs {
    /// The life-cycle stage of a given --mass (computed stages set it themselves)
    #[arg(long, value_enum)]
    pub stage: Option<Stage>,
    /// Quarrying at the quarry's factor, e.g. "2.5 kg/t" (with --rock-mass)
    #[arg(long, value_name = "FACTOR", allow_hyphen_values = true)]
    pub quarrying: Option<String>,
    /// Grinding energy (with --rock-mass, --grid-factor and --d80; Bond also --work-index, --feed-f80)
    #[arg(long, value_enum)]
    pub grinding: Option<GrindingMethod>,
    /// Product size that 80 % passes, e.g. "50 um"
    #[arg(long, value_name = "SIZE", allow_hyphen_values = true)]
    pub d80: Option<String>,
    /// Feed size that 80 % passes, for Bond's law, e.g. "12 mm"
    #[arg(long, value_name = "SIZE", allow_hyphen_values = true)]
    pub feed_f80: Option<String>,
    /// Bond work index per metric tonne, e.g. "18 kWh/t"
    #[arg(long, value_name = "ENERGY", allow_hyphen_values = true)]
    pub work_index: Option<String>,
    /// Rock quarried or ground, e.g. "1200 t"
    #[arg(long, value_name = "MASS", allow_hyphen_values = true)]
    pub rock_mass: Option<String>,
    /// CO2 of the electricity used, e.g. "0.35 kg/kWh" (kg/kWh, g/kWh, kg/MWh, kg/GJ)
    #[arg(long, value_name = "FACTOR", allow_hyphen_values = true)]
    pub grid_factor: Option<String>,
    /// Transport by this mode (with --distance and --payload)
    #[arg(long, value_enum)]
    pub transport: Option<TransportMode>,
    /// Distance carried, e.g. "85 km"
    #[arg(long, value_name = "DISTANCE", allow_hyphen_values = true)]
    pub distance: Option<String>,
    /// Mass carried, e.g. "1200 t"
    #[arg(long, value_name = "MASS", allow_hyphen_values = true)]
    pub payload: Option<String>,
    /// A transport factor instead of the US EPA 2018 one, e.g. "0.095 kg/tkm" (name it with --factor-source)
    #[arg(long, value_name = "FACTOR", allow_hyphen_values = true)]
    pub transport_factor: Option<String>,
    /// Spreading: fuel burnt per hectare, e.g. "4 L/ha" (with --fuel-factor)
    #[arg(long, value_name = "RATE", allow_hyphen_values = true)]
    pub spreading_fuel: Option<String>,
    /// CO2 per litre of the fuel, e.g. "2.68 kg/L"
    #[arg(long, value_name = "FACTOR", allow_hyphen_values = true)]
    pub fuel_factor: Option<String>,
    /// Area spread [default: the field's registered area]
    #[arg(long, value_name = "AREA", allow_hyphen_values = true)]
    pub area: Option<String>,
    /// Where the factors given come from, recorded beside them
    #[arg(long, value_name = "TEXT", allow_hyphen_values = true)]
    pub factor_source: Option<String>,
}

impl InventoryArgs {
    /// Whether the record is a life-cycle one (computed or a given mass with its stage).
    pub fn is_given(&self) -> bool {
        self.stage.is_some() || self.inputs().computed().is_some()
    }

    /// The inputs as the stages read them.
    fn inputs(&self) -> Inputs<'_> {
        Inputs {
            quarrying: self.quarrying.as_deref(),
            grinding: self.grinding,
            d80: self.d80.as_deref(),
            feed_f80: self.feed_f80.as_deref(),
            work_index: self.work_index.as_deref(),
            rock_mass: self.rock_mass.as_deref(),
            grid_factor: self.grid_factor.as_deref(),
            transport: self.transport,
            distance: self.distance.as_deref(),
            payload: self.payload.as_deref(),
            transport_factor: self.transport_factor.as_deref(),
            spreading_fuel: self.spreading_fuel.as_deref(),
            fuel_factor: self.fuel_factor.as_deref(),
            factor_source: self.factor_source.as_deref(),
        }
    }
}

/// The option that gives each input.
fn option(given: Given) -> &'static str {
    match given {
        Given::Quarrying => "--quarrying",
        Given::D80 => "--d80",
        Given::FeedF80 => "--feed-f80",
        Given::WorkIndex => "--work-index",
        Given::RockMass => "--rock-mass",
        Given::GridFactor => "--grid-factor",
        Given::Distance => "--distance",
        Given::Payload => "--payload",
        Given::TransportFactor => "--transport-factor",
        Given::SpreadingFuel => "--spreading-fuel",
        Given::FuelFactor => "--fuel-factor",
    }
}

impl From<InventoryError> for Error {
    fn from(e: InventoryError) -> Error {
        match e {
            InventoryError::Missing(given, stage) => Error::options(
                option(given),
                format!(
                    "{} is required to compute {} emissions",
                    option(given),
                    stage.name()
                ),
            ),
            InventoryError::Value { given, text, why } => Error::field(option(given), &text, why),
            InventoryError::Check(e) => e.into(),
            InventoryError::ProductNotFiner { d80, feed_f80 } => Error::field(
                "--d80",
                &d80,
                format!("must be finer than --feed-f80 {feed_f80:?}"),
            ),
        }
    }
}

/// A life-cycle emission: computed from its stage's inputs, or a given mass tagged by stage.
pub fn emission(ctx: &Context, a: EmissionArgs) -> Result<Report> {
    let i = &a.inventory;
    let b = &a.base;
    let inputs = i.inputs();
    let chosen = inputs.stage(i.stage);
    if chosen != Err(StageError::Several)
        && let Some(t) = &i.factor_source
    {
        super::inputs::text("--factor-source", t)?;
    }
    let stage = chosen.map_err(|e| match e {
        StageError::Several => Error::options(
            "--stage",
            "give one life-cycle stage per record (--quarrying, --grinding, --transport or --spreading-fuel)",
        ),
        StageError::Mismatch { named, computed } => Error::field(
            "--stage",
            named.name(),
            format!("the options given compute {} emissions", computed.name()),
        ),
        StageError::Unnamed => Error::options(
            "--stage",
            "a life-cycle emission needs --stage or a stage's inputs",
        ),
    })?;
    let category = a.category.unwrap_or(category(stage));
    let category = format!("{category:?}").to_lowercase();
    if inputs.computed().is_none() {
        let extra = [("category", category), ("stage", stage.name().into())];
        let e = metered(EntryKind::Emission, b, &extra, ctx)?;
        return commit(ctx, e, b.reading.key.clone(), false);
    }
    if b.reading.quantity.mass.is_some() || b.reading.quantity.volume.is_some() {
        return Err(Error::options(
            "--mass",
            format!("give --mass or the {} inputs, not both", stage.name()),
        ));
    }
    commit_with(ctx, b.reading.key.clone(), false, |tx| {
        let period = period(
            required(&b.reading.from, "--from")?,
            required(&b.reading.to, "--to")?,
            ctx.now.date_naive(),
        )?;
        let area = || spread_area(tx, b, i);
        let (reading, mass) = stage_reading(stage, &inputs, area, &category)?;
        draft(EntryKind::Emission, b, reading, mass, period, ctx)
    })
}

/// The area spread: as given, or the field's registered one.
fn spread_area(tx: &mut Tx<'_>, b: &RecordArgs, i: &InventoryArgs) -> Result<Area> {
    if let Some(t) = &i.area {
        return Area::parse(t).map_err(|e| Error::field("--area", t, e));
    }
    super::setup::known_project(tx, &b.project)?;
    let site = tx.site(&b.project, &b.site)?;
    match site.as_ref().map(field_area) {
        Some(Ok(Some(area))) => Ok(area),
        Some(Err(AreaError::Unreadable(why))) => Err(Error::field("--site", &b.site, why)),
        _ => Err(Error::field(
            "--site",
            &b.site,
            "is not a field with an area: give --area",
        )),
    }
}
