//! The potential tables: the CO2 a rock's oxides or a mineral can take up, term by term.

use crate::chem::mineral::Uptake;
use crate::chem::oxides::{RenforthPotential, SteinourPotential, Term};
use crate::report::names;
use crate::report::{Cell, Column, Table, columns};

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

/// The Steinour formula's terms and the rock's CO2 content by the carbonate route.
pub fn steinour_table(s: &SteinourPotential) -> Table {
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
    st
}

/// The modified Steinour formula's terms (Renforth 2019) at `eta`, with `delta` for P2O5.
pub fn renforth_table(r: &RenforthPotential, eta: f64, delta: f64) -> Table {
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
        delta
    ));
    rt.note("A potential, not a measured removal: what dissolves, and what stays as bicarbonate, must be measured.");
    rt
}

/// The CO2 a mineral of formula `text` takes up, cation by cation, by both routes; `reducing`
/// when Fe²⁺ and Mn²⁺ count.
pub fn mineral_table(text: &str, carb: &Uptake, bicarb: &Uptake, reducing: bool) -> Table {
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
    } else if reducing && carb.cations.iter().any(|c| c.element.symbol == "Fe") {
        t.note("Fe²⁺ counted: the setting was declared reducing (--reducing).");
    }
    t
}
