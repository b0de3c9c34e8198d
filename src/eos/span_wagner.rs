//! The residual Helmholtz energy φr(δ, τ) of the Span–Wagner (1996) equation and the pressure it
//! implies, p = ρ R T (1 + δ φr_δ).
//!
//! Every density solve runs at one temperature, so [`Isotherm`] works out the τ-dependent factors
//! once and each evaluation at a new density pays only for the δ-dependent ones.

use super::coefficients::{GAUSSIAN, NON_ANALYTIC, NonAnalyticTerm, POWER};
use super::constants::{CRITICAL_DENSITY_KG_PER_M3, CRITICAL_TEMPERATURE_K, SPECIFIC_GAS_CONSTANT};
use super::table_layout::{
    BELL_UNIT, GAUSSIAN_BELL_MULTIPLES, GAUSSIAN_SHAPE_OF, GAUSSIAN_SHAPES, GAUSSIAN_TAU_QUARTERS,
    MAX_BELL_MULTIPLE, MAX_C, MAX_DELTA_POWER, MAX_TAU_POWER, NON_ANALYTIC_BELL_MULTIPLES,
    NON_ANALYTIC_HALVES, POWER_C_START, POWER_SHAPE_D, POWER_SHAPE_OF, POWER_SHAPES,
    POWER_TAU_QUARTERS,
};

/// φr and its δ-derivatives at one state, scaled the way the pressure uses them.
#[derive(Debug, Clone, Copy)]
pub(super) struct Residual {
    /// φr.
    pub phi: f64,
    /// δ ∂φr/∂δ.
    pub delta_phi_d: f64,
    /// δ² ∂²φr/∂δ².
    pub delta2_phi_dd: f64,
}

/// Pressure and its slope along an isotherm.
#[derive(Debug, Clone, Copy)]
pub(super) struct PressureSlope {
    /// p, Pa.
    pub pressure: f64,
    /// ∂p/∂ρ at constant T, Pa m³/kg; positive wherever the fluid is mechanically stable.
    pub slope: f64,
}

/// The equation along one temperature, with the τ-dependent factors worked out.
pub(super) struct Isotherm {
    /// R T, J/kg.
    rt: f64,
    /// 1 − τ, the start of θ in the non-analytic terms.
    one_minus_tau: f64,
    /// For each shape of `POWER`, a = Σ n τ^t over its terms, with a d and a d².
    power: [[f64; 3]; POWER_SHAPES.len()],
    /// Σ n τ^t exp(−β(τ − γ)²) over the terms of each shape of `GAUSSIAN`.
    gaussian: [f64; GAUSSIAN_SHAPES.len()],
    /// n exp(−D(τ − 1)²) of each term in `NON_ANALYTIC`.
    non_analytic: [f64; NON_ANALYTIC.len()],
}

/// The value computed for the previous table row, reused when the next row repeats the
/// parameters it depends on (rows 36–37 share β and γ; rows 40–42 share β and D, rows 40–41
/// all but n and b): exponentials and powers are the bulk of an evaluation's cost.
fn reuse<K: PartialEq, V: Copy>(
    last: &mut Option<(K, V)>,
    key: K,
    compute: impl FnOnce() -> V,
) -> V {
    match last {
        Some((k, v)) if *k == key => *v,
        _ => {
            let v = compute();
            *last = Some((key, v));
            v
        }
    }
}

/// x⁰, x¹, … x^(N−1). Each entry is the product of two earlier ones of about half its exponent,
/// so the chain of dependent multiplications is short.
fn powers<const N: usize>(x: f64) -> [f64; N] {
    const { assert!(N >= 2) };
    let mut pow = [1.0; N];
    pow[1] = x;
    for k in 2..N {
        pow[k] = pow[k / 2] * pow[k.div_ceil(2)];
    }
    pow
}

/// Δ = θ² + B q^a of a non-analytic term and what its derivatives need, at one density.
#[derive(Clone, Copy)]
struct Distance {
    big_delta: f64,
    ln_big_delta: f64,
    /// ∂Δ/∂δ.
    d: f64,
    /// ∂²Δ/∂δ².
    dd: f64,
}

impl Distance {
    /// With `offset` = δ − 1, q = offset², `s` = q^(1/(2β) − 1) and `q_a1` = q^(a − 1). Every
    /// power of q here has a positive exponent, so all are finite (zero) at δ = 1.
    fn new(term: &NonAnalyticTerm, one_minus_tau: f64, offset: f64, s: f64, q_a1: f64) -> Self {
        let q = offset * offset;
        let (a, beta, big_a, big_b) = (term.a, term.beta, term.big_a, term.big_b);
        let theta = one_minus_tau + big_a * q * s;
        let big_delta = theta * theta + big_b * q * q_a1;
        // Δ_δ = (δ − 1) g; Δ_δδ follows from differentiating (δ − 1) g once more.
        let g = 2.0 * big_a * theta / beta * s + 2.0 * big_b * a * q_a1;
        let dd = g
            + 4.0 * big_b * a * (a - 1.0) * q_a1
            + 2.0 * (big_a / beta).powi(2) * q * s * s
            + 4.0 * big_a * theta / beta * (0.5 / beta - 1.0) * s;
        Distance {
            big_delta,
            ln_big_delta: big_delta.ln(),
            d: offset * g,
            dd,
        }
    }
}

impl Isotherm {
    pub(super) fn new(temperature_k: f64) -> Self {
        let tau = CRITICAL_TEMPERATURE_K / temperature_k;
        let whole = powers::<{ MAX_TAU_POWER + 1 }>(tau);
        let half = tau.sqrt();
        let quarter = half.sqrt();
        let roots = [1.0, quarter, half, half * quarter];
        let tau_pow = |quarters: usize| whole[quarters / 4] * roots[quarters % 4];

        let mut sums = [0.0; POWER_SHAPES.len()];
        for ((term, &q), &shape) in POWER.iter().zip(&POWER_TAU_QUARTERS).zip(&POWER_SHAPE_OF) {
            sums[shape] += term.n * tau_pow(q);
        }
        let mut power = [[0.0; 3]; POWER_SHAPES.len()];
        for ((out, a), &d) in power.iter_mut().zip(sums).zip(&POWER_SHAPE_D) {
            let d = d as f64;
            *out = [a, a * d, a * d * d];
        }
        let mut gaussian = [0.0; GAUSSIAN_SHAPES.len()];
        let mut last = None;
        for ((term, &q), &shape) in GAUSSIAN
            .iter()
            .zip(&GAUSSIAN_TAU_QUARTERS)
            .zip(&GAUSSIAN_SHAPE_OF)
        {
            let bell = reuse(&mut last, (term.beta, term.gamma), || {
                (-term.beta * (tau - term.gamma).powi(2)).exp()
            });
            gaussian[shape] += term.n * tau_pow(q) * bell;
        }
        let mut non_analytic = [0.0; NON_ANALYTIC.len()];
        let mut last = None;
        for (out, term) in non_analytic.iter_mut().zip(&NON_ANALYTIC) {
            *out = term.n
                * reuse(&mut last, term.big_d, || {
                    (-term.big_d * (tau - 1.0).powi(2)).exp()
                });
        }
        Isotherm {
            rt: SPECIFIC_GAS_CONSTANT * temperature_k,
            one_minus_tau: 1.0 - tau,
            power,
            gaussian,
            non_analytic,
        }
    }

    /// φr, δ φr_δ and δ² φr_δδ at reduced density `delta`.
    pub(super) fn residual(&self, delta: f64) -> Residual {
        let delta_pow = powers::<{ MAX_DELTA_POWER + 1 }>(delta);
        let mut sum = Residual {
            phi: 0.0,
            delta_phi_d: 0.0,
            delta2_phi_dd: 0.0,
        };

        // f = a δ^d exp(−δ^c). Shapes with the same c share exp(−δ^c), so sum Σ a δ^d, Σ d a δ^d
        // and Σ d² a δ^d per c first. With w = c δ^c and u = d − w: δ f' = f u and
        // δ² f'' = f (u² − d − (c − 1) w).
        for c in 0..=MAX_C {
            let (mut s0, mut s1, mut s2) = (0.0, 0.0, 0.0);
            for k in POWER_C_START[c]..POWER_C_START[c + 1] {
                let [a, ad, add] = self.power[k];
                let delta_d = delta_pow[POWER_SHAPE_D[k]];
                s0 += a * delta_d;
                s1 += ad * delta_d;
                s2 += add * delta_d;
            }
            // c = 0 marks the polynomial terms, which have no exponential.
            let e = if c == 0 { 1.0 } else { (-delta_pow[c]).exp() };
            let (c, w) = (c as f64, c as f64 * delta_pow[c]);
            sum.phi += e * s0;
            sum.delta_phi_d += e * (s1 - w * s0);
            sum.delta2_phi_dd += e * (s2 - (2.0 * w + 1.0) * s1 + (w * w - (c - 1.0) * w) * s0);
        }

        // exp(−k (δ − 1)²) for every k that is a multiple of the bell unit.
        let offset = delta - 1.0;
        let q = offset * offset;
        let bells = powers::<{ MAX_BELL_MULTIPLE + 1 }>((-BELL_UNIT * q).exp());

        // f = a δ^d exp(−α(δ − ε)²): with u = d − 2αδ(δ − ε), δ f' = f u, δ² f'' = f (u² − d − 2αδ²).
        for (&first, a) in GAUSSIAN_SHAPES.iter().zip(&self.gaussian) {
            let term = &GAUSSIAN[first];
            let offset = delta - term.epsilon;
            let f = a * delta_pow[term.d as usize] * bells[GAUSSIAN_BELL_MULTIPLES[first]];
            let d = f64::from(term.d);
            let u = d - 2.0 * term.alpha * delta * offset;
            sum.phi += f;
            sum.delta_phi_d += f * u;
            sum.delta2_phi_dd += f * (u * u - d - 2.0 * term.alpha * delta * delta);
        }

        // f = n Δ^b δ ψ.
        let (mut last_s, mut last_distance) = (None, None);
        for (i, (term, n_psi_tau)) in NON_ANALYTIC.iter().zip(&self.non_analytic).enumerate() {
            let halves = NON_ANALYTIC_HALVES[i];
            let key = (term.a, term.beta, term.big_a, term.big_b);
            let dist = reuse(&mut last_distance, key, || {
                // q^(1/(2β) − 1) as exp(k ln q): a third cheaper than powf, and 0 at q = 0.
                let s = reuse(&mut last_s, term.beta, || {
                    ((0.5 / term.beta - 1.0) * q.ln()).exp()
                });
                // q^(a − 1) = q^(halves/2): a whole power, times √q for an odd count.
                let whole = q.powi(halves / 2);
                let q_a1 = if halves % 2 == 1 {
                    whole * q.sqrt()
                } else {
                    whole
                };
                Distance::new(term, self.one_minus_tau, offset, s, q_a1)
            });
            let db = (term.b * dist.ln_big_delta).exp();
            // Δ = 0 only at δ = τ = 1, where Δ_δ and Δ_δδ vanish faster than Δ^(b−1) and
            // Δ^(b−2) grow: both derivatives of Δ^b tend to 0 there.
            let (db_d, db_dd) = if dist.big_delta > 0.0 {
                let db_1 = db / dist.big_delta;
                let db_2 = db_1 / dist.big_delta;
                (
                    term.b * db_1 * dist.d,
                    term.b * (db_1 * dist.dd + (term.b - 1.0) * db_2 * dist.d * dist.d),
                )
            } else {
                (0.0, 0.0)
            };
            // ψ carries n exp(−D(τ − 1)²) from the isotherm.
            let psi = n_psi_tau * bells[NON_ANALYTIC_BELL_MULTIPLES[i]];
            let psi_d = -2.0 * term.big_c * offset * psi;
            let psi_dd = 2.0 * term.big_c * (2.0 * term.big_c * q - 1.0) * psi;
            let phi_d = db * (psi + delta * psi_d) + db_d * delta * psi;
            let phi_dd = db * (2.0 * psi_d + delta * psi_dd)
                + 2.0 * db_d * (psi + delta * psi_d)
                + db_dd * delta * psi;
            sum.phi += db * delta * psi;
            sum.delta_phi_d += delta * phi_d;
            sum.delta2_phi_dd += delta * delta * phi_dd;
        }
        sum
    }

    /// Pressure and ∂p/∂ρ at density `density_kg_per_m3`.
    pub(super) fn pressure(&self, density_kg_per_m3: f64) -> PressureSlope {
        let r = self.residual(density_kg_per_m3 / CRITICAL_DENSITY_KG_PER_M3);
        PressureSlope {
            pressure: density_kg_per_m3 * self.rt * (1.0 + r.delta_phi_d),
            slope: self.rt * (1.0 + 2.0 * r.delta_phi_d + r.delta2_phi_dd),
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::eos::constants::CRITICAL_PRESSURE_PA;

    #[test]
    fn pressure_at_the_critical_point() {
        // read: Span & Wagner 1996 constants, pc = 7.3773 MPa at Tc and ρc (to its 5 digits).
        let p = Isotherm::new(CRITICAL_TEMPERATURE_K).pressure(CRITICAL_DENSITY_KG_PER_M3);
        assert!(
            (p.pressure - CRITICAL_PRESSURE_PA).abs() < 50.0,
            "{}",
            p.pressure
        );
        // The critical isotherm is flat there.
        assert!(p.slope.abs() < 1e-3, "{}", p.slope);
    }

    #[test]
    fn derivatives_match_finite_differences() {
        // Central differences of φr and δ φr_δ in δ, across gas, liquid and the critical region
        // (where the non-analytic terms matter), but not at δ = 1 itself.
        for t in [
            220.0, 280.0, 300.0, 304.0, 304.1282, 304.2, 310.0, 400.0, 1000.0,
        ] {
            let isotherm = Isotherm::new(t);
            for delta in [0.01, 0.3, 0.8, 0.97, 0.999, 1.001, 1.03, 1.2, 1.8, 2.6, 3.5] {
                let h = 1e-6 * delta;
                let (lo, mid, hi) = (
                    isotherm.residual(delta - h),
                    isotherm.residual(delta),
                    isotherm.residual(delta + h),
                );
                let phi_d = (hi.phi - lo.phi) / (2.0 * h);
                let delta_phi_d_d = (hi.delta_phi_d - lo.delta_phi_d) / (2.0 * h);
                // δ²φ_δδ = δ (δφ_δ)' − δφ_δ.
                let delta2_phi_dd = delta * delta_phi_d_d - mid.delta_phi_d;
                let scale = 1.0 + mid.delta_phi_d.abs() + mid.delta2_phi_dd.abs();
                assert!(
                    (delta * phi_d - mid.delta_phi_d).abs() < 1e-7 * scale,
                    "{t} K, δ {delta}"
                );
                assert!(
                    (delta2_phi_dd - mid.delta2_phi_dd).abs() < 1e-6 * scale,
                    "{t} K, δ {delta}"
                );
            }
        }
    }

    #[test]
    fn finite_and_continuous_at_the_critical_point() {
        // At δ = τ = 1 the non-analytic terms have Δ = 0, where the derivative formulas hold
        // 0 × ∞; their limits are taken instead. Nearby values must tend to those.
        let isotherm = Isotherm::new(CRITICAL_TEMPERATURE_K);
        let at = isotherm.residual(1.0);
        assert!(at.phi.is_finite() && at.delta_phi_d.is_finite() && at.delta2_phi_dd.is_finite());
        for offset in [1e-4, 1e-6, 1e-9, -1e-9, -1e-6, -1e-4] {
            let near = isotherm.residual(1.0 + offset);
            let close = |a: f64, b: f64| (a - b).abs() < 1e3 * offset.abs() * (1.0 + a.abs());
            assert!(close(near.phi, at.phi), "{offset}");
            assert!(close(near.delta_phi_d, at.delta_phi_d), "{offset}");
            assert!(close(near.delta2_phi_dd, at.delta2_phi_dd), "{offset}");
        }
    }

    #[test]
    fn zero_density_limit_is_the_ideal_gas() {
        for t in [216.592, 300.0, 1100.0] {
            let isotherm = Isotherm::new(t);
            let r = isotherm.residual(1e-12);
            assert!(r.delta_phi_d.abs() < 1e-11 && r.delta2_phi_dd.abs() < 1e-11);
            let p = isotherm.pressure(1e-9);
            assert!((p.pressure / (1e-9 * SPECIFIC_GAS_CONSTANT * t) - 1.0).abs() < 1e-11);
        }
    }

    /// φr term by term, straight from the forms in the header of the transcribed table, with
    /// nothing shared or rearranged.
    fn plain_phi(delta: f64, tau: f64) -> f64 {
        let mut phi = 0.0;
        for term in &POWER {
            let e = if term.c == 0 {
                1.0
            } else {
                (-delta.powi(term.c as i32)).exp()
            };
            phi += term.n * delta.powi(term.d as i32) * tau.powf(term.t) * e;
        }
        for g in &GAUSSIAN {
            let bell = -g.alpha * (delta - g.epsilon).powi(2) - g.beta * (tau - g.gamma).powi(2);
            phi += g.n * delta.powi(g.d as i32) * tau.powf(g.t) * bell.exp();
        }
        for na in &NON_ANALYTIC {
            let q = (delta - 1.0).powi(2);
            let theta = (1.0 - tau) + na.big_a * q.powf(1.0 / (2.0 * na.beta));
            let big_delta = theta * theta + na.big_b * q.powf(na.a);
            let psi = (-na.big_c * q - na.big_d * (tau - 1.0).powi(2)).exp();
            phi += na.n * big_delta.powf(na.b) * delta * psi;
        }
        phi
    }

    #[test]
    fn rearranged_sum_equals_the_plain_one() {
        for t in [
            216.592, 250.0, 290.0, 304.0, 304.1282, 304.5, 330.0, 500.0, 1100.0,
        ] {
            let isotherm = Isotherm::new(t);
            for i in 1..=80 {
                let delta = 0.05 * f64::from(i);
                let plain = plain_phi(delta, CRITICAL_TEMPERATURE_K / t);
                let phi = isotherm.residual(delta).phi;
                assert!(
                    (phi - plain).abs() < 1e-12 * (1.0 + plain.abs()),
                    "{t} K, δ {delta}"
                );
            }
        }
    }

    #[test]
    fn each_term_counts() {
        // Every one of the 42 terms is evaluated: reference values of φr and its derivatives at
        // one state near the critical point, where all term groups contribute, computed with
        // CoolProp 8.0.0 (AbstractState alphar, dalphar_dDelta, d2alphar_dDelta2 at 304 K,
        // 480 kg/m³). CoolProp reduces by 10624.9063 mol/m³ (467.600001 kg/m³), so its δ is
        // taken as it reports it.
        let delta = 1.026_518_388_974_059_7;
        let r = Isotherm::new(304.0).residual(delta);
        let expected = [
            -1.002_235_880_295_69,
            -0.714_257_197_880_602,
            0.442_238_165_462_614,
        ];
        let got = [
            r.phi,
            r.delta_phi_d / delta,
            r.delta2_phi_dd / (delta * delta),
        ];
        for (g, e) in got.iter().zip(expected) {
            assert!((g - e).abs() < 1e-10 * e.abs().max(1.0), "{g} vs {e}");
        }
    }
}
