//! Three-end-member soil mass balance (Suhrhoff et al. 2025, Environ. Sci. Technol.,
//! doi 10.1021/acs.est.5c08303, eq. S13a–e): a sample is baseline soil (s), fresh feedstock (f)
//! and weathered feedstock (wf) that has taken the soil's mobile composition and density while
//! keeping its immobile element. With bulk densities ρ,
//!
//! ```text
//! a = ρs([j]mix − [j]s), b = ρf([j]mix − [j]f), c = ρs([i]mix − [i]s), d = ρf([i]mix − [i]f),
//! e = ρf·[i]f; X_f = a/(a − b), X_wf = (a·d − b·c)/(e·(a − b)), τ = X_wf/(X_wf + X_f),
//! ```
//!
//! X_f and X_wf being volume fractions of the sample. The mobile element finds the fresh
//! feedstock, the immobile element all the feedstock ever applied. Derivation and the forward
//! model: docs/weathering.md.

use super::{Analysis, Material, WeatheringError};
use crate::accounting::input::{Rule, check};
use std::fmt;

/// An end-member's analysis and its bulk density, kg/m³.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct EndMember {
    pub analysis: Analysis,
    pub bulk_density: f64,
}

impl EndMember {
    fn checked(&self, material: Material) -> Result<(f64, f64, f64), WeatheringError> {
        let (j, i) = self.analysis.checked(material)?;
        let field = format!("{}.bulk_density", material.key());
        let rho = check(&field, self.bulk_density, Rule::Positive)?;
        Ok((j, i, rho))
    }
}

/// One soil sample from a field that received the feedstock, with the field's baseline soil.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Sampling {
    /// None when no baseline was taken: the sample cannot then be read.
    pub soil: Option<EndMember>,
    pub feedstock: EndMember,
    pub sample: Analysis,
}

/// The smallest contrasts between feedstock and soil that this ledger will read a number
/// from. Below them, analytical scatter and soil heterogeneity swamp the signal. The values are
/// our screen, not from a source; a monitoring plan can set its own.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Resolution {
    /// `|[i]f − [i]s| / [i]s`.
    pub min_immobile_contrast: f64,
    /// `|a − b| / (ρs[j]s + ρf[j]f)`: how far X_f's denominator is from 0.
    pub min_mobile_contrast: f64,
}

impl Resolution {
    pub const DEFAULT: Resolution = Resolution {
        min_immobile_contrast: 0.25,
        min_mobile_contrast: 0.1,
    };
}

impl Default for Resolution {
    fn default() -> Self {
        Self::DEFAULT
    }
}

/// Why a sample cannot be read.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum Unresolved {
    /// Feedstock and soil hold nearly the same immobile element: applied feedstock is invisible.
    ImmobileContrast { threshold: f64 },
    /// a − b is near 0: the mobile element cannot tell feedstock from soil.
    MobileContrast { threshold: f64 },
}

impl fmt::Display for Unresolved {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            Unresolved::ImmobileContrast { threshold } => write!(
                f,
                "feedstock and soil differ by less than {threshold} (relative) in the immobile element"
            ),
            Unresolved::MobileContrast { threshold } => write!(
                f,
                "the mobile element separates feedstock from soil by less than {threshold} (relative)"
            ),
        }
    }
}

/// Why a mass balance lies outside what the three-end-member model allows.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Finding {
    /// X_f + X_wf ≤ 0: no feedstock in the sample.
    NoFeedstockFound,
    /// X_f < 0: the sample's mobile element lies outside the soil–feedstock range.
    NegativeFreshFeedstock,
    /// X_wf < 0: less immobile element than soil and the fresh feedstock alone give.
    NegativeWeatheredFeedstock,
    /// X_f + X_wf > 1: more feedstock than sample.
    MoreFeedstockThanSample,
}

impl fmt::Display for Finding {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(match self {
            Finding::NoFeedstockFound => "the sample shows no feedstock (X_f + X_wf ≤ 0)",
            Finding::NegativeFreshFeedstock => {
                "the sample's mobile element lies outside the soil–feedstock range (X_f < 0)"
            }
            Finding::NegativeWeatheredFeedstock => {
                "the sample holds less immobile element than soil and fresh feedstock give (X_wf < 0)"
            }
            Finding::MoreFeedstockThanSample => {
                "the feedstock found exceeds the sample's volume (X_f + X_wf > 1)"
            }
        })
    }
}

/// The mass balance as computed.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct MassBalance {
    /// Volume fraction of the sample that is fresh feedstock.
    pub x_f: f64,
    /// Volume fraction (as fresh feedstock) that has weathered.
    pub x_wf: f64,
    /// τ = X_wf / (X_wf + X_f).
    pub dissolved_fraction: f64,
    /// (X_f + X_wf)·ρf: feedstock applied per m³ of sampled soil.
    pub applied_kg_per_m3: f64,
}

impl MassBalance {
    /// Feedstock applied in a sampled volume V: (X_f + X_wf)·V·ρf.
    pub fn applied_kg(&self, volume_m3: f64) -> Result<f64, WeatheringError> {
        Ok(self.applied_kg_per_m3 * check("volume_m3", volume_m3, Rule::NonNegative)?)
    }
}

/// What a sample says about dissolution.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum MassBalanceResult {
    /// 0 ≤ X_f, 0 ≤ X_wf, 0 < X_f + X_wf ≤ 1.
    Resolved(MassBalance),
    /// Computed, but outside the model: a finding for a person, not a number to book.
    OutOfRange { balance: MassBalance, why: Finding },
    /// The contrast between feedstock and soil is too small to give a number.
    Inconclusive { contrast: f64, why: Unresolved },
}

/// Reads one sample by eq. S13a–e.
pub fn mass_balance(
    s: &Sampling,
    resolution: &Resolution,
) -> Result<MassBalanceResult, WeatheringError> {
    let min_i = "resolution.min_immobile_contrast";
    let min_i = check(min_i, resolution.min_immobile_contrast, Rule::NonNegative)?;
    let min_j = "resolution.min_mobile_contrast";
    let min_j = check(min_j, resolution.min_mobile_contrast, Rule::NonNegative)?;
    let soil = s.soil.ok_or(WeatheringError::NoBaseline)?;
    let (js, is, rs) = soil.checked(Material::Soil)?;
    let (jf, i_f, rf) = s.feedstock.checked(Material::Feedstock)?;
    let (jm, im) = s.sample.checked(Material::Sample)?;

    // A contrast of exactly 0 (or NaN, from overflow) is never resolved, whatever the threshold.
    let unresolved =
        |contrast: f64, threshold| contrast.is_nan() || contrast < threshold || contrast == 0.0;
    let contrast = (i_f - is).abs() / is;
    if unresolved(contrast, min_i) {
        return Ok(MassBalanceResult::Inconclusive {
            contrast,
            why: Unresolved::ImmobileContrast { threshold: min_i },
        });
    }
    let a = rs * (jm - js);
    let b = rf * (jm - jf);
    let c = rs * (im - is);
    let d = rf * (im - i_f);
    let e = rf * i_f;
    let scale = rs * js + rf * jf;
    let contrast = if scale > 0.0 {
        (a - b).abs() / scale
    } else {
        0.0
    };
    if unresolved(contrast, min_j) {
        return Ok(MassBalanceResult::Inconclusive {
            contrast,
            why: Unresolved::MobileContrast { threshold: min_j },
        });
    }
    let x_f = check("x_f", a / (a - b), Rule::Finite)?;
    let x_wf = check("x_wf", (a * d - b * c) / (e * (a - b)), Rule::Finite)?;
    let applied_volume = x_f + x_wf;
    let balance = MassBalance {
        x_f,
        x_wf,
        dissolved_fraction: x_wf / applied_volume,
        applied_kg_per_m3: applied_volume * rf,
    };
    let why = if applied_volume <= 0.0 {
        Finding::NoFeedstockFound
    } else if x_f < 0.0 {
        Finding::NegativeFreshFeedstock
    } else if x_wf < 0.0 {
        Finding::NegativeWeatheredFeedstock
    } else if applied_volume > 1.0 {
        Finding::MoreFeedstockThanSample
    } else {
        return Ok(MassBalanceResult::Resolved(balance));
    };
    Ok(MassBalanceResult::OutOfRange { balance, why })
}

/// The forward model behind eq. S13: the sample that results from mixing `applied_kg_per_m3`
/// of feedstock into the soil and dissolving `dissolved_fraction` of it. The dissolved volume
/// turns into soil (the soil's density and mobile composition) but keeps the feedstock's
/// immobile element. For planning (will a plot show the feedstock?) and for testing.
pub fn forward_model(
    soil: &EndMember,
    feedstock: &EndMember,
    applied_kg_per_m3: f64,
    dissolved_fraction: f64,
) -> Result<Analysis, WeatheringError> {
    let (js, is, rs) = soil.checked(Material::Soil)?;
    let (jf, i_f, rf) = feedstock.checked(Material::Feedstock)?;
    check("applied_kg_per_m3", applied_kg_per_m3, Rule::NonNegative)?;
    let tau = check("dissolved_fraction", dissolved_fraction, Rule::Fraction)?;
    let field = "applied_kg_per_m3/feedstock.bulk_density";
    let applied_volume = check(field, applied_kg_per_m3 / rf, Rule::Fraction)?;
    let x_f = (1.0 - tau) * applied_volume;
    let soil_kg = rs * (1.0 - x_f);
    let fresh_kg = rf * x_f;
    let total_kg = soil_kg + fresh_kg;
    Ok(Analysis::new(
        (soil_kg * js + fresh_kg * jf) / total_kg,
        (soil_kg * is + rf * applied_volume * i_f) / total_kg,
    ))
}

#[cfg(test)]
mod tests {
    use super::super::Role;
    use super::super::tau::tau;
    use super::*;
    use proptest::prelude::*;

    /// Invented but plausible (docs/weathering.md): a loam with Ca 0.1 and Ti 0.1 mol/kg at
    /// 1300 kg/m³; a basalt powder with Ca 1.6 (≈ 9 wt% CaO) and Ti 0.25 mol/kg (≈ 2 wt%
    /// TiO2) at 1500 kg/m³; 50 t/ha mixed into 0.1 m is 50 kg/m³.
    const SOIL: EndMember = EndMember {
        analysis: Analysis {
            mobile: Some(0.1),
            immobile: Some(0.1),
        },
        bulk_density: 1300.0,
    };
    const BASALT: EndMember = EndMember {
        analysis: Analysis {
            mobile: Some(1.6),
            immobile: Some(0.25),
        },
        bulk_density: 1500.0,
    };

    fn sample(dissolved: f64) -> Analysis {
        forward_model(&SOIL, &BASALT, 50.0, dissolved).unwrap_or_else(|e| panic!("{e}"))
    }

    fn read(soil: EndMember, feedstock: EndMember, sample: Analysis) -> MassBalanceResult {
        let s = Sampling {
            soil: Some(soil),
            feedstock,
            sample,
        };
        mass_balance(&s, &Resolution::DEFAULT).unwrap_or_else(|e| panic!("{e}"))
    }

    fn resolved(r: MassBalanceResult) -> MassBalance {
        match r {
            MassBalanceResult::Resolved(b) => b,
            other => panic!("{other:?}"),
        }
    }

    /// Round trip through the forward model of Suhrhoff et al. (2025; eq. S13 read in the
    /// authors' public code, per REFERENCES.md): 30 % dissolved, 50 kg/m³ applied.
    #[test]
    fn round_trip_recovers_the_dissolved_fraction() {
        let b = resolved(read(SOIL, BASALT, sample(0.3)));
        assert!((b.dissolved_fraction - 0.3).abs() < 1e-12, "{b:?}");
        assert!((b.applied_kg_per_m3 - 50.0).abs() < 1e-9);
        assert!((b.x_f - 0.7 * 50.0 / 1500.0).abs() < 1e-12);
        assert!((b.x_wf - 0.3 * 50.0 / 1500.0).abs() < 1e-12);
        // A 0.1 m × 1 m² core holds 5 kg: 50 t/ha.
        let kg = b.applied_kg(0.1).unwrap_or(f64::NAN);
        assert!((kg - 5.0).abs() < 1e-9);
        for end in [0.0, 1.0] {
            let b = resolved(read(SOIL, BASALT, sample(end)));
            assert!((b.dissolved_fraction - end).abs() < 1e-12);
        }
    }

    /// docs/weathering.md: τ on the bulk mixture, parent = the mixture at application, reads
    /// 30 % dissolution as about 12 %.
    #[test]
    fn bulk_tau_understates_dissolution() {
        let t = tau(&sample(0.0), &sample(0.3)).unwrap_or_else(|e| panic!("{e}"));
        let bulk = t.bulk_dissolved_fraction();
        assert!((bulk - 0.1187).abs() < 5e-5, "{bulk}");
        // Close to the dilution estimate 0.3 · feedstock Ca / all Ca in a m³.
        let feed_ca = 50.0 * 1.6;
        let soil_ca = 1300.0 * (1.0 - 50.0 / 1500.0) * 0.1;
        assert!((bulk - 0.3 * feed_ca / (feed_ca + soil_ca)).abs() < 0.005);
        // The baseline soil as parent even shows a gain: the feedstock added Ca.
        let vs_soil = tau(&SOIL.analysis, &sample(0.3)).map_or(f64::NAN, |t| t.tau);
        assert!(vs_soil > 0.0);
    }

    #[test]
    fn small_contrasts_are_inconclusive() {
        let same_ti = EndMember {
            analysis: Analysis::new(1.6, 0.11),
            ..BASALT
        };
        let r = read(SOIL, same_ti, sample(0.3));
        assert!(matches!(
            r,
            MassBalanceResult::Inconclusive { contrast, why: Unresolved::ImmobileContrast { threshold } }
                if (contrast - 0.1).abs() < 1e-12 && threshold == 0.25
        ));
        let same_ca = EndMember {
            analysis: Analysis::new(0.1, 0.25),
            bulk_density: 1300.0,
        };
        let mixed = forward_model(&SOIL, &same_ca, 50.0, 0.3).unwrap_or_else(|e| panic!("{e}"));
        assert!(matches!(
            read(SOIL, same_ca, mixed),
            MassBalanceResult::Inconclusive { contrast, why: Unresolved::MobileContrast { .. } }
                if contrast.abs() < 1e-12
        ));
        let zero = Resolution {
            min_immobile_contrast: 0.0,
            min_mobile_contrast: 0.0,
        };
        let s = Sampling {
            soil: Some(SOIL),
            feedstock: same_ca,
            sample: mixed,
        };
        assert!(matches!(
            mass_balance(&s, &zero),
            Ok(MassBalanceResult::Inconclusive { .. })
        ));
    }

    #[test]
    fn out_of_model_samples_are_findings() {
        let finding = |a: Analysis| match read(SOIL, BASALT, a) {
            MassBalanceResult::OutOfRange { why, .. } => why,
            other => panic!("{other:?}"),
        };
        assert_eq!(finding(SOIL.analysis), Finding::NoFeedstockFound);
        let s = sample(0.3);
        let low_ti = Analysis::new(s.mobile.unwrap_or(0.0), 0.1);
        assert_eq!(finding(low_ti), Finding::NegativeWeatheredFeedstock);
        assert_eq!(
            finding(Analysis::new(0.09, 0.11)),
            Finding::NegativeFreshFeedstock
        );
        assert_eq!(
            finding(Analysis::new(1.6, 0.3)),
            Finding::MoreFeedstockThanSample
        );
    }

    #[test]
    fn refusals() {
        let no_baseline = Sampling {
            soil: None,
            feedstock: BASALT,
            sample: sample(0.3),
        };
        let r = &Resolution::DEFAULT;
        assert_eq!(
            mass_balance(&no_baseline, r),
            Err(WeatheringError::NoBaseline)
        );
        let no_ti = Analysis {
            mobile: Some(1.6),
            immobile: None,
        };
        let missing = |soil: Analysis, feedstock: Analysis| {
            let s = Sampling {
                soil: Some(EndMember {
                    analysis: soil,
                    ..SOIL
                }),
                feedstock: EndMember {
                    analysis: feedstock,
                    ..BASALT
                },
                sample: sample(0.3),
            };
            mass_balance(&s, r)
        };
        assert_eq!(
            missing(SOIL.analysis, no_ti),
            Err(WeatheringError::Missing {
                material: Material::Feedstock,
                element: Role::Immobile
            })
        );
        assert_eq!(
            missing(no_ti, BASALT.analysis),
            Err(WeatheringError::Missing {
                material: Material::Soil,
                element: Role::Immobile
            })
        );
        let field = |e: Result<Analysis, WeatheringError>| match e {
            Err(WeatheringError::Input(e)) => e.field,
            other => panic!("{other:?}"),
        };
        assert_eq!(
            field(forward_model(&SOIL, &BASALT, 1600.0, 0.3)),
            "applied_kg_per_m3/feedstock.bulk_density"
        );
        assert_eq!(
            field(forward_model(&SOIL, &BASALT, 50.0, 1.2)),
            "dissolved_fraction"
        );
        let light = EndMember {
            bulk_density: 0.0,
            ..SOIL
        };
        assert_eq!(
            field(forward_model(&light, &BASALT, 50.0, 0.3)),
            "soil.bulk_density"
        );
        assert!(WeatheringError::NoBaseline.to_string().starts_with("soil "));
    }

    fn end_member(j: f64, i: f64, rho: f64) -> EndMember {
        EndMember {
            analysis: Analysis::new(j, i),
            bulk_density: rho,
        }
    }

    proptest! {
        /// Plausible ranges: soil Ca/Mg 0.01–1 mol/kg, Ti/Zr 0.01–0.3 mol/kg, 900–1600 kg/m³;
        /// feedstock cation 2–20× the soil's, immobile 0.3–0.95 below or 1.3–6× the soil's,
        /// 1200–3000 kg/m³; 1–300 kg/m³ applied (about 1–300 t/ha into 0.1 m).
        #[test]
        fn round_trip_over_plausible_ranges(
            js in 0.01..1.0f64, is in 0.01..0.3f64, rs in 900.0..1600.0f64,
            j_ratio in 2.0..20.0f64, i_ratio in prop_oneof![0.05..0.7f64, 1.3..6.0f64],
            rf in 1200.0..3000.0f64, applied in 1.0..300.0f64, dissolved in 0.0..=1.0f64,
        ) {
            let soil = end_member(js, is, rs);
            let feed = end_member(js * j_ratio, is * i_ratio, rf);
            let mix = forward_model(&soil, &feed, applied, dissolved);
            prop_assert!(mix.is_ok());
            let s = Sampling { soil: Some(soil), feedstock: feed, sample: mix.unwrap_or(soil.analysis) };
            match mass_balance(&s, &Resolution::DEFAULT) {
                Ok(MassBalanceResult::Resolved(b)) => {
                    prop_assert!((b.dissolved_fraction - dissolved).abs() < 1e-7, "{:?}", b);
                    prop_assert!((b.applied_kg_per_m3 - applied).abs() < 1e-7 * applied.max(1.0));
                }
                other => prop_assert!(false, "{:?}", other),
            }
        }

        #[test]
        fn never_panics(
            v in proptest::array::uniform12(proptest::num::f64::ANY),
            none in any::<bool>(),
        ) {
            let soil = end_member(v[0], v[1], v[2]);
            let feed = end_member(v[3], v[4], v[5]);
            let s = Sampling {
                soil: (!none).then_some(soil),
                feedstock: feed,
                sample: Analysis::new(v[6], v[7]),
            };
            let r = Resolution { min_immobile_contrast: v[8], min_mobile_contrast: v[9] };
            if let Ok(MassBalanceResult::Resolved(b) | MassBalanceResult::OutOfRange { balance: b, .. }) = mass_balance(&s, &r) {
                let _ = b.applied_kg(v[10]);
            }
            let _ = mass_balance(&s, &Resolution::DEFAULT);
            let _ = forward_model(&soil, &feed, v[10], v[11]);
        }
    }
}
