//! Rock-route records as the ledger keeps them: inventories, idempotency, tampering.

use super::*;

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
