//! `density`: CO2 density, phase and compressibility at a temperature and pressure.

use crate::eos::density as solve;
use crate::error::{Error, Result};
use crate::quantity::conditions::{
    ConditionError, PRESSURE_UNITS, TEMPERATURE_UNITS, atmosphere, parse_pressure,
    parse_temperature,
};
use crate::report::Report;
use crate::report::tables::density::density_table;
use clap::Args;
use uom::si::pressure::pascal;
use uom::si::thermodynamic_temperature::kelvin;

#[derive(Debug, Args)]
pub struct DensityArgs {
    /// Temperature with its unit: K, C or F (e.g. 40C)
    #[arg(long, allow_hyphen_values = true)]
    pub temperature: String,
    /// Pressure with its unit: Pa, kPa, MPa, bar, atm, psia, or psig (gauge)
    #[arg(long, allow_hyphen_values = true)]
    pub pressure: String,
    /// Atmospheric pressure added to a gauge pressure (psig, barg)
    #[arg(long, default_value = "101.325kPa")]
    pub atmospheric: String,
}

/// A temperature or pressure that does not read, told with the units its option takes.
fn unread(option: &str, text: &str, e: ConditionError, units: &str) -> Error {
    Error::field(option, text, format!("{e} (units: {units})"))
}

pub fn density(a: DensityArgs) -> Result<Report> {
    let t = parse_temperature(&a.temperature)
        .map_err(|e| unread("--temperature", &a.temperature, e, TEMPERATURE_UNITS))?;
    let atm = parse_pressure(&a.atmospheric, atmosphere())
        .map_err(|e| Error::field("--atmospheric", &a.atmospheric, e))?;
    let p = parse_pressure(&a.pressure, atm)
        .map_err(|e| unread("--pressure", &a.pressure, e, PRESSURE_UNITS))?;
    let (tk, ppa) = (t.get::<kelvin>(), p.get::<pascal>());
    let s = solve(tk, ppa)
        .map_err(|e| Error::field("state", &format!("{}, {}", a.temperature, a.pressure), e))?;
    let gauge = a
        .pressure
        .trim_end()
        .ends_with('g')
        .then_some(a.atmospheric.as_str());
    Ok(Report::default().table(density_table(tk, ppa, &s, gauge)))
}
