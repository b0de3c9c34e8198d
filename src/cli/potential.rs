//! `potential`: the CO2 a rock or mineral can take up, from its oxide composition or formula.

use crate::chem::formula::Formula;
use crate::chem::mineral::{Redox, Route, uptake};
use crate::chem::oxide_list::oxide_list;
use crate::chem::oxides::{OxideComposition, RenforthParameters, renforth, steinour};
use crate::error::{Error, Result};
use crate::report::Report;
use crate::report::tables::potential::{mineral_table, renforth_table, steinour_table};
use clap::{Args, ValueEnum};

#[derive(Debug, Clone, Copy, ValueEnum)]
pub enum RouteArg {
    Carbonate,
    Bicarbonate,
}

#[derive(Debug, Args)]
#[command(group = clap::ArgGroup::new("rock").required(true).args(["oxides", "mineral"]))]
pub struct PotentialArgs {
    /// Oxide composition in wt%, e.g. CaO=10,MgO=7,Na2O=2.5,K2O=1.5 (also SO3, P2O5, CaCO3 or TIC, …)
    #[arg(long)]
    pub oxides: Option<String>,
    /// A mineral formula, e.g. Mg2SiO4
    #[arg(long)]
    pub mineral: Option<String>,
    /// Carbonate (η = 1) or bicarbonate (η = 2) route
    #[arg(long, value_enum, default_value_t = RouteArg::Carbonate)]
    pub route: RouteArg,
    /// Pathway factor η of Renforth (2019), 1 to 2; overrides --route
    #[arg(long)]
    pub eta: Option<f64>,
    /// Phosphate coefficient δ of Renforth (2019)
    #[arg(long, default_value_t = RenforthParameters::DEFAULT_DELTA, allow_hyphen_values = true)]
    pub delta: f64,
    /// Count Fe²⁺ (and Mn²⁺): only where the setting is reducing
    #[arg(long)]
    pub reducing: bool,
}

pub fn potential(a: PotentialArgs) -> Result<Report> {
    match (&a.oxides, &a.mineral) {
        (Some(o), _) => oxides(o, &a),
        (None, Some(m)) => mineral(m, &a),
        (None, None) => Err(Error::options("--oxides", "give --oxides or --mineral")),
    }
}

fn oxides(text: &str, a: &PotentialArgs) -> Result<Report> {
    let parts = oxide_list(text).map_err(|(part, why)| Error::field("--oxides", &part, why))?;
    let refs: Vec<(&str, f64)> = parts.iter().map(|(n, v)| (n.as_str(), *v)).collect();
    let rock = OxideComposition::new(&refs).map_err(|e| Error::field("--oxides", text, e))?;
    let eta = a.eta.unwrap_or(match a.route {
        RouteArg::Carbonate => 1.0,
        RouteArg::Bicarbonate => 2.0,
    });
    let params = RenforthParameters::new(eta)
        .and_then(|p| p.with_delta(a.delta))
        .map_err(|e| Error::field("--eta", &eta.to_string(), e))?;

    Ok(Report::default()
        .table(steinour_table(&steinour(&rock)))
        .table(renforth_table(&renforth(&rock, params), eta, a.delta)))
}

fn mineral(text: &str, a: &PotentialArgs) -> Result<Report> {
    let f = Formula::parse(text).map_err(|e| Error::field("--mineral", text, e))?;
    let redox = Redox::counting_iron(a.reducing);
    let carb = uptake(&f, Route::Carbonate, redox);
    let bicarb = uptake(&f, Route::Bicarbonate, redox);
    Ok(Report::default().table(mineral_table(text, &carb, &bicarb, a.reducing)))
}
