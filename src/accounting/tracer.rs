//! In-situ mineralization by tracer mass balance (the structure of Matter et al. 2016, Science
//! 352:1312): a conservative tracer co-injected with the dissolved CO2 says how much injectate a
//! monitoring-well sample holds; the DIC that the mixing leaves unexplained has turned to rock.
//!
//! X = tracer_sample / tracer_injectate (background water carries no tracer), and
//! f = 1 − (DIC_sample − (1 − X)·DIC_background) / (X·DIC_injectate).
//! Derivation and limits: docs/mineralization.md.

use super::input::{InputError, Rule, check};
use crate::quantity::Mass;
use std::fmt;

/// One monitoring-well sample with the injectate and background it is compared against.
/// Tracer concentrations share one unit, DIC concentrations another (mmol/L, say).
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct TracerSample {
    pub tracer_sample: f64,
    pub tracer_injectate: f64,
    pub dic_sample: f64,
    pub dic_injectate: f64,
    pub dic_background: f64,
}

/// The fraction mineralized from one sample.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum Mineralized {
    /// f in [0, 1]; `injectate_share` is X.
    Fraction { f: f64, injectate_share: f64 },
    /// f outside [0, 1], kept as computed: the sample contradicts the two-end-member mixing,
    /// and a person must decide what it means. Never clamped, so it cannot pass for a result.
    OutOfRange { f: f64, why: OutOfRange },
}

impl Mineralized {
    /// f as computed, in range or not.
    pub fn f(&self) -> f64 {
        match *self {
            Mineralized::Fraction { f, .. } | Mineralized::OutOfRange { f, .. } => f,
        }
    }
}

/// Why a mineralized fraction fell outside [0, 1].
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum OutOfRange {
    /// f < 0: more DIC than mixing of injectate and background can supply.
    MoreCarbonThanMixing,
    /// f > 1: less DIC than the background water alone would leave.
    LessCarbonThanBackground,
}

impl fmt::Display for OutOfRange {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(match self {
            OutOfRange::MoreCarbonThanMixing => {
                "the sample holds more DIC than injectate and background water supply \
                 (carbon from another source, tracer lost, or a changed background)"
            }
            OutOfRange::LessCarbonThanBackground => {
                "the sample holds less DIC than the background water alone would leave \
                 (background carbon also removed, degassing while sampling, or a changed background)"
            }
        })
    }
}

/// Why tracer figures were refused.
#[derive(Debug, Clone, PartialEq)]
pub enum TracerError {
    Input(InputError),
    /// X·DIC_injectate is too small to divide by: f came out as this non-finite value.
    Indeterminate {
        f: f64,
    },
    NoWells,
    /// Two campaigns on one date: which one is the latest evidence is ambiguous.
    SameCampaignDate {
        first: usize,
        second: usize,
    },
}

impl fmt::Display for TracerError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            TracerError::Input(e) => write!(f, "{e}"),
            TracerError::Indeterminate { f: v } => write!(
                f,
                "mineralized fraction is {v}: tracer_sample/tracer_injectate × dic_injectate is too small to divide by"
            ),
            TracerError::NoWells => {
                f.write_str("wells is empty; a campaign needs at least one sample")
            }
            TracerError::SameCampaignDate { first, second } => write!(
                f,
                "campaigns[{first}] and campaigns[{second}] have the same date; merge them into one campaign"
            ),
        }
    }
}

impl std::error::Error for TracerError {}

impl From<InputError> for TracerError {
    fn from(e: InputError) -> Self {
        TracerError::Input(e)
    }
}

/// The fraction of the injected carbon that a sample shows as mineralized.
pub fn mineralized_fraction(s: &TracerSample) -> Result<Mineralized, TracerError> {
    check("tracer_sample", s.tracer_sample, Rule::NonNegative)?;
    check("tracer_injectate", s.tracer_injectate, Rule::Positive)?;
    check("dic_sample", s.dic_sample, Rule::NonNegative)?;
    check("dic_injectate", s.dic_injectate, Rule::Positive)?;
    check("dic_background", s.dic_background, Rule::NonNegative)?;
    let x = check(
        "tracer_sample/tracer_injectate",
        s.tracer_sample / s.tracer_injectate,
        Rule::MixingRatio,
    )?;
    let still_dissolved = s.dic_sample - (1.0 - x) * s.dic_background;
    let f = 1.0 - still_dissolved / (x * s.dic_injectate);
    if !f.is_finite() {
        return Err(TracerError::Indeterminate { f });
    }
    Ok(if f < 0.0 {
        Mineralized::OutOfRange {
            f,
            why: OutOfRange::MoreCarbonThanMixing,
        }
    } else if f > 1.0 {
        Mineralized::OutOfRange {
            f,
            why: OutOfRange::LessCarbonThanBackground,
        }
    } else {
        Mineralized::Fraction {
            f,
            injectate_share: x,
        }
    })
}

/// The wells of one sampling campaign, summarized.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct CampaignStatistics {
    pub n: usize,
    pub mean: f64,
    pub min: f64,
    pub max: f64,
    /// Sample standard deviation (n − 1); none for a single well.
    pub std_dev: Option<f64>,
    /// How many of the n were outside [0, 1]. They are in the statistics as measured:
    /// dropping them would move the mean toward whichever side was dropped.
    pub out_of_range: usize,
}

/// Mean, spread and range of the wells' fractions, every well as computed.
pub fn campaign_statistics(wells: &[Mineralized]) -> Result<CampaignStatistics, TracerError> {
    if wells.is_empty() {
        return Err(TracerError::NoWells);
    }
    for (i, w) in wells.iter().enumerate() {
        check(&format!("wells[{i}].f"), w.f(), Rule::Finite)?;
    }
    let n = wells.len();
    let values = || wells.iter().map(Mineralized::f);
    // Dividing each term first keeps the sum finite for any finite inputs.
    let mean: f64 = values().map(|v| v / n as f64).sum();
    let std_dev = (n > 1).then(|| {
        let ss: f64 = values().map(|v| (v - mean).powi(2)).sum();
        (ss / (n - 1) as f64).sqrt()
    });
    Ok(CampaignStatistics {
        n,
        mean,
        min: values().fold(f64::INFINITY, f64::min),
        max: values().fold(f64::NEG_INFINITY, f64::max),
        std_dev,
        out_of_range: wells
            .iter()
            .filter(|w| matches!(w, Mineralized::OutOfRange { .. }))
            .count(),
    })
}

/// CO2 injected in one period, dated by the period's end (any ordered date type).
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Injection<D> {
    pub end: D,
    pub mass: Mass,
}

/// A sampling campaign: its date and the fraction it found mineralized (often a
/// [`CampaignStatistics::mean`], or a lower bound the monitoring plan prefers).
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Campaign<D> {
    pub date: D,
    pub fraction: f64,
}

/// One injection period split by the evidence.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct PeriodMineralization<D> {
    pub end: D,
    pub injected: Mass,
    pub mineralized: Mass,
    pub still_dissolved: Mass,
    /// All of `injected` when no campaign is dated after the period's end.
    pub not_yet_sampled: Mass,
    /// The campaign whose fraction was applied.
    pub campaign: Option<Campaign<D>>,
}

/// Splits each injection into mineralized, still dissolved and not yet sampled.
///
/// CO2 injected in a period ending strictly before a campaign's date is covered by it (CO2
/// injected on the sampling day cannot yet be in the sample). The latest campaign is the
/// latest evidence, so it supersedes earlier ones for all the CO2 it covers; for the state as of
/// a past date pass only the campaigns up to it, and where a tracer tags one injection phase,
/// call this once per phase. In each period mineralized + still dissolved + not yet sampled
/// equals injected exactly, in grams.
pub fn apply_campaigns<D: Ord + Copy>(
    injections: &[Injection<D>],
    campaigns: &[Campaign<D>],
) -> Result<Vec<PeriodMineralization<D>>, TracerError> {
    for (i, c) in campaigns.iter().enumerate() {
        check(
            &format!("campaigns[{i}].fraction"),
            c.fraction,
            Rule::Fraction,
        )?;
    }
    for (i, inj) in injections.iter().enumerate() {
        let g = inj.mass.grams() as f64;
        check(&format!("injections[{i}].mass_g"), g, Rule::NonNegative)?;
    }
    let mut by_date: Vec<usize> = (0..campaigns.len()).collect();
    by_date.sort_by_key(|&i| campaigns[i].date);
    if let Some(pair) = by_date
        .windows(2)
        .find(|p| campaigns[p[0]].date == campaigns[p[1]].date)
    {
        // The sort is stable, so the pair keeps its input order.
        return Err(TracerError::SameCampaignDate {
            first: pair[0],
            second: pair[1],
        });
    }
    let latest = by_date.last().map(|&i| campaigns[i]);
    Ok(injections
        .iter()
        .map(|inj| {
            let campaign = latest.filter(|c| inj.end < c.date);
            let (mineralized, still_dissolved, not_yet_sampled) = match campaign {
                Some(c) => {
                    let m = inj.mass.scale(c.fraction);
                    (m, inj.mass - m, Mass::ZERO)
                }
                None => (Mass::ZERO, Mass::ZERO, inj.mass),
            };
            PeriodMineralization {
                end: inj.end,
                injected: inj.mass,
                mineralized,
                still_dissolved,
                not_yet_sampled,
                campaign,
            }
        })
        .collect())
}

#[cfg(test)]
mod tests {
    use super::*;
    use proptest::prelude::*;

    fn sample(tracer: f64, dic: f64) -> TracerSample {
        TracerSample {
            tracer_sample: tracer,
            tracer_injectate: 1.0,
            dic_sample: dic,
            dic_injectate: 20.0,
            dic_background: 1.0,
        }
    }

    fn fraction(s: &TracerSample) -> f64 {
        mineralized_fraction(s).map_or(f64::NAN, |m| m.f())
    }

    /// REFERENCES.md, tracer mass balance (structure of Matter et al. 2016 — from memory):
    /// DIC_bg 1, DIC_inj 20, X 0.4, DIC_meas 1.2 → 0.925 (computed).
    #[test]
    fn references_md_tracer_example() {
        let m = mineralized_fraction(&sample(0.4, 1.2));
        let expected: f64 = 1.0 - (1.2 - 0.6 * 1.0) / (0.4 * 20.0);
        assert!((expected - 0.925).abs() < 1e-12);
        match m {
            Ok(Mineralized::Fraction { f, injectate_share }) => {
                assert!((f - 0.925).abs() < 1e-12, "{f}");
                assert_eq!(injectate_share, 0.4);
            }
            other => panic!("{other:?}"),
        }
    }

    #[test]
    fn limits_of_the_mixing_line() {
        // No reaction: DIC is the mixing line itself → f = 0; all injected carbon gone → f = 1.
        assert!(fraction(&sample(0.4, 0.4 * 20.0 + 0.6)).abs() < 1e-12);
        assert!((fraction(&sample(0.4, 0.6)) - 1.0).abs() < 1e-12);
        assert!(matches!(
            mineralized_fraction(&sample(0.4, 9.0)),
            Ok(Mineralized::OutOfRange { f, why: OutOfRange::MoreCarbonThanMixing }) if f < 0.0
        ));
        assert!(matches!(
            mineralized_fraction(&sample(0.4, 0.5)),
            Ok(Mineralized::OutOfRange { f, why: OutOfRange::LessCarbonThanBackground }) if f > 1.0
        ));
    }

    #[test]
    fn refusals_name_the_field() {
        let cases = [
            (sample(0.0, 1.0), "tracer_sample/tracer_injectate"),
            (sample(1.5, 1.0), "tracer_sample/tracer_injectate"),
            (sample(-0.1, 1.0), "tracer_sample"),
            (sample(0.4, f64::NAN), "dic_sample"),
            (
                TracerSample {
                    dic_injectate: 0.0,
                    ..sample(0.4, 1.0)
                },
                "dic_injectate",
            ),
            (
                TracerSample {
                    dic_background: -1.0,
                    ..sample(0.4, 1.0)
                },
                "dic_background",
            ),
        ];
        for (s, field) in cases {
            match mineralized_fraction(&s) {
                Err(TracerError::Input(e)) => assert_eq!(e.field, field),
                other => panic!("{field}: {other:?}"),
            }
        }
        let tiny = TracerSample {
            tracer_sample: 1e-320,
            dic_injectate: 1e-10,
            ..sample(0.4, 1.0)
        };
        assert!(matches!(
            mineralized_fraction(&tiny),
            Err(TracerError::Indeterminate { .. })
        ));
    }

    #[test]
    fn statistics_keep_every_well() {
        let wells = [
            mineralized_fraction(&sample(0.4, 1.2)),
            mineralized_fraction(&sample(0.5, 2.5)),
            mineralized_fraction(&sample(0.4, 9.0)),
        ]
        .map(|m| m.unwrap_or_else(|e| panic!("{e}")));
        let s = campaign_statistics(&wells).unwrap_or_else(|e| panic!("{e}"));
        let f: Vec<f64> = wells.iter().map(Mineralized::f).collect();
        let mean = (f[0] + f[1] + f[2]) / 3.0;
        let sd = (f.iter().map(|v| (v - mean).powi(2)).sum::<f64>() / 2.0).sqrt();
        assert_eq!(s.n, 3);
        assert_eq!(s.out_of_range, 1);
        assert!((s.mean - mean).abs() < 1e-12);
        assert!((s.std_dev.unwrap_or(f64::NAN) - sd).abs() < 1e-12);
        assert_eq!(s.min, f[2]);
        assert_eq!(s.max, f[0]);
        let one = campaign_statistics(&wells[..1]).unwrap_or_else(|e| panic!("{e}"));
        assert_eq!(one.std_dev, None);
        assert_eq!(campaign_statistics(&[]), Err(TracerError::NoWells));
    }

    #[test]
    fn campaigns_split_each_period_exactly() {
        let t = |g| Mass::from_grams(g);
        let injections = [
            Injection {
                end: (2025, 3, 31),
                mass: t(1_000_001),
            },
            Injection {
                end: (2025, 6, 30),
                mass: t(2_000_000),
            },
            Injection {
                end: (2025, 9, 30),
                mass: t(500_000),
            },
        ];
        let campaigns = [
            Campaign {
                date: (2025, 4, 15),
                fraction: 0.5,
            },
            Campaign {
                date: (2025, 9, 30),
                fraction: 0.75,
            },
        ];
        let lines = apply_campaigns(&injections, &campaigns).unwrap_or_else(|e| panic!("{e}"));
        // The latest campaign covers the first two; the third ends on its date: not yet sampled.
        assert_eq!(lines[0].mineralized, t(750_001)); // 750 000.75 → 750 001
        assert_eq!(lines[0].still_dissolved, t(250_000));
        assert_eq!(lines[1].mineralized, t(1_500_000));
        assert_eq!(lines[1].campaign, Some(campaigns[1]));
        assert_eq!(lines[2].not_yet_sampled, t(500_000));
        assert_eq!(lines[2].mineralized, Mass::ZERO);
        assert_eq!(lines[2].campaign, None);
        for l in &lines {
            assert_eq!(
                l.mineralized + l.still_dissolved + l.not_yet_sampled,
                l.injected
            );
        }
        // As of mid-April only the first campaign exists.
        let early = apply_campaigns(&injections, &campaigns[..1]).unwrap_or_else(|e| panic!("{e}"));
        assert_eq!(early[0].mineralized, t(500_000)); // 500 000.5 → even
        assert_eq!(early[1].not_yet_sampled, t(2_000_000));
    }

    #[test]
    fn campaign_refusals() {
        let inj = [Injection {
            end: 1,
            mass: Mass::from_grams(-5),
        }];
        let ok = [Campaign {
            date: 2,
            fraction: 0.5,
        }];
        match apply_campaigns(&inj, &ok) {
            Err(TracerError::Input(e)) => assert_eq!(e.field, "injections[0].mass_g"),
            other => panic!("{other:?}"),
        }
        let bad = [
            Campaign {
                date: 2,
                fraction: 0.5,
            },
            Campaign {
                date: 3,
                fraction: 1.1,
            },
        ];
        match apply_campaigns::<i32>(&[], &bad) {
            Err(TracerError::Input(e)) => assert_eq!(e.field, "campaigns[1].fraction"),
            other => panic!("{other:?}"),
        }
        let twins = [ok[0], bad[0], ok[0]];
        let e = apply_campaigns::<i32>(&[], &twins);
        assert!(matches!(e, Err(TracerError::SameCampaignDate { .. })));
        let text = e.map_or_else(|e| e.to_string(), |_| String::new());
        assert!(text.starts_with("campaigns[") && !text.contains('\n'));
    }

    proptest! {
        #[test]
        fn never_panics(
            a in proptest::num::f64::ANY,
            b in proptest::num::f64::ANY,
            c in proptest::num::f64::ANY,
            d in proptest::num::f64::ANY,
            e in proptest::num::f64::ANY,
            grams in proptest::collection::vec(any::<i64>(), 0..4),
            dates in proptest::collection::vec((any::<u8>(), proptest::num::f64::ANY), 0..4),
        ) {
            let s = TracerSample { tracer_sample: a, tracer_injectate: b, dic_sample: c, dic_injectate: d, dic_background: e };
            if let Ok(m) = mineralized_fraction(&s) {
                let _ = campaign_statistics(&[m, m]);
            }
            let _ = campaign_statistics(&[Mineralized::Fraction { f: a, injectate_share: b }]);
            let injections: Vec<_> = grams.iter().zip(0u8..).map(|(&g, end)| Injection { end, mass: Mass::from_grams(g) }).collect();
            let campaigns: Vec<_> = dates.iter().map(|&(date, fraction)| Campaign { date, fraction }).collect();
            if let Ok(lines) = apply_campaigns(&injections, &campaigns) {
                for l in lines {
                    prop_assert_eq!(l.mineralized + l.still_dissolved + l.not_yet_sampled, l.injected);
                }
            }
        }
    }
}
