//! `potential`: the CO2 a rock or mineral can take up, from its oxide composition or formula.

use crate::chem::formula::Formula;
use crate::chem::mineral::{Redox, Route, uptake};
use crate::chem::oxides::{OxideComposition, RenforthParameters, Term, renforth, steinour};
use crate::error::{Error, Result};
use crate::report::names;
use crate::report::{Cell, Column, Report, Table, columns};
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

fn parse_oxides(text: &str) -> Result<Vec<(String, f64)>> {
    text.split(',')
        .map(|part| {
            let (name, value) = part
                .split_once('=')
                .ok_or_else(|| Error::field("--oxides", part, "write NAME=wt%, e.g. CaO=10"))?;
            let v = crate::quantity::Decimal::parse(value.trim())
                .map_err(|e| Error::field("--oxides", part, e))?
                .to_f64();
            Ok((name.trim().to_string(), v))
        })
        .collect()
}

fn oxides(text: &str, a: &PotentialArgs) -> Result<Report> {
    let parts = parse_oxides(text)?;
    let refs: Vec<(&str, f64)> = parts.iter().map(|(n, v)| (n.as_str(), *v)).collect();
    let rock = OxideComposition::new(&refs).map_err(|e| Error::field("--oxides", text, e))?;
    let eta = a.eta.unwrap_or(match a.route {
        RouteArg::Carbonate => 1.0,
        RouteArg::Bicarbonate => 2.0,
    });
    let params = RenforthParameters::new(eta)
        .and_then(|p| p.with_delta(a.delta))
        .map_err(|e| Error::field("--eta", &eta.to_string(), e))?;

    let s = steinour(&rock);
    let mut st = terms_table(
        (
            "steinour",
            "Steinour formula (as used by Huntzinger et al. 2009)".into(),
        ),
        (names::CO2_WT_PCT, 3),
        &s.terms,
        s.co2_wt_pct,
    );
    st.note(format!(
        "= {:.1} kg CO2 per t of rock, carbonate route. Coefficients are molar-mass ratios computed from CIAAW 2021 atomic weights.",
        s.kg_co2_per_t()
    ));
    let r = renforth(&rock, params);
    let mut rt = terms_table(
        (
            "renforth",
            format!("Modified Steinour formula (Renforth 2019), η = {eta}"),
        ),
        (names::CO2_KG_PER_T, 1),
        &r.terms,
        r.kg_co2_per_t,
    );
    rt.note(format!(
        "E_pot = (M_CO2/100)·Σ(coefficient·wt%/M_oxide)·10³·η; δ (P2O5) = {}. η runs from 1 (carbonate) to 2 (bicarbonate).",
        a.delta
    ));
    rt.note("A potential, not a measured removal: what dissolves, and what stays as bicarbonate, must be measured.");
    Ok(Report::default().table(st).table(rt))
}

/// One formula's terms, each with the given share, its coefficient and its contribution, and
/// the total.
fn terms_table(
    (id, title): (&'static str, String),
    (figure, decimals): (Column, usize),
    terms: &[Term],
    total: f64,
) -> Table {
    let mut t = Table::new(
        id,
        title,
        columns(&[names::TERM, names::GIVEN_WT_PCT, names::COEFFICIENT, figure]),
    );
    for x in terms {
        t.push(vec![
            Cell::text(x.constituent.name()),
            Cell::Number(x.wt_pct, 3),
            Cell::Number(x.coefficient, 4),
            Cell::Number(x.value, decimals),
        ]);
    }
    t.push(vec![
        Cell::text("total"),
        Cell::Empty,
        Cell::Empty,
        Cell::Number(total, decimals),
    ]);
    t
}

fn mineral(text: &str, a: &PotentialArgs) -> Result<Report> {
    let f = Formula::parse(text).map_err(|e| Error::field("--mineral", text, e))?;
    let redox = if a.reducing {
        Redox::Reducing
    } else {
        Redox::Oxidizing
    };
    let carb = uptake(&f, Route::Carbonate, redox);
    let bicarb = uptake(&f, Route::Bicarbonate, redox);
    let mut t = Table::new(
        "mineral",
        format!("CO2 uptake of {text} (M = {:.3} g/mol)", carb.molar_mass),
        columns(&[
            names::CATION,
            names::CHARGE,
            names::MOL_PER_MOL,
            names::COUNTED,
            names::CARBONATE_ROUTE_T_CO2_PER_T,
            names::BICARBONATE_ROUTE_T_CO2_PER_T,
        ]),
    );
    for (c, b) in carb.cations.iter().zip(&bicarb.cations) {
        t.push(vec![
            Cell::text(c.element.symbol),
            Cell::Int(i64::from(c.charge)),
            Cell::Number(c.mol_per_mol, 3),
            Cell::text(if c.counted { "yes" } else { "no (oxic)" }),
            Cell::Number(c.t_co2_per_t, 4),
            Cell::Number(b.t_co2_per_t, 4),
        ]);
    }
    if carb.carbon_held_mol_per_mol > 0.0 {
        t.push(vec![
            Cell::text("carbon already held"),
            Cell::Empty,
            Cell::Number(carb.carbon_held_mol_per_mol, 3),
            Cell::text("deducted"),
            Cell::Empty,
            Cell::Empty,
        ]);
    }
    t.push(vec![
        Cell::text("total"),
        Cell::Empty,
        Cell::Empty,
        Cell::Empty,
        Cell::Number(carb.t_co2_per_t, 4),
        Cell::Number(bicarb.t_co2_per_t, 4),
    ]);
    t.note("Carbonate route: 1 CO2 per divalent cation, 0.5 per monovalent; bicarbonate route: 2 and 1. Computed from the formula's cations and CIAAW 2021 atomic weights.");
    let excluded = carb.excluded_t_co2_per_t();
    if excluded > 0.0 {
        t.note(format!(
            "Fe²⁺/Mn²⁺ not counted: oxic weathering returns their acidity (would add {excluded:.4} t CO2/t by the carbonate route). Use --reducing where the setting is reducing."
        ));
    } else if a.reducing && carb.cations.iter().any(|c| c.element.symbol == "Fe") {
        t.note("Fe²⁺ counted: the setting was declared reducing (--reducing).");
    }
    Ok(Report::default().table(t))
}
