//! The density table: CO2 density, phase and compressibility at a temperature and pressure.

use crate::eos::{Phase, State, ideal_gas_density};
use crate::report::names;
use crate::report::{Cell, Table, columns};

/// The state `s` solved at `tk` K and `ppa` Pa; `gauge` is the atmospheric pressure added when
/// the pressure was given as gauge.
pub fn density_table(tk: f64, ppa: f64, s: &State, gauge: Option<&str>) -> Table {
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
    if let Some(atmospheric) = gauge {
        table.note(format!(
            "Gauge pressure: atmospheric pressure {atmospheric} added."
        ));
    }
    table.note("Pure CO2: impurities change the density of a real stream.");
    table
}

fn phase_name(p: Phase) -> &'static str {
    match p {
        Phase::Gas => "gas",
        Phase::Liquid => "liquid",
        Phase::Supercritical => "supercritical",
    }
}
