//! Weathering and carbonation claims: the uncertainty deducted, parameters over time.

use super::*;

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
