//! Figures that hold still and add up: each test states a case whose figure is worked out by
//! hand beside it, and checks the command line gives exactly that.

mod common;
use common::Ledger;

/// An EOR project with an injection well, a production well and a plant.
fn eor() -> Ledger {
    Ledger::with_kre(&[("KR-I1", "injection-well"), ("KR-P", "plant")])
}

fn record(l: &Ledger, kind: &str, site: &str, extra: &[&str], from: &str, to: &str) {
    let mut args = vec![
        "record", kind, "KRE", "--site", site, "--from", from, "--to", to,
    ];
    args.extend_from_slice(extra);
    l.ok(&args);
}

#[test]
fn produced_uncertainty_comes_from_the_separator_meter_alone() {
    // Injected 1 000 t stating no uncertainty; separated S = 100 t at ±2 % with an entrained
    // fraction X = 0.02. The entrained 2 t is read by the same separator meter, so
    // U = (1 + X)·S·u = 1.02 × 100 t × 0.02 = 2.04 t, added linearly (in quadrature with S it
    // would be √(2² + 0.04²) = 2.0004 t).
    let l = eor();
    let q1 = ("2026-01-01", "2026-03-31");
    record(
        &l,
        "injection",
        "KR-I1",
        &["--mass", "1000 t", "--meter", "FM-1"],
        q1.0,
        q1.1,
    );
    record(
        &l,
        "production",
        "KR-P",
        &[
            "--mass",
            "100 t",
            "--entrained-fraction",
            "0.02",
            "--uncertainty",
            "2%",
            "--meter",
            "SEP-1",
        ],
        q1.0,
        q1.1,
    );
    let b = l.json(&["balance", "KRE", "--by", "quarter"]);
    let q = &b["balance"][0];
    assert_eq!(q["produced_t"], 102.0);
    assert_eq!(q["sequestered_t"], 898.0);
    let u = q["sequestered_u_t"].as_f64().unwrap();
    assert!((u - 2.04).abs() < 1e-9, "stored ± {u} t, expected 2.04 t");
}

#[test]
fn footnotes_cite_the_equations_the_table_uses() {
    // 40 CFR 98.443: receipts are RR-1 to RR-3 (RR-4 is injection); an EOR project reports by
    // RR-11 in every quarter, one without production included (its figure equals RR-12's).
    let l = eor();
    record(
        &l,
        "injection",
        "KR-I1",
        &["--mass", "500 t", "--meter", "FM-1"],
        "2026-04-01",
        "2026-06-30",
    );
    let b = l.json(&["balance", "KRE", "--by", "quarter"]);
    assert_eq!(b["balance"][0]["equation"], "RR-11");
    assert_eq!(b["balance"][0]["sequestered_t"], 500.0);
    let table = l.ok(&["balance", "KRE", "--by", "quarter"]);
    assert!(table.contains("(RR-1 to RR-3)"), "{table}");
    assert!(!table.contains("RR-1/RR-4"), "{table}");
}

#[test]
fn totals_years_add_up_and_filters_name_what_they_miss() {
    // 2025 Q1 stores 1 000 t; buffer 10 % → 100 t withheld, 900 t claimable (no uncertainty, no
    // retention). A 150 t reversal in May 2026 cancels the 100 t of buffer, then 50 t of
    // claimable: the 2026 row shows buffer −100 t and claimable −50 t, and the years add up
    // to the project's line: buffer 0 t, claimable 850 t.
    let l = eor();
    l.set("KRE", &["--buffer", "10%", "--from", "2025-01-01"]);
    record(
        &l,
        "injection",
        "KR-I1",
        &["--mass", "1000 t", "--meter", "FM-1"],
        "2025-01-01",
        "2025-03-31",
    );
    l.ok(&[
        "record",
        "reversal",
        "KRE",
        "--site",
        "KR-I1",
        "--mass",
        "150 t",
        "--date",
        "2026-05-10",
        "--reason",
        "CO2 found at the surface above KR-I1",
    ]);
    let by_year = l.json(&["totals", "--by", "year"]);
    let rows = by_year.as_array().unwrap();
    let year = |y: &str| rows.iter().find(|r| r["year"] == y).unwrap();
    assert_eq!(year("2025")["buffer_held_t"], 100.0);
    assert_eq!(year("2025")["claimable_geological_t"], 900.0);
    assert_eq!(year("2026")["buffer_held_t"], -100.0);
    assert_eq!(year("2026")["claimable_geological_t"], -50.0);
    assert_eq!(year("2026")["reversed_t"], 150.0);
    let all = rows.iter().find(|r| r["project"] == "all").unwrap();
    assert_eq!(all["buffer_held_t"], 0.0);
    assert_eq!(all["claimable_geological_t"], 850.0);
    let total = l.json(&["totals"]);
    assert_eq!(total[0]["claimable_geological_t"], 850.0);
    // --operator matches whatever its case; a filter that matches nothing lists what is known.
    let lower = l.json(&["totals", "--operator", "northdeep storage cooperative"]);
    assert_eq!(lower[0]["project"], "KRE");
    let r = l.run(&["totals", "--operator", "Nobody"]);
    assert_eq!(r.code, 1, "{}", r.err);
    assert!(
        r.err.contains(
            "--operator \"Nobody\": matches no project (known: Northdeep Storage Cooperative)"
        ),
        "{}",
        r.err
    );
}

#[test]
fn a_loss_is_drawn_on_the_pool_and_a_reversal_counts_in_its_year() {
    // Buffer 10 %, no uncertainty, no retention. 2025: injected 1 000 t, a 50 t reversal dated
    // inside 2025 → the year claims on 950 t: buffer 95 t, claimable 855 t, the pool untouched
    // by the reversal. 2026: injected 100 t, surface leakage 300 t → stored −200 t: the year
    // claims nothing and its 200 t loss cancels the 95 t of buffer, then 105 t of claimable.
    let l = eor();
    l.set("KRE", &["--buffer", "10%", "--from", "2025-01-01"]);
    let (y25, y26) = (("2025-01-01", "2025-03-31"), ("2026-01-01", "2026-03-31"));
    record(
        &l,
        "injection",
        "KR-I1",
        &["--mass", "1000 t", "--meter", "FM-1"],
        y25.0,
        y25.1,
    );
    l.ok(&[
        "record",
        "reversal",
        "KRE",
        "--site",
        "KR-I1",
        "--mass",
        "50 t",
        "--date",
        "2025-06-01",
        "--reason",
        "CO2 lost through a failed casing",
    ]);
    record(
        &l,
        "injection",
        "KR-I1",
        &["--mass", "100 t", "--meter", "FM-1"],
        y26.0,
        y26.1,
    );
    record(
        &l,
        "leakage",
        "KR-I1",
        &["--mass", "300 t", "--pathway", "fault F-2"],
        y26.0,
        y26.1,
    );
    let b = l.json(&["balance", "KRE", "--by", "quarter"]);
    let claims = b["claims"].as_array().unwrap();
    let claim = |p: &str| claims.iter().find(|r| r["period"] == p).unwrap();
    assert_eq!(claim("2025")["stored_t"], 950.0);
    assert_eq!(claim("2025")["buffer_withheld_t"], 95.0);
    assert_eq!(claim("2025")["claimable_t"], 855.0);
    assert_eq!(claim("2026")["stored_t"], -200.0);
    assert_eq!(claim("2026")["claimable_t"], 0.0);
    let pool = b["buffer_pool"].as_array().unwrap();
    let loss = pool
        .iter()
        .find(|r| r["event"].as_str().unwrap().starts_with("loss 2026"))
        .unwrap();
    assert_eq!(loss["reversed_t"], 200.0);
    assert_eq!(loss["cancelled_from_buffer_t"], 95.0);
    assert_eq!(loss["cancelled_from_claimable_t"], 105.0);
    assert!(
        !pool
            .iter()
            .any(|r| r["event"].as_str().unwrap().contains("2025-06"))
    );
    let t = l.json(&["totals"]);
    assert_eq!(t[0]["buffer_held_t"], 0.0);
    assert_eq!(t[0]["claimable_geological_t"], 750.0); // 855 − 105
    assert_eq!(t[0]["reversed_t"], 50.0);
}
