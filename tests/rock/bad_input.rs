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
    for (x, dic, unit, needle) in [
        (
            "0",
            "1.2",
            "mmol/kg",
            format!(r#"--tracer-ratio "0": {bad}"#),
        ),
        (
            "1.5",
            "1.2",
            "mmol/kg",
            format!(r#"--tracer-ratio "1.5": {bad}"#),
        ),
        (
            "0.4",
            "-1",
            "mmol/kg",
            r#"--dic-sample "-1": must be a finite number of at least 0"#.into(),
        ),
        (
            "0.4",
            "1.2",
            "ppb",
            r#"--unit "ppb": is not a DIC unit"#.into(),
        ),
    ] {
        refused(&l, "CRB", &t(x, dic, unit), &needle);
    }
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
    for (before, after, needle) in [
        (
            "2%",
            "100%",
            r#"--co2-after "100%": must be at least 0 and less than 1"#,
        ),
        ("120%", "20%", r#"--co2-before "120%": must be from 0 to 1"#),
        ("2%", "-1%", r#"--co2-after "-1%": must be from 0 to 1"#),
    ] {
        refused(&p, "XSM", &c(before, after), needle);
    }
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
fn bad_soil_input() {
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
    let (ca_ti, rho) = ("Ca=0.15,Ti=0.07", "1.3 t/m3");
    for (conc, unit, rho, needle) in [
        (
            "Ca=-0.1,Ti=0.07",
            "mol/kg",
            rho,
            r#"--conc "Ca=-0.1,Ti=0.07": Ca is -0.1; a concentration must be a finite number of at least 0"#,
        ),
        (
            "Ca=900000,Mg=200000,Ti=3600",
            "mg/kg",
            rho,
            "more than the sample (1000 g/kg): check the unit",
        ),
        (
            "Ca=0.15,Mg=0.14",
            "mol/kg",
            rho,
            r#"--conc "Ca=0.15,Mg=0.14": no immobile element: give Ti or Zr"#,
        ),
        (
            "Ca=0.15,Fe=1,Ti=0.07",
            "mol/kg",
            rho,
            "Fe is not an element used here",
        ),
        (
            ca_ti,
            "ppm",
            rho,
            r#"--unit "ppm": is not a concentration unit"#,
        ),
        (
            ca_ti,
            "mol/kg",
            "3.1 t/m3",
            r#"--bulk-density "3.1 t/m3": must be at most 2.65 t/m3"#,
        ),
    ] {
        refused(&l, "EVW", &s(conc, unit, rho), needle);
    }
    let mut depth = s("Ca=0.15,Ti=0.07", "mol/kg", "1.3 t/m3");
    depth[8] = "20-0 cm";
    refused(
        &l,
        "EVW",
        &depth,
        r#"--depth "20-0 cm": the bottom must lie below the top"#,
    );
}

#[test]
fn bad_feedstock_input() {
    let l = evw();
    let before = l.ok(&["--format", "json", "feedstock", "list", "EVW"]);
    let f = |oxides: &'static str, extra: &[&'static str]| -> Vec<&'static str> {
        let mut v = vec!["feedstock", "add", "EVW", "EVB-2", "--oxides", oxides];
        v.extend_from_slice(extra);
        if !extra.contains(&"--density") {
            v.extend_from_slice(&["--density", "2.9 t/m3"]);
        }
        v
    };
    let ca_ti = "CaO=9.4,TiO2=1";
    for (oxides, extra, needle) in [
        (
            "CaO=9.4,MgO=7.8",
            &[][..],
            r#"--elements "": no immobile element: give Ti or Zr (or TiO2 among a feedstock's oxides)"#,
        ),
        (
            "CaO=60,MgO=45,TiO2=1",
            &[],
            r#"--oxides "CaO=60,MgO=45,TiO2=1": oxides total 106.000 wt%"#,
        ),
        (
            ca_ti,
            &["--elements", "Nb=20"],
            "Nb is not an element used here (give Ti or Zr)",
        ),
        (
            ca_ti,
            &["--density", "2900 t/m3"],
            r#"--density "2900 t/m3": must be at most 5 t/m3"#,
        ),
        (
            ca_ti,
            &["--unit", "ppm"],
            r#"--unit "ppm": is not a concentration unit"#,
        ),
    ] {
        refused(&l, "EVW", &f(oxides, extra), needle);
    }
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
    // Options as `--name=value`, one word each.
    let mill = ["--rock-mass=100 t", "--grid-factor=0.3 kg/kWh"];
    let truck = ["--transport=truck", "--distance=85 km", "--payload=100 t"];
    for (options, needle) in [
        (
            [&["--grinding=bond", "--d80=90 um"][..], &mill].concat(),
            "--work-index is required to compute grinding emissions",
        ),
        (
            [
                &[
                    "--grinding=bond",
                    "--d80=20 mm",
                    "--feed-f80=12 mm",
                    "--work-index=18 kWh/t",
                ][..],
                &mill,
            ]
            .concat(),
            r#"--d80 "20 mm": must be finer than --feed-f80 "12 mm""#,
        ),
        (
            [&["--grinding=strefler", "--d80=90"][..], &mill].concat(),
            r#"--d80 "90": a unit is needed (um, mm)"#,
        ),
        (
            [&truck[..], &["--mass=3 t"]].concat(),
            "give --mass or the transport inputs, not both",
        ),
        (
            vec![
                "--transport=rail",
                "--spreading-fuel=4 L/ha",
                "--distance=85 km",
            ],
            "give one life-cycle stage per record",
        ),
        (
            [&["--stage=grinding"][..], &truck].concat(),
            r#"--stage "grinding": the options given compute transport emissions"#,
        ),
        (
            vec!["--transport=truck", "--distance=-5 km", "--payload=100 t"],
            r#"--distance "-5 km": must be at least zero"#,
        ),
        (
            vec!["--spreading-fuel=4 L/ha", "--fuel-factor=2.68 kg/gal"],
            r#"--fuel-factor "2.68 kg/gal": unknown unit "kg/gal""#,
        ),
    ] {
        refused(&l, "EVW", &e(&options), needle);
    }
}
