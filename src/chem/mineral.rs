//! Mineral chemistry: the CO2 a carbonate holds, carbon ↔ CO2, and the CO2 a mineral can take
//! up by the carbonate or the bicarbonate route.
//!
//! Uptake is worked out from the formula's cations and charge balance, not from a table of
//! minerals: each unit of positive charge on a reactive cation balances half a carbonate ion
//! (CO3²⁻) or one bicarbonate ion (HCO3⁻), and each of those holds one CO2. So a divalent
//! cation takes 1 CO2 by the carbonate route and 2 by the bicarbonate route, a monovalent one
//! 0.5 and 1.

use crate::chem::elements::Element;
use crate::chem::formula::Formula;
use crate::chem::{M_C, M_CO2};

/// Mass of CO2 per mass of carbon, M_CO2 / M_C (3.66406 with the CIAAW 2021 weights).
pub const CO2_PER_C: f64 = M_CO2 / M_C;

/// Tonnes of CO2 that hold this many tonnes of carbon.
pub fn carbon_to_co2(carbon_t: f64) -> f64 {
    carbon_t * CO2_PER_C
}

/// Tonnes of carbon in this many tonnes of CO2.
pub fn co2_to_carbon(co2_t: f64) -> f64 {
    co2_t / CO2_PER_C
}

/// CO2 held by a carbonate, t CO2 per t of mineral: carbon atoms × M_CO2 / M_formula.
/// Every carbon atom counts, so the answer is 0 for a carbon-free formula and is meant for
/// carbonates (or for any formula whose carbon is to be expressed as CO2).
pub fn co2_content(mineral: &Formula) -> f64 {
    mineral.carbon_count() * M_CO2 / mineral.molar_mass()
}

/// Where the CO2 ends up.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Route {
    /// Solid carbonate (mineralization): one CO3²⁻ per two units of cation charge.
    Carbonate,
    /// Dissolved bicarbonate (enhanced weathering to the ocean): one HCO3⁻ per unit of charge.
    Bicarbonate,
}

impl Route {
    /// Mol CO2 per mol of positive charge.
    pub fn co2_per_charge(self) -> f64 {
        match self {
            Route::Carbonate => 0.5,
            Route::Bicarbonate => 1.0,
        }
    }
}

/// Redox setting of the reaction. Fe²⁺ and Mn²⁺ form siderite and rhodochrosite only where
/// they stay reduced; where oxygen is about they oxidize and precipitate as oxides and
/// hydroxides, taking no CO2.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Redox {
    /// Fe and Mn are counted as divalent carbonate-formers.
    Reducing,
    /// Fe and Mn are excluded; the result still says what they would have added.
    Oxidizing,
}

impl Redox {
    /// Reducing when Fe²⁺ and Mn²⁺ are to be counted, else oxidizing.
    pub fn counting_iron(reducing: bool) -> Redox {
        if reducing {
            Redox::Reducing
        } else {
            Redox::Oxidizing
        }
    }
}

/// A cation that can balance carbonate or bicarbonate.
struct Reactive {
    symbol: &'static str,
    charge: u8,
    /// Counted only in a reducing setting.
    redox_sensitive: bool,
}

/// The cations counted: alkaline earths Ca, Mg, Sr, Ba (each has a stable carbonate), Fe and
/// Mn taken as Fe²⁺/Mn²⁺ (a formula carries no oxidation state: for Fe³⁺ minerals such as
/// hematite choose [`Redox::Oxidizing`]), and the alkalis Na and K. Others (Al, Si, Ti, ...)
/// form no carbonate in these settings and are left out.
const REACTIVE: [Reactive; 8] = [
    reactive("Ca", 2, false),
    reactive("Mg", 2, false),
    reactive("Fe", 2, true),
    reactive("Mn", 2, true),
    reactive("Sr", 2, false),
    reactive("Ba", 2, false),
    reactive("Na", 1, false),
    reactive("K", 1, false),
];

const fn reactive(symbol: &'static str, charge: u8, redox_sensitive: bool) -> Reactive {
    Reactive {
        symbol,
        charge,
        redox_sensitive,
    }
}

/// One cation's share of the uptake.
#[derive(Debug, Clone, PartialEq)]
pub struct CationUptake {
    pub element: &'static Element,
    pub charge: u8,
    /// Mol cation per mol mineral.
    pub mol_per_mol: f64,
    /// Mol CO2 per mol mineral this cation takes (or would take, when not counted).
    pub co2_mol_per_mol: f64,
    /// t CO2 per t mineral this cation takes (or would take, when not counted).
    pub t_co2_per_t: f64,
    /// False for Fe and Mn in an oxidizing setting: shown, not added to the total.
    pub counted: bool,
}

/// Whether Fe was counted, for the line a report must print about it.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum IronStatus {
    /// The formula has no Fe.
    Absent,
    /// Reducing setting: Fe counted, adding this many t CO2 per t.
    Counted { t_co2_per_t: f64 },
    /// Oxidizing setting: Fe left out; counting it would have added this many t CO2 per t.
    Excluded { would_add_t_co2_per_t: f64 },
}

/// CO2 uptake of a mineral by one route, with its breakdown.
#[derive(Debug, Clone, PartialEq)]
pub struct Uptake {
    pub route: Route,
    pub redox: Redox,
    /// g/mol of the mineral formula.
    pub molar_mass: f64,
    /// Reactive cations in order of the formula, counted or not.
    pub cations: Vec<CationUptake>,
    /// Mol CO2 per mol already held as carbon in the formula (calcite: 1). Carbon there is
    /// taken to be carbonate that already uses cation charge, so it is deducted: calcite takes
    /// nothing by the carbonate route and 1 CO2 by the bicarbonate route, as its dissolution
    /// CaCO3 + CO2 + H2O → Ca²⁺ + 2HCO3⁻ says.
    pub carbon_held_mol_per_mol: f64,
    /// Net mol CO2 per mol: counted cations minus carbon held. Negative where the formula
    /// holds more CO2 than the route keeps (NaHCO3 by the carbonate route releases 0.5).
    pub co2_mol_per_mol: f64,
    /// Net t CO2 per t of mineral.
    pub t_co2_per_t: f64,
}

impl Uptake {
    /// The Fe line of the breakdown.
    pub fn iron(&self) -> IronStatus {
        match self.cations.iter().find(|c| c.element.symbol == "Fe") {
            None => IronStatus::Absent,
            Some(c) if c.counted => IronStatus::Counted {
                t_co2_per_t: c.t_co2_per_t,
            },
            Some(c) => IronStatus::Excluded {
                would_add_t_co2_per_t: c.t_co2_per_t,
            },
        }
    }

    /// t CO2 per t that the excluded cations (Fe, Mn when oxidizing) would have added.
    pub fn excluded_t_co2_per_t(&self) -> f64 {
        self.cations
            .iter()
            .filter(|c| !c.counted)
            .map(|c| c.t_co2_per_t)
            .sum()
    }
}

/// CO2 uptake of `mineral` by `route` in a `redox` setting, from its cations.
pub fn uptake(mineral: &Formula, route: Route, redox: Redox) -> Uptake {
    let molar_mass = mineral.molar_mass();
    let to_t_per_t = |mol_co2: f64| mol_co2 * M_CO2 / molar_mass;
    let cations: Vec<CationUptake> = mineral
        .counts()
        .iter()
        .filter_map(|c| {
            let rule = REACTIVE.iter().find(|r| r.symbol == c.element.symbol)?;
            let co2_mol_per_mol = c.count * f64::from(rule.charge) * route.co2_per_charge();
            Some(CationUptake {
                element: c.element,
                charge: rule.charge,
                mol_per_mol: c.count,
                co2_mol_per_mol,
                t_co2_per_t: to_t_per_t(co2_mol_per_mol),
                counted: !rule.redox_sensitive || redox == Redox::Reducing,
            })
        })
        .collect();
    let carbon_held_mol_per_mol = mineral.carbon_count();
    let gross: f64 = cations
        .iter()
        .filter(|c| c.counted)
        .map(|c| c.co2_mol_per_mol)
        .sum();
    let co2_mol_per_mol = gross - carbon_held_mol_per_mol;
    Uptake {
        route,
        redox,
        molar_mass,
        cations,
        carbon_held_mol_per_mol,
        co2_mol_per_mol,
        t_co2_per_t: to_t_per_t(co2_mol_per_mol),
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn parse(text: &str) -> Formula {
        match Formula::parse(text) {
            Ok(f) => f,
            Err(e) => panic!("{text}: {e}"),
        }
    }

    fn close(value: f64, printed: f64, half_unit: f64) -> bool {
        (value - printed).abs() <= half_unit
    }

    /// REFERENCES.md, "Molar masses and CO2 content" — computed from the CIAAW 2021 weights;
    /// t CO2 per t printed to 5 decimals, checked to half a unit of the last digit.
    #[test]
    fn references_md_co2_content_of_carbonates() {
        for (text, printed) in [
            ("CaCO3", 0.43971),
            ("MgCO3", 0.52197),
            ("FeCO3", 0.37987),
            ("CaMg(CO3)2", 0.47732),
        ] {
            let w = co2_content(&parse(text));
            assert!(close(w, printed, 0.000005), "{text}: {w}");
        }
        assert_eq!(co2_content(&parse("Mg2SiO4")), 0.0);
    }

    /// REFERENCES.md, "CO2 per C 3.66406" — computed (M_CO2 / M_C).
    #[test]
    fn references_md_co2_per_carbon() {
        assert!(close(CO2_PER_C, 3.66406, 0.000005), "{CO2_PER_C}");
        assert!(close(carbon_to_co2(1.0), 3.66406, 0.000005));
        assert!((co2_to_carbon(carbon_to_co2(123.4)) - 123.4).abs() < 1e-12);
    }

    /// REFERENCES.md, "Mineral uptake by route" — computed from the stoichiometry of the
    /// carbonate and bicarbonate routes; M to 3 decimals, t/t to 4, each to half a unit of the
    /// last printed digit.
    #[test]
    fn references_md_mineral_uptake() {
        let table = [
            ("Mg2SiO4", 140.691, 0.6256, 1.2512), // forsterite
            ("CaSiO3", 116.160, 0.3789, 0.7577),  // wollastonite
            ("Mg(OH)2", 58.319, 0.7546, 1.5093),  // brucite
            ("Ca(OH)2", 74.092, 0.5940, 1.1880),  // portlandite
        ];
        for (text, m, carbonate, bicarbonate) in table {
            let mineral = parse(text);
            let c = uptake(&mineral, Route::Carbonate, Redox::Oxidizing);
            let b = uptake(&mineral, Route::Bicarbonate, Redox::Oxidizing);
            assert!(close(c.molar_mass, m, 0.0005), "{text}: {}", c.molar_mass);
            assert!(
                close(c.t_co2_per_t, carbonate, 0.00005),
                "{text}: {}",
                c.t_co2_per_t
            );
            assert!(
                close(b.t_co2_per_t, bicarbonate, 0.00005),
                "{text}: {}",
                b.t_co2_per_t
            );
            assert_eq!(c.iron(), IronStatus::Absent);
        }
    }

    #[test]
    fn breakdown_per_cation() {
        // Olivine Fo90: Mg1.8Fe0.2SiO4, M = 146.999 g/mol (computed here).
        let olivine = parse("Mg1.8Fe0.2SiO4");
        let reducing = uptake(&olivine, Route::Carbonate, Redox::Reducing);
        let oxidizing = uptake(&olivine, Route::Carbonate, Redox::Oxidizing);
        assert_eq!(reducing.cations.len(), 2);
        let mg = &reducing.cations[0];
        assert_eq!(
            (mg.element.symbol, mg.charge, mg.mol_per_mol),
            ("Mg", 2, 1.8)
        );
        assert_eq!(mg.co2_mol_per_mol, 1.8);
        assert!((mg.t_co2_per_t - 1.8 * 44.009 / 146.999).abs() < 1e-9);
        let fe_t = 0.2 * M_CO2 / olivine.molar_mass();
        assert_eq!(reducing.iron(), IronStatus::Counted { t_co2_per_t: fe_t });
        assert_eq!(
            oxidizing.iron(),
            IronStatus::Excluded {
                would_add_t_co2_per_t: fe_t
            }
        );
        assert!((reducing.t_co2_per_t - oxidizing.t_co2_per_t - fe_t).abs() < 1e-12);
        assert_eq!(oxidizing.excluded_t_co2_per_t(), fe_t);
        assert_eq!(reducing.excluded_t_co2_per_t(), 0.0);
        assert_eq!(oxidizing.co2_mol_per_mol, 1.8);

        // Monovalent: albite NaAlSi3O8 takes 0.5 CO2 as carbonate, 1 as bicarbonate.
        let albite = parse("NaAlSi3O8");
        assert_eq!(
            uptake(&albite, Route::Carbonate, Redox::Reducing).co2_mol_per_mol,
            0.5
        );
        assert_eq!(
            uptake(&albite, Route::Bicarbonate, Redox::Reducing).co2_mol_per_mol,
            1.0
        );
        // Mn is redox-sensitive like Fe.
        let rhodonite = parse("MnSiO3");
        assert_eq!(
            uptake(&rhodonite, Route::Carbonate, Redox::Oxidizing).co2_mol_per_mol,
            0.0
        );
        assert_eq!(
            uptake(&rhodonite, Route::Carbonate, Redox::Reducing).co2_mol_per_mol,
            1.0
        );
    }

    #[test]
    fn carbon_already_held_is_deducted() {
        let calcite = parse("CaCO3");
        let c = uptake(&calcite, Route::Carbonate, Redox::Oxidizing);
        let b = uptake(&calcite, Route::Bicarbonate, Redox::Oxidizing);
        assert_eq!(c.carbon_held_mol_per_mol, 1.0);
        assert_eq!(c.co2_mol_per_mol, 0.0);
        assert_eq!(b.co2_mol_per_mol, 1.0);
        assert!((b.t_co2_per_t - co2_content(&calcite)).abs() < 1e-15);
        let nahcolite = parse("NaHCO3");
        assert_eq!(
            uptake(&nahcolite, Route::Carbonate, Redox::Oxidizing).co2_mol_per_mol,
            -0.5
        );
    }
}
