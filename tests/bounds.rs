//! Values out of bounds are refused with one line naming the option and the value, exit 1,
//! nothing written: activity dates outside 1900 to the ledger's clock, free text longer than
//! 200 characters (a signed statement 2,000), readings that round to 0 g, and corrections that
//! give an entry options its kind does not have.

mod common;
use chrono::{Datelike, NaiveDate};
use common::{Ledger, NOW};

/// The day of the tests' clock.
fn today() -> NaiveDate {
    chrono::DateTime::parse_from_rfc3339(NOW)
        .unwrap()
        .date_naive()
}

/// Runs `args`, expects exit 1 with one line naming `option` and the start of `value` and
/// saying `why`, and the project's entries as they were.
fn refused(l: &Ledger, args: &[&str], option: &str, value: &str, why: &str) {
    let before = l.count("TFS");
    let r = l.run(args);
    assert_eq!(r.code, 1, "{args:?} was not refused: {}", r.out);
    assert_eq!(r.err.trim().lines().count(), 1, "{args:?}: {}", r.err);
    let shown: String = value.chars().take(40).collect();
    let named = format!("{option} \"{shown}");
    assert!(
        r.err.contains(&named),
        "{args:?}: expected {named:?} in {}",
        r.err
    );
    assert!(
        r.err.contains(why),
        "{args:?}: expected {why:?} in {}",
        r.err
    );
    assert!(
        r.err.len() < 400,
        "the error repeats the whole value: {} bytes",
        r.err.len()
    );
    assert_eq!(l.count("TFS"), before, "{args:?} wrote something");
}

fn injection<'a>(from: &'a str, to: &'a str) -> Vec<&'a str> {
    vec![
        "record",
        "injection",
        "TFS",
        "--site",
        "TF-I1",
        "--mass",
        "100 t",
        "--from",
        from,
        "--to",
        to,
    ]
}

#[test]
fn activity_dates_before_1900_or_after_the_clock_are_refused() {
    let l = Ledger::with_tfs();
    let tomorrow = (today() + chrono::Days::new(1)).to_string();
    let after = "is after the ledger's clock";
    let before = "is before 1900-01-01";
    refused(
        &l,
        &injection("1899-12-31", "2026-01-31"),
        "--from",
        "1899-12-31",
        before,
    );
    refused(
        &l,
        &injection("0001-01-01", "2026-01-31"),
        "--from",
        "0001-01-01",
        before,
    );
    refused(
        &l,
        &injection("2026-01-01", &tomorrow),
        "--to",
        &tomorrow,
        after,
    );
    refused(
        &l,
        &injection("2026-01-01", "9999-12-31"),
        "--to",
        "9999-12-31",
        after,
    );
    let survey = [
        "record", "survey", "TFS", "--site", "TF-M1", "--date", &tomorrow, "--result", "no-leak",
    ];
    refused(&l, &survey, "--date", &tomorrow, after);
    let calibration = [
        "record",
        "calibration",
        "TFS",
        "--site",
        "TF-I1",
        "--date",
        "1850-06-01",
        "--uncertainty",
        "1%",
    ];
    refused(&l, &calibration, "--date", "1850-06-01", before);

    // The window's own ends are taken.
    let today = today().to_string();
    let r = l.run(&injection("1900-01-01", &today));
    assert_eq!(r.code, 0, "{}", r.err);
    let fix = ["correct", "TFS", "0", "--to", &tomorrow, "--reason", "typo"];
    refused(&l, &fix, "--to", &tomorrow, after);

    // A file's rows are held to the same window: nothing of it is written.
    let csv = l.dir.path().join("future.csv");
    std::fs::write(
        &csv,
        format!("timestamp,site,quantity,unit,co2_fraction\n2026-03-01,TF-I1,100,t,1\n{tomorrow},TF-I1,100,t,1\n"),
    )
    .unwrap();
    let r = l.run(&["import", "TFS", csv.to_str().unwrap()]);
    assert_eq!(r.code, 1, "{}", r.out);
    let day = format!("future.csv: meter-day {tomorrow}: {after}");
    assert!(r.err.contains(&day), "{}", r.err);
    assert_eq!(l.count("TFS"), 1);
}

/// One entry over the whole window is split into one part per month of the report, exactly.
#[test]
fn an_entry_over_the_whole_window_splits_into_the_reports_months() {
    let l = Ledger::with_tfs();
    let today = today();
    let r = l.run(&[
        "record",
        "injection",
        "TFS",
        "--site",
        "TF-I1",
        "--mass",
        "1000000 t",
        "--from",
        "1900-01-01",
        "--to",
        &today.to_string(),
    ]);
    assert_eq!(r.code, 0, "{}", r.err);
    let v = l.json(&["balance", "TFS", "--by", "month"]);
    let rows = v["balance"].as_array().unwrap();
    // Months from 1900-01 to the clock's month, both included.
    let months = (today.year() - 1900) as usize * 12 + today.month() as usize;
    assert_eq!(rows.len(), months);
    assert_eq!(rows[0]["period"], "1900-01");
    let last = rows.last().unwrap();
    assert_eq!(
        last["period"],
        format!("{}-{:02}", today.year(), today.month())
    );
    assert_eq!(last["cumulative_injected_t"], 1_000_000.0);
    // 31 of the window's days fall in January 1900: 31/days × 1,000,000 t, to the gram.
    let days = (today - NaiveDate::from_ymd_opt(1900, 1, 1).unwrap()).num_days() + 1;
    let jan_g = (31 * 1_000_000_000_000i128 + days as i128 / 2) / days as i128;
    let jan_t = rows[0]["injected_t"].as_f64().unwrap();
    assert!(
        (jan_t * 1e6 - jan_g as f64).abs() <= 1.0,
        "{jan_t} t against {jan_g} g"
    );
}

#[test]
fn free_text_is_bounded() {
    let l = Ledger::with_tfs();
    let long = "x".repeat(201);
    let why = "is 201 characters long; at most 200 are kept";
    for option in ["--note", "--meter", "--key"] {
        let mut args = injection("2026-01-01", "2026-01-31");
        args.extend([option, long.as_str()]);
        refused(&l, &args, option, &long, why);
    }
    let leak = [
        "record",
        "leakage",
        "TFS",
        "--site",
        "TF-M1",
        "--pathway",
        &long,
        "--mass",
        "1 t",
        "--from",
        "2026-02-01",
        "--to",
        "2026-02-02",
    ];
    refused(&l, &leak, "--pathway", &long, why);
    let project = [
        "project",
        "add",
        "LONG",
        "--name",
        &long,
        "--method",
        "saline-aquifer",
        "--operator",
        "Northdeep Storage Cooperative",
    ];
    refused(&l, &project, "--name", &long, why);

    let at_most = "y".repeat(200);
    let mut args = injection("2026-01-01", "2026-01-31");
    args.extend(["--note", at_most.as_str()]);
    let r = l.run(&args);
    assert_eq!(r.code, 0, "{}", r.err);
    refused(
        &l,
        &["correct", "TFS", "0", "--mass", "99 t", "--reason", &long],
        "--reason",
        &long,
        why,
    );

    // A meter export's meter names too: the row is named and nothing is written.
    let csv = l.dir.path().join("meter.csv");
    std::fs::write(
        &csv,
        format!(
            "timestamp,site,quantity,unit,co2_fraction,meter\n2026-03-01,TF-I1,100,t,1,{long}\n"
        ),
    )
    .unwrap();
    let r = l.run(&["import", "TFS", csv.to_str().unwrap()]);
    assert_eq!(r.code, 1, "{}", r.out);
    assert!(r.err.contains("line 2") && r.err.contains(why), "{}", r.err);
    assert_eq!(l.count("TFS"), 1);
}

#[test]
fn a_statement_takes_2000_characters() {
    let l = Ledger::with_tfs();
    let r = l.inject("TF-I1", "1000 t", "2026-01-01", "2026-01-31", "jan");
    assert_eq!(r.code, 0, "{}", r.err);
    let key = l.dir.path().join("op.key");
    l.ok(&["key", "new", "--out", key.to_str().unwrap()]);
    let sign = |statement: &str| {
        l.run(&[
            "sign",
            "TFS",
            "--period",
            "2026-Q1",
            "--role",
            "operator",
            "--key",
            key.to_str().unwrap(),
            "--statement",
            statement,
        ])
    };
    let r = sign(&"s".repeat(2001));
    assert_eq!(r.code, 1, "{}", r.out);
    assert!(
        r.err.contains("--statement") && r.err.contains("is 2001 characters long; at most 2000"),
        "{}",
        r.err
    );
    let r = sign(&"s".repeat(2000));
    assert_eq!(r.code, 0, "{}", r.err);
}

#[test]
fn readings_that_round_to_zero_grams_are_refused_like_zero() {
    let l = Ledger::with_tfs();
    let record = |mass: &'static str| {
        vec![
            "record",
            "injection",
            "TFS",
            "--site",
            "TF-I1",
            "--mass",
            mass,
            "--from",
            "2026-01-01",
            "--to",
            "2026-01-31",
        ]
    };
    refused(
        &l,
        &record("0 t"),
        "--mass",
        "0 t",
        "must be greater than zero",
    );
    for tiny in ["0.0000001 t", "0.4 g", "0.5 g"] {
        // 0.1 g, 0.4 g and 0.5 g round half to even to 0 g.
        refused(&l, &record(tiny), "--mass", tiny, "rounds to 0 g of CO2");
    }
    let r = l.run(&record("1 g"));
    assert_eq!(r.code, 0, "{}", r.err);
    let v = l.json(&["entries", "TFS"]);
    assert_eq!(v[0]["co2_g"], 1);
}

#[test]
fn corrections_take_only_the_options_of_the_corrected_kind() {
    let l = Ledger::with_tfs();
    l.ok(&[
        "record",
        "survey",
        "TFS",
        "--site",
        "TF-M1",
        "--date",
        "2026-06-14",
        "--result",
        "no-leak",
    ]);
    l.ok(&[
        "record",
        "calibration",
        "TFS",
        "--site",
        "TF-I1",
        "--meter",
        "FM-101",
        "--date",
        "2026-08-25",
        "--uncertainty",
        "1.0%",
    ]);
    let survey_takes = "does not belong to a survey entry (seq 0)";
    for (option, value) in [
        ("--mass", "5 t"),
        ("--volume", "5 Sm3"),
        ("--meter", "FM-9"),
        ("--uncertainty", "1%"),
    ] {
        refused(
            &l,
            &["correct", "TFS", "0", option, value, "--reason", "r"],
            option,
            value,
            survey_takes,
        );
    }
    refused(
        &l,
        &["correct", "TFS", "1", "--mass", "5 t", "--reason", "r"],
        "--mass",
        "5 t",
        "does not belong to a calibration entry (seq 1); a calibration correction takes --uncertainty, --meter",
    );
    // A calibration's uncertainty stays correctable: the correction holds the new one.
    l.ok(&[
        "correct",
        "TFS",
        "1",
        "--uncertainty",
        "0.8%",
        "--reason",
        "re-read the certificate",
    ]);
    let v = l.json(&["entries", "TFS"]);
    assert_eq!(v[2]["corrects"], 1);
    assert_eq!(
        v[2]["reading"],
        serde_json::json!([["uncertainty", "0.008"]])
    );
}
