//! The ledgers the rock-route tests start from, and the readings they record.

use super::*;

// ---------------------------------------------------------------------------------------------
// In-situ mineralization

pub(crate) fn crb() -> Ledger {
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

pub(crate) fn tracer(l: &Ledger, well: &str, date: &str, x: &str, sample: &str) -> String {
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

// ---------------------------------------------------------------------------------------------
// Ex-situ carbonation

pub(crate) fn plant() -> Ledger {
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

pub(crate) fn carbonate(
    l: &Ledger,
    mass: &str,
    before: &str,
    after: &str,
    from: &str,
    to: &str,
) -> String {
    let r = l.carbonate(mass, before, after, from, to);
    assert_eq!(
        r.code, 0,
        "record carbonation {mass} {before} → {after}: {}",
        r.err
    );
    r.out
}

// ---------------------------------------------------------------------------------------------
// Enhanced weathering

/// The feedstock of the fixtures: oxides in wt%.
pub(crate) const OXIDES: &str =
    "SiO2=49.5,Al2O3=14.2,FeO=11.6,CaO=9.4,MgO=7.8,Na2O=2.9,K2O=0.9,TiO2=1.9";

/// mol per kg of the fixture feedstock, from its oxides with the weights above.
pub(crate) fn feedstock_mol_per_kg() -> [f64; 5] {
    [
        94.0 / (CA + O),
        78.0 / (MG + O),
        2.0 * 29.0 / (2.0 * NA + O),
        2.0 * 9.0 / (2.0 * K + O),
        19.0 / (TI + 2.0 * O),
    ]
}

/// Baseline soil of the fixtures, mol/kg: Ca, Mg, Na, K, Ti.
pub(crate) const SOIL: [f64; 5] = [0.1535, 0.1407, 0.2275, 0.3785, 0.0754];

pub(crate) fn conc(v: &[f64; 5]) -> String {
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
pub(crate) fn forward(applied_kg_per_m3: f64, dissolved: f64) -> [f64; 5] {
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

pub(crate) fn evw() -> Ledger {
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

pub(crate) fn core(l: &Ledger, field: &str, date: &str, c: &[f64; 5], baseline: bool) {
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

pub(crate) fn spread(l: &Ledger, field: &str, mass: &str, date: &str) {
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
pub(crate) const APPLIED_KG_M3: f64 = 25.0;

/// A field with a baseline, one spreading and a core generated by the forward model with 30 %
/// of the feedstock dissolved.
pub(crate) fn evw_one_field() -> Ledger {
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
