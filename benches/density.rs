//! Times Span–Wagner density evaluations against the ideal-gas formula over states met in CO2
//! transport and storage: pipelines, wellheads and reservoirs (280–400 K, 1–30 MPa) and the
//! standard conditions that volumes are quoted at. Run with `cargo bench --bench density`.

use std::hint::black_box;
use std::time::Instant;

use sinkbook::eos::{density, ideal_gas_density};

/// Evaluations per timed round of each function.
const N: usize = 1_000_000;
/// Rounds per function; the fastest is reported, the others having been slowed by whatever
/// else ran on the machine.
const ROUNDS: usize = 7;

/// A fixed spread of states: a grid over 280–400 K and 1–30 MPa, with every fourth state at a
/// standard reference condition (0 °C, 15 °C or 60 °F at 1 atm).
fn states() -> Vec<(f64, f64)> {
    const STANDARD: [(f64, f64); 3] = [
        (273.15, 101_325.0),
        (288.15, 101_325.0),
        (288.705_556, 101_325.0),
    ];
    let mut states = Vec::new();
    for i in 0..61_u32 {
        for j in 0..59_u32 {
            let t = 280.0 + 2.0 * f64::from(i);
            let p = 1e6 + 0.5e6 * f64::from(j);
            states.push((t, p));
            if (i * 59 + j) % 3 == 0 {
                states.push(STANDARD[((i + j) % 3) as usize]);
            }
        }
    }
    states
}

/// Runs `f` over the states, cycling until `N` calls, in each of `ROUNDS` rounds, and returns
/// nanoseconds per call in the fastest round.
fn time(states: &[(f64, f64)], f: impl Fn(f64, f64) -> f64) -> f64 {
    (0..ROUNDS)
        .map(|_| {
            let start = Instant::now();
            let mut sum = 0.0;
            for &(t, p) in states.iter().cycle().take(N) {
                sum += f(black_box(t), black_box(p));
            }
            black_box(sum);
            start.elapsed().as_secs_f64() * 1e9 / N as f64
        })
        .fold(f64::INFINITY, f64::min)
}

fn main() {
    let states = states();
    // Every state must solve: a refused state would make the timing meaningless.
    let refused = states
        .iter()
        .filter(|&&(t, p)| density(t, p).is_err())
        .count();
    assert_eq!(refused, 0, "states refused by the equation");

    let span_wagner = time(&states, |t, p| {
        density(t, p).map_or(f64::NAN, |s| s.density_kg_per_m3)
    });
    let ideal = time(&states, ideal_gas_density);
    println!(
        "{} states, best of {ROUNDS} rounds of {N} evaluations, one thread",
        states.len()
    );
    println!(
        "{:<14} {:>16} {:>12}",
        "function", "evaluations/s", "ns/eval"
    );
    for (name, ns) in [("Span–Wagner", span_wagner), ("ideal gas", ideal)] {
        println!("{name:<14} {:>16.0} {ns:>12.1}", 1e9 / ns);
    }
    println!(
        "Span–Wagner costs {:.0} ideal-gas evaluations",
        span_wagner / ideal
    );
}
