//! Uncertainty of measured and balanced masses, propagated by the IPCC 2006 Guidelines' error
//! propagation (Vol. 1 Ch. 3, Approach 1), with one refinement: a meter's error is systematic,
//! so its readings add linearly and only different meters combine in quadrature.
//! docs/uncertainty.md explains the choice.
//!
//! Every uncertainty here is an expanded uncertainty at 95 % confidence, the half-width of the
//! interval, given as a fraction (`0.005` is ±0.5 %).

use crate::quantity::Mass;
use std::collections::BTreeMap;
use std::fmt;

/// Why an uncertainty computation was refused.
#[derive(Debug, Clone, PartialEq)]
pub enum UncertaintyError {
    /// A relative uncertainty that is negative, NaN or infinite.
    RelU { of: String, value: f64 },
    /// A reading's mass below zero: a meter measures a flow, not its sign.
    NegativeReading { of: String, mass: Mass },
    /// A reading without a meter name, so it cannot be grouped.
    NoMeter { reading: usize },
    /// A total beyond the i64 grams the ledger can hold.
    TooLarge { of: String },
}

impl fmt::Display for UncertaintyError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            Self::RelU { of, value } => {
                write!(f, "rel_u of {of} is {value}: must be a finite number ≥ 0")
            }
            Self::NegativeReading { of, mass } => {
                write!(f, "mass of {of} is {mass}: a reading must not be negative")
            }
            Self::NoMeter { reading } => write!(f, "meter of reading {reading} is empty"),
            Self::TooLarge { of } => write!(f, "{of} is too large for the ledger"),
        }
    }
}

/// A mass with its absolute expanded uncertainty (95 %). The uncertainty is kept in f64 grams:
/// it is combined before it is ever deducted, and rounded to whole grams only then.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Estimate {
    value: Mass,
    abs_u_grams: f64,
}

impl Estimate {
    /// A mass known to ± `rel_u` of itself.
    pub fn relative(value: Mass, rel_u: f64) -> Result<Self, UncertaintyError> {
        check_rel_u(rel_u, || format!("estimate {value}"))?;
        Ok(Self {
            value,
            abs_u_grams: rel_u * (value.grams() as f64).abs(),
        })
    }

    /// A mass known to ± `abs_u`; the sign of `abs_u` is ignored, an interval has one width.
    pub fn absolute(value: Mass, abs_u: Mass) -> Self {
        Self {
            value,
            abs_u_grams: (abs_u.grams() as f64).abs(),
        }
    }

    pub fn value(&self) -> Mass {
        self.value
    }

    /// The absolute uncertainty in grams, unrounded.
    pub fn abs_u_grams(&self) -> f64 {
        self.abs_u_grams
    }

    /// The absolute uncertainty rounded half to even to whole grams.
    pub fn abs_u(&self) -> Mass {
        Mass::from_grams(crate::quantity::mass::round_half_even_f64(self.abs_u_grams))
    }

    /// The uncertainty as a fraction of the value; `None` when the value is zero, since a
    /// percentage of nothing says nothing.
    pub fn rel_u(&self) -> Option<f64> {
        let v = self.value.grams();
        (v != 0).then(|| self.abs_u_grams / (v as f64).abs())
    }

    /// [`Self::rel_u`] in per cent, the form reports print.
    pub fn rel_u_pct(&self) -> Option<f64> {
        self.rel_u().map(|u| 100.0 * u)
    }
}

fn check_rel_u(rel_u: f64, of: impl FnOnce() -> String) -> Result<(), UncertaintyError> {
    if rel_u.is_finite() && rel_u >= 0.0 {
        Ok(())
    } else {
        Err(UncertaintyError::RelU {
            of: of(),
            value: rel_u,
        })
    }
}

/// Relative uncertainty of a product (mass = flow × concentration × …): the factors' relative
/// uncertainties combine in quadrature, √Σuᵢ², because different instruments err independently.
pub fn product_rel_u(factors: &[f64]) -> Result<f64, UncertaintyError> {
    for (i, &u) in factors.iter().enumerate() {
        check_rel_u(u, || format!("factor {}", i + 1))?;
    }
    Ok(quadrature(factors.iter().copied()))
}

fn quadrature(parts: impl Iterator<Item = f64>) -> f64 {
    parts.map(|u| u * u).sum::<f64>().sqrt()
}

/// One metered mass: `rel_u` is the meter's relative uncertainty for this reading.
#[derive(Debug, Clone, PartialEq)]
pub struct MeteredMass {
    pub meter: String,
    pub mass: Mass,
    pub rel_u: f64,
}

/// The readings of one meter added up.
#[derive(Debug, Clone, PartialEq)]
pub struct MeterTotal {
    pub meter: String,
    pub readings: usize,
    pub estimate: Estimate,
}

/// A sum of readings: per meter (in meter-name order) and in total.
#[derive(Debug, Clone, PartialEq)]
pub struct MeteredSum {
    pub meters: Vec<MeterTotal>,
    pub total: Estimate,
}

/// Adds readings. Within a meter the absolute uncertainties add linearly (U = Σ uᵢ·xᵢ): a
/// meter's bias repeats in every reading and does not average out. Meters are independent of one
/// another, so the meters' totals combine in quadrature (U = √Σ U_meter²).
pub fn sum_readings(readings: &[MeteredMass]) -> Result<MeteredSum, UncertaintyError> {
    let mut by_meter: BTreeMap<&str, (usize, i64, f64)> = BTreeMap::new();
    for (i, r) in readings.iter().enumerate() {
        let of = || format!("reading {} (meter {:?})", i + 1, r.meter);
        if r.meter.trim().is_empty() {
            return Err(UncertaintyError::NoMeter { reading: i + 1 });
        }
        check_rel_u(r.rel_u, of)?;
        if r.mass.grams() < 0 {
            return Err(UncertaintyError::NegativeReading {
                of: of(),
                mass: r.mass,
            });
        }
        let (n, grams, u) = by_meter.entry(&r.meter).or_default();
        *n += 1;
        *grams = grams
            .checked_add(r.mass.grams())
            .ok_or_else(|| UncertaintyError::TooLarge {
                of: format!("the total of meter {:?}", r.meter),
            })?;
        *u += r.rel_u * r.mass.grams() as f64;
    }
    let meters: Vec<MeterTotal> = by_meter
        .into_iter()
        .map(|(meter, (readings, grams, u))| MeterTotal {
            meter: meter.to_string(),
            readings,
            estimate: Estimate {
                value: Mass::from_grams(grams),
                abs_u_grams: u,
            },
        })
        .collect();
    let total = combine(
        meters.iter().map(|m| (1, m.estimate)),
        "the sum of the readings",
    )?;
    Ok(MeteredSum { meters, total })
}

/// Meters' totals already added up, each (grams, absolute uncertainty in grams), combined as
/// [`sum_readings`] combines them (in quadrature, in the order given): for sums folded reading
/// by reading without keeping the readings.
pub fn sum_meters(meters: impl Iterator<Item = (Mass, f64)>) -> Result<Estimate, UncertaintyError> {
    combine(
        meters.map(|(value, abs_u_grams)| (1, Estimate { value, abs_u_grams })),
        "the sum of the readings",
    )
}

/// t(0.975, ν) for ν = 1 … 30 degrees of freedom: the two-sided 95 % quantile of Student's
/// t distribution (computed by integrating the density numerically; agrees with the printed
/// tables to the digits shown).
const STUDENT_T_975: [f64; 30] = [
    12.706, 4.303, 3.182, 2.776, 2.571, 2.447, 2.365, 2.306, 2.262, 2.228, 2.201, 2.179, 2.160,
    2.145, 2.131, 2.120, 2.110, 2.101, 2.093, 2.086, 2.080, 2.074, 2.069, 2.064, 2.060, 2.056,
    2.052, 2.048, 2.045, 2.042,
];

/// t(0.975, ν); beyond 30 degrees of freedom the value at 30, which is larger than the true
/// one (t falls towards 1.960 as ν grows), so the interval errs wide.
pub fn student_t_975(dof: usize) -> Option<f64> {
    (dof > 0).then(|| STUDENT_T_975[dof.min(30) - 1])
}

/// The mean of replicate measurements and its expanded uncertainty at 95 %:
/// U = t(0.975, n − 1) · s / √n, s the sample standard deviation. `None` below two values (one
/// value has no spread) or for a value that is not finite.
pub fn replicate_mean(values: &[f64]) -> Option<(f64, f64)> {
    let n = values.len();
    if n < 2 || values.iter().any(|v| !v.is_finite()) {
        return None;
    }
    let mean = values.iter().map(|v| v / n as f64).sum::<f64>();
    let s = (values.iter().map(|v| (v - mean).powi(2)).sum::<f64>() / (n - 1) as f64).sqrt();
    Some((mean, student_t_975(n - 1)? * s / (n as f64).sqrt()))
}

/// Whether a mass-balance term adds to or deducts from the result.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum TermSign {
    Adds,
    Deducts,
}

/// One term of a mass balance (injected, produced, leakage …) with its own uncertainty.
#[derive(Debug, Clone, PartialEq)]
pub struct Term {
    pub name: String,
    pub sign: TermSign,
    pub estimate: Estimate,
}

/// The net of a mass balance (stored = injected − produced − leakage …) with its uncertainty.
/// The terms' absolute uncertainties combine in quadrature whatever their sign: deducting an
/// uncertain term widens the interval, it never narrows it.
pub fn mass_balance(terms: &[Term]) -> Result<Estimate, UncertaintyError> {
    combine(
        terms.iter().map(|t| match t.sign {
            TermSign::Adds => (1, t.estimate),
            TermSign::Deducts => (-1, t.estimate),
        }),
        "the net of the mass balance",
    )
}

/// Signed exact sum of independent estimates, uncertainties in quadrature.
fn combine(
    parts: impl Iterator<Item = (i64, Estimate)>,
    of: &str,
) -> Result<Estimate, UncertaintyError> {
    let too_large = || UncertaintyError::TooLarge { of: of.to_string() };
    let mut grams = 0i64;
    let mut u2 = 0.0;
    for (sign, e) in parts {
        let g = e.value.grams().checked_mul(sign).ok_or_else(too_large)?;
        grams = grams.checked_add(g).ok_or_else(too_large)?;
        u2 += e.abs_u_grams * e.abs_u_grams;
    }
    Ok(Estimate {
        value: Mass::from_grams(grams),
        abs_u_grams: u2.sqrt(),
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    fn t(tonnes: i64) -> Mass {
        Mass::from_grams(tonnes * 1_000_000)
    }

    fn reading(meter: &str, tonnes: i64, rel_u: f64) -> MeteredMass {
        MeteredMass {
            meter: meter.into(),
            mass: t(tonnes),
            rel_u,
        }
    }

    fn close(a: f64, b: f64, tol: f64) -> bool {
        (a - b).abs() <= tol
    }

    #[test]
    fn product_of_flow_and_concentration() {
        // Computed (REFERENCES.md, IPCC 2006 Guidelines Vol. 1 Ch. 3 Approach 1, from memory):
        // ±0.5 % flow with ±0.3 % concentration → ±0.583 %.
        let u = product_rel_u(&[0.005, 0.003]).unwrap();
        assert!(close(100.0 * u, 0.583, 0.0005), "{u}");
        assert_eq!(u, (0.005f64.powi(2) + 0.003f64.powi(2)).sqrt());
    }

    #[test]
    fn sum_of_two_meters() {
        // Computed (REFERENCES.md, IPCC 2006 Guidelines Vol. 1 Ch. 3 Approach 1, from memory):
        // 600 kt ±1 % + 400 kt ±1.5 %, different meters → ±0.849 %.
        let s = sum_readings(&[
            reading("TF-I1", 600_000, 0.01),
            reading("TF-I2", 400_000, 0.015),
        ])
        .unwrap();
        assert_eq!(s.total.value(), t(1_000_000));
        let pct = s.total.rel_u_pct().unwrap();
        assert!(close(pct, 0.849, 0.0005), "{pct}");
        let recomputed = (6000.0f64.powi(2) + 6000.0f64.powi(2)).sqrt() / 1e6 * 100.0;
        assert!(close(pct, recomputed, 1e-12));
    }

    #[test]
    fn readings_of_one_meter_keep_its_relative_uncertainty() {
        // The correlated-meter rule: twelve monthly readings of one ±1 % meter are still ±1 %,
        // not ±1 %/√12 as independent readings would be.
        let readings: Vec<MeteredMass> = (1..=12)
            .map(|m| reading("TF-I1", 40_000 + 1000 * m, 0.01))
            .collect();
        let s = sum_readings(&readings).unwrap();
        assert_eq!(s.meters.len(), 1);
        assert_eq!(s.meters[0].readings, 12);
        assert!(close(s.total.rel_u().unwrap(), 0.01, 1e-15));
        assert!(close(s.meters[0].estimate.rel_u().unwrap(), 0.01, 1e-15));
    }

    #[test]
    fn meters_are_grouped_by_name_in_order() {
        let s = sum_readings(&[
            reading("TF-I2", 100, 0.02),
            reading("TF-I1", 300, 0.01),
            reading("TF-I2", 100, 0.02),
        ])
        .unwrap();
        let names: Vec<&str> = s.meters.iter().map(|m| m.meter.as_str()).collect();
        assert_eq!(names, ["TF-I1", "TF-I2"]);
        // TF-I2: 2 + 2 = 4 t linearly; TF-I1: 3 t; total √(9 + 16) = 5 t.
        assert!(close(s.meters[1].estimate.abs_u_grams(), 4e6, 1e-6));
        assert_eq!(s.total.abs_u(), t(5));
    }

    #[test]
    fn mass_balance_net_and_uncertainty() {
        // Net computed (REFERENCES.md, 40 CFR 98 Subpart RR eq. RR-11): injected 1000000,
        // produced 408000, surface leakage 150, injection-side leaks 50, production-side 80
        // → 591720 t, exactly in grams.
        let term = |name: &str, sign, tonnes, rel_u| Term {
            name: name.into(),
            sign,
            estimate: Estimate::relative(t(tonnes), rel_u).unwrap(),
        };
        let terms = [
            term("injected", TermSign::Adds, 1_000_000, 0.01),
            term("produced", TermSign::Deducts, 408_000, 0.02),
            term("leakage", TermSign::Deducts, 150, 0.5),
            term("equipment-leak injection", TermSign::Deducts, 50, 0.5),
            term("equipment-leak production", TermSign::Deducts, 80, 0.5),
        ];
        let net = mass_balance(&terms).unwrap();
        assert_eq!(net.value(), t(591_720));
        let u_t =
            (10_000f64.powi(2) + 8_160f64.powi(2) + 75f64.powi(2) + 25f64.powi(2) + 40f64.powi(2))
                .sqrt();
        assert!(close(net.abs_u_grams() / 1e6, u_t, 1e-6));
        // Deducting widens: the net's relative uncertainty exceeds the injected term's.
        assert!(net.rel_u().unwrap() > 0.01);
    }

    #[test]
    fn zero_net_has_no_percentage() {
        let e = Estimate::relative(t(10), 0.01).unwrap();
        let net = mass_balance(&[
            Term {
                name: "injected".into(),
                sign: TermSign::Adds,
                estimate: e,
            },
            Term {
                name: "produced".into(),
                sign: TermSign::Deducts,
                estimate: e,
            },
        ])
        .unwrap();
        assert_eq!(net.value(), Mass::ZERO);
        assert_eq!(net.rel_u(), None);
        assert!(net.abs_u_grams() > 0.0);
    }

    #[test]
    fn refusals_name_the_field_and_value() {
        let e = sum_readings(&[reading("TF-I1", 1, -0.01)]).unwrap_err();
        assert_eq!(
            e.to_string(),
            "rel_u of reading 1 (meter \"TF-I1\") is -0.01: must be a finite number ≥ 0"
        );
        let e = sum_readings(&[reading(" ", 1, 0.01)]).unwrap_err();
        assert_eq!(e.to_string(), "meter of reading 1 is empty");
        let e = sum_readings(&[reading("M", -1, 0.01)]).unwrap_err();
        assert!(e.to_string().contains("-1.000000 t"), "{e}");
        let e = product_rel_u(&[0.01, f64::NAN]).unwrap_err();
        assert_eq!(
            e.to_string(),
            "rel_u of factor 2 is NaN: must be a finite number ≥ 0"
        );
        let big = MeteredMass {
            meter: "M".into(),
            mass: Mass::from_grams(i64::MAX),
            rel_u: 0.0,
        };
        let e = sum_readings(&[big.clone(), big]).unwrap_err();
        assert_eq!(
            e.to_string(),
            "the total of meter \"M\" is too large for the ledger"
        );
    }

    #[test]
    fn three_replicates_take_t_for_two_degrees_of_freedom() {
        // 0.10, 0.12, 0.14: mean 0.12, s = √((0.02² + 0 + 0.02²)/2) = 0.02,
        // U = t(0.975, 2)·s/√3 = 4.303 × 0.02 / 1.7321 = 0.049687.
        let (mean, u) = replicate_mean(&[0.10, 0.12, 0.14]).unwrap();
        assert!(close(mean, 0.12, 1e-15));
        assert!(close(u, 4.303 * 0.02 / 3f64.sqrt(), 1e-12), "{u}");
        assert_eq!(replicate_mean(&[0.1]), None);
        assert_eq!(replicate_mean(&[0.1, f64::NAN]), None);
        assert_eq!(student_t_975(0), None);
        // Computed (REFERENCES.md, Student t quantiles, computed): ν = 1 → 12.706, ν = 30 → 2.042,
        // and beyond 30 the value at 30, never the smaller true one.
        assert_eq!(student_t_975(1), Some(12.706));
        assert_eq!(student_t_975(30), Some(2.042));
        assert_eq!(student_t_975(200), Some(2.042));
    }

    proptest::proptest! {
        #[test]
        fn sums_are_exact_and_never_panic(
            rs in proptest::collection::vec(
                (0usize..3, 0i64..1_000_000_000_000_000, -1.0f64..1.0), 0..20)
        ) {
            let readings: Vec<MeteredMass> = rs
                .iter()
                .map(|&(m, g, u)| MeteredMass {
                    meter: format!("M{m}"),
                    mass: Mass::from_grams(g),
                    rel_u: u,
                })
                .collect();
            match sum_readings(&readings) {
                Ok(s) => {
                    let exact: i64 = rs.iter().map(|r| r.1).sum();
                    proptest::prop_assert_eq!(s.total.value().grams(), exact);
                    let per_meter: Mass = s.meters.iter().map(|m| m.estimate.value()).sum();
                    proptest::prop_assert_eq!(per_meter, s.total.value());
                    // Quadrature over meters never exceeds their linear sum.
                    let linear: f64 = s.meters.iter().map(|m| m.estimate.abs_u_grams()).sum();
                    proptest::prop_assert!(s.total.abs_u_grams() <= linear * (1.0 + 1e-12));
                }
                Err(e) => proptest::prop_assert!(
                    matches!(e, UncertaintyError::RelU { .. }),
                    "{}", e
                ),
            }
        }
    }
}
