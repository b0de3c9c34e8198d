//! Geological storage accounting end to end: every entry kind, both mass balances, leak events
//! backdated to surveys, permits, and the per-meter table.

mod common;
use common::Ledger;

/// A small EOR project: CO2 bought in at a plant, injected, produced back, recycled.
fn eor() -> Ledger {
    let l = Ledger::with_kre(&[
        ("KR-P", "plant"),
        ("KR-I1", "injection-well"),
        ("KR-W1", "production-well"),
    ]);
    let q1 = ["--from", "2026-01-01", "--to", "2026-03-31"];
    let rec = |kind: &str, site: &str, extra: &[&str]| {
        let mut args = vec!["record", kind, "KRE", "--site", site];
        args.extend_from_slice(extra);
        args.extend_from_slice(&q1);
        l.ok(&args);
    };
    rec("receipt", "KR-P", &["--mass", "1000 t", "--meter", "CT-1"]);
    rec("redelivery", "KR-P", &["--mass", "20 t", "--meter", "CT-2"]);
    rec(
        "injection",
        "KR-I1",
        &["--mass", "1280 t", "--meter", "FM-1"],
    );
    rec(
        "production",
        "KR-P",
        &[
            "--mass",
            "300 t",
            "--entrained-fraction",
            "0.02",
            "--meter",
            "SEP-1",
        ],
    );
    rec(
        "equipment-leak",
        "KR-I1",
        &["--mass", "0.4 t", "--side", "injection"],
    );
    rec(
        "equipment-leak",
        "KR-W1",
        &["--mass", "1 t", "--side", "production"],
    );
    rec(
        "emission",
        "KR-P",
        &["--mass", "35 t", "--category", "energy"],
    );
    l
}

#[test]
fn rr_11_terms_for_an_eor_project() {
    let l = eor();
    let b = l.json(&["balance", "KRE", "--by", "year"]);
    let y = &b["balance"][0];
    assert_eq!(y["received_t"], 980.0);
    assert_eq!(y["injected_t"], 1280.0);
    assert_eq!(y["separated_t"], 300.0);
    assert_eq!(y["entrained_t"], 6.0);
    assert_eq!(y["produced_t"], 306.0);
    assert_eq!(y["equation"], "RR-11");
    // 1280 − 306 − 0 − 0.4 − 1 = 972.6 t
    assert_eq!(y["sequestered_t"], 972.6);
    assert_eq!(y["emissions_t"], 35.0);
}

#[test]
fn iso_27916_counts_recycled_once() {
    let l = eor();
    let b = l.json(&["balance", "KRE", "--by", "year", "--method", "iso27916"]);
    let y = &b["balance"][0];
    assert_eq!(y["input_t"], 980.0);
    assert_eq!(y["operational_losses_t"], 1.4);
    assert_eq!(y["losses_from_eor_complex_t"], 6.0);
    assert_eq!(y["stored_t"], 972.6);
    assert_eq!(y["recycled_t"], 300.0);
    crate::snapshot!(
        "kre_iso27916_year",
        l.ok(&["balance", "KRE", "--by", "year", "--method", "iso27916"])
    );
    crate::snapshot!(
        "kre_rr_quarter",
        l.ok(&["balance", "KRE", "--by", "quarter"])
    );
}

#[test]
fn volumetric_meters_and_the_meter_table() {
    let l = Ledger::with_tfs();
    l.ok(&[
        "record",
        "injection",
        "TFS",
        "--site",
        "TF-I2",
        "--meter",
        "FM-201",
        "--volume",
        "500 MMscf",
        "--co2-fraction",
        "0.99",
        "--density",
        "regulatory",
        "--from",
        "2026-01-01",
        "--to",
        "2026-01-31",
    ]);
    l.ok(&[
        "record",
        "injection",
        "TFS",
        "--site",
        "TF-I1",
        "--meter",
        "FM-101",
        "--mass",
        "20000 t",
        "--co2-fraction",
        "0.985",
        "--from",
        "2026-01-01",
        "--to",
        "2026-01-31",
    ]);
    let e = l.json(&["entries", "TFS"]);
    // 500e6 scf × 0.028316846592 m³/scf × 1.8682 kg/m³ × 0.99 — the RR-2 form with D (40 CFR 98.443, read).
    let expected = (500e6_f64 * 0.028316846592 * 1.8682 * 0.99 * 1000.0).round() as i64;
    assert!((e[0]["co2_g"].as_i64().unwrap() - expected).abs() <= 1);
    let m = l.json(&["meters", "TFS", "--year", "2026"]);
    assert_eq!(m[0]["meter"], "FM-101");
    assert_eq!(m[0]["quantity_read"], 20000.0);
    assert_eq!(m[1]["meter_type"], "volumetric");
    assert_eq!(m[1]["co2_fraction_mean"], 0.99);
    crate::snapshot!(
        "tfs_meters_2026",
        l.ok(&["meters", "TFS", "--year", "2026"])
    );
}

#[test]
fn a_meter_read_on_both_bases_has_a_row_for_each() {
    // FM-101 in January at 0.985 by mass, in February at 0.97 by mole (with its 3 % N2): a
    // mean of the two fractions would mix bases, so the quarter has a row for each basis.
    let l = Ledger::with_tfs();
    let record = |fraction: &[&str], from: &str, to: &str| {
        let mut args = vec![
            "record",
            "injection",
            "TFS",
            "--site",
            "TF-I1",
            "--meter",
            "FM-101",
            "--mass",
            "1000 t",
            "--from",
            from,
            "--to",
            to,
        ];
        args.extend_from_slice(fraction);
        l.ok(&args);
    };
    record(&["--co2-fraction", "0.985"], "2026-01-01", "2026-01-31");
    record(
        &[
            "--co2-fraction",
            "0.97",
            "--co2-basis",
            "mol",
            "--impurities",
            "N2=0.03",
        ],
        "2026-02-01",
        "2026-02-28",
    );
    let m = l.json(&["meters", "TFS", "--year", "2026"]);
    let rows: Vec<(String, f64, f64)> = m
        .as_array()
        .unwrap()
        .iter()
        .map(|r| {
            (
                r["co2_basis"].as_str().unwrap().to_string(),
                r["co2_fraction_mean"].as_f64().unwrap(),
                r["quantity_read"].as_f64().unwrap(),
            )
        })
        .collect();
    assert_eq!(
        rows,
        vec![
            ("mass".into(), 0.985, 1000.0),
            ("mole".into(), 0.97, 1000.0)
        ]
    );
}

#[test]
fn leak_by_rate_backdated_to_the_last_clear_survey() {
    let l = Ledger::with_tfs();
    l.ok(&[
        "record",
        "survey",
        "TFS",
        "--site",
        "TF-M1",
        "--date",
        "2026-03-20",
        "--result",
        "no-leak",
    ]);
    l.ok(&[
        "record",
        "survey",
        "TFS",
        "--site",
        "TF-M1",
        "--date",
        "2026-06-20",
        "--result",
        "leak-found",
    ]);
    let r = l.run(&[
        "record",
        "leakage",
        "TFS",
        "--site",
        "TF-M1",
        "--pathway",
        "TF-M1 annulus",
        "--rate",
        "0.02 t/h",
        "--since-last-survey",
        "--to",
        "2026-06-24",
    ]);
    assert_eq!(r.code, 0, "{}", r.err);
    let e = l.json(&["entries", "TFS"]);
    // 2026-03-20 to 2026-06-24: 97 days × 24 h × 0.02 t/h = 46.56 t (EU 2018/2066 Annex IV §23 B.3).
    assert_eq!(e[2]["period_from"], "2026-03-20");
    assert_eq!(e[2]["co2_g"], 46_560_000);
    let b = l.json(&["balance", "TFS", "--by", "quarter"]);
    // Split by days: 12 days in Q1, 85 in Q2.
    assert_eq!(b["balance"][0]["surface_leakage_t"], 5.76);
    assert_eq!(b["balance"][1]["surface_leakage_t"], 40.8);
    assert_eq!(b["leakage"][0]["pathway"], "TF-M1 annulus");
    // Without a clear survey there is nothing to backdate to.
    let r = l.run(&[
        "record",
        "leakage",
        "TFS",
        "--site",
        "TF-I1",
        "--pathway",
        "x",
        "--rate",
        "1 t/h",
        "--since-last-survey",
        "--to",
        "2026-06-24",
    ]);
    assert_eq!(r.code, 1);
    assert!(
        r.err.contains(
            "no survey of this site up to 2026-06-24 found no leak and no injection is recorded"
        ),
        "{}",
        r.err
    );
}

#[test]
fn a_leak_of_unknown_start_does_not_begin_before_injection() {
    // The last clear survey at TF-M1 was on 15 March, before TF-I1 first injected on 1 April:
    // the leak starts on 1 April (EU 2018/2066 Annex IV §23 B.3: the latest of the last survey
    // without leakage and the start of injection). 1 April to 30 April is 30 days × 24 h ×
    // 0.01 t/h = 7.2 t.
    let l = Ledger::with_tfs();
    l.ok(&[
        "record",
        "survey",
        "TFS",
        "--site",
        "TF-M1",
        "--date",
        "2026-03-15",
        "--result",
        "no-leak",
    ]);
    assert_eq!(
        l.inject("TF-I1", "5000 t", "2026-04-01", "2026-04-30", "apr")
            .code,
        0
    );
    let leak = |site: &str, to: &str| {
        l.run(&[
            "record",
            "leakage",
            "TFS",
            "--site",
            site,
            "--pathway",
            "TF-M1 annulus",
            "--rate",
            "0.01 t/h",
            "--since-last-survey",
            "--to",
            to,
        ])
    };
    let r = leak("TF-M1", "2026-04-30");
    assert_eq!(r.code, 0, "{}", r.err);
    let e = l.json(&["entries", "TFS"]);
    let last = e.as_array().unwrap().last().unwrap();
    assert_eq!(last["period_from"], "2026-04-01");
    assert_eq!(last["co2_g"], 7_200_000);
    let reading = last["reading"].as_array().unwrap();
    assert!(
        reading.contains(&serde_json::json!([
            "backdated_to_injection_start",
            "2026-04-01"
        ])),
        "{reading:?}"
    );
    // A site never surveyed: the start of injection alone bounds it, 1 to 10 April = 2.4 t.
    let r = leak("TF-I2", "2026-04-10");
    assert_eq!(r.code, 0, "{}", r.err);
    let e = l.json(&["entries", "TFS"]);
    assert_eq!(e.as_array().unwrap().last().unwrap()["co2_g"], 2_400_000);
    // A leak said to end before injection began is refused, naming the day injection began.
    let r = leak("TF-M1", "2026-03-31");
    assert_eq!(r.code, 1);
    assert!(
        r.err.contains("--to \"2026-03-31\"") && r.err.contains("injection began on 2026-04-01"),
        "{}",
        r.err
    );
}

#[test]
fn permits_warn_refuse_and_flag() {
    let l = Ledger::new();
    l.ok(&[
        "project",
        "add",
        "SML",
        "--name",
        "Small",
        "--method",
        "saline-aquifer",
        "--operator",
        "N",
        "--permit-capacity",
        "1000 t",
        "--permit-annual",
        "800 t",
    ]);
    l.ok(&["site", "add", "SML", "W", "--kind", "injection-well"]);
    let inj = |mass: &str, m: &str, extra: &[&str]| {
        let mut a = vec![
            "record",
            "injection",
            "SML",
            "--site",
            "W",
            "--mass",
            mass,
            "--from",
            m,
            "--to",
            m,
        ];
        a.extend_from_slice(extra);
        l.run(&a)
    };
    let r = inj("700 t", "2026-01-10", &[]);
    assert_eq!(r.code, 0);
    assert!(r.err.is_empty());
    let r = inj("210 t", "2027-01-10", &[]);
    assert_eq!(r.code, 0);
    assert!(
        r.err
            .contains("warning: project SML has used 91.00 % of its permitted capacity"),
        "{}",
        r.err
    );
    let r = inj("100 t", "2027-01-12", &[]);
    assert_eq!(r.code, 1);
    assert!(
        r.err.contains(
            "cumulative stored 1,010.000 t would be 101.00 % of the permitted capacity 1,000.000 t"
        ),
        "{}",
        r.err
    );
    let r = inj("100 t", "2027-01-12", &["--over-permit"]);
    assert_eq!(r.code, 0, "{}", r.err);
    assert!(r.err.contains("recorded over the permit"), "{}", r.err);
    let b = l.ok(&["balance", "SML", "--by", "year"]);
    assert!(
        b.contains("PERMIT EXCEEDED: cumulative stored 1,010.000 t"),
        "{b}"
    );
    assert!(
        b.contains("Recorded over the permit (--over-permit): seq 2."),
        "{b}"
    );
    // The annual maximum: 800 t in 2026.
    let r = inj("150 t", "2026-03-10", &[]);
    assert_eq!(r.code, 1);
    assert!(
        r.err.contains(
            "injection in 2026 would be 850.000 t, above the permitted annual maximum 800.000 t"
        ),
        "{}",
        r.err
    );
}

/// A refused record: its kind, site, options, period options and what the refusal names.
type Case<'a> = (&'a str, &'a str, &'a [&'a str], &'a [&'a str], &'a str);

#[test]
fn bad_geological_inputs() {
    let l = eor();
    let before = l.count("KRE");
    let one_day = ["--from", "2026-01-01", "--to", "2026-01-01"];
    let two_days = ["--from", "2026-01-01", "--to", "2026-01-02"];
    let (fraction, mol) = ("--co2-fraction", "--co2-basis");
    let cases: [Case; 9] = [
        (
            "production",
            "KR-P",
            &["--mass", "1 t", "--entrained-fraction", "1.5"],
            &one_day,
            "--entrained-fraction \"1.5\"",
        ),
        (
            "leakage",
            "KR-P",
            &["--pathway", "p", "--rate", "2 t/week"],
            &two_days,
            "--rate \"2 t/week\"",
        ),
        (
            "leakage",
            "KR-P",
            &["--pathway", "p", "--rate", "2 t/h", "--mass", "1 t"],
            &two_days,
            "not both",
        ),
        (
            "receipt",
            "KR-W1",
            &["--mass", "1 t"],
            &two_days,
            "receipt entries are recorded at sites of kind plant or injection-well",
        ),
        (
            "injection",
            "KR-I1",
            &["--volume", "1200 m3"],
            &two_days,
            "reference conditions",
        ),
        (
            "injection",
            "KR-I1",
            &["--volume", "12 Sm3", "--density", "regulatory"],
            &two_days,
            "60 °F and 1 atm",
        ),
        (
            "injection",
            "KR-I1",
            &["--mass", "12 t", fraction, "0.9", mol, "mol"],
            &two_days,
            "--impurities",
        ),
        (
            "injection",
            "KR-I1",
            &[
                "--mass",
                "12 t",
                fraction,
                "0.9",
                mol,
                "mol",
                "--impurities",
                "N2=0.2",
            ],
            &two_days,
            "--impurities \"N2=0.2\"",
        ),
        (
            "survey",
            "KR-P",
            &["--date", "2026-02-30", "--result", "no-leak"],
            &[],
            "--date \"2026-02-30\"",
        ),
    ];
    for (kind, site, options, period, needle) in cases {
        let mut args = vec!["record", kind, "KRE", "--site", site];
        args.extend(options.iter().chain(period));
        let r = l.run(&args);
        assert_eq!(r.code, 1, "{args:?}: {}", r.err);
        assert_eq!(r.err.trim_end().lines().count(), 1, "{}", r.err);
        assert!(r.err.contains(needle), "{args:?}: {}", r.err);
    }
    assert_eq!(l.count("KRE"), before);
}
