//! `convert`: masses, standard gas volumes and species (CaCO3, C, minerals) into CO2 and back.

use super::potential::RouteArg;
use super::record::DensityArg;
use crate::chem::formula::Formula;
use crate::chem::mineral::{CO2_PER_C, Redox, Route, co2_content, uptake};
use crate::error::{Error, Result};
use crate::quantity::volume::{DensityMethod, StandardVolume, VolumeError, VolumeMass};
use crate::quantity::{MassReading, MassUnit};
use crate::report::Report;
use crate::report::tables::convert::conversion_table;
use clap::Args;

#[derive(Debug, Args)]
pub struct ConvertArgs {
    /// A mass ("12 t") or a gas volume with its conditions ("2.5 MMscf", "1200 m3@15C,101.325kPa")
    pub quantity: String,
    /// What the quantity is of: CO2 (default), C, a carbonate (CaCO3) or a mineral (Mg2SiO4)
    pub species: Option<String>,
    /// CO2, C, a mass unit (t, kg, lb, …) or a volume unit (scf, Mscf, MMscf, Sm3, Nm3, m3@T,p)
    #[arg(long)]
    pub to: String,
    /// How a gas volume becomes a mass
    #[arg(long, value_enum, default_value_t = DensityArg::Eos)]
    pub density: DensityArg,
    /// Uptake route of a mineral
    #[arg(long, value_enum, default_value_t = RouteArg::Carbonate)]
    pub route: RouteArg,
    /// Count Fe²⁺ and Mn²⁺ in a mineral (a reducing setting)
    #[arg(long)]
    pub reducing: bool,
}

/// What one conversion step did, for the table.
struct Step {
    result: f64,
    unit: String,
    how: String,
}

fn volume_mass(v: &StandardVolume, a: &ConvertArgs, field: &str, text: &str) -> Result<VolumeMass> {
    v.mass(DensityMethod::from(a.density)).map_err(|e| match e {
        VolumeError::RegulatoryNeedsStandard(_) => {
            Error::field(field, text, format!("{e} (use --density eos)"))
        }
        e => Error::field(field, text, e),
    })
}

pub fn convert(a: ConvertArgs) -> Result<Report> {
    let species = a.species.clone().unwrap_or_else(|| "CO2".into());
    let step = match MassReading::parse(&a.quantity) {
        Ok(m) => from_mass(&m, &species, &a)?,
        Err(mass_err) => {
            let v = StandardVolume::parse(&a.quantity).map_err(|e| match e {
                // Neither unit: say both readings. A volume unit: the volume's own error.
                VolumeError::UnknownUnit(_) => Error::field(
                    "QUANTITY",
                    &a.quantity,
                    format!("not a mass ({mass_err}) nor a gas volume ({e})"),
                ),
                e => Error::field("QUANTITY", &a.quantity, e),
            })?;
            if species != "CO2" {
                return Err(Error::field(
                    "SPECIES",
                    &species,
                    "a gas volume converts as CO2 only",
                ));
            }
            from_volume(&v, &a)?
        }
    };
    Ok(Report::default().table(conversion_table(
        &a.quantity,
        &species,
        (step.result, &step.unit, &step.how),
    )))
}

fn from_mass(m: &MassReading, species: &str, a: &ConvertArgs) -> Result<Step> {
    let value = m.number.to_f64();
    let unit = m.unit.symbol().to_string();
    let kg = m
        .grams_exact()
        .map_err(|e| Error::field("QUANTITY", &a.quantity, e))?
        .to_f64()
        / 1e3;
    match (species, a.to.as_str()) {
        ("C", "CO2") => Ok(Step {
            result: value * CO2_PER_C,
            unit,
            how: format!("× M(CO2)/M(C) = {CO2_PER_C:.5}"),
        }),
        ("CO2", "C") => Ok(Step {
            result: value / CO2_PER_C,
            unit,
            how: format!("÷ M(CO2)/M(C) = {CO2_PER_C:.5}"),
        }),
        ("CO2", target) => co2_mass_to(kg, target, a),
        (s, "CO2") => {
            let f = Formula::parse(s).map_err(|e| Error::field("SPECIES", s, e))?;
            if f.carbon_count() > 0.0 {
                let k = co2_content(&f);
                return Ok(Step {
                    result: value * k,
                    unit,
                    how: format!("CO2 held: {k:.5} t CO2 per t {s} (C atoms × M(CO2)/M)"),
                });
            }
            let route = match a.route {
                RouteArg::Carbonate => Route::Carbonate,
                RouteArg::Bicarbonate => Route::Bicarbonate,
            };
            let redox = if a.reducing {
                Redox::Reducing
            } else {
                Redox::Oxidizing
            };
            let u = uptake(&f, route, redox);
            let iron = if u.excluded_t_co2_per_t() > 0.0 {
                "; Fe²⁺/Mn²⁺ not counted (oxic)"
            } else {
                ""
            };
            let route_name = if route == Route::Carbonate {
                "carbonate"
            } else {
                "bicarbonate"
            };
            Ok(Step {
                result: value * u.t_co2_per_t,
                unit,
                how: format!(
                    "uptake, {route_name} route: {:.4} t CO2 per t{iron}",
                    u.t_co2_per_t
                ),
            })
        }
        (s, t) => Err(Error::field("--to", t, format!("{s} converts to CO2 only"))),
    }
}

/// CO2 mass in kg to a mass unit or a gas volume.
fn co2_mass_to(kg: f64, target: &str, a: &ConvertArgs) -> Result<Step> {
    if let Some(u) = MassUnit::from_symbol(target) {
        let per = u.grams_per_unit().to_f64() / 1e3;
        return Ok(Step {
            result: kg / per,
            unit: u.symbol().into(),
            how: format!("exact factor: 1 {} = {per} kg", u.symbol()),
        });
    }
    let probe = StandardVolume::parse(&format!("1 {target}")).map_err(|e| {
        Error::field(
            "--to",
            target,
            format!("not CO2, C, a mass unit nor a volume unit ({e})"),
        )
    })?;
    let vm = volume_mass(&probe, a, "--to", target)?;
    Ok(Step {
        result: kg / vm.kg,
        unit: target.into(),
        how: format!(
            "÷ {:.5} kg/m³ at {} ({})",
            vm.density_kg_per_m3,
            probe.conditions,
            DensityMethod::from(a.density).source()
        ),
    })
}

fn from_volume(v: &StandardVolume, a: &ConvertArgs) -> Result<Step> {
    let vm = volume_mass(v, a, "QUANTITY", &a.quantity)?;
    let mut step = co2_mass_to(vm.kg, &a.to, a)?;
    step.how = format!(
        "{:.3} m³ × {:.5} kg/m³ at {} ({}); {}",
        vm.m3,
        vm.density_kg_per_m3,
        v.conditions,
        DensityMethod::from(a.density).source(),
        step.how
    );
    Ok(step)
}
