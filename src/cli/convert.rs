//! `convert`: masses, standard gas volumes and species (CaCO3, C, minerals) into CO2 and back.

use super::potential::RouteArg;
use super::record::DensityArg;
use crate::chem::conversion::{ConvertError, Given, Options, convert as conversion};
use crate::chem::mineral::{Redox, Route};
use crate::error::{Error, Result};
use crate::quantity::volume::DensityMethod;
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

/// The option (or argument) that gives each value.
fn option(given: Given) -> &'static str {
    match given {
        Given::Quantity => "QUANTITY",
        Given::Species => "SPECIES",
        Given::To => "--to",
    }
}

pub fn convert(a: ConvertArgs) -> Result<Report> {
    let species = a.species.clone().unwrap_or_else(|| "CO2".into());
    let o = Options {
        density: DensityMethod::from(a.density),
        route: match a.route {
            RouteArg::Carbonate => Route::Carbonate,
            RouteArg::Bicarbonate => Route::Bicarbonate,
        },
        redox: Redox::counting_iron(a.reducing),
    };
    let step = conversion(&a.quantity, &species, &a.to, &o).map_err(|e| match e {
        ConvertError::Value { given, text, why } => Error::field(option(given), &text, why),
        ConvertError::NeedsStandard { given, text, why } => {
            Error::field(option(given), &text, format!("{why} (use --density eos)"))
        }
    })?;
    Ok(Report::default().table(conversion_table(
        &a.quantity,
        &species,
        (step.result, &step.unit, &step.how),
    )))
}
