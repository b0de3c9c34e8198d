//! Life-cycle emissions of spreading rock: grinding, transport and spreading. Each returns the
//! CO2 as a ledger mass and how it was computed, so a deduction can be traced to its inputs.

use super::input::{InputError, Rule, check, grams};
use crate::quantity::Mass;
use std::fmt;

/// An emission and the working behind it.
#[derive(Debug, Clone, PartialEq)]
pub struct Emission {
    pub mass: Mass,
    pub how: String,
}

/// Why life-cycle figures were refused.
#[derive(Debug, Clone, PartialEq)]
pub enum LifecycleError {
    Input(InputError),
    /// Bond's law needs the product finer than the feed.
    ProductNotFiner {
        feed_f80_um: f64,
        product_p80_um: f64,
    },
}

impl fmt::Display for LifecycleError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            LifecycleError::Input(e) => write!(f, "{e}"),
            LifecycleError::ProductNotFiner {
                feed_f80_um,
                product_p80_um,
            } => write!(
                f,
                "product_p80_um is {product_p80_um}; it must be smaller than feed_f80_um ({feed_f80_um})"
            ),
        }
    }
}

impl std::error::Error for LifecycleError {}

impl From<InputError> for LifecycleError {
    fn from(e: InputError) -> Self {
        LifecycleError::Input(e)
    }
}

/// kWh in one GJ, exactly (1 kWh = 3.6 MJ).
pub const KWH_PER_GJ: f64 = 1e9 / 3.6e6;

/// CO2 per unit of electricity, as the user's grid or supply contract states it.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum GridFactor {
    KgCo2PerKwh(f64),
    KgCo2PerGj(f64),
}

impl GridFactor {
    fn kg_per_kwh(self) -> Result<f64, InputError> {
        match self {
            GridFactor::KgCo2PerKwh(v) => check("grid_kg_co2_per_kwh", v, Rule::NonNegative),
            GridFactor::KgCo2PerGj(v) => {
                Ok(check("grid_kg_co2_per_gj", v, Rule::NonNegative)? / KWH_PER_GJ)
            }
        }
    }
}

impl fmt::Display for GridFactor {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            GridFactor::KgCo2PerKwh(v) => write!(f, "{v} kg CO2/kWh (given)"),
            GridFactor::KgCo2PerGj(v) => write!(f, "{v} kg CO2/GJ (given)"),
        }
    }
}

/// CO2 from quarrying `rock_t` tonnes at the quarry's own factor (fuel and explosives per tonne),
/// as the user gives it: there is no general default.
pub fn quarrying_emission(rock_t: f64, kg_co2_per_t: f64) -> Result<Emission, LifecycleError> {
    let rock_t = check("rock_t", rock_t, Rule::NonNegative)?;
    let k = check("kg_co2_per_t", kg_co2_per_t, Rule::NonNegative)?;
    let kg = rock_t * k;
    Ok(Emission {
        mass: grams("quarrying_g", kg * 1e3)?,
        how: format!("quarrying: {rock_t} t × {k} kg CO2/t (given) = {kg:.3} kg CO2"),
    })
}

/// Coefficient and exponent of the Strefler et al. (2018, Environ. Res. Lett. 13:034010)
/// grinding fit, E (GJ/t) = 6.62·d^−1.16, d in µm.
const STREFLER: (f64, f64) = (6.62, -1.16);

/// How the grinding energy is estimated.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum Grinding {
    /// The Strefler et al. (2018) fit for particle size `size_um`.
    Strefler { size_um: f64 },
    /// Bond's law (Bond 1952) from a work index, in kWh per tonne, and the sizes that 80 % of
    /// the feed and of the product pass.
    Bond {
        work_index_kwh_per_t: f64,
        feed_f80_um: f64,
        product_p80_um: f64,
    },
}

/// Grinding energy by the Strefler et al. (2018) fit, GJ per tonne of rock.
pub fn strefler_energy_gj_per_t(size_um: f64) -> Result<f64, LifecycleError> {
    let d = check("size_um", size_um, Rule::Positive)?;
    Ok(STREFLER.0 * d.powf(STREFLER.1))
}

/// Grinding energy by Bond's law, W = 10·Wi·(1/√P80 − 1/√F80), kWh per tonne.
pub fn bond_energy_kwh_per_t(
    work_index_kwh_per_t: f64,
    feed_f80_um: f64,
    product_p80_um: f64,
) -> Result<f64, LifecycleError> {
    let wi = check(
        "work_index_kwh_per_t",
        work_index_kwh_per_t,
        Rule::NonNegative,
    )?;
    let f80 = check("feed_f80_um", feed_f80_um, Rule::Positive)?;
    let p80 = check("product_p80_um", product_p80_um, Rule::Positive)?;
    if p80 >= f80 {
        return Err(LifecycleError::ProductNotFiner {
            feed_f80_um,
            product_p80_um,
        });
    }
    Ok(10.0 * wi * (1.0 / p80.sqrt() - 1.0 / f80.sqrt()))
}

/// CO2 from grinding `rock_t` tonnes with electricity of the given grid factor.
pub fn grinding_emission(
    method: Grinding,
    rock_t: f64,
    grid: GridFactor,
) -> Result<Emission, LifecycleError> {
    let rock_t = check("rock_t", rock_t, Rule::NonNegative)?;
    let kg_per_kwh = grid.kg_per_kwh()?;
    let (kwh_per_t, energy) = match method {
        Grinding::Strefler { size_um } => {
            let gj = strefler_energy_gj_per_t(size_um)?;
            let text = format!(
                "{}·({size_um} µm)^{} = {gj:.5} GJ/t (Strefler et al. 2018 fit)",
                STREFLER.0, STREFLER.1
            );
            (gj * KWH_PER_GJ, text)
        }
        Grinding::Bond {
            work_index_kwh_per_t: wi,
            feed_f80_um: f80,
            product_p80_um: p80,
        } => {
            let kwh = bond_energy_kwh_per_t(wi, f80, p80)?;
            let text =
                format!("10·{wi} kWh/t·(1/√{p80} µm − 1/√{f80} µm) = {kwh:.4} kWh/t (Bond's law)");
            (kwh, text)
        }
    };
    let kg = kwh_per_t * rock_t * kg_per_kwh;
    Ok(Emission {
        mass: grams("grinding_g", kg * 1e3)?,
        how: format!("grinding: {energy} × {rock_t} t × {grid} = {kg:.3} kg CO2"),
    })
}

/// Exact by definition: the international mile is 1760 yd × 0.9144 m = 1.609344 km.
pub const KM_PER_MILE: f64 = 1.609344;
/// Exact by definition: the short ton is 2000 lb × 0.45359237 kg (NIST SP 811, Appendix B).
pub const T_PER_SHORT_TON: f64 = 0.90718474;

/// kg CO2 per short ton-mile → per tonne-km.
fn per_tonne_km(kg_co2_per_short_ton_mile: f64) -> f64 {
    kg_co2_per_short_ton_mile / (T_PER_SHORT_TON * KM_PER_MILE)
}

/// A transport mode.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Mode {
    Truck,
    Rail,
    Waterborne,
}

impl Mode {
    pub fn name(self) -> &'static str {
        match self {
            Mode::Truck => "truck",
            Mode::Rail => "rail",
            Mode::Waterborne => "waterborne",
        }
    }
}

/// A transport emission factor with the edition it comes from.
#[derive(Debug, Clone, PartialEq)]
pub struct TransportFactor {
    pub mode: Mode,
    pub kg_co2_per_tonne_km: f64,
    pub edition: String,
}

/// The 2018 edition, as transcribed by a third party; the original was not read.
const EPA_2018: &str = "US EPA Emission Factors for GHG Inventories, 2018 edition \
     (through a third-party transcription, not read in the original)";

impl TransportFactor {
    /// A factor given per short ton-mile, converted with exact unit factors.
    pub fn from_short_ton_mile(
        mode: Mode,
        kg_co2_per_short_ton_mile: f64,
        edition: impl Into<String>,
    ) -> Result<Self, LifecycleError> {
        let v = check(
            "kg_co2_per_short_ton_mile",
            kg_co2_per_short_ton_mile,
            Rule::NonNegative,
        )?;
        Ok(Self {
            mode,
            kg_co2_per_tonne_km: per_tonne_km(v),
            edition: edition.into(),
        })
    }

    /// The US EPA 2018 factor for the mode: truck 0.202, rail 0.023, waterborne 0.059 kg CO2
    /// per short ton-mile.
    pub fn epa_2018(mode: Mode) -> Self {
        let per_short_ton_mile = match mode {
            Mode::Truck => 0.202,
            Mode::Rail => 0.023,
            Mode::Waterborne => 0.059,
        };
        Self {
            mode,
            kg_co2_per_tonne_km: per_tonne_km(per_short_ton_mile),
            edition: EPA_2018.into(),
        }
    }
}

/// CO2 from carrying `payload_t` tonnes over `distance_km`.
pub fn transport_emission(
    distance_km: f64,
    payload_t: f64,
    factor: &TransportFactor,
) -> Result<Emission, LifecycleError> {
    let km = check("distance_km", distance_km, Rule::NonNegative)?;
    let t = check("payload_t", payload_t, Rule::NonNegative)?;
    let f = check(
        "kg_co2_per_tonne_km",
        factor.kg_co2_per_tonne_km,
        Rule::NonNegative,
    )?;
    let kg = km * t * f;
    Ok(Emission {
        mass: grams("transport_g", kg * 1e3)?,
        how: format!(
            "transport by {}: {km} km × {t} t × {f:.6} kg CO2/(t·km) ({}) = {kg:.3} kg CO2",
            factor.mode.name(),
            factor.edition
        ),
    })
}

/// How the spreading emission is known.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum Spreading {
    /// Fuel burnt by the spreader, with the fuel's CO2 factor as the user gives it.
    Fuel {
        litres_per_ha: f64,
        area_ha: f64,
        kg_co2_per_litre: f64,
    },
    /// A mass the user has from elsewhere (a contractor's statement, say).
    Given(Mass),
}

/// CO2 from spreading.
pub fn spreading_emission(s: Spreading) -> Result<Emission, LifecycleError> {
    match s {
        Spreading::Fuel {
            litres_per_ha,
            area_ha,
            kg_co2_per_litre,
        } => {
            let l = check("litres_per_ha", litres_per_ha, Rule::NonNegative)?;
            let ha = check("area_ha", area_ha, Rule::NonNegative)?;
            let k = check("kg_co2_per_litre", kg_co2_per_litre, Rule::NonNegative)?;
            let kg = l * ha * k;
            Ok(Emission {
                mass: grams("spreading_g", kg * 1e3)?,
                how: format!(
                    "spreading: {l} L/ha × {ha} ha × {k} kg CO2/L (given) = {kg:.3} kg CO2"
                ),
            })
        }
        Spreading::Given(mass) => {
            check("spreading_g", mass.grams() as f64, Rule::NonNegative)?;
            Ok(Emission {
                mass,
                how: format!("spreading: {mass} CO2 (given)"),
            })
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use proptest::prelude::*;

    /// REFERENCES.md: Strefler et al. (2018) fit, read in open model code: 50 µm → 0.0708 GJ/t
    /// (computed).
    #[test]
    fn references_md_strefler_50_um() {
        let e = strefler_energy_gj_per_t(50.0).unwrap_or(f64::NAN);
        assert!((e - 6.62 * 50f64.powf(-1.16)).abs() < 1e-15);
        assert!((e - 0.0708).abs() < 5e-5, "{e}");
    }

    /// Bond's law (Bond 1952 — from memory): Wi 15 kWh/t, F80 10 000 µm, P80 100 µm →
    /// 10·15·(0.1 − 0.01) = 13.5 kWh/t (computed from that form).
    #[test]
    fn bond_law() {
        let w = bond_energy_kwh_per_t(15.0, 10_000.0, 100.0).unwrap_or(f64::NAN);
        assert!((w - 13.5).abs() < 1e-12, "{w}");
        assert_eq!(
            bond_energy_kwh_per_t(15.0, 100.0, 100.0),
            Err(LifecycleError::ProductNotFiner {
                feed_f80_um: 100.0,
                product_p80_um: 100.0
            })
        );
    }

    /// 1000 t to 50 µm at 0.5 kg CO2/kWh; the same grid given per GJ gives the same grams.
    #[test]
    fn grinding_emission_either_grid_unit() {
        let method = Grinding::Strefler { size_um: 50.0 };
        let per_kwh = grinding_emission(method, 1000.0, GridFactor::KgCo2PerKwh(0.5));
        let per_kwh = per_kwh.unwrap_or_else(|e| panic!("{e}"));
        let kg = 6.62 * 50f64.powf(-1.16) * 1000.0 * 1e9 / 3.6e6 * 0.5;
        assert_eq!(per_kwh.mass.grams(), (kg * 1e3).round_ties_even() as i64);
        assert!(per_kwh.how.contains("Strefler et al. 2018") && per_kwh.how.contains("1000 t"));
        let per_gj = grinding_emission(method, 1000.0, GridFactor::KgCo2PerGj(0.5 * KWH_PER_GJ));
        let per_gj = per_gj.unwrap_or_else(|e| panic!("{e}"));
        assert!((per_gj.mass.grams() - per_kwh.mass.grams()).abs() <= 1);
        let bond = Grinding::Bond {
            work_index_kwh_per_t: 15.0,
            feed_f80_um: 10_000.0,
            product_p80_um: 100.0,
        };
        let b = grinding_emission(bond, 2.0, GridFactor::KgCo2PerKwh(0.1));
        assert_eq!(b.map(|e| e.mass.grams()), Ok(2_700)); // 13.5 · 2 · 0.1 kg
        match grinding_emission(method, 1.0, GridFactor::KgCo2PerGj(-1.0)) {
            Err(LifecycleError::Input(e)) => assert_eq!(e.field, "grid_kg_co2_per_gj"),
            other => panic!("{other:?}"),
        }
    }

    #[test]
    fn quarrying() {
        let q = quarrying_emission(1200.0, 2.5).unwrap_or_else(|e| panic!("{e}"));
        assert_eq!(q.mass, Mass::from_grams(3_000_000));
        assert_eq!(
            q.how,
            "quarrying: 1200 t × 2.5 kg CO2/t (given) = 3000.000 kg CO2"
        );
        assert!(quarrying_emission(-1.0, 2.5).is_err());
    }

    /// REFERENCES.md: US EPA Emission Factors for GHG Inventories, 2018 edition, through a
    /// third-party transcription (not read in the original): 0.202, 0.023, 0.059 kg CO2 per
    /// short ton-mile = 0.1384, 0.0158, 0.0404 kg per t·km (computed).
    #[test]
    fn references_md_epa_2018_factors() {
        for (mode, metric) in [
            (Mode::Truck, 0.1384),
            (Mode::Rail, 0.0158),
            (Mode::Waterborne, 0.0404),
        ] {
            let f = TransportFactor::epa_2018(mode);
            assert!((f.kg_co2_per_tonne_km - metric).abs() < 5e-5, "{mode:?}");
            assert!(f.edition.contains("2018 edition"));
        }
        let f = TransportFactor::epa_2018(Mode::Truck);
        let same = TransportFactor::from_short_ton_mile(Mode::Truck, 0.202, EPA_2018);
        assert_eq!(same.as_ref(), Ok(&f));
        // The unit factors from their definitions (REFERENCES.md units table, read).
        assert!((T_PER_SHORT_TON - 2000.0 * 0.45359237 / 1e3).abs() < 1e-15);
        assert!((KM_PER_MILE - 1760.0 * 0.9144 / 1e3).abs() < 1e-15);
        // One short ton carried one mile at 0.202 kg: exactly 202 g.
        let e = transport_emission(KM_PER_MILE, T_PER_SHORT_TON, &f);
        assert_eq!(e.map(|e| e.mass.grams()), Ok(202));
    }

    #[test]
    fn transport_and_spreading() {
        let rail = TransportFactor::epa_2018(Mode::Rail);
        let e = transport_emission(400.0, 1000.0, &rail).unwrap_or_else(|e| panic!("{e}"));
        let g: f64 = 400.0 * 1000.0 * 0.023 / (0.90718474 * 1.609344) * 1e3;
        assert_eq!(e.mass.grams(), g.round_ties_even() as i64);
        assert!(e.how.starts_with("transport by rail: 400 km × 1000 t"));
        let fuel = Spreading::Fuel {
            litres_per_ha: 6.0,
            area_ha: 40.0,
            kg_co2_per_litre: 2.5,
        };
        let s = spreading_emission(fuel).unwrap_or_else(|e| panic!("{e}"));
        assert_eq!(s.mass, Mass::from_grams(600_000));
        let given = spreading_emission(Spreading::Given(Mass::from_grams(1_500)));
        assert_eq!(
            given.map(|e| e.how),
            Ok("spreading: 0.001500 t CO2 (given)".into())
        );
        assert!(spreading_emission(Spreading::Given(Mass::from_grams(-1))).is_err());
        match transport_emission(-1.0, 1.0, &rail) {
            Err(e) => assert_eq!(
                e.to_string(),
                "distance_km is -1; it must be a finite number of at least 0"
            ),
            Ok(e) => panic!("{e:?}"),
        }
    }

    proptest! {
        #[test]
        fn never_panics(
            v in proptest::array::uniform6(proptest::num::f64::ANY),
            g in any::<i64>(),
            per_gj in any::<bool>(),
        ) {
            let grid = if per_gj { GridFactor::KgCo2PerGj(v[5]) } else { GridFactor::KgCo2PerKwh(v[5]) };
            let _ = strefler_energy_gj_per_t(v[0]);
            let _ = bond_energy_kwh_per_t(v[0], v[1], v[2]);
            let _ = grinding_emission(Grinding::Strefler { size_um: v[0] }, v[1], grid);
            let bond = Grinding::Bond { work_index_kwh_per_t: v[0], feed_f80_um: v[1], product_p80_um: v[2] };
            let _ = grinding_emission(bond, v[3], grid);
            if let Ok(f) = TransportFactor::from_short_ton_mile(Mode::Truck, v[4], "p") {
                let _ = transport_emission(v[0], v[1], &f);
            }
            let raw = TransportFactor { mode: Mode::Rail, kg_co2_per_tonne_km: v[4], edition: String::new() };
            let _ = transport_emission(v[0], v[1], &raw);
            let _ = spreading_emission(Spreading::Fuel { litres_per_ha: v[0], area_ha: v[1], kg_co2_per_litre: v[2] });
            let _ = spreading_emission(Spreading::Given(Mass::from_grams(g)));
        }
    }
}
