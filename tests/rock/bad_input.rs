//! Bad rock-route input: one line naming the option and the value, exit 1, nothing written.

use super::*;

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
