//! Coefficients of the residual part of the Span–Wagner (1996) equation, Table 31 of the paper.
//!
//! Kept as typed const tables so the compiler sees their sizes and exponents; a test checks them,
//! digit for digit, against the transcription `span-wagner-1996-co2-residual.tsv` beside this file.

/// A polynomial or exponential term (see [`POWER`]).
pub(super) struct PowerTerm {
    pub n: f64,
    pub d: u32,
    pub t: f64,
    pub c: u32,
}

/// A Gaussian bell-shaped term (see [`GAUSSIAN`]).
pub(super) struct GaussianTerm {
    pub n: f64,
    pub d: u32,
    pub t: f64,
    pub alpha: f64,
    pub beta: f64,
    pub gamma: f64,
    pub epsilon: f64,
}

/// A non-analytic term (see [`NON_ANALYTIC`]): with q = (δ − 1)²,
/// θ = (1 − τ) + A q^(1/(2β)), Δ = θ² + B q^a and ψ = exp(−C q − D (τ − 1)²).
pub(super) struct NonAnalyticTerm {
    pub n: f64,
    pub a: f64,
    pub b: f64,
    pub beta: f64,
    pub big_a: f64,
    pub big_b: f64,
    pub big_c: f64,
    pub big_d: f64,
}

/// Terms 1–34: n δ^d τ^t exp(−δ^c), with c = 0 for the seven polynomial terms 1–7.
#[rustfmt::skip]
pub(super) const POWER: [PowerTerm; 34] = [
    PowerTerm { n: 0.38856823203161, d: 1, t: 0.0, c: 0 },
    PowerTerm { n: 2.938547594274, d: 1, t: 0.75, c: 0 },
    PowerTerm { n: -5.5867188534934, d: 1, t: 1.0, c: 0 },
    PowerTerm { n: -0.76753199592477, d: 1, t: 2.0, c: 0 },
    PowerTerm { n: 0.31729005580416, d: 2, t: 0.75, c: 0 },
    PowerTerm { n: 0.54803315897767, d: 2, t: 2.0, c: 0 },
    PowerTerm { n: 0.12279411220335, d: 3, t: 0.75, c: 0 },
    PowerTerm { n: 2.165896154322, d: 1, t: 1.5, c: 1 },
    PowerTerm { n: 1.5841735109724, d: 2, t: 1.5, c: 1 },
    PowerTerm { n: -0.23132705405503, d: 4, t: 2.5, c: 1 },
    PowerTerm { n: 0.058116916431436, d: 5, t: 0.0, c: 1 },
    PowerTerm { n: -0.55369137205382, d: 5, t: 1.5, c: 1 },
    PowerTerm { n: 0.48946615909422, d: 5, t: 2.0, c: 1 },
    PowerTerm { n: -0.024275739843501, d: 6, t: 0.0, c: 1 },
    PowerTerm { n: 0.062494790501678, d: 6, t: 1.0, c: 1 },
    PowerTerm { n: -0.12175860225246, d: 6, t: 2.0, c: 1 },
    PowerTerm { n: -0.37055685270086, d: 1, t: 3.0, c: 2 },
    PowerTerm { n: -0.016775879700426, d: 1, t: 6.0, c: 2 },
    PowerTerm { n: -0.11960736637987, d: 4, t: 3.0, c: 2 },
    PowerTerm { n: -0.045619362508778, d: 4, t: 6.0, c: 2 },
    PowerTerm { n: 0.035612789270346, d: 4, t: 8.0, c: 2 },
    PowerTerm { n: -0.0074427727132052, d: 7, t: 6.0, c: 2 },
    PowerTerm { n: -0.0017395704902432, d: 8, t: 0.0, c: 2 },
    PowerTerm { n: -0.021810121289527, d: 2, t: 7.0, c: 3 },
    PowerTerm { n: 0.024332166559236, d: 3, t: 12.0, c: 3 },
    PowerTerm { n: -0.037440133423463, d: 3, t: 16.0, c: 3 },
    PowerTerm { n: 0.14338715756878, d: 5, t: 22.0, c: 4 },
    PowerTerm { n: -0.13491969083286, d: 5, t: 24.0, c: 4 },
    PowerTerm { n: -0.02315122505348, d: 6, t: 16.0, c: 4 },
    PowerTerm { n: 0.012363125492901, d: 7, t: 24.0, c: 4 },
    PowerTerm { n: 0.002105832197294, d: 8, t: 8.0, c: 4 },
    PowerTerm { n: -0.00033958519026368, d: 10, t: 2.0, c: 4 },
    PowerTerm { n: 0.0055993651771592, d: 4, t: 28.0, c: 5 },
    PowerTerm { n: -0.00030335118055646, d: 8, t: 14.0, c: 6 },
];

/// Terms 35–39: n δ^d τ^t exp(−α(δ − ε)² − β(τ − γ)²).
#[rustfmt::skip]
pub(super) const GAUSSIAN: [GaussianTerm; 5] = [
    GaussianTerm { n: -213.6548868832, d: 2, t: 1.0, alpha: 25.0, beta: 325.0, gamma: 1.16, epsilon: 1.0 },
    GaussianTerm { n: 26641.569149272, d: 2, t: 0.0, alpha: 25.0, beta: 300.0, gamma: 1.19, epsilon: 1.0 },
    GaussianTerm { n: -24027.212204557, d: 2, t: 1.0, alpha: 25.0, beta: 300.0, gamma: 1.19, epsilon: 1.0 },
    GaussianTerm { n: -283.41603423999, d: 3, t: 3.0, alpha: 15.0, beta: 275.0, gamma: 1.25, epsilon: 1.0 },
    GaussianTerm { n: 212.47284400179, d: 3, t: 3.0, alpha: 20.0, beta: 275.0, gamma: 1.22, epsilon: 1.0 },
];

/// Terms 40–42: n Δ^b δ ψ, the non-analytic terms that shape the critical region.
#[rustfmt::skip]
pub(super) const NON_ANALYTIC: [NonAnalyticTerm; 3] = [
    NonAnalyticTerm { n: -0.66642276540751, a: 3.5, b: 0.875, beta: 0.3, big_a: 0.7, big_b: 0.3, big_c: 10.0, big_d: 275.0 },
    NonAnalyticTerm { n: 0.72608632349897, a: 3.5, b: 0.925, beta: 0.3, big_a: 0.7, big_b: 0.3, big_c: 10.0, big_d: 275.0 },
    NonAnalyticTerm { n: 0.055068668612842, a: 3.0, b: 0.875, beta: 0.3, big_a: 0.7, big_b: 1.0, big_c: 12.5, big_d: 275.0 },
];

#[cfg(test)]
mod tests {
    use super::*;

    /// Splits the transcription into rows of named fields; empty cells stay empty.
    fn tsv_rows() -> Vec<Vec<(&'static str, &'static str)>> {
        let text = include_str!("span-wagner-1996-co2-residual.tsv");
        let mut lines = text.lines().filter(|line| !line.starts_with('#'));
        let header: Vec<&str> = lines.next().expect("header row").split('\t').collect();
        lines
            .map(|line| header.iter().copied().zip(line.split('\t')).collect())
            .collect()
    }

    fn number(row: &[(&str, &str)], column: &str) -> f64 {
        let cell = row
            .iter()
            .find(|(name, _)| *name == column)
            .map_or("", |c| c.1);
        cell.parse()
            .unwrap_or_else(|_| panic!("column {column}: {cell:?}"))
    }

    fn is_empty(row: &[(&str, &str)], column: &str) -> bool {
        row.iter()
            .find(|(name, _)| *name == column)
            .is_none_or(|c| c.1.is_empty())
    }

    #[test]
    fn const_tables_equal_the_transcribed_table() {
        // read: Span & Wagner 1996, Table 31, as transcribed in span-wagner-1996-co2-residual.tsv.
        let rows = tsv_rows();
        assert_eq!(
            rows.len(),
            POWER.len() + GAUSSIAN.len() + NON_ANALYTIC.len()
        );
        for (row, term) in rows.iter().zip(&POWER) {
            assert_eq!(number(row, "n"), term.n);
            assert_eq!(number(row, "d"), term.d as f64);
            assert_eq!(number(row, "t"), term.t);
            let c = if is_empty(row, "c") {
                0.0
            } else {
                number(row, "c")
            };
            assert_eq!(c, term.c as f64);
            assert!(is_empty(row, "alpha") && is_empty(row, "b"));
        }
        for (row, term) in rows[POWER.len()..].iter().zip(&GAUSSIAN) {
            assert_eq!(number(row, "n"), term.n);
            assert_eq!(number(row, "d"), term.d as f64);
            assert_eq!(number(row, "t"), term.t);
            assert_eq!(number(row, "alpha"), term.alpha);
            assert_eq!(number(row, "beta"), term.beta);
            assert_eq!(number(row, "gamma"), term.gamma);
            assert_eq!(number(row, "eps"), term.epsilon);
            assert!(is_empty(row, "c") && is_empty(row, "b"));
        }
        for (row, term) in rows[POWER.len() + GAUSSIAN.len()..]
            .iter()
            .zip(&NON_ANALYTIC)
        {
            assert_eq!(number(row, "n"), term.n);
            assert_eq!(number(row, "a"), term.a);
            assert_eq!(number(row, "b"), term.b);
            assert_eq!(number(row, "beta"), term.beta);
            assert_eq!(number(row, "A"), term.big_a);
            assert_eq!(number(row, "B"), term.big_b);
            assert_eq!(number(row, "C"), term.big_c);
            assert_eq!(number(row, "D"), term.big_d);
            assert!(is_empty(row, "d") && is_empty(row, "c"));
        }
        // The row numbers run 1..=42 in order, so no row was skipped or repeated.
        for (i, row) in rows.iter().enumerate() {
            assert_eq!(number(row, "i"), (i + 1) as f64);
        }
    }
}
