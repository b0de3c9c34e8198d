//! The residual Helmholtz energy φr(δ, τ) of the Span–Wagner (1996) equation and the pressure it
//! implies, p = ρ R T (1 + δ φr_δ).
//!
//! Every density solve runs at one temperature, so [`Isotherm`] works out the τ-dependent factors
//! once and each evaluation at a new density pays only for the δ-dependent ones.

use super::coefficients::{GAUSSIAN, MAX_DELTA_POWER, MAX_TAU_POWER, NON_ANALYTIC, POWER};
use super::constants::{CRITICAL_DENSITY_KG_PER_M3, CRITICAL_TEMPERATURE_K, SPECIFIC_GAS_CONSTANT};

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
pub struct PressureSlope {
    /// p, Pa.
    pub pressure: f64,
    /// ∂p/∂ρ at constant T, Pa m³/kg; positive wherever the fluid is mechanically stable.
    pub slope: f64,
}

/// The equation along one temperature, with the τ-dependent factors worked out.
pub struct Isotherm {
    /// R T, J/kg.
    rt: f64,
    /// 1 − τ, the start of θ in the non-analytic terms.
    one_minus_tau: f64,
    /// n τ^t of each term in `POWER`.
    power: [f64; POWER.len()],
    /// n τ^t exp(−β(τ − γ)²) of each term in `GAUSSIAN`.
    gaussian: [f64; GAUSSIAN.len()],
    /// n exp(−D(τ − 1)²) of each term in `NON_ANALYTIC`.
    non_analytic: [f64; NON_ANALYTIC.len()],
}

impl Isotherm {
    pub fn new(temperature_k: f64) -> Self {
        NEWS.fetch_add(1, std::sync::atomic::Ordering::Relaxed);
        let tau = CRITICAL_TEMPERATURE_K / temperature_k;
        let mut whole = [1.0; MAX_TAU_POWER + 1];
        for k in 1..whole.len() {
            whole[k] = whole[k - 1] * tau;
        }
        let half = tau.sqrt();
        let quarter = half.sqrt();
        let roots = [1.0, quarter, half, half * quarter];
        // Exponents are whole multiples of ¼ (checked at compile time in `coefficients`).
        let tau_pow = |t: f64| {
            let quarters = (t * 4.0) as usize;
            whole[quarters / 4] * roots[quarters % 4]
        };
        Isotherm {
            rt: SPECIFIC_GAS_CONSTANT * temperature_k,
            one_minus_tau: 1.0 - tau,
            power: POWER.map(|term| term.n * tau_pow(term.t)),
            gaussian: GAUSSIAN.map(|term| {
                term.n * tau_pow(term.t) * (-term.beta * (tau - term.gamma).powi(2)).exp()
            }),
            non_analytic: NON_ANALYTIC
                .map(|term| term.n * (-term.big_d * (tau - 1.0).powi(2)).exp()),
        }
    }

    /// φr, δ φr_δ and δ² φr_δδ at reduced density `delta`.
    pub(super) fn residual(&self, delta: f64) -> Residual {
        let mut delta_pow = [1.0; MAX_DELTA_POWER + 1];
        for k in 1..delta_pow.len() {
            delta_pow[k] = delta_pow[k - 1] * delta;
        }
        // exp(−δ^c) for each c; c = 0 (the polynomial terms) gets no exponential.
        let mut exp_neg = [1.0; MAX_DELTA_POWER + 1];
        for c in 1..exp_neg.len() {
            exp_neg[c] = (-delta_pow[c]).exp();
        }
        let mut sum = Residual {
            phi: 0.0,
            delta_phi_d: 0.0,
            delta2_phi_dd: 0.0,
        };

        // f = a δ^d exp(−δ^c): with u = d − c δ^c, δ f' = f u and δ² f'' = f (u² − d − c(c−1) δ^c).
        for (term, a) in POWER.iter().zip(&self.power) {
            let f = a * delta_pow[term.d] * exp_neg[term.c];
            let (d, c) = (term.d as f64, term.c as f64);
            let c_delta_c = c * delta_pow[term.c];
            let u = d - c_delta_c;
            sum.phi += f;
            sum.delta_phi_d += f * u;
            sum.delta2_phi_dd += f * (u * u - d - (c - 1.0) * c_delta_c);
        }

        // f = a δ^d exp(−α(δ − ε)²): with u = d − 2αδ(δ − ε), δ f' = f u, δ² f'' = f (u² − d − 2αδ²).
        for (term, a) in GAUSSIAN.iter().zip(&self.gaussian) {
            let offset = delta - term.epsilon;
            let f = a * delta_pow[term.d] * (-term.alpha * offset * offset).exp();
            let d = term.d as f64;
            let u = d - 2.0 * term.alpha * delta * offset;
            sum.phi += f;
            sum.delta_phi_d += f * u;
            sum.delta2_phi_dd += f * (u * u - d - 2.0 * term.alpha * delta * delta);
        }

        let offset = delta - 1.0;
        let q = offset * offset;
        for (term, n_psi_tau) in NON_ANALYTIC.iter().zip(&self.non_analytic) {
            // All powers of q below have positive exponents, so they are finite (zero) at δ = 1.
            let s = q.powf(0.5 / term.beta - 1.0);
            let q_a1 = q.powf(term.a - 1.0);
            let theta = self.one_minus_tau + term.big_a * q * s;
            let big_delta = theta * theta + term.big_b * q * q_a1;
            // Δ_δ = (δ − 1) g; Δ_δδ follows from differentiating (δ − 1) g once more.
            let g = 2.0 * term.big_a * theta / term.beta * s + 2.0 * term.big_b * term.a * q_a1;
            let big_delta_d = offset * g;
            let big_delta_dd = g
                + 4.0 * term.big_b * term.a * (term.a - 1.0) * q_a1
                + 2.0 * (term.big_a / term.beta).powi(2) * q * s * s
                + 4.0 * term.big_a * theta / term.beta * (0.5 / term.beta - 1.0) * s;
            let db = big_delta.powf(term.b);
            // Δ = 0 only at δ = τ = 1, where Δ_δ and Δ_δδ vanish faster than Δ^(b−1) and
            // Δ^(b−2) grow: both derivatives of Δ^b tend to 0 there.
            let (db_d, db_dd) = if big_delta > 0.0 {
                let db_1 = db / big_delta;
                (
                    term.b * db_1 * big_delta_d,
                    term.b
                        * (db_1 * big_delta_dd
                            + (term.b - 1.0) * db_1 / big_delta * big_delta_d * big_delta_d),
                )
            } else {
                (0.0, 0.0)
            };
            // ψ already carries n exp(−D(τ − 1)²).
            let psi = n_psi_tau * (-term.big_c * q).exp();
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
    pub fn pressure(&self, density_kg_per_m3: f64) -> PressureSlope {
        EVALS.fetch_add(1, std::sync::atomic::Ordering::Relaxed);
        let r = self.residual(density_kg_per_m3 / CRITICAL_DENSITY_KG_PER_M3);
        PressureSlope {
            pressure: density_kg_per_m3 * self.rt * (1.0 + r.delta_phi_d),
            slope: self.rt * (1.0 + 2.0 * r.delta_phi_d + r.delta2_phi_dd),
        }
    }
}

pub static EVALS: std::sync::atomic::AtomicUsize = std::sync::atomic::AtomicUsize::new(0);
pub static NEWS: std::sync::atomic::AtomicUsize = std::sync::atomic::AtomicUsize::new(0);
