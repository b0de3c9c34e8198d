//! A life-cycle stage's emission from the values given: quarrying, grinding, transport and
//! spreading, each input read, the reading recording every input, every factor with its source
//! or edition, and the working. A refusal names the input ([`Given`]), its text and why; the
//! caller says which option that is.

use crate::accounting::input::InputError;
use crate::accounting::lifecycle::{
    Emission, GridFactor, Grinding, LifecycleError, Mode, Spreading, TransportFactor,
    grinding_emission, quarrying_emission, spreading_emission, transport_emission,
};
use crate::ledger::{Reading, bounds};
use crate::quantity::area::Area;
use crate::quantity::measure::{
    DISTANCE, FUEL_FACTOR, FUEL_RATE, GRID, Measure, PER_TONNE, PER_TONNE_KM, SIZE, Units,
    WORK_INDEX, parse_measure,
};
use crate::quantity::{Mass, MassReading};

/// A life-cycle stage.
#[derive(Debug, Clone, Copy, PartialEq, Eq, clap::ValueEnum)]
pub enum Stage {
    Quarrying,
    Grinding,
    Transport,
    Spreading,
}

impl Stage {
    pub fn name(self) -> &'static str {
        match self {
            Stage::Quarrying => "quarrying",
            Stage::Grinding => "grinding",
            Stage::Transport => "transport",
            Stage::Spreading => "spreading",
        }
    }
}

#[derive(Debug, Clone, Copy, PartialEq, Eq, clap::ValueEnum)]
pub enum GrindingMethod {
    /// E (GJ/t) = 6.62·d80^−1.16, d80 in µm (Strefler et al. 2018)
    Strefler,
    /// W = 10·Wi·(1/√P80 − 1/√F80) kWh/t (Bond's law)
    Bond,
}

#[derive(Debug, Clone, Copy, PartialEq, Eq, clap::ValueEnum)]
pub enum TransportMode {
    Truck,
    Rail,
    Waterborne,
}

/// An input of a stage.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Given {
    Quarrying,
    D80,
    FeedF80,
    WorkIndex,
    RockMass,
    GridFactor,
    Distance,
    Payload,
    TransportFactor,
    SpreadingFuel,
    FuelFactor,
}

/// The inputs as given; each stage reads its own.
#[derive(Debug, Default, Clone, Copy)]
pub struct Inputs<'a> {
    pub quarrying: Option<&'a str>,
    pub grinding: Option<GrindingMethod>,
    pub d80: Option<&'a str>,
    pub feed_f80: Option<&'a str>,
    pub work_index: Option<&'a str>,
    pub rock_mass: Option<&'a str>,
    pub grid_factor: Option<&'a str>,
    pub transport: Option<TransportMode>,
    pub distance: Option<&'a str>,
    pub payload: Option<&'a str>,
    pub transport_factor: Option<&'a str>,
    pub spreading_fuel: Option<&'a str>,
    pub fuel_factor: Option<&'a str>,
    pub factor_source: Option<&'a str>,
}

impl Inputs<'_> {
    /// The stage the inputs compute, if any: the first whose own input is given.
    pub fn computed(&self) -> Option<Stage> {
        self.stages().into_iter().next()
    }

    /// Every stage whose own input is given, in stage order.
    fn stages(&self) -> Vec<Stage> {
        [
            (self.quarrying.is_some(), Stage::Quarrying),
            (self.grinding.is_some(), Stage::Grinding),
            (self.transport.is_some(), Stage::Transport),
            (self.spreading_fuel.is_some(), Stage::Spreading),
        ]
        .into_iter()
        .filter_map(|(given, stage)| given.then_some(stage))
        .collect()
    }

    /// The one stage of a record: the one the inputs compute, which a `named` stage must agree
    /// with, or the stage named when none is computed.
    pub fn stage(&self, named: Option<Stage>) -> std::result::Result<Stage, StageError> {
        if self.stages().len() > 1 {
            return Err(StageError::Several);
        }
        match (named, self.computed()) {
            (Some(named), Some(computed)) if named != computed => {
                Err(StageError::Mismatch { named, computed })
            }
            (_, Some(stage)) | (Some(stage), None) => Ok(stage),
            (None, None) => Err(StageError::Unnamed),
        }
    }
}

/// Why a record names no one life-cycle stage.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum StageError {
    /// More than one stage's inputs are given.
    Several,
    /// The stage named is not the one the inputs compute.
    Mismatch { named: Stage, computed: Stage },
    /// Neither a stage nor a stage's inputs.
    Unnamed,
}

/// Why a stage's emission cannot be computed from what was given.
#[derive(Debug, Clone, PartialEq)]
pub enum InventoryError {
    /// An input the stage needs is missing.
    Missing(Given, Stage),
    /// An input does not read, or breaks a rule.
    Value {
        given: Given,
        text: String,
        why: String,
    },
    /// A check on a figure no single input holds.
    Check(InputError),
    /// Bond's law: the product (d80) is not finer than the feed (F80), as given.
    ProductNotFiner { d80: String, feed_f80: String },
}

type Result<T> = std::result::Result<T, InventoryError>;

/// The stage's emission, its inputs and working pushed to `reading`; `area` gives the area
/// spread (asked only once spreading's own inputs read).
pub fn stage_emission<E: From<InventoryError>>(
    stage: Stage,
    i: &Inputs<'_>,
    area: impl FnOnce() -> std::result::Result<Area, E>,
    reading: &mut Reading,
) -> std::result::Result<Emission, E> {
    Ok(match stage {
        Stage::Quarrying => quarrying(i, reading)?,
        Stage::Grinding => grinding(i, reading)?,
        Stage::Transport => transport(i, reading)?,
        Stage::Spreading => {
            let fuel = needed(i.spreading_fuel, Given::SpreadingFuel, stage)?;
            let fuel = (measure(Given::SpreadingFuel, fuel, FUEL_RATE, false)?, fuel);
            let k_text = needed(i.fuel_factor, Given::FuelFactor, stage)?;
            let k = measure(Given::FuelFactor, k_text, FUEL_FACTOR, false)?;
            spreading(i, fuel, k, area()?, reading)?
        }
    })
}

/// A computed stage's reading — the stage, its inputs and working, the record's `category` —
/// and the CO2 emitted.
pub fn stage_reading<E: From<InventoryError>>(
    stage: Stage,
    i: &Inputs<'_>,
    area: impl FnOnce() -> std::result::Result<Area, E>,
    category: &str,
) -> std::result::Result<(Reading, Mass), E> {
    let mut reading = Reading::default();
    reading.push("stage", stage.name());
    let computed = stage_emission(stage, i, area, &mut reading)?;
    reading.push("how", computed.how);
    reading.push("category", category);
    Ok((reading, computed.mass))
}

fn needed(v: Option<&str>, given: Given, stage: Stage) -> Result<&str> {
    v.ok_or(InventoryError::Missing(given, stage))
}

fn value(given: Given, text: &str, why: impl ToString) -> InventoryError {
    InventoryError::Value {
        given,
        text: text.into(),
        why: why.to_string(),
    }
}

fn measure(given: Given, text: &str, units: Units, positive: bool) -> Result<Measure> {
    parse_measure(text, units, positive).map_err(|why| value(given, text, why))
}

/// A mass as recorded and in tonnes, within the ledger's bounds.
fn tonnes(given: Given, text: &str) -> Result<(String, f64)> {
    let r = MassReading::parse(text).map_err(|e| value(given, text, e))?;
    let m = r.to_mass().map_err(|e| value(given, text, e))?;
    bounds::grams(m).map_err(|e| value(given, text, e))?;
    Ok((r.to_string(), m.tonnes()))
}

/// A given factor, recorded with its source (or "given").
fn factor(reading: &mut Reading, name: &str, m: &Measure, source: Option<&str>) {
    reading.push(name, m.to_string());
    reading.push(&format!("{name}_source"), source.unwrap_or("given"));
}

/// A check's refusal told as the input it rests on: `inputs` maps the check's field names to
/// the input and its text.
fn refused(e: LifecycleError, inputs: &[(&str, Given, &str)]) -> InventoryError {
    let text = |field| inputs.iter().find(|o| o.0 == field).map_or("", |o| o.2);
    match e {
        LifecycleError::Input(e) => match inputs.iter().find(|(field, ..)| *field == e.field) {
            Some((_, given, text)) => value(*given, text, format!("must be {}", e.rule)),
            None => InventoryError::Check(e),
        },
        LifecycleError::ProductNotFiner { .. } => InventoryError::ProductNotFiner {
            d80: text("product_p80_um").into(),
            feed_f80: text("feed_f80_um").into(),
        },
    }
}

fn quarrying(i: &Inputs<'_>, reading: &mut Reading) -> Result<Emission> {
    let stage = Stage::Quarrying;
    let text = needed(i.quarrying, Given::Quarrying, stage)?;
    let k = measure(Given::Quarrying, text, PER_TONNE, false)?;
    let rock_text = needed(i.rock_mass, Given::RockMass, stage)?;
    let (rock, rock_t) = tonnes(Given::RockMass, rock_text)?;
    reading.push("rock_mass", rock);
    factor(reading, "quarrying_factor", &k, i.factor_source);
    quarrying_emission(rock_t, k.base).map_err(|e| {
        refused(
            e,
            &[
                ("rock_t", Given::RockMass, rock_text),
                ("quarrying_g", Given::RockMass, rock_text),
            ],
        )
    })
}

fn grinding(i: &Inputs<'_>, reading: &mut Reading) -> Result<Emission> {
    let stage = Stage::Grinding;
    let method = i.grinding.unwrap_or(GrindingMethod::Strefler);
    let d80_text = needed(i.d80, Given::D80, stage)?;
    let d80 = measure(Given::D80, d80_text, SIZE, true)?;
    let rock_text = needed(i.rock_mass, Given::RockMass, stage)?;
    let (rock, rock_t) = tonnes(Given::RockMass, rock_text)?;
    let grid_text = needed(i.grid_factor, Given::GridFactor, stage)?;
    let grid = measure(Given::GridFactor, grid_text, GRID, false)?;
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
            let wi_text = needed(i.work_index, Given::WorkIndex, stage)?;
            let wi = measure(Given::WorkIndex, wi_text, WORK_INDEX, false)?;
            let f80_text = needed(i.feed_f80, Given::FeedF80, stage)?;
            let f80 = measure(Given::FeedF80, f80_text, SIZE, true)?;
            reading.push("feed_f80", f80.to_string());
            factor(reading, "work_index", &wi, i.factor_source);
            let bond = Grinding::Bond {
                work_index_kwh_per_t: wi.base,
                feed_f80_um: f80.base,
                product_p80_um: d80.base,
            };
            (bond, f80_text)
        }
    };
    reading.push("rock_mass", rock);
    factor(reading, "grid_factor", &grid, i.factor_source);
    let k = if grid.unit == "kg/GJ" {
        GridFactor::KgCo2PerGj(grid.number.to_f64())
    } else {
        GridFactor::KgCo2PerKwh(grid.base)
    };
    grinding_emission(how, rock_t, k).map_err(|e| {
        refused(
            e,
            &[
                ("rock_t", Given::RockMass, rock_text),
                ("grinding_g", Given::RockMass, rock_text),
                ("product_p80_um", Given::D80, d80_text),
                ("feed_f80_um", Given::FeedF80, f80_text),
            ],
        )
    })
}

fn transport(i: &Inputs<'_>, reading: &mut Reading) -> Result<Emission> {
    let stage = Stage::Transport;
    let mode = match i.transport.unwrap_or(TransportMode::Truck) {
        TransportMode::Truck => Mode::Truck,
        TransportMode::Rail => Mode::Rail,
        TransportMode::Waterborne => Mode::Waterborne,
    };
    let km_text = needed(i.distance, Given::Distance, stage)?;
    let km = measure(Given::Distance, km_text, DISTANCE, false)?;
    let t_text = needed(i.payload, Given::Payload, stage)?;
    let (payload, t) = tonnes(Given::Payload, t_text)?;
    let k = match i.transport_factor {
        None => TransportFactor::epa_2018(mode),
        Some(text) => TransportFactor {
            mode,
            kg_co2_per_tonne_km: measure(Given::TransportFactor, text, PER_TONNE_KM, false)?.base,
            edition: i.factor_source.unwrap_or("given").into(),
        },
    };
    reading.push("mode", mode.name());
    reading.push("distance", km.to_string());
    reading.push("payload", payload);
    reading.push(
        "transport_factor",
        format!("{} kg/tkm", k.kg_co2_per_tonne_km),
    );
    reading.push("transport_factor_edition", k.edition.clone());
    transport_emission(km.base, t, &k).map_err(|e| {
        refused(
            e,
            &[
                ("distance_km", Given::Distance, km_text),
                ("payload_t", Given::Payload, t_text),
                ("transport_g", Given::Payload, t_text),
            ],
        )
    })
}

fn spreading(
    i: &Inputs<'_>,
    (fuel, fuel_text): (Measure, &str),
    k: Measure,
    area: Area,
    reading: &mut Reading,
) -> Result<Emission> {
    reading.push("spreading_fuel", fuel.to_string());
    reading.push("area", area.to_string());
    factor(reading, "fuel_factor", &k, i.factor_source);
    spreading_emission(Spreading::Fuel {
        litres_per_ha: fuel.base,
        area_ha: area.m2() / 1e4,
        kg_co2_per_litre: k.base,
    })
    .map_err(|e| refused(e, &[("spreading_g", Given::SpreadingFuel, fuel_text)]))
}

#[cfg(test)]
mod tests {
    use super::*;

    fn run(stage: Stage, i: &Inputs<'_>) -> Result<(Emission, Reading)> {
        let mut reading = Reading::default();
        let area = || Ok::<_, InventoryError>(Area::parse("10 ha").expect("area"));
        stage_emission(stage, i, area, &mut reading).map(|e| (e, reading))
    }

    #[test]
    fn a_stage_reading_names_its_stage_first_and_its_category_last() {
        let quarry = Inputs {
            quarrying: Some("2.5 kg/t"),
            rock_mass: Some("1200 t"),
            ..Inputs::default()
        };
        let area = || Ok::<_, InventoryError>(Area::parse("10 ha").expect("area"));
        let (reading, mass) = stage_reading(Stage::Quarrying, &quarry, area, "energy").unwrap();
        assert_eq!(
            reading.0.first(),
            Some(&("stage".into(), "quarrying".into()))
        );
        assert_eq!(
            reading.0.last(),
            Some(&("category".into(), "energy".into()))
        );
        assert_eq!(mass, Mass::from_grams(3_000_000));
    }

    #[test]
    fn one_stage_per_record() {
        let quarry = Inputs {
            quarrying: Some("2.5 kg/t"),
            ..Inputs::default()
        };
        assert_eq!(quarry.stage(None), Ok(Stage::Quarrying));
        assert_eq!(quarry.stage(Some(Stage::Quarrying)), Ok(Stage::Quarrying));
        assert_eq!(
            quarry.stage(Some(Stage::Transport)),
            Err(StageError::Mismatch {
                named: Stage::Transport,
                computed: Stage::Quarrying
            })
        );
        let both = Inputs {
            transport: Some(TransportMode::Rail),
            ..quarry
        };
        assert_eq!(both.stage(Some(Stage::Transport)), Err(StageError::Several));
        let none = Inputs::default();
        assert_eq!(none.computed(), None);
        assert_eq!(none.stage(Some(Stage::Grinding)), Ok(Stage::Grinding));
        assert_eq!(none.stage(None), Err(StageError::Unnamed));
    }

    #[test]
    fn refusals_name_the_input_not_an_option() {
        let i = Inputs {
            quarrying: Some("2.5 kg/t"),
            ..Inputs::default()
        };
        assert_eq!(
            run(Stage::Quarrying, &i).unwrap_err(),
            InventoryError::Missing(Given::RockMass, Stage::Quarrying)
        );
        let bond = Inputs {
            grinding: Some(GrindingMethod::Bond),
            d80: Some("20 mm"),
            feed_f80: Some("12 mm"),
            work_index: Some("18 kWh/t"),
            rock_mass: Some("100 t"),
            grid_factor: Some("0.35 kg/kWh"),
            ..Inputs::default()
        };
        assert_eq!(
            run(Stage::Grinding, &bond).unwrap_err(),
            InventoryError::ProductNotFiner {
                d80: "20 mm".into(),
                feed_f80: "12 mm".into()
            }
        );
    }

    #[test]
    fn quarrying_records_its_factor_and_source() {
        let i = Inputs {
            quarrying: Some("2.5 kg/t"),
            rock_mass: Some("1000 t"),
            ..Inputs::default()
        };
        let (e, reading) = run(Stage::Quarrying, &i).unwrap();
        assert_eq!(e.mass.grams(), 2_500_000);
        let source = ("quarrying_factor_source".to_string(), "given".to_string());
        assert!(reading.0.contains(&source), "{reading:?}");
    }
}
