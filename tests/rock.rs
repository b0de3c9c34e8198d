//! Mineralization and enhanced weathering end to end: the reference examples, the
//! three-end-member round trip through the command line, gross-to-net term by term, the route
//! tables, and every refused input.

mod common;
use common::Ledger;
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

// ---------------------------------------------------------------------------------------------
// In-situ mineralization

fn crb() -> Ledger {
    let l = Ledger::new();
    run_all(
        &l,
        &[
            &[
                "project",
                "add",
                "CRB",
                "--name",
                "Corrie Ridge Basalt",
                "--method",
                "basalt-mineralization",
                "--operator",
                "Northdeep Storage Cooperative",
            ],
            &["site", "add", "CRB", "CR-I1", "--kind", "injection-well"],
            &["site", "add", "CRB", "CR-M1", "--kind", "monitoring-well"],
            &["site", "add", "CRB", "CR-M2", "--kind", "monitoring-well"],
            &[
                "record",
                "injection",
                "CRB",
                "--site",
                "CR-I1",
                "--mass",
                "300.5 t",
                "--from",
                "2025-01-01",
                "--to",
                "2025-03-31",
            ],
            &[
                "record",
                "injection",
                "CRB",
                "--site",
                "CR-I1",
                "--mass",
                "280.25 t",
                "--from",
                "2025-04-01",
                "--to",
                "2025-06-30",
            ],
        ],
    );
    l
}

fn tracer(l: &Ledger, well: &str, date: &str, x: &str, sample: &str) -> String {
    l.ok(&[
        "record",
        "tracer-sample",
        "CRB",
        "--site",
        well,
        "--date",
        date,
        "--tracer-ratio",
        x,
        "--dic-sample",
        sample,
        "--dic-background",
        "1",
        "--dic-injectate",
        "20",
    ])
}

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

// ---------------------------------------------------------------------------------------------
// Ex-situ carbonation

fn plant() -> Ledger {
    let l = Ledger::new();
    run_all(
        &l,
        &[
            &[
                "project",
                "add",
                "XSM",
                "--name",
                "Ashby Slag Carbonation",
                "--method",
                "ex-situ-mineralization",
                "--operator",
                "Northdeep Storage Cooperative",
            ],
            &["site", "add", "XSM", "AS-P1", "--kind", "plant"],
        ],
    );
    l
}

fn carbonate(l: &Ledger, mass: &str, before: &str, after: &str, from: &str, to: &str) -> String {
    let r = l.carbonate(mass, before, after, from, to);
    assert_eq!(
        r.code, 0,
        "record carbonation {mass} {before} → {after}: {}",
        r.err
    );
    r.out
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

// ---------------------------------------------------------------------------------------------
// Enhanced weathering

/// The feedstock of the fixtures: oxides in wt%.
const OXIDES: &str = "SiO2=49.5,Al2O3=14.2,FeO=11.6,CaO=9.4,MgO=7.8,Na2O=2.9,K2O=0.9,TiO2=1.9";

/// mol per kg of the fixture feedstock, from its oxides with the weights above.
fn feedstock_mol_per_kg() -> [f64; 5] {
    [
        94.0 / (CA + O),
        78.0 / (MG + O),
        2.0 * 29.0 / (2.0 * NA + O),
        2.0 * 9.0 / (2.0 * K + O),
        19.0 / (TI + 2.0 * O),
    ]
}

/// Baseline soil of the fixtures, mol/kg: Ca, Mg, Na, K, Ti.
const SOIL: [f64; 5] = [0.1535, 0.1407, 0.2275, 0.3785, 0.0754];

fn conc(v: &[f64; 5]) -> String {
    let names = ["Ca", "Mg", "Na", "K", "Ti"];
    let parts: Vec<String> = names
        .iter()
        .zip(v)
        .map(|(n, c)| format!("{n}={c:.10}"))
        .collect();
    parts.join(",")
}

/// What a core holds after `applied_kg_per_m3` of feedstock of which `dissolved` has
/// dissolved, element by element, by the forward model of Suhrhoff et al. (2025).
fn forward(applied_kg_per_m3: f64, dissolved: f64) -> [f64; 5] {
    let f = feedstock_mol_per_kg();
    let mut out = [0.0; 5];
    for j in 0..4 {
        let soil = EndMember {
            analysis: Analysis::new(SOIL[j], SOIL[4]),
            bulk_density: 1300.0,
        };
        let feed = EndMember {
            analysis: Analysis::new(f[j], f[4]),
            bulk_density: 2900.0,
        };
        let a = forward_model(&soil, &feed, applied_kg_per_m3, dissolved).unwrap();
        out[j] = a.mobile.unwrap();
        out[4] = a.immobile.unwrap();
    }
    out
}

fn evw() -> Ledger {
    let l = Ledger::new();
    run_all(
        &l,
        &[
            &[
                "project",
                "add",
                "EVW",
                "--name",
                "Ellery Vale Weathering",
                "--method",
                "enhanced-weathering",
                "--operator",
                "Northdeep Storage Cooperative",
            ],
            &[
                "site", "add", "EVW", "EV-F1", "--kind", "field", "--area", "10 ha",
            ],
            &[
                "site", "add", "EVW", "EV-F2", "--kind", "field", "--area", "8 ha",
            ],
            &["site", "add", "EVW", "EV-MILL", "--kind", "plant"],
            &[
                "feedstock",
                "add",
                "EVW",
                "EVB-1",
                "--oxides",
                OXIDES,
                "--unit",
                "wt%",
                "--density",
                "2.9 t/m3",
                "--d80",
                "90 um",
            ],
        ],
    );
    l
}

fn core(l: &Ledger, field: &str, date: &str, c: &[f64; 5], baseline: bool) {
    let text = conc(c);
    let mut args = vec![
        "record",
        "soil-sample",
        "EVW",
        "--site",
        field,
        "--date",
        date,
        "--depth",
        "0-20 cm",
        "--bulk-density",
        "1.3 t/m3",
        "--conc",
        &text,
        "--unit",
        "mol/kg",
    ];
    if baseline {
        args.push("--baseline");
    }
    l.ok(&args);
}

fn spread(l: &Ledger, field: &str, mass: &str, date: &str) {
    l.ok(&[
        "record",
        "application",
        "EVW",
        "--site",
        field,
        "--feedstock",
        "EVB-1",
        "--mass",
        mass,
        "--date",
        date,
    ]);
}

/// 500 t on 10 ha mixed into 0–20 cm is 500 000 kg / (100 000 m² × 0.2 m) = 25 kg/m³.
const APPLIED_KG_M3: f64 = 25.0;

/// A field with a baseline, one spreading and a core generated by the forward model with 30 %
/// of the feedstock dissolved.
fn evw_one_field() -> Ledger {
    let l = evw();
    core(&l, "EV-F1", "2025-03-20", &SOIL, true);
    spread(&l, "EV-F1", "500 t", "2025-04-10");
    core(
        &l,
        "EV-F1",
        "2025-10-06",
        &forward(APPLIED_KG_M3, 0.3),
        false,
    );
    l
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
    let w = l.json(&[
        "weathering",
        "EVW",
        "--strong-acid",
        "10%",
        "--cation-retention",
        "5%",
        "--secondary-carbonate",
        "20%",
        "--ocean-efficiency",
        "0.85",
    ]);
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
            "weathering",
            "EVW",
            "--strong-acid",
            "10%",
            "--cation-retention",
            "5%",
            "--secondary-carbonate",
            "20%",
            "--ocean-efficiency",
            "0.85",
            "--deduction-source",
            "monitoring plan EVW-MP-2 table 4",
        ])
    );
}

/// Two fields over two years, a correction and emissions elsewhere: the table, and the balance
/// crediting each campaign's change to its year.
#[test]
fn weathering_table_and_balance_by_year() {
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

#[test]
fn emission_inventory_records_every_input_and_factor() {
    let l = evw();
    let out = l.ok(&[
        "record",
        "emission",
        "EVW",
        "--site",
        "EV-MILL",
        "--grinding",
        "bond",
        "--work-index",
        "18 kWh/t",
        "--feed-f80",
        "12 mm",
        "--d80",
        "90 um",
        "--rock-mass",
        "1200 t",
        "--grid-factor",
        "97.2 kg/GJ",
        "--factor-source",
        "supplier disclosure 2025",
        "--from",
        "2025-03-01",
        "--to",
        "2025-03-31",
    ]);
    assert!(out.contains("recorded EVW seq 0"));
    let e = l.json(&["entries", "EVW"]);
    let reading: Vec<(String, String)> = e[0]["reading"]
        .as_array()
        .unwrap()
        .iter()
        .map(|p| (p[0].as_str().unwrap().into(), p[1].as_str().unwrap().into()))
        .collect();
    let get = |n: &str| {
        reading
            .iter()
            .find(|(k, _)| k == n)
            .map(|(_, v)| v.as_str())
    };
    assert_eq!(get("stage"), Some("grinding"));
    assert_eq!(get("work_index"), Some("18 kWh/t"));
    assert_eq!(get("feed_f80"), Some("12 mm"));
    assert_eq!(get("grid_factor"), Some("97.2 kg/GJ"));
    assert_eq!(get("grid_factor_source"), Some("supplier disclosure 2025"));
    assert_eq!(get("category"), Some("energy"));
    // Bond's law: 10·18·(1/√90 − 1/√12000) kWh/t × 1200 t × 97.2 kg/GJ ÷ (1000/3.6 kWh/GJ).
    let kwh_t = 10.0 * 18.0 * (1.0 / 90f64.sqrt() - 1.0 / 12000f64.sqrt());
    let g = (kwh_t * 1200.0 * 97.2 / (1e9 / 3.6e6) * 1e3).round_ties_even() as i64;
    assert_eq!(e[0]["co2_g"].as_i64().unwrap(), g);
    // Strefler et al. (2018) fit, read in open model code: 50 µm → 0.0708 GJ/t (computed).
    l.ok(&[
        "record",
        "emission",
        "EVW",
        "--site",
        "EV-MILL",
        "--grinding",
        "strefler",
        "--d80",
        "50 um",
        "--rock-mass",
        "1000 t",
        "--grid-factor",
        "1 kg/GJ",
        "--from",
        "2025-03-01",
        "--to",
        "2025-03-31",
    ]);
    let e = l.json(&["entries", "EVW"]);
    let kg = e[1]["co2_g"].as_i64().unwrap() as f64 / 1e3;
    assert!((kg / 1000.0 - 0.0708).abs() < 5e-5, "{kg}");
    // A given mass tagged with its stage.
    l.ok(&[
        "record",
        "emission",
        "EVW",
        "--site",
        "EV-F1",
        "--stage",
        "spreading",
        "--mass",
        "0.21 t",
        "--from",
        "2025-04-10",
        "--to",
        "2025-04-10",
    ]);
    let e = l.json(&["entries", "EVW"]);
    assert_eq!(e[2]["co2_g"], 210_000);
    let r = &e[2]["reading"];
    assert!(
        r.as_array()
            .unwrap()
            .iter()
            .any(|p| p[0] == "stage" && p[1] == "spreading")
    );
}

#[test]
fn records_are_idempotent_and_corrections_need_a_new_reading() {
    let l = evw_one_field();
    let n = l.count("EVW");
    spread(&l, "EV-F1", "500 t", "2025-04-10");
    assert_eq!(l.count("EVW"), n, "the same spreading again writes nothing");
    refused(
        &l,
        "EVW",
        &["correct", "EVW", "2", "--mass", "12 t", "--reason", "typo"],
        r#"seq "2": is a soil-sample entry, not a metered quantity"#,
    );
    refused(
        &l,
        "EVW",
        &[
            "record",
            "application",
            "EVW",
            "--site",
            "EV-F1",
            "--feedstock",
            "EVB-1",
            "--mass",
            "480 t",
            "--date",
            "2025-04-10",
            "--corrects",
            "0",
            "--reason",
            "weighbridge",
        ],
        r#"--corrects "0": is a soil-sample entry; --corrects names an earlier application entry"#,
    );
}

#[test]
fn tampered_feedstock_is_caught_by_verify() {
    use diesel::connection::SimpleConnection;
    use diesel::{Connection, SqliteConnection};
    let l = common::on_file(evw);
    assert_eq!(l.run(&["verify"]).code, 0);
    SqliteConnection::establish(l.path.to_str().unwrap())
        .unwrap()
        .batch_execute(
            "DROP TRIGGER feedstocks_append_only_update;
             UPDATE feedstocks SET oxides = replace(oxides, '\"9.4\"', '\"12.4\"');",
        )
        .unwrap();
    let r = l.run(&["verify"]);
    assert_eq!(r.code, 3, "{}", r.out);
    assert!(
        r.err
            .contains("feedstock EVB-1 of project EVW differs from its row hash"),
        "{}",
        r.err
    );
}

/// A setting's source is covered by its row hash: altered in the file, `verify` exits 3 naming
/// the setting.
#[test]
fn tampered_setting_source_is_caught_by_verify() {
    use diesel::connection::SimpleConnection;
    use diesel::{Connection, SqliteConnection};
    let l = common::on_file(evw);
    l.set(
        "EVW",
        &[
            "--strong-acid",
            "2%",
            "--source",
            "monitoring plan EVW-MP-1 §4.2",
            "--from",
            "2026-01-01",
        ],
    );
    assert_eq!(l.run(&["verify"]).code, 0);
    SqliteConnection::establish(l.path.to_str().unwrap())
        .unwrap()
        .batch_execute(
            "DROP TRIGGER settings_append_only_update;
             UPDATE settings SET source = 'soil survey 2019';",
        )
        .unwrap();
    let r = l.run(&["verify"]);
    assert_eq!(r.code, 3, "{}", r.out);
    assert!(
        r.err
            .contains("setting 0 of project EVW differs from its row hash"),
        "{}",
        r.err
    );
}

#[test]
fn feedstock_table_is_append_only() {
    use diesel::connection::SimpleConnection;
    use diesel::{Connection, SqliteConnection};
    let l = common::on_file(evw);
    let mut c = SqliteConnection::establish(l.path.to_str().unwrap()).unwrap();
    for sql in [
        "UPDATE feedstocks SET density = '3 t/m3'",
        "DELETE FROM feedstocks",
    ] {
        let e = c.batch_execute(sql).unwrap_err().to_string();
        assert!(e.contains("append-only"), "{sql}: {e}");
    }
}

// ---------------------------------------------------------------------------------------------
// Bad input: one line naming the option and the value, exit 1, nothing written.

#[test]
fn bad_tracer_and_carbonation_input() {
    let l = crb();
    let t = |x: &'static str, s: &'static str, unit: &'static str| -> Vec<&'static str> {
        vec![
            "record",
            "tracer-sample",
            "CRB",
            "--site",
            "CR-M1",
            "--date",
            "2025-05-10",
            "--tracer-ratio",
            x,
            "--dic-sample",
            s,
            "--dic-background",
            "1",
            "--dic-injectate",
            "20",
            "--unit",
            unit,
        ]
    };
    let bad = "must be greater than 0 and at most 1";
    refused(
        &l,
        "CRB",
        &t("0", "1.2", "mmol/kg"),
        &format!(r#"--tracer-ratio "0": {bad}"#),
    );
    refused(
        &l,
        "CRB",
        &t("1.5", "1.2", "mmol/kg"),
        &format!(r#"--tracer-ratio "1.5": {bad}"#),
    );
    refused(
        &l,
        "CRB",
        &t("0.4", "-1", "mmol/kg"),
        r#"--dic-sample "-1": must be a finite number of at least 0"#,
    );
    refused(
        &l,
        "CRB",
        &t("0.4", "1.2", "ppb"),
        r#"--unit "ppb": is not a DIC unit"#,
    );
    let mut wrong_site = t("0.4", "1.2", "mmol/kg");
    wrong_site[4] = "CR-I1";
    refused(
        &l,
        "CRB",
        &wrong_site,
        "site CR-I1 is a injection-well; tracer-sample entries are recorded at sites of kind monitoring-well",
    );
    let p = plant();
    let c = |before: &'static str, after: &'static str| -> Vec<&'static str> {
        vec![
            "record",
            "carbonation",
            "XSM",
            "--site",
            "AS-P1",
            "--mass",
            "100 t",
            "--co2-before",
            before,
            "--co2-after",
            after,
            "--from",
            "2026-01-01",
            "--to",
            "2026-01-31",
        ]
    };
    refused(
        &p,
        "XSM",
        &c("2%", "100%"),
        r#"--co2-after "100%": must be at least 0 and less than 1"#,
    );
    refused(
        &p,
        "XSM",
        &c("120%", "20%"),
        r#"--co2-before "120%": must be from 0 to 1"#,
    );
    refused(
        &p,
        "XSM",
        &c("2%", "-1%"),
        r#"--co2-after "-1%": must be from 0 to 1"#,
    );
    let mut tfs = c("2%", "20%");
    tfs[2] = "CRB";
    refused(
        &l,
        "CRB",
        &tfs,
        r#"project "CRB": has method basalt-mineralization; carbonation entries belong to ex-situ-mineralization projects"#,
    );
}

#[test]
fn bad_soil_and_feedstock_input() {
    let l = evw();
    let s = |conc: &'static str, unit: &'static str, rho: &'static str| -> Vec<&'static str> {
        vec![
            "record",
            "soil-sample",
            "EVW",
            "--site",
            "EV-F1",
            "--date",
            "2025-03-20",
            "--depth",
            "0-20 cm",
            "--bulk-density",
            rho,
            "--conc",
            conc,
            "--unit",
            unit,
            "--baseline",
        ]
    };
    refused(
        &l,
        "EVW",
        &s("Ca=-0.1,Ti=0.07", "mol/kg", "1.3 t/m3"),
        r#"--conc "Ca=-0.1,Ti=0.07": Ca is -0.1; a concentration must be a finite number of at least 0"#,
    );
    refused(
        &l,
        "EVW",
        &s("Ca=900000,Mg=200000,Ti=3600", "mg/kg", "1.3 t/m3"),
        "more than the sample (1000 g/kg): check the unit",
    );
    refused(
        &l,
        "EVW",
        &s("Ca=0.15,Mg=0.14", "mol/kg", "1.3 t/m3"),
        r#"--conc "Ca=0.15,Mg=0.14": no immobile element: give Ti or Zr"#,
    );
    refused(
        &l,
        "EVW",
        &s("Ca=0.15,Fe=1,Ti=0.07", "mol/kg", "1.3 t/m3"),
        "Fe is not an element used here",
    );
    refused(
        &l,
        "EVW",
        &s("Ca=0.15,Ti=0.07", "ppm", "1.3 t/m3"),
        r#"--unit "ppm": is not a concentration unit"#,
    );
    refused(
        &l,
        "EVW",
        &s("Ca=0.15,Ti=0.07", "mol/kg", "3.1 t/m3"),
        r#"--bulk-density "3.1 t/m3": must be at most 2.65 t/m3"#,
    );
    let mut depth = s("Ca=0.15,Ti=0.07", "mol/kg", "1.3 t/m3");
    depth[8] = "20-0 cm";
    refused(
        &l,
        "EVW",
        &depth,
        r#"--depth "20-0 cm": the bottom must lie below the top"#,
    );

    let before = l.ok(&["--format", "json", "feedstock", "list", "EVW"]);
    let f = |oxides: &'static str, extra: &[&'static str]| -> Vec<&'static str> {
        let mut v = vec!["feedstock", "add", "EVW", "EVB-2", "--oxides", oxides];
        v.extend_from_slice(extra);
        if !extra.contains(&"--density") {
            v.extend_from_slice(&["--density", "2.9 t/m3"]);
        }
        v
    };
    refused(
        &l,
        "EVW",
        &f("CaO=9.4,MgO=7.8", &[]),
        r#"--elements "": no immobile element: give Ti or Zr (or TiO2 among a feedstock's oxides)"#,
    );
    refused(
        &l,
        "EVW",
        &f("CaO=60,MgO=45,TiO2=1", &[]),
        r#"--oxides "CaO=60,MgO=45,TiO2=1": oxides total 106.000 wt%"#,
    );
    refused(
        &l,
        "EVW",
        &f("CaO=9.4,TiO2=1", &["--elements", "Nb=20"]),
        "Nb is not an element used here (give Ti or Zr)",
    );
    refused(
        &l,
        "EVW",
        &f("CaO=9.4,TiO2=1", &["--density", "2900 t/m3"]),
        r#"--density "2900 t/m3": must be at most 5 t/m3"#,
    );
    refused(
        &l,
        "EVW",
        &f("CaO=9.4,TiO2=1", &["--unit", "ppm"]),
        r#"--unit "ppm": is not a concentration unit"#,
    );
    refused(
        &l,
        "EVW",
        &[
            "feedstock",
            "add",
            "EVW",
            "EVB-1",
            "--oxides",
            OXIDES,
            "--density",
            "2.9 t/m3",
        ],
        r#"feedstock "EVB-1": is already registered in project EVW"#,
    );
    assert_eq!(
        before,
        l.ok(&["--format", "json", "feedstock", "list", "EVW"]),
        "no feedstock written"
    );
}

#[test]
fn bad_applications_and_baselines() {
    let l = evw_one_field();
    let a =
        |site: &'static str, feedstock: &'static str, date: &'static str| -> Vec<&'static str> {
            vec![
                "record",
                "application",
                "EVW",
                "--site",
                site,
                "--feedstock",
                feedstock,
                "--mass",
                "100 t",
                "--date",
                date,
            ]
        };
    refused(
        &l,
        "EVW",
        &a("EV-F1", "EVB-9", "2025-05-01"),
        r#"--feedstock "EVB-9": is not a feedstock of project EVW"#,
    );
    refused(
        &l,
        "EVW",
        &a("EV-F1", "EVB-1", "2025-03-01"),
        r#"--date "2025-03-01": field EV-F1 has a baseline soil sample of 2025-03-20"#,
    );
    refused(
        &l,
        "EVW",
        &a("EV-MILL", "EVB-1", "2025-05-01"),
        "site EV-MILL is a plant; application entries are recorded at sites of kind field",
    );
    l.ok(&["site", "add", "EVW", "EV-F9", "--kind", "field"]);
    refused(
        &l,
        "EVW",
        &a("EV-F9", "EVB-1", "2025-05-01"),
        r#"--site "EV-F9": has no area"#,
    );
    refused(
        &l,
        "EVW",
        &[
            "record",
            "soil-sample",
            "EVW",
            "--site",
            "EV-F1",
            "--date",
            "2025-11-01",
            "--depth",
            "0-20 cm",
            "--bulk-density",
            "1.3 t/m3",
            "--conc",
            "Ca=0.15,Ti=0.07",
            "--baseline",
        ],
        r#"--baseline "2025-11-01": field EV-F1 received feedstock on 2025-04-10 (seq 1)"#,
    );
}

#[test]
fn bad_weathering_requests() {
    let l = evw();
    spread(&l, "EV-F1", "500 t", "2025-04-10");
    core(
        &l,
        "EV-F1",
        "2025-10-06",
        &forward(APPLIED_KG_M3, 0.3),
        false,
    );
    let n = l.count("EVW");
    refused(
        &l,
        "EVW",
        &["weathering", "EVW"],
        r#"--method "three-end-member": field EV-F1 has no baseline soil sample"#,
    );
    refused(
        &l,
        "EVW",
        &["balance", "EVW"],
        "the project's figures read soil campaigns by three-end-member with Ti: field EV-F1 has no baseline",
    );
    core(&l, "EV-F1", "2025-03-20", &SOIL, true);
    refused(
        &l,
        "EVW",
        &["weathering", "EVW", "--immobile", "Zr"],
        r#"--immobile "Zr": soil sample seq"#,
    );
    refused(
        &l,
        "EVW",
        &["weathering", "EVW", "--immobile", "Nb"],
        r#"--immobile "Nb": use Ti or Zr"#,
    );
    refused(
        &l,
        "EVW",
        &["weathering", "EVW", "--mobile", "Ca,Fe"],
        r#"--mobile "Ca,Fe": "Fe" is not Ca, Mg, Na or K"#,
    );
    refused(
        &l,
        "EVW",
        &["weathering", "EVW", "--strong-acid", "120%"],
        r#"--strong-acid "120%": must be from 0 to 1"#,
    );
    refused(
        &l,
        "EVW",
        &["weathering", "EVW", "--ocean-efficiency", "-0.2"],
        r#"--ocean-efficiency "-0.2": must be from 0 to 1"#,
    );
    refused(
        &l,
        "EVW",
        &["weathering", "EVW", "--site", "EV-MILL"],
        r#"--site "EV-MILL": is not a field of project EVW"#,
    );
    refused(
        &l,
        "EVW",
        &["mineralization", "EVW"],
        r#"project "EVW": has method enhanced-weathering; `mineralization` reads basalt-mineralization projects"#,
    );
    assert_eq!(l.count("EVW"), n + 1);
    // Soil analysed for Zr, a feedstock that reports Ti only: the feedstock is named.
    for (date, baseline) in [("2025-03-21", true), ("2025-10-07", false)] {
        let mut args = vec![
            "record",
            "soil-sample",
            "EVW",
            "--site",
            "EV-F2",
            "--date",
            date,
            "--depth",
            "0-20 cm",
            "--bulk-density",
            "1.3 t/m3",
            "--conc",
            "Ca=0.15,Mg=0.1,Na=0.2,K=0.3,Zr=0.002",
        ];
        if baseline {
            args.push("--baseline");
        }
        l.ok(&args);
    }
    spread(&l, "EV-F2", "300 t", "2025-04-11");
    refused(
        &l,
        "EVW",
        &["weathering", "EVW", "--site", "EV-F2", "--immobile", "Zr"],
        r#"--immobile "Zr": feedstock EVB-1 has no Zr analysed"#,
    );
}

#[test]
fn bad_emission_inventories() {
    let l = evw();
    let e = |extra: &[&'static str]| -> Vec<&'static str> {
        let mut v = vec![
            "record",
            "emission",
            "EVW",
            "--site",
            "EV-F1",
            "--from",
            "2025-03-01",
            "--to",
            "2025-03-31",
        ];
        v.extend_from_slice(extra);
        v
    };
    refused(
        &l,
        "EVW",
        &e(&[
            "--grinding",
            "bond",
            "--d80",
            "90 um",
            "--rock-mass",
            "100 t",
            "--grid-factor",
            "0.3 kg/kWh",
        ]),
        "--work-index is required to compute grinding emissions",
    );
    refused(
        &l,
        "EVW",
        &e(&[
            "--grinding",
            "bond",
            "--d80",
            "20 mm",
            "--feed-f80",
            "12 mm",
            "--work-index",
            "18 kWh/t",
            "--rock-mass",
            "100 t",
            "--grid-factor",
            "0.3 kg/kWh",
        ]),
        r#"--d80 "20 mm": must be finer than --feed-f80 "12 mm""#,
    );
    refused(
        &l,
        "EVW",
        &e(&[
            "--grinding",
            "strefler",
            "--d80",
            "90",
            "--rock-mass",
            "100 t",
            "--grid-factor",
            "0.3 kg/kWh",
        ]),
        r#"--d80 "90": a unit is needed (um, mm)"#,
    );
    refused(
        &l,
        "EVW",
        &e(&[
            "--transport",
            "truck",
            "--distance",
            "85 km",
            "--payload",
            "100 t",
            "--mass",
            "3 t",
        ]),
        "give --mass or the transport inputs, not both",
    );
    refused(
        &l,
        "EVW",
        &e(&[
            "--transport",
            "rail",
            "--spreading-fuel",
            "4 L/ha",
            "--distance",
            "85 km",
        ]),
        "give one life-cycle stage per record",
    );
    refused(
        &l,
        "EVW",
        &e(&[
            "--stage",
            "grinding",
            "--transport",
            "truck",
            "--distance",
            "85 km",
            "--payload",
            "100 t",
        ]),
        r#"--stage "grinding": the options given compute transport emissions"#,
    );
    refused(
        &l,
        "EVW",
        &e(&[
            "--transport",
            "truck",
            "--distance",
            "-5 km",
            "--payload",
            "100 t",
        ]),
        r#"--distance "-5 km": must be at least zero"#,
    );
    refused(
        &l,
        "EVW",
        &e(&["--spreading-fuel", "4 L/ha", "--fuel-factor", "2.68 kg/gal"]),
        r#"--fuel-factor "2.68 kg/gal": unknown unit "kg/gal""#,
    );
}

// ---------------------------------------------------------------------------------------------
// Rock-route uncertainty and dated deduction parameters

/// The claims table's row for `period`.
fn claim_row<'a>(b: &'a Value, period: &str) -> &'a Value {
    b["claims"]
        .as_array()
        .unwrap()
        .iter()
        .find(|r| r["period"] == period)
        .unwrap_or_else(|| panic!("no claim for {period}: {b}"))
}

/// Three replicate cores give three dissolved fractions, 0.28, 0.30 and 0.32 (forward model):
/// mean 0.30, s = √((0.02² + 0 + 0.02²)/2) = 0.02, U = t(0.975, 2)·s/√3 = 4.303 × 0.02 / 1.73205
/// = 0.049687 of dissolved fraction. One unit of fraction is worth the removal of the 500 t
/// wholly dissolved: Σ 500 × mol/t × z × M_CO2 (gross), times the ocean's 0.8 (the default).
/// The claim's uncertainty deduction is that U in tonnes, and conservative = stored − U.
#[test]
fn replicate_cores_give_the_removal_an_uncertainty_that_claims_deduct() {
    let l = evw();
    core(&l, "EV-F1", "2025-03-20", &SOIL, true);
    spread(&l, "EV-F1", "500 t", "2025-04-10");
    for f in [0.28, 0.30, 0.32] {
        core(&l, "EV-F1", "2025-10-06", &forward(APPLIED_KG_M3, f), false);
    }
    let m = feedstock_mol_per_kg();
    let whole: f64 = [(m[0], 2.0), (m[1], 2.0), (m[2], 1.0), (m[3], 1.0)]
        .iter()
        .map(|(mol_kg, z)| (500.0 * mol_kg * 1e3 * z * M_CO2).round_ties_even())
        .sum::<f64>();
    let kept = (whole * 0.8).round_ties_even();
    let u_f = 4.303 * 0.02 / 3f64.sqrt();
    let u_g = u_f * kept;
    let b = l.json(&["balance", "EVW", "--by", "year"]);
    let c = claim_row(&b, "2025");
    let deducted = grams(&c["uncertainty_deduction_t"]) as f64;
    // The cores read back their fractions to 1e-7, so U to a few parts in a million.
    assert!(
        (deducted - u_g).abs() < 1e-4 * u_g,
        "deducted {deducted} g, by hand {u_g} g"
    );
    assert_eq!(
        grams(&c["conservative_t"]),
        grams(&c["stored_t"]) - grams(&c["uncertainty_deduction_t"])
    );
    // The stored figure is the balance's net for the year.
    assert_eq!(grams(&c["stored_t"]), grams(&b["balance"][0]["net_t"]));
    let text = l.ok(&["balance", "EVW", "--by", "year"]);
    assert!(text.contains("U = t(0.975, n − 1)·s/√n"), "{text}");
    assert!(!text.contains("No uncertainty estimate"), "{text}");
}

/// A campaign of one core has no spread: the report says so, and the claim deducts nothing
/// for it instead of pretending to know.
#[test]
fn a_single_core_is_reported_as_without_an_estimate() {
    let l = evw_one_field();
    let b = l.json(&["balance", "EVW", "--by", "year"]);
    assert_eq!(grams(&claim_row(&b, "2025")["uncertainty_deduction_t"]), 0);
    let text = l.ok(&["balance", "EVW", "--by", "year"]);
    assert!(
        text.contains("No uncertainty estimate: 2025: EV-F1 2025-10-06: one core"),
        "{text}"
    );
}

/// EV-F1 read in October 2025 and October 2026; a strong-acid share of 10 % set from
/// 2026-07-01 changes only 2026 (the claim period whose last day is after it). 2026 restates
/// the field's removal to date, so its strong-acid column is the whole cumulative gross's:
/// gross − round(0.9 × gross), gross = gross₂₀₂₅ + Δgross₂₀₂₆.
#[test]
fn a_deduction_parameter_set_from_july_changes_only_periods_ending_after() {
    let l = evw_one_field();
    spread(&l, "EV-F1", "400 t", "2026-04-10");
    core(&l, "EV-F1", "2026-10-05", &forward(45.0, 0.4), false);
    let before = l.json(&["balance", "EVW", "--by", "year"]);
    refused(
        &l,
        "EVW",
        &["project", "set", "EVW", "--strong-acid", "10%"],
        "--strong-acid",
    );
    refused(
        &l,
        "EVW",
        &[
            "project",
            "set",
            "EVW",
            "--strong-acid",
            "110%",
            "--source",
            "plan",
        ],
        "--strong-acid",
    );
    let out = l.set(
        "EVW",
        &[
            "--strong-acid",
            "10%",
            "--source",
            "monitoring plan EVW-MP-2 table 4",
            "--from",
            "2026-07-01",
        ],
    );
    assert!(
        out.contains("Source of strong-acid weathering share = 10 % from 2026-07-01: monitoring plan EVW-MP-2 table 4."),
        "{out}"
    );
    let after = l.json(&["balance", "EVW", "--by", "year"]);
    assert_eq!(before["balance"][0], after["balance"][0], "2025 moved");
    assert_eq!(claim_row(&before, "2025"), claim_row(&after, "2025"));
    let gross = grams(&after["balance"][0]["gross_t"]) + grams(&after["balance"][1]["gross_t"]);
    let acid = gross - (gross as f64 * 0.9).round_ties_even() as i64;
    assert_eq!(grams(&after["balance"][1]["strong_acid_t"]), acid);
    assert_eq!(grams(&before["balance"][1]["strong_acid_t"]), 0);
    assert!(grams(&after["balance"][1]["net_t"]) < grams(&before["balance"][1]["net_t"]));
    let text = l.ok(&["balance", "EVW", "--by", "year"]);
    assert!(
        text.contains("strong-acid weathering share = 0.1, in force from 2026-07-01 (monitoring plan EVW-MP-2 table 4)"),
        "{text}"
    );
    // `weathering` reads with the settings too; its own options are a what-if, and say so.
    let w = l.json(&["weathering", "EVW"]);
    assert_eq!(w[0]["strong_acid_t"].as_f64(), Some(0.0));
    assert!(w[1]["strong_acid_t"].as_f64().unwrap() > 0.0);
    let what_if = l.ok(&["weathering", "EVW", "--strong-acid", "0"]);
    assert!(what_if.contains("What-if:"), "{what_if}");
    let w = l.json(&["weathering", "EVW", "--strong-acid", "0"]);
    assert_eq!(w[1]["strong_acid_t"].as_f64(), Some(0.0));
}

/// A deduction parameter belongs to a weathering project.
#[test]
fn deduction_parameters_are_refused_on_other_routes() {
    let l = plant();
    refused(
        &l,
        "XSM",
        &[
            "project",
            "set",
            "XSM",
            "--ocean-efficiency",
            "0.8",
            "--source",
            "plan",
        ],
        "is a weathering deduction",
    );
}

/// Two batches of one plant state 4 % and 2 %: one laboratory's errors repeat, so they add
/// linearly, U = 0.04 × 225 t + 0.02 × 112.5 t = 9 + 2.25 = 11.25 t; uptake 1000 t 2 % → 20 %
/// is 1000 × 0.18 / 0.8 = 225 t and 500 t the same is 112.5 t. A third batch states none: the
/// report says so.
#[test]
fn carbonation_batches_carry_their_stated_uncertainty_into_claims() {
    let l = plant();
    let with = |mass: &str, u: &str, from: &str| {
        l.ok(&[
            "record",
            "carbonation",
            "XSM",
            "--site",
            "AS-P1",
            "--mass",
            mass,
            "--co2-before",
            "2%",
            "--co2-after",
            "20%",
            "--from",
            from,
            "--to",
            from,
            "--uncertainty",
            u,
        ])
    };
    with("1000 t", "4%", "2026-01-05");
    with("500 t", "2%", "2026-02-05");
    refused(
        &l,
        "XSM",
        &[
            "record",
            "carbonation",
            "XSM",
            "--site",
            "AS-P1",
            "--mass",
            "1 t",
            "--co2-before",
            "2%",
            "--co2-after",
            "20%",
            "--from",
            "2026-03-01",
            "--to",
            "2026-03-01",
            "--uncertainty",
            "-1%",
        ],
        "--uncertainty",
    );
    let b = l.json(&["balance", "XSM", "--by", "year"]);
    let c = claim_row(&b, "2026");
    assert_eq!(grams(&c["stored_t"]), 337_500_000);
    assert_eq!(grams(&c["uncertainty_deduction_t"]), 11_250_000);
    assert_eq!(grams(&c["conservative_t"]), 337_500_000 - 11_250_000);
    carbonate(&l, "100 t", "2%", "20%", "2026-03-01", "2026-03-01");
    let text = l.ok(&["balance", "XSM", "--by", "year"]);
    assert!(
        text.contains(
            "No uncertainty estimate: 2026: 1 of 3 carbonation batches state no uncertainty"
        ),
        "{text}"
    );
}
