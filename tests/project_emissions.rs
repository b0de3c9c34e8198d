//! Every route nets its project's emissions: CO2 a carbonation batch releases counts as an
//! emission of that batch.

mod common;
use common::Ledger;

fn plant() -> Ledger {
    let l = Ledger::new();
    l.add_xsm();
    l
}

fn carbonate(l: &Ledger, mass: &str, before: &str, after: &str) -> common::Run {
    l.carbonate(mass, before, after, "2026-01-05", "2026-01-30")
}

fn grams(v: &serde_json::Value) -> i64 {
    (v.as_f64().unwrap() * 1e6).round() as i64
}

#[test]
fn co2_a_batch_releases_is_an_emission_of_that_batch() {
    let l = plant();
    // Uptake 1 000 t × (0.20 − 0.02)/(1 − 0.20) = 225 t.
    assert_eq!(carbonate(&l, "1000 t", "2%", "20%").code, 0);
    // A batch whose solid went from 20 % to 2 % CO2 released
    // 1 000 t × (0.20 − 0.02)/(1 − 0.02) = 183.673469… t = 183 673 469 g (rounded half to even).
    let r = carbonate(&l, "1000 t", "20%", "2%");
    assert_eq!(r.code, 0, "{}", r.err);
    assert!(
        r.err.contains("counted as an emission of this batch"),
        "{}",
        r.err
    );
    let b = l.json(&["balance", "XSM", "--by", "month"]);
    let jan = &b["balance"][0];
    assert_eq!(grams(&jan["stored_t"]), 225_000_000);
    assert_eq!(grams(&jan["emissions_t"]), 183_673_469);
    // Net = 225 000 000 − 183 673 469 = 41 326 531 g; claims start from it.
    assert_eq!(grams(&jan["net_t"]), 41_326_531);
    let t = l.json(&["totals"]);
    assert_eq!(grams(&t[0]["mineralized_t"]), 41_326_531);
}

#[test]
fn a_geological_project_keeps_emissions_beside_storage_and_its_claims_deduct_them() {
    // TFS receives and injects 1 000 t (fraction 1, stated) in January 2026 and its compressors
    // emit 30 t. The mass balance stores 1 000 t (RR-12 from injection, ISO 27916 from the
    // input received) with the 30 t beside it; the
    // claims deduct them: 1 000 − 30 = 970 t, no uncertainty, buffer or loss set → 970 t
    // claimable.
    let l = Ledger::with_tfs();
    for (kind, mass) in [
        ("receipt", "1000 t"),
        ("injection", "1000 t"),
        ("emission", "30 t"),
    ] {
        l.ok(&[
            "record",
            kind,
            "TFS",
            "--site",
            "TF-I1",
            "--mass",
            mass,
            "--co2-fraction",
            "1",
            "--from",
            "2026-01-01",
            "--to",
            "2026-01-31",
        ]);
    }
    for method in ["rr", "iso27916"] {
        let b = l.json(&["balance", "TFS", "--by", "year", "--method", method]);
        let year = &b["balance"][0];
        assert_eq!(year["emissions_t"], 30.0, "{method}: {year}");
        let stored = if method == "rr" {
            "sequestered_t"
        } else {
            "stored_t"
        };
        assert_eq!(year[stored], 1000.0, "{method}: {year}");
        let c = &b["claims"][0];
        assert_eq!(c["stored_t"], 1000.0);
        assert_eq!(c["project_emissions_t"], 30.0);
        assert_eq!(c["net_of_emissions_t"], 970.0);
        assert_eq!(c["claimable_t"], 970.0);
    }
    let t = l.json(&["totals"]);
    assert_eq!(t[0]["stored_geological_t"], 1000.0);
    assert_eq!(t[0]["claimable_geological_t"], 970.0);
    let table = l.ok(&["balance", "TFS", "--by", "year"]);
    assert!(table.contains("Project emissions (t)"), "{table}");
}
