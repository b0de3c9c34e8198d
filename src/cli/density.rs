//! `density`: CO2 density, phase and compressibility at a temperature and pressure.

use crate::eos::{Phase, density as solve, ideal_gas_density};
use crate::error::{Error, Result};
use crate::quantity::conditions::{
    PRESSURE_UNITS, TEMPERATURE_UNITS, atmosphere, parse_pressure, parse_temperature,
};
use crate::report::names;
use crate::report::{Cell, Report, Table, columns};
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

fn phase_name(p: Phase) -> &'static str {
    match p {
        Phase::Gas => "gas",
        Phase::Liquid => "liquid",
        Phase::Supercritical => "supercritical",
    }
}

pub fn density(a: DensityArgs) -> Result<Report> {
    let t = parse_temperature(&a.temperature).map_err(|e| {
        Error::field(
            "--temperature",
            &a.temperature,
            format!("{e} (units: {TEMPERATURE_UNITS})"),
        )
    })?;
    let atm = parse_pressure(&a.atmospheric, atmosphere())
        .map_err(|e| Error::field("--atmospheric", &a.atmospheric, e))?;
    let p = parse_pressure(&a.pressure, atm).map_err(|e| {
        Error::field(
            "--pressure",
            &a.pressure,
            format!("{e} (units: {PRESSURE_UNITS})"),
        )
    })?;
    let (tk, ppa) = (t.get::<kelvin>(), p.get::<pascal>());
    let s = solve(tk, ppa)
        .map_err(|e| Error::field("state", &format!("{}, {}", a.temperature, a.pressure), e))?;
    let mut table = Table::new(
        "density",
        "CO2 density",
        columns(&[
            names::TEMPERATURE_K,
            names::PRESSURE_MPA,
            names::DENSITY_KG_PER_M3,
            names::PHASE,
            names::COMPRESSIBILITY_Z,
            names::IDEAL_GAS_DENSITY_KG_PER_M3,
        ]),
    );
    table.push(vec![
        Cell::Number(tk, 3),
        Cell::Number(ppa / 1e6, 6),
        Cell::Number(s.density_kg_per_m3, 4),
        Cell::text(phase_name(s.phase)),
        Cell::Number(s.compressibility_factor, 5),
        Cell::Number(ideal_gas_density(tk, ppa), 4),
    ]);
    table.note("Method: Span & Wagner (1996), J. Phys. Chem. Ref. Data 25:1509, reference equation of state for CO2 (216.592–1100 K, up to 800 MPa).");
    if a.pressure.trim_end().ends_with('g') {
        table.note(format!(
            "Gauge pressure: atmospheric pressure {} added.",
            a.atmospheric
        ));
    }
    table.note("Pure CO2: impurities change the density of a real stream.");
    Ok(Report::default().table(table))
}
