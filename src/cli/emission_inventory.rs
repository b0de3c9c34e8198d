//! `record emission` by life-cycle stage: quarrying, grinding, transport and spreading
//! computed from their inputs and factors (or a given `--mass` tagged with its stage). The
//! reading records every input, every factor with its source or edition, and the working.

use super::Context;
use super::record::{
    Category, EmissionArgs, RecordArgs, commit, commit_with, draft, metered, period, required,
};
use super::rock_inputs::{
    self as ri, DISTANCE, FUEL_FACTOR, FUEL_RATE, GRID, Measure, PER_TONNE, PER_TONNE_KM, SIZE,
    WORK_INDEX,
};
use crate::accounting::lifecycle::{
    Emission, GridFactor, Grinding, LifecycleError, Mode, Spreading, TransportFactor,
    grinding_emission, quarrying_emission, spreading_emission, transport_emission,
};
use crate::error::{Error, Result};
use crate::ledger::{EntryKind, Reading, SiteKind};
use crate::quantity::area::Area;
use crate::report::Report;
use crate::store::Tx;
use clap::{Args, ValueEnum};

#[derive(Debug, Clone, Copy, PartialEq, Eq, ValueEnum)]
pub enum Stage {
    Quarrying,
    Grinding,
    Transport,
    Spreading,
}

impl Stage {
    fn name(self) -> &'static str {
        match self {
            Stage::Quarrying => "quarrying",
            Stage::Grinding => "grinding",
            Stage::Transport => "transport",
            Stage::Spreading => "spreading",
        }
    }

    fn category(self) -> Category {
        match self {
            Stage::Transport => Category::Transport,
            Stage::Quarrying | Stage::Grinding | Stage::Spreading => Category::Energy,
        }
    }
}

#[derive(Debug, Clone, Copy, PartialEq, Eq, ValueEnum)]
pub enum GrindingMethod {
    /// E (GJ/t) = 6.62·d80^−1.16, d80 in µm (Strefler et al. 2018)
    Strefler,
    /// W = 10·Wi·(1/√P80 − 1/√F80) kWh/t (Bond's law)
    Bond,
}

#[derive(Debug, Clone, Copy, PartialEq, Eq, ValueEnum)]
pub enum TransportMode {
    Truck,
    Rail,
    Waterborne,
}

/// The life-cycle options of `record emission`.
#[derive(Debug, Args, Default)]
pub struct InventoryArgs {
    /// The life-cycle stage of a given --mass (computed stages set it themselves)
    #[arg(long, value_enum, help_heading = "Life-cycle inventory")]
    pub stage: Option<Stage>,
    /// Quarrying at the quarry's factor, e.g. "2.5 kg/t" (with --rock-mass)
    #[arg(
        long,
        value_name = "FACTOR",
        help_heading = "Life-cycle inventory",
        allow_hyphen_values = true
    )]
    pub quarrying: Option<String>,
    /// Grinding energy (with --rock-mass, --grid-factor and --d80; Bond also --work-index, --feed-f80)
    #[arg(long, value_enum, help_heading = "Life-cycle inventory")]
    pub grinding: Option<GrindingMethod>,
    /// Product size that 80 % passes, e.g. "50 um"
    #[arg(
        long,
        value_name = "SIZE",
        help_heading = "Life-cycle inventory",
        allow_hyphen_values = true
    )]
    pub d80: Option<String>,
    /// Feed size that 80 % passes, for Bond's law, e.g. "12 mm"
    #[arg(
        long,
        value_name = "SIZE",
        help_heading = "Life-cycle inventory",
        allow_hyphen_values = true
    )]
    pub feed_f80: Option<String>,
    /// Bond work index per metric tonne, e.g. "18 kWh/t"
    #[arg(
        long,
        value_name = "ENERGY",
        help_heading = "Life-cycle inventory",
        allow_hyphen_values = true
    )]
    pub work_index: Option<String>,
    /// Rock quarried or ground, e.g. "1200 t"
    #[arg(
        long,
        value_name = "MASS",
        help_heading = "Life-cycle inventory",
        allow_hyphen_values = true
    )]
    pub rock_mass: Option<String>,
    /// CO2 of the electricity used, e.g. "0.35 kg/kWh" (kg/kWh, g/kWh, kg/MWh, kg/GJ)
    #[arg(
        long,
        value_name = "FACTOR",
        help_heading = "Life-cycle inventory",
        allow_hyphen_values = true
    )]
    pub grid_factor: Option<String>,
    /// Transport by this mode (with --distance and --payload)
    #[arg(long, value_enum, help_heading = "Life-cycle inventory")]
    pub transport: Option<TransportMode>,
    /// Distance carried, e.g. "85 km"
    #[arg(
        long,
        value_name = "DISTANCE",
        help_heading = "Life-cycle inventory",
        allow_hyphen_values = true
    )]
    pub distance: Option<String>,
    /// Mass carried, e.g. "1200 t"
    #[arg(
        long,
        value_name = "MASS",
        help_heading = "Life-cycle inventory",
        allow_hyphen_values = true
    )]
    pub payload: Option<String>,
    /// A transport factor instead of the US EPA 2018 one, e.g. "0.095 kg/tkm" (name it with --factor-source)
    #[arg(
        long,
        value_name = "FACTOR",
        help_heading = "Life-cycle inventory",
        allow_hyphen_values = true
    )]
    pub transport_factor: Option<String>,
    /// Spreading: fuel burnt per hectare, e.g. "4 L/ha" (with --fuel-factor)
    #[arg(
        long,
        value_name = "RATE",
        help_heading = "Life-cycle inventory",
        allow_hyphen_values = true
    )]
    pub spreading_fuel: Option<String>,
    /// CO2 per litre of the fuel, e.g. "2.68 kg/L"
    #[arg(
        long,
        value_name = "FACTOR",
        help_heading = "Life-cycle inventory",
        allow_hyphen_values = true
    )]
    pub fuel_factor: Option<String>,
    /// Area spread [default: the field's registered area]
    #[arg(
        long,
        value_name = "AREA",
        help_heading = "Life-cycle inventory",
        allow_hyphen_values = true
    )]
    pub area: Option<String>,
    /// Where the factors given come from, recorded beside them
    #[arg(
        long,
        value_name = "TEXT",
        help_heading = "Life-cycle inventory",
        allow_hyphen_values = true
    )]
    pub factor_source: Option<String>,
}

impl InventoryArgs {
    /// Whether the record is a life-cycle one (computed or a given mass with its stage).
    pub fn is_given(&self) -> bool {
        self.stage.is_some() || self.computed().is_some()
    }

    /// The stage an option computes, if any.
    fn computed(&self) -> Option<Stage> {
        [
            (self.quarrying.is_some(), Stage::Quarrying),
            (self.grinding.is_some(), Stage::Grinding),
            (self.transport.is_some(), Stage::Transport),
            (self.spreading_fuel.is_some(), Stage::Spreading),
        ]
        .into_iter()
        .find_map(|(given, stage)| given.then_some(stage))
    }
}

fn needed<'a>(v: &'a Option<String>, option: &str, stage: Stage) -> Result<&'a str> {
    v.as_deref().ok_or_else(|| {
        Error::options(
            option,
            format!("{option} is required to compute {} emissions", stage.name()),
        )
    })
}

fn tonnes(option: &str, text: &str) -> Result<(String, f64)> {
    let (r, m) = super::inputs::mass(option, text)?;
    Ok((r.to_string(), m.tonnes()))
}

/// A given factor, recorded with its source (or "given").
fn given(reading: &mut Reading, name: &str, m: &Measure, source: &Option<String>) {
    reading.push(name, m.to_string());
    reading.push(
        &format!("{name}_source"),
        source.clone().unwrap_or_else(|| "given".into()),
    );
}

fn lifecycle_refusal(e: LifecycleError, options: &[(&str, &str, &str)]) -> Error {
    match e {
        LifecycleError::Input(e) => ri::refused(&e, options),
        LifecycleError::ProductNotFiner { .. } => {
            let text = |field| options.iter().find(|o| o.0 == field).map_or("", |o| o.2);
            Error::field(
                "--d80",
                text("product_p80_um"),
                format!("must be finer than --feed-f80 {:?}", text("feed_f80_um")),
            )
        }
    }
}

/// A life-cycle emission: computed from its stage's inputs, or a given mass tagged by stage.
pub fn emission(ctx: &Context, a: EmissionArgs) -> Result<Report> {
    let i = &a.inventory;
    let b = &a.base;
    let stages: Vec<Stage> = [
        i.quarrying.as_ref().map(|_| Stage::Quarrying),
        i.grinding.map(|_| Stage::Grinding),
        i.transport.map(|_| Stage::Transport),
        i.spreading_fuel.as_ref().map(|_| Stage::Spreading),
    ]
    .into_iter()
    .flatten()
    .collect();
    if stages.len() > 1 {
        return Err(Error::options(
            "--stage",
            "give one life-cycle stage per record (--quarrying, --grinding, --transport or --spreading-fuel)",
        ));
    }
    if let Some(t) = &i.factor_source {
        super::inputs::text("--factor-source", t)?;
    }
    if let (Some(s), Some(c)) = (i.stage, i.computed())
        && s != c
    {
        return Err(Error::field(
            "--stage",
            s.name(),
            format!("the options given compute {} emissions", c.name()),
        ));
    }
    let Some(stage) = i.computed().or(i.stage) else {
        return Err(Error::options(
            "--stage",
            "a life-cycle emission needs --stage or a stage's inputs",
        ));
    };
    let category = a.category.unwrap_or(stage.category());
    let category = format!("{category:?}").to_lowercase();
    if i.computed().is_none() {
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
        let mut reading = Reading::default();
        reading.push("stage", stage.name());
        let computed = match stage {
            Stage::Quarrying => quarrying(i, &mut reading)?,
            Stage::Grinding => grinding(i, &mut reading)?,
            Stage::Transport => transport(i, &mut reading)?,
            Stage::Spreading => spreading(tx, b, i, &mut reading)?,
        };
        reading.push("how", computed.how);
        reading.push("category", category.clone());
        draft(EntryKind::Emission, b, reading, computed.mass, period, ctx)
    })
}

fn quarrying(i: &InventoryArgs, reading: &mut Reading) -> Result<Emission> {
    let stage = Stage::Quarrying;
    let text = needed(&i.quarrying, "--quarrying", stage)?;
    let factor = ri::measure("--quarrying", text, PER_TONNE, false)?;
    let rock_text = needed(&i.rock_mass, "--rock-mass", stage)?;
    let (rock, rock_t) = tonnes("--rock-mass", rock_text)?;
    reading.push("rock_mass", rock);
    given(reading, "quarrying_factor", &factor, &i.factor_source);
    quarrying_emission(rock_t, factor.base).map_err(|e| {
        lifecycle_refusal(
            e,
            &[
                ("rock_t", "--rock-mass", rock_text),
                ("quarrying_g", "--rock-mass", rock_text),
            ],
        )
    })
}

fn grinding(i: &InventoryArgs, reading: &mut Reading) -> Result<Emission> {
    let stage = Stage::Grinding;
    let method = i.grinding.expect("grinding stage");
    let d80_text = needed(&i.d80, "--d80", stage)?;
    let d80 = ri::measure("--d80", d80_text, SIZE, true)?;
    let rock_text = needed(&i.rock_mass, "--rock-mass", stage)?;
    let (rock, rock_t) = tonnes("--rock-mass", rock_text)?;
    let grid_text = needed(&i.grid_factor, "--grid-factor", stage)?;
    let grid = ri::measure("--grid-factor", grid_text, GRID, false)?;
    reading.push(
        "grinding_method",
        match method {
            GrindingMethod::Strefler => "strefler",
            GrindingMethod::Bond => "bond",
        },
    );
    reading.push("d80", d80.to_string());
    let (how, f80_text) = match method {
        GrindingMethod::Strefler => (Grinding::Strefler { size_um: d80.base }, ""),
        GrindingMethod::Bond => {
            let wi_text = needed(&i.work_index, "--work-index", stage)?;
            let wi = ri::measure("--work-index", wi_text, WORK_INDEX, false)?;
            let f80_text = needed(&i.feed_f80, "--feed-f80", stage)?;
            let f80 = ri::measure("--feed-f80", f80_text, SIZE, true)?;
            reading.push("feed_f80", f80.to_string());
            given(reading, "work_index", &wi, &i.factor_source);
            let bond = Grinding::Bond {
                work_index_kwh_per_t: wi.base,
                feed_f80_um: f80.base,
                product_p80_um: d80.base,
            };
            (bond, f80_text)
        }
    };
    reading.push("rock_mass", rock);
    given(reading, "grid_factor", &grid, &i.factor_source);
    let factor = if grid.unit == "kg/GJ" {
        GridFactor::KgCo2PerGj(grid.number.to_f64())
    } else {
        GridFactor::KgCo2PerKwh(grid.base)
    };
    grinding_emission(how, rock_t, factor).map_err(|e| {
        lifecycle_refusal(
            e,
            &[
                ("rock_t", "--rock-mass", rock_text),
                ("grinding_g", "--rock-mass", rock_text),
                ("product_p80_um", "--d80", d80_text),
                ("feed_f80_um", "--feed-f80", f80_text),
            ],
        )
    })
}

fn transport(i: &InventoryArgs, reading: &mut Reading) -> Result<Emission> {
    let stage = Stage::Transport;
    let mode = match i.transport.expect("transport stage") {
        TransportMode::Truck => Mode::Truck,
        TransportMode::Rail => Mode::Rail,
        TransportMode::Waterborne => Mode::Waterborne,
    };
    let km_text = needed(&i.distance, "--distance", stage)?;
    let km = ri::measure("--distance", km_text, DISTANCE, false)?;
    let t_text = needed(&i.payload, "--payload", stage)?;
    let (payload, t) = tonnes("--payload", t_text)?;
    let factor = match &i.transport_factor {
        None => TransportFactor::epa_2018(mode),
        Some(text) => TransportFactor {
            mode,
            kg_co2_per_tonne_km: ri::measure("--transport-factor", text, PER_TONNE_KM, false)?.base,
            edition: i.factor_source.clone().unwrap_or_else(|| "given".into()),
        },
    };
    reading.push("mode", mode.name());
    reading.push("distance", km.to_string());
    reading.push("payload", payload);
    reading.push(
        "transport_factor",
        format!("{} kg/tkm", factor.kg_co2_per_tonne_km),
    );
    reading.push("transport_factor_edition", factor.edition.clone());
    transport_emission(km.base, t, &factor).map_err(|e| {
        lifecycle_refusal(
            e,
            &[
                ("distance_km", "--distance", km_text),
                ("payload_t", "--payload", t_text),
                ("transport_g", "--payload", t_text),
            ],
        )
    })
}

fn spreading(
    tx: &mut Tx<'_>,
    b: &RecordArgs,
    i: &InventoryArgs,
    reading: &mut Reading,
) -> Result<Emission> {
    let stage = Stage::Spreading;
    let fuel_text = needed(&i.spreading_fuel, "--spreading-fuel", stage)?;
    let fuel = ri::measure("--spreading-fuel", fuel_text, FUEL_RATE, false)?;
    let k_text = needed(&i.fuel_factor, "--fuel-factor", stage)?;
    let k = ri::measure("--fuel-factor", k_text, FUEL_FACTOR, false)?;
    let area = match &i.area {
        Some(t) => Area::parse(t).map_err(|e| Error::field("--area", t, e))?,
        None => {
            super::setup::known_project(tx, &b.project)?;
            let site = tx.site(&b.project, &b.site)?;
            let text = site
                .filter(|s| s.kind == SiteKind::Field)
                .and_then(|s| s.area)
                .ok_or_else(|| {
                    Error::field(
                        "--site",
                        &b.site,
                        "is not a field with an area: give --area",
                    )
                })?;
            Area::parse(&text).map_err(|e| Error::field("--site", &b.site, e))?
        }
    };
    let ha = area.m2() / 1e4;
    reading.push("spreading_fuel", fuel.to_string());
    reading.push("area", area.to_string());
    given(reading, "fuel_factor", &k, &i.factor_source);
    spreading_emission(Spreading::Fuel {
        litres_per_ha: fuel.base,
        area_ha: ha,
        kg_co2_per_litre: k.base,
    })
    .map_err(|e| lifecycle_refusal(e, &[("spreading_g", "--spreading-fuel", fuel_text)]))
}
