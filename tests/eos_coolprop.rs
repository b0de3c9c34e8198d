//! Independent check of the Span–Wagner density against CoolProp (a thermophysical property
//! library that implements the same equation), over states across the whole range: gas, liquid,
//! supercritical, near the critical point, at high pressure and on both sides of the saturation
//! line. Needs python3 with CoolProp (`pip install CoolProp`); without it the test fails under
//! `CI=true` and says it was skipped elsewhere.

mod common;

use std::io::Write;
use std::process::{Command, Stdio};

use sinkbook::eos::{EosError, density};

/// Tolerance on density: REFERENCES.md, "CO2 density", 0.01 %.
const TOLERANCE: f64 = 1e-4;

/// Answers one request per line: `D T p` gives the density at T and p; `S T f` gives the
/// pressure f times the saturation pressure at T and the density there. Each answer is
/// `p ρ` or `ERR` and CoolProp's message.
const SCRIPT: &str = r#"
import sys
from CoolProp.CoolProp import PropsSI
for line in sys.stdin:
    kind, t, x = line.split()
    t, x = float(t), float(x)
    try:
        p = x if kind == "D" else x * PropsSI("P", "T", t, "Q", 0, "CO2")
        print(repr(p), repr(PropsSI("D", "T", t, "P", p, "CO2")))
    except Exception as e:
        print("ERR", str(e).replace("\n", " ")[:160])
    sys.stdout.flush()
"#;

/// One state to compare: a plain (T, p), or T and a factor on CoolProp's saturation pressure.
#[derive(Clone, Copy)]
enum Request {
    Plain(f64, f64),
    Saturation(f64, f64),
}

fn grid() -> Vec<Request> {
    let mut requests = Vec::new();
    // A broad grid: temperatures from the triple point to 1100 K, pressures from 1 kPa to
    // 800 MPa, log-spaced (states above the melting line are refused by both sides).
    let temperatures = [
        216.6, 218.0, 220.0, 230.0, 240.0, 250.0, 260.0, 270.0, 280.0, 290.0, 295.0, 300.0, 302.0,
        303.5, 304.0, 305.0, 307.0, 310.0, 315.0, 320.0, 330.0, 350.0, 375.0, 400.0, 450.0, 500.0,
        600.0, 700.0, 800.0, 900.0, 1000.0, 1100.0,
    ];
    for &t in &temperatures {
        for i in 0..=40 {
            let p = 1e3 * (800e6_f64 / 1e3).powf(f64::from(i) / 40.0);
            requests.push(Request::Plain(t, p));
        }
    }
    // Pipelines, wellheads and reservoirs: 280–400 K, 1–30 MPa, where the fluid turns from gas
    // through liquid to dense supercritical.
    for i in 0..=24 {
        for j in 1..=30 {
            requests.push(Request::Plain(
                280.0 + 5.0 * f64::from(i),
                1e6 * f64::from(j),
            ));
        }
    }
    // Near the critical point (304.1282 K, 7.3773 MPa), on both sides in T and p.
    for &t in &[
        304.0, 304.1, 304.12, 304.127, 304.1282, 304.13, 304.15, 304.2, 304.5, 305.0, 306.0,
    ] {
        for &f in &[
            0.9, 0.97, 0.99, 0.995, 0.999, 0.9999, 1.0, 1.0001, 1.001, 1.005, 1.01, 1.03, 1.1,
        ] {
            requests.push(Request::Plain(t, 7.3773e6 * f));
        }
    }
    // Just below and just above the saturation pressure, where the phase flips.
    for &t in &[
        216.6, 217.0, 220.0, 230.0, 240.0, 250.0, 260.0, 270.0, 280.0, 290.0, 295.0, 300.0, 302.0,
        303.0, 303.5, 303.8, 304.0, 304.1,
    ] {
        for &f in &[1e-2, 6e-3, 4e-3, 1e-3, 1e-4, 1e-5, 1e-6] {
            requests.push(Request::Saturation(t, 1.0 - f));
            requests.push(Request::Saturation(t, 1.0 + f));
        }
    }
    requests
}

/// CoolProp's answer for each request, or `None` when python3 or CoolProp is missing.
fn coolprop(requests: &[Request]) -> Option<Vec<Result<(f64, f64), String>>> {
    let mut child = Command::new("python3")
        .args(["-c", SCRIPT])
        .stdin(Stdio::piped())
        .stdout(Stdio::piped())
        .stderr(Stdio::piped())
        .spawn()
        .ok()?;
    let mut input = String::new();
    for request in requests {
        match *request {
            Request::Plain(t, p) => input += &format!("D {t:?} {p:?}\n"),
            Request::Saturation(t, f) => input += &format!("S {t:?} {f:?}\n"),
        }
    }
    child.stdin.take()?.write_all(input.as_bytes()).ok()?;
    let output = child.wait_with_output().ok()?;
    if !output.status.success() {
        return None;
    }
    let text = String::from_utf8(output.stdout).ok()?;
    let answers: Vec<_> = text
        .lines()
        .map(|line| match line.split_once(' ') {
            Some(("ERR", message)) => Err(message.to_string()),
            Some((p, rho)) => Ok((p.parse().unwrap(), rho.parse().unwrap())),
            None => Err(line.to_string()),
        })
        .collect();
    (answers.len() == requests.len()).then_some(answers)
}

#[test]
fn densities_agree_with_coolprop() {
    let requests = grid();
    let Some(answers) = coolprop(&requests) else {
        common::tool_missing("python3 with CoolProp (pip install CoolProp==8.0.0)");
        return;
    };
    let (mut compared, mut both_refused) = (0, 0);
    let mut differences = Vec::new();
    let mut coolprop_cannot = Vec::new();
    let mut disagreements = Vec::new();
    for (request, answer) in requests.iter().zip(&answers) {
        let t = match *request {
            Request::Plain(t, _) | Request::Saturation(t, _) => t,
        };
        match answer {
            Ok((p, expected)) => match density(t, *p) {
                Ok(state) => {
                    compared += 1;
                    let diff = (state.density_kg_per_m3 / expected - 1.0).abs();
                    differences.push((diff, t, *p));
                    if diff > TOLERANCE {
                        disagreements.push(format!(
                            "{t} K, {p} Pa: {} kg/m³ ({:?}), CoolProp {expected}",
                            state.density_kg_per_m3, state.phase
                        ));
                    }
                }
                Err(e) => {
                    disagreements.push(format!("{t} K, {p} Pa: refused ({e}), CoolProp {expected}"))
                }
            },
            Err(message) => match *request {
                Request::Plain(_, p) => match density(t, p) {
                    Ok(state) => coolprop_cannot.push(format!(
                        "{t} K, {p} Pa: {} kg/m³; CoolProp: {message}",
                        state.density_kg_per_m3
                    )),
                    Err(EosError::Solid { .. }) if message.contains("Tmelt") => both_refused += 1,
                    Err(e) => coolprop_cannot
                        .push(format!("{t} K, {p} Pa: refused ({e}); CoolProp: {message}")),
                },
                Request::Saturation(_, f) => coolprop_cannot.push(format!(
                    "{t} K, {f} × saturation pressure; CoolProp: {message}"
                )),
            },
        }
    }
    println!(
        "compared {compared} states with CoolProp, {both_refused} solid states refused by both"
    );
    differences.sort_by(|a, b| b.0.total_cmp(&a.0));
    for (diff, t, p) in differences.iter().take(3) {
        println!("relative difference {diff:.3e} at {t} K, {p} Pa");
    }
    for line in &coolprop_cannot {
        println!("CoolProp cannot solve: {line}");
    }
    assert!(
        disagreements.is_empty(),
        "{} disagreements:\n{}",
        disagreements.len(),
        disagreements.join("\n")
    );
}
