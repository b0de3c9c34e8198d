//! Mineralization and enhanced weathering end to end: the reference examples, the
//! three-end-member round trip through the command line, gross-to-net term by term, the route
//! tables, and every refused input.

mod common;

#[path = "rock/bad_input.rs"]
mod bad_input;
#[path = "rock/claims.rs"]
mod claims;
#[path = "rock/fixtures.rs"]
mod fixtures;
#[path = "rock/records.rs"]
mod records;

use common::Ledger;
use fixtures::*;
use serde_json::Value;
use sinkbook::accounting::weathering::Analysis;
use sinkbook::accounting::weathering::tau::tau;
use sinkbook::accounting::weathering::three_end_member::{EndMember, forward_model};

fn grams(v: &Value) -> i64 {
    (v.as_f64().unwrap() * 1e6).round() as i64
}

/// Refused: exit 1, one line on stderr containing `needle`, nothing on stdout, nothing written.
fn refused(l: &Ledger, project: &str, args: &[&str], needle: &str) {
    let before = l.count(project);
    let r = l.run(args);
    assert_eq!(r.code, 1, "{args:?} should be refused; stderr: {}", r.err);
    assert_eq!(r.err.trim_end().lines().count(), 1, "one line: {}", r.err);
    assert!(
        r.err.contains(needle),
        "{args:?}: expected {needle:?} in {:?}",
        r.err
    );
    assert!(r.out.is_empty(), "nothing on stdout: {}", r.out);
    assert_eq!(l.count(project), before, "{args:?} wrote an entry");
}

fn run_all(l: &Ledger, lines: &[&[&str]]) {
    for args in lines {
        l.ok(args);
    }
}

/// CIAAW 2021 abridged atomic weights (REFERENCES.md, read).
const CA: f64 = 40.078;

const MG: f64 = 24.305;

const NA: f64 = 22.990;

const K: f64 = 39.098;

const TI: f64 = 47.867;

const O: f64 = 15.999;

const M_CO2: f64 = 12.011 + 2.0 * O;

/// REFERENCES.md, tracer mass balance (structure of Matter et al. 2016, Science 352:1312 —
/// from memory): DIC_bg 1, DIC_inj 20, X 0.4, DIC_meas 1.2 → 0.925 (computed).
#[test]
fn references_md_tracer_example_through_the_ledger() {
    let l = crb();
    let out = tracer(&l, "CR-M1", "2025-05-10", "0.4", "1.2");
    assert!(out.contains("mineralized fraction 0.9250"), "{out}");
    let m = l.json(&["mineralization", "CRB"]);
    let s = &m["tracer_samples"][0];
    assert!((s["mineralized_fraction"].as_f64().unwrap() - 0.925).abs() < 1e-12);
    // Recomputed here from the formula: 1 − (1.2 − 0.6·1)/(0.4·20).
    assert!((1.0f64 - (1.2 - 0.6) / 8.0 - 0.925).abs() < 1e-12);
}

#[test]
fn campaigns_apply_to_co2_injected_before_them() {
    let l = crb();
    tracer(&l, "CR-M1", "2025-05-10", "0.4", "1.2"); // 0.925
    tracer(&l, "CR-M2", "2025-05-10", "0.5", "2.5"); // 1 − 2/10 = 0.8
    let m = l.json(&["mineralization", "CRB"]);
    let c = &m["campaigns"][0];
    assert!((c["mineralized_fraction_mean"].as_f64().unwrap() - 0.8625).abs() < 1e-12);
    let sd = ((0.0625f64.powi(2) * 2.0) / 1.0).sqrt();
    assert!((c["mineralized_fraction_sd"].as_f64().unwrap() - sd).abs() < 1e-12);
    let q = &m["mineralization"];
    // Q1 ended before the campaign: 300.5 t × 0.8625 = 259.18125 t → 259 181 250 g.
    assert_eq!(grams(&q[0]["mineralized_t"]), 259_181_250);
    assert_eq!(grams(&q[0]["still_dissolved_t"]), 300_500_000 - 259_181_250);
    assert_eq!(q[0]["campaign"], "2025-05-10");
    // Two wells: U = t(0.975, 1)·s/√2 = 12.706 × 0.088388 / 1.414214 = 0.794125 of fraction
    // (s = √(2 × 0.0625²) = 0.088388); on the 300.5 t it covers, ± 238.634 t mineralized.
    let u = 12.706 * sd / 2f64.sqrt();
    assert!((c["mineralized_fraction_u_95_pct"].as_f64().unwrap() - u).abs() < 1e-12);
    assert_eq!(
        grams(&q[0]["mineralized_u_t"]),
        (u * 300.5e6).round_ties_even() as i64
    );
    assert!(q[1]["mineralized_u_t"].is_null(), "not yet sampled");
    // Q2 ends after it: not yet sampled, neither mineralized nor dissolved.
    assert_eq!(grams(&q[1]["not_yet_sampled_t"]), 280_250_000);
    assert_eq!(grams(&q[1]["mineralized_t"]), 0);
    assert_eq!(q[2]["period"], "total");
    for row in q.as_array().unwrap() {
        let parts = grams(&row["mineralized_t"])
            + grams(&row["still_dissolved_t"])
            + grams(&row["not_yet_sampled_t"]);
        assert_eq!(parts, grams(&row["injected_t"]));
    }
    // A later campaign supersedes: all of Q1 and Q2 at its fraction.
    tracer(&l, "CR-M1", "2025-08-01", "0.4", "0.8"); // 1 − 0.2/8 = 0.975
    let m = l.json(&["balance", "CRB"]);
    assert_eq!(grams(&m[1]["mineralized_t"]), 273_243_750); // 280.25 × 0.975
    assert_eq!(m[1]["campaign"], "2025-08-01");
    crate::snapshot!("mineralization_tables", l.ok(&["mineralization", "CRB"]));
}

#[test]
fn out_of_range_fractions_are_findings_not_clamped() {
    let l = crb();
    let r = l.run(&[
        "record",
        "tracer-sample",
        "CRB",
        "--site",
        "CR-M1",
        "--date",
        "2025-05-10",
        "--tracer-ratio",
        "0.3",
        "--dic-sample",
        "9",
        "--dic-background",
        "1",
        "--dic-injectate",
        "20",
    ]);
    assert_eq!(r.code, 0);
    assert!(r.err.contains("outside [0, 1]"), "{}", r.err);
    let m = l.json(&["mineralization", "CRB"]);
    let f = m["tracer_samples"][0]["mineralized_fraction"]
        .as_f64()
        .unwrap();
    assert!(
        (f - (1.0 - (9.0 - 0.7) / 6.0)).abs() < 1e-12,
        "kept as computed: {f}"
    );
    assert_eq!(
        m["campaigns"][0]["applied"],
        "no: its mean is outside [0, 1]"
    );
    assert_eq!(grams(&m["mineralization"][0]["mineralized_t"]), 0);
    let text = l.ok(&["mineralization", "CRB"]);
    assert!(
        text.contains("Campaign of 2025-05-10 not applied"),
        "{text}"
    );
}

/// Derived in docs/mineralization.md (computed): 1000 t at 2 % → 20 % CO2 takes up
/// 1000·0.18/0.8 = 225 t, not the naive 180 t. And a REFERENCES.md cross-check: CaO carbonated
/// all the way to CaCO3 (0.43971 t CO2 per t, computed from CIAAW 2021 weights) takes up
/// M(CO2)/M(CaO) = 0.7848 t per t — the 0.785 = CO2/CaO of the Steinour formula (from memory).
#[test]
fn carbonation_uptake_counts_the_mass_co2_adds() {
    let l = plant();
    carbonate(&l, "1000 t", "2%", "20%", "2026-01-05", "2026-01-30");
    let b = &l.json(&["balance", "XSM", "--by", "month"])["balance"];
    assert_eq!(grams(&b[0]["stored_t"]), 225_000_000);
    assert!((b[0]["product_t"].as_f64().unwrap() - 1225.0).abs() < 1e-9);

    let caco3 = CA + 12.011 + 3.0 * O;
    let w = M_CO2 / caco3;
    assert!((w - 0.43971).abs() < 5e-6);
    carbonate(
        &l,
        "100 t",
        "0",
        &format!("{w:.12}"),
        "2026-02-02",
        "2026-02-06",
    );
    let b = &l.json(&["balance", "XSM", "--by", "month"])["balance"];
    let per_t = grams(&b[1]["stored_t"]) as f64 / 100e6;
    assert!((per_t - M_CO2 / (CA + O)).abs() < 2e-8, "{per_t}");
    assert!((per_t - 0.785).abs() < 5e-4);
    assert_eq!(
        grams(&b[1]["cumulative_stored_t"]),
        225_000_000 + grams(&b[1]["stored_t"])
    );
}

#[test]
fn carbonation_balance_by_period_and_no_uptake_finding() {
    let l = plant();
    // 31 days over January and February: split by days.
    carbonate(&l, "620 t", "1.2%", "14.5%", "2026-01-16", "2026-02-15");
    l.ok(&[
        "record",
        "emission",
        "XSM",
        "--site",
        "AS-P1",
        "--mass",
        "12.4 t",
        "--from",
        "2026-01-01",
        "--to",
        "2026-02-28",
        "--note",
        "reactor and grinding electricity",
    ]);
    let r = l.run(&[
        "record",
        "carbonation",
        "XSM",
        "--site",
        "AS-P1",
        "--mass",
        "100 t",
        "--co2-before",
        "20%",
        "--co2-after",
        "10%",
        "--from",
        "2026-03-02",
        "--to",
        "2026-03-03",
    ]);
    assert_eq!(r.code, 0);
    assert!(
        r.err.contains("no uptake: the solid lost 11.111 t CO2"),
        "{}",
        r.err
    );
    let b = &l.json(&["balance", "XSM", "--by", "month"])["balance"];
    let uptake: f64 = 620e6 * (0.145 - 0.012) / (1.0 - 0.145);
    let jan = grams(&b[0]["stored_t"]);
    let feb = grams(&b[1]["stored_t"]);
    assert_eq!(jan + feb, uptake.round() as i64);
    assert_eq!(jan, (uptake.round() * 16.0 / 31.0).round() as i64);
    assert_eq!(grams(&b[2]["stored_t"]), 0);
    assert_eq!(
        grams(&b[1]["net_t"]),
        feb - grams(&b[1]["emissions_t"]),
        "net = stored − emissions"
    );
    crate::snapshot!(
        "carbonation_balance",
        l.ok(&["balance", "XSM", "--by", "month"])
    );
}

/// Round trip of the three-end-member method (Suhrhoff et al. 2025, eq. S13a–e; the equations
/// as REFERENCES.md gives them, read in the authors' public code) through the command line: a
/// baseline, a spreading and a core from the forward model give the dissolved fraction back.
#[test]
fn three_end_member_round_trip_through_the_cli() {
    let l = evw_one_field();
    let w = l.json(&["weathering", "EVW"]);
    let row = &w[0];
    assert_eq!(row["field"], "EV-F1");
    let f = row["dissolved_fraction"].as_f64().unwrap();
    assert!((f - 0.3).abs() < 1e-7, "dissolved fraction {f}");
    // The cores hold what was spread: 25 kg/m³ × 0.2 m = 5 kg/m² = 50 t/ha.
    assert!((row["found_t_per_ha"].as_f64().unwrap() - 50.0).abs() < 1e-5);
    assert!((row["rate_t_per_ha"].as_f64().unwrap() - 50.0).abs() < 1e-12);

    // τ of the bulk soil against the mixture at application reads far less than 30 %.
    let t = l.json(&["weathering", "EVW", "--method", "tau"]);
    let bulk = t[0]["dissolved_fraction"].as_f64().unwrap();
    assert!(bulk > 0.0 && bulk < 0.1, "τ on the bulk mixture: {bulk}");
    // The same τ from the library on the composite cations (computed by hand here).
    let charge = |c: &[f64; 5]| 2.0 * (c[0] + c[1]) + c[2] + c[3];
    let parent = forward(APPLIED_KG_M3, 0.0);
    let weathered = forward(APPLIED_KG_M3, 0.3);
    let by_hand = tau(
        &Analysis::new(charge(&parent), parent[4]),
        &Analysis::new(charge(&weathered), weathered[4]),
    )
    .unwrap();
    assert!(
        (bulk + by_hand.tau).abs() < 1e-7,
        "{bulk} vs {}",
        -by_hand.tau
    );
}

/// REFERENCES.md, mass transfer coefficient (Brimhall & Dietrich 1987; Anderson, Dietrich &
/// Brimhall 2002; formula from memory): C_j,p 10, C_i,p 1, C_j,w 6, C_i,w 1.25 → τ = −0.52
/// (computed).
#[test]
fn references_md_tau_example() {
    let t = tau(&Analysis::new(10.0, 1.0), &Analysis::new(6.0, 1.25)).unwrap();
    assert!((t.tau + 0.52).abs() < 1e-12, "{}", t.tau);
    assert!(((6.0 / 10.0) * (1.0 / 1.25) - 1.0 + 0.52f64).abs() < 1e-12);
}

/// The deductions of the term-by-term check: strong acid, retention, secondary carbonate and
/// the ocean's efficiency.
const DEDUCTIONS: [&str; 8] = [
    "--strong-acid",
    "10%",
    "--cation-retention",
    "5%",
    "--secondary-carbonate",
    "20%",
    "--ocean-efficiency",
    "0.85",
];

/// Gross = f × applied × Σ(mol/t × z) × M_CO2, then strong acid, retention, secondary carbonate
/// (keeps half) and the ocean's share, each rounded once to grams; net less emissions. Checked
/// term by term against the command's output.
#[test]
fn gross_to_net_term_by_term() {
    let l = evw_one_field();
    l.ok(&[
        "record",
        "emission",
        "EVW",
        "--site",
        "EV-F1",
        "--transport",
        "truck",
        "--distance",
        "85 km",
        "--payload",
        "500 t",
        "--from",
        "2025-04-02",
        "--to",
        "2025-04-10",
    ]);
    let w = l.json(&[&["weathering", "EVW"][..], &DEDUCTIONS].concat());
    let row = &w[0];
    let f = row["dissolved_fraction"].as_f64().unwrap();
    let m = feedstock_mol_per_kg();
    // mol/t and charge per cation: Ca, Mg (z = 2), Na, K (z = 1).
    let cations = [
        (m[0] * 1e3, 2.0),
        (m[1] * 1e3, 2.0),
        (m[2] * 1e3, 1.0),
        (m[3] * 1e3, 1.0),
    ];
    let gross: i64 = cations
        .iter()
        .map(|(mol_t, z)| (f * 500.0 * mol_t * z * M_CO2).round_ties_even() as i64)
        .sum();
    assert_eq!(grams(&row["gross_t"]), gross);
    let scale = |g: i64, r: f64| (g as f64 * r).round_ties_even() as i64;
    let after_acid = scale(gross, 0.9);
    let reacting = scale(after_acid, 0.95);
    let precipitated = scale(reacting, 0.2);
    let kept_as_carbonate = scale(precipitated, 0.5);
    let to_ocean = reacting - precipitated;
    let kept_in_ocean = scale(to_ocean, 0.85);
    assert_eq!(grams(&row["strong_acid_t"]), gross - after_acid);
    assert_eq!(grams(&row["cation_retention_t"]), after_acid - reacting);
    assert_eq!(
        grams(&row["secondary_carbonate_t"]),
        precipitated - kept_as_carbonate
    );
    assert_eq!(
        grams(&row["ocean_re_equilibration_t"]),
        to_ocean - kept_in_ocean
    );
    // US EPA 2018 truck factor, 0.202 kg per short ton-mile (REFERENCES.md, through a
    // transcription): 85 km × 500 t × 0.202 / (0.90718474 × 1.609344).
    let truck =
        (85.0f64 * 500.0 * (0.202 / (0.90718474 * 1.609344)) * 1e3).round_ties_even() as i64;
    assert_eq!(grams(&row["emissions_t"]), truck);
    assert_eq!(
        grams(&row["net_t"]),
        kept_as_carbonate + kept_in_ocean - truck
    );
    // The potential: Renforth (2019) at η = 2 on the same oxides.
    let pot_kg_t = M_CO2 / 100.0
        * (9.4 / (CA + O) + 7.8 / (MG + O) + 2.9 / (2.0 * NA + O) + 0.9 / (2.0 * K + O))
        * 1e3
        * 2.0;
    assert!((row["potential_t"].as_f64().unwrap() - pot_kg_t * 0.5).abs() < 1e-5);
    // Full dissolution would give the potential (no SO3 or P2O5 here).
    let full: f64 = cations
        .iter()
        .map(|(mol_t, z)| 500.0 * mol_t * z * M_CO2)
        .sum();
    assert!((full / 1e6 - pot_kg_t * 0.5).abs() < 1e-6);
    crate::snapshot!(
        "weathering_deductions",
        l.ok(&[
            &["weathering", "EVW"][..],
            &DEDUCTIONS,
            &["--deduction-source", "monitoring plan EVW-MP-2 table 4"],
        ]
        .concat())
    );
}

/// EVW's two fields over two years: baselines, spreadings, three campaigns (one corrected) and
/// emissions at the mill and on a field.
fn two_fields_two_years() -> Ledger {
    let l = evw();
    core(&l, "EV-F1", "2025-03-20", &SOIL, true);
    core(&l, "EV-F2", "2025-03-21", &SOIL, true);
    spread(&l, "EV-F1", "500 t", "2025-04-10");
    spread(&l, "EV-F2", "320 t", "2025-04-11");
    // EV-F2: 320 t on 8 ha into 0.2 m is 20 kg/m³.
    core(&l, "EV-F1", "2025-10-06", &forward(25.0, 0.12), false);
    core(&l, "EV-F2", "2025-10-07", &forward(20.0, 0.9), false); // a transcription slip
    let slip = l.count("EVW") - 1;
    spread(&l, "EV-F1", "400 t", "2026-04-12");
    core(&l, "EV-F1", "2026-10-05", &forward(45.0, 0.2), false);
    let fixed = conc(&forward(20.0, 0.10));
    l.ok(&[
        "record",
        "soil-sample",
        "EVW",
        "--site",
        "EV-F2",
        "--date",
        "2025-10-07",
        "--depth",
        "0-20 cm",
        "--bulk-density",
        "1.3 t/m3",
        "--conc",
        &fixed,
        "--unit",
        "mol/kg",
        "--corrects",
        &slip.to_string(),
        "--reason",
        "lab re-run of the Ca and Mg digestion",
    ]);
    l.ok(&[
        "record",
        "emission",
        "EVW",
        "--site",
        "EV-MILL",
        "--grinding",
        "strefler",
        "--d80",
        "90 um",
        "--rock-mass",
        "820 t",
        "--grid-factor",
        "0.35 kg/kWh",
        "--from",
        "2025-03-01",
        "--to",
        "2025-03-31",
    ]);
    l.ok(&[
        "record",
        "emission",
        "EVW",
        "--site",
        "EV-F1",
        "--spreading-fuel",
        "4 L/ha",
        "--fuel-factor",
        "2.68 kg/L",
        "--factor-source",
        "diesel, supplier's declaration",
        "--from",
        "2025-04-10",
        "--to",
        "2025-04-10",
    ]);
    l
}

/// Two fields over two years, a correction and emissions elsewhere: the table, and the balance
/// crediting each campaign's change to its year.
#[test]
fn weathering_table_and_balance_by_year() {
    let l = two_fields_two_years();
    let w = l.json(&["weathering", "EVW"]);
    let rows = w.as_array().unwrap();
    assert_eq!(rows.len(), 4, "three campaigns and the total");
    let f2 = rows.iter().find(|r| r["field"] == "EV-F2").unwrap();
    assert!(
        (f2["dissolved_fraction"].as_f64().unwrap() - 0.10).abs() < 1e-7,
        "the correction counts"
    );
    let b = l.json(&["balance", "EVW", "--by", "year"]);
    let y = b["balance"].as_array().unwrap();
    assert_eq!(y[0]["period"], "2025");
    // 2025 credits both fields' first campaigns; 2026 the change of EV-F1's.
    let f1: Vec<&Value> = rows.iter().filter(|r| r["field"] == "EV-F1").collect();
    assert_eq!(
        grams(&y[0]["gross_t"]),
        grams(&f1[0]["gross_t"]) + grams(&f2["gross_t"])
    );
    assert_eq!(
        grams(&y[1]["gross_t"]),
        grams(&f1[1]["gross_t"]) - grams(&f1[0]["gross_t"])
    );
    for row in y {
        let deducted: i64 = [
            "strong_acid_t",
            "cation_retention_t",
            "secondary_carbonate_t",
            "ocean_re_equilibration_t",
        ]
        .iter()
        .map(|k| grams(&row[*k]))
        .sum();
        assert_eq!(grams(&row["removal_t"]), grams(&row["gross_t"]) - deducted);
        assert_eq!(
            grams(&row["net_t"]),
            grams(&row["removal_t"]) - grams(&row["emissions_t"])
        );
    }
    assert_eq!(
        grams(&y[1]["cumulative_net_t"]),
        grams(&y[0]["net_t"]) + grams(&y[1]["net_t"])
    );
    let total = rows.last().unwrap();
    assert_eq!(total["field"], "total");
    assert_eq!(grams(&total["net_t"]), grams(&y[1]["cumulative_net_t"]));
    crate::snapshot!("weathering_table", l.ok(&["weathering", "EVW"]));
    crate::snapshot!(
        "weathering_balance",
        l.ok(&["balance", "EVW", "--by", "year"])
    );
    crate::snapshot!("feedstock_list", l.ok(&["feedstock", "list", "EVW"]));
    crate::snapshot!(
        "weathering_one_field_tau",
        l.ok(&["weathering", "EVW", "--site", "EV-F2", "--method", "tau"])
    );
    assert_eq!(l.run(&["verify"]).code, 0);
}

/// A soil whose Ti is close to the feedstock's: no number, a line saying so with the contrast.
#[test]
fn small_immobile_contrast_is_inconclusive() {
    let l = evw();
    let f = feedstock_mol_per_kg();
    let ti_rich = [SOIL[0], SOIL[1], SOIL[2], SOIL[3], f[4] / 1.1];
    core(&l, "EV-F1", "2025-03-20", &ti_rich, true);
    spread(&l, "EV-F1", "500 t", "2025-04-10");
    core(&l, "EV-F1", "2025-10-06", &ti_rich, false);
    let out = l.ok(&["weathering", "EVW"]);
    assert!(
        out.contains(
            "inconclusive: feedstock and soil differ by 0.100 (relative) in Ti, less than the 0.25"
        ),
        "{out}"
    );
    let w = l.json(&["weathering", "EVW"]);
    assert_eq!(w[0]["dissolved_fraction"], "inconclusive");
    assert!(w[0]["net_t"].is_null());
    // A lower screen set by the monitoring plan lets the number through.
    let low = l.json(&["weathering", "EVW", "--min-immobile-contrast", "0.05"]);
    let finding = low[0]["finding"].as_str().unwrap();
    assert!(
        finding.contains("the sample shows no feedstock"),
        "{finding}"
    );
}
