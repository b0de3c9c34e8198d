//! The coefficient table arranged for fast evaluation, worked out and checked when compiling.
//!
//! Exponents of τ are whole numbers of quarters, so τ^t is a table entry times a root of τ.
//! Terms that share their δ-dependence (the same d and c, or the same d, α and ε) differ only in
//! their τ-dependence, so an isotherm sums them once and each density evaluation pays for one
//! "shape" instead of several terms: 21 shapes for the 34 terms of POWER, 3 for the 5 of
//! GAUSSIAN. Every exponential of (δ − 1)² has a coefficient that is a whole multiple of one
//! unit, so one exponential and its powers serve them all. The assertions below make any table
//! that breaks these assumptions a compile error, so indexing cannot fail at run time.

use super::coefficients::{GAUSSIAN, NON_ANALYTIC, POWER};

/// Largest power of δ in `POWER` and `GAUSSIAN` (as d or c): the size of the δ-power table.
pub(super) const MAX_DELTA_POWER: usize = 10;
/// Largest c in `POWER`, the number of distinct exponentials exp(−δ^c).
pub(super) const MAX_C: usize = 6;
/// Largest whole power of τ in the tables: the size of the τ-power table.
pub(super) const MAX_TAU_POWER: usize = 28;

/// The τ exponent of a term in quarters.
const fn quarters(t: f64) -> usize {
    let q = t * 4.0;
    assert!(q >= 0.0 && q == (q as usize) as f64 && q as usize / 4 <= MAX_TAU_POWER);
    q as usize
}

/// τ exponents of `POWER`, in quarters.
pub(super) const POWER_TAU_QUARTERS: [usize; POWER.len()] = {
    let mut q = [0; POWER.len()];
    let mut i = 0;
    while i < q.len() {
        let (d, c) = (POWER[i].d as usize, POWER[i].c as usize);
        assert!(d <= MAX_DELTA_POWER && c <= MAX_C && MAX_C <= MAX_DELTA_POWER);
        q[i] = quarters(POWER[i].t);
        i += 1;
    }
    q
};

/// τ exponents of `GAUSSIAN`, in quarters.
pub(super) const GAUSSIAN_TAU_QUARTERS: [usize; GAUSSIAN.len()] = {
    let mut q = [0; GAUSSIAN.len()];
    let mut i = 0;
    while i < q.len() {
        assert!(GAUSSIAN[i].d as usize <= MAX_DELTA_POWER);
        q[i] = quarters(GAUSSIAN[i].t);
        i += 1;
    }
    q
};

/// a − 1 of each term of `NON_ANALYTIC` in halves: every a is a multiple of ½, so q^(a − 1)
/// needs no general power.
pub(super) const NON_ANALYTIC_HALVES: [i32; NON_ANALYTIC.len()] = {
    let mut halves = [0; NON_ANALYTIC.len()];
    let mut i = 0;
    while i < halves.len() {
        let h = 2.0 * (NON_ANALYTIC[i].a - 1.0);
        assert!(h >= 0.0 && h == (h as i32) as f64);
        halves[i] = h as i32;
        i += 1;
    }
    halves
};

/// Every exponential of (δ − 1)² in the equation, the Gaussian exp(−α(δ − ε)²) (all with ε = 1)
/// and the non-analytic exp(−C(δ − 1)²), has α or C a whole multiple of this.
pub(super) const BELL_UNIT: f64 = 2.5;
/// Largest multiple of [`BELL_UNIT`] in the tables.
pub(super) const MAX_BELL_MULTIPLE: usize = 10;

const fn bell_multiple(k: f64) -> usize {
    let m = k / BELL_UNIT;
    assert!(m >= 1.0 && m == (m as usize) as f64 && m as usize <= MAX_BELL_MULTIPLE);
    m as usize
}

/// α / [`BELL_UNIT`] of each term of `GAUSSIAN`.
pub(super) const GAUSSIAN_BELL_MULTIPLES: [usize; GAUSSIAN.len()] = {
    let mut m = [0; GAUSSIAN.len()];
    let mut i = 0;
    while i < m.len() {
        assert!(GAUSSIAN[i].epsilon == 1.0);
        m[i] = bell_multiple(GAUSSIAN[i].alpha);
        i += 1;
    }
    m
};

/// C / [`BELL_UNIT`] of each term of `NON_ANALYTIC`.
pub(super) const NON_ANALYTIC_BELL_MULTIPLES: [usize; NON_ANALYTIC.len()] = {
    let mut m = [0; NON_ANALYTIC.len()];
    let mut i = 0;
    while i < m.len() {
        m[i] = bell_multiple(NON_ANALYTIC[i].big_c);
        i += 1;
    }
    m
};

/// What fixes a term's δ-dependence: (d, c) in POWER, (d, α, ε) in GAUSSIAN.
type ShapeKey = [f64; 3];

const POWER_KEYS: [ShapeKey; POWER.len()] = {
    let mut keys = [[0.0; 3]; POWER.len()];
    let mut i = 0;
    while i < keys.len() {
        keys[i] = [POWER[i].d as f64, POWER[i].c as f64, 0.0];
        i += 1;
    }
    keys
};

const GAUSSIAN_KEYS: [ShapeKey; GAUSSIAN.len()] = {
    let mut keys = [[0.0; 3]; GAUSSIAN.len()];
    let mut i = 0;
    while i < keys.len() {
        keys[i] = [GAUSSIAN[i].d as f64, GAUSSIAN[i].alpha, GAUSSIAN[i].epsilon];
        i += 1;
    }
    keys
};

const fn same(a: ShapeKey, b: ShapeKey) -> bool {
    a[0] == b[0] && a[1] == b[1] && a[2] == b[2]
}

/// For each term, the number of its shape; shapes are numbered in order of first appearance.
const fn shape_of<const N: usize>(keys: &[ShapeKey; N]) -> [usize; N] {
    let mut shape = [0; N];
    let mut count = 0;
    let mut i = 0;
    while i < N {
        let mut j = 0;
        while j < i && !same(keys[j], keys[i]) {
            j += 1;
        }
        if j == i {
            shape[i] = count;
            count += 1;
        } else {
            shape[i] = shape[j];
        }
        i += 1;
    }
    shape
}

const fn shape_count(shape_of: &[usize]) -> usize {
    let mut count = 0;
    let mut i = 0;
    while i < shape_of.len() {
        if shape_of[i] + 1 > count {
            count = shape_of[i] + 1;
        }
        i += 1;
    }
    count
}

/// For each shape, the first term that has it (to read d, c or α, ε from).
const fn first_of_shape<const M: usize>(shape_of: &[usize]) -> [usize; M] {
    let mut first = [0; M];
    let mut i = shape_of.len();
    while i > 0 {
        i -= 1;
        first[shape_of[i]] = i;
    }
    first
}

/// Shape of each term of `POWER`.
pub(super) const POWER_SHAPE_OF: [usize; POWER.len()] = shape_of(&POWER_KEYS);
/// For each shape of `POWER`, a term that has it.
pub(super) const POWER_SHAPES: [usize; shape_count(&POWER_SHAPE_OF)] =
    first_of_shape(&POWER_SHAPE_OF);
/// d of each shape of `POWER`.
pub(super) const POWER_SHAPE_D: [usize; POWER_SHAPES.len()] = {
    let mut d = [0; POWER_SHAPES.len()];
    let mut k = 0;
    while k < d.len() {
        d[k] = POWER[POWER_SHAPES[k]].d as usize;
        k += 1;
    }
    d
};
/// The shapes of `POWER` come in order of c (checked here): those with exponential exp(−δ^c)
/// are `POWER_C_START[c]..POWER_C_START[c + 1]`.
pub(super) const POWER_C_START: [usize; MAX_C + 2] = {
    let mut start = [POWER_SHAPES.len(); MAX_C + 2];
    let mut k = POWER_SHAPES.len();
    while k > 0 {
        k -= 1;
        let c = POWER[POWER_SHAPES[k]].c as usize;
        assert!(k == 0 || POWER[POWER_SHAPES[k - 1]].c as usize <= c);
        start[c] = k;
    }
    // A c with no shape starts where the next one does.
    let mut c = MAX_C + 1;
    while c > 0 {
        c -= 1;
        if start[c] > start[c + 1] {
            start[c] = start[c + 1];
        }
    }
    start
};
/// Shape of each term of `GAUSSIAN`.
pub(super) const GAUSSIAN_SHAPE_OF: [usize; GAUSSIAN.len()] = shape_of(&GAUSSIAN_KEYS);
/// For each shape of `GAUSSIAN`, a term that has it.
pub(super) const GAUSSIAN_SHAPES: [usize; shape_count(&GAUSSIAN_SHAPE_OF)] =
    first_of_shape(&GAUSSIAN_SHAPE_OF);
