//! Meter import: file edge cases, all-or-nothing, idempotency, a meter-day counted once,
//! readings traced back to the kept file, and an import stopped mid-way by the planner's fault
//! point leaving the ledger exactly as before.

mod common;
use common::Ledger;
use serde_json::Value;

fn write(l: &Ledger, name: &str, bytes: &[u8]) -> String {
    let p = l.dir.path().join(name);
    std::fs::write(&p, bytes).unwrap();
    p.display().to_string()
}

fn entries(l: &Ledger) -> Value {
    serde_json::from_str(&l.ok(&["--format", "json", "entries", "TFS"])).unwrap()
}

#[test]
fn bom_crlf_quotes_blank_lines_offsets_and_mixed_units() {
    let l = Ledger::with_tfs();
    let f = write(
        &l,
        "export.csv",
        b"\xEF\xBB\xBFtimestamp,site,quantity,unit,co2_fraction,meter\r\n\
          2026-01-05T06:00:00+01:00,TF-I1,\"1250.5\",t,0.985,FM-101\r\n\
          \r\n\
          2026-01-05T23:30:00-05:00,TF-I1,500,kg,98.5%,FM-101\r\n\
          \"2026-01-05T12:00:00Z\",TF-I2,100,Mscf,0.99,\"FM-201\"\r\n",
    );
    let out = l.ok(&["import", "TFS", &f, "--density", "regulatory"]);
    assert!(out.contains("3 readings → 2 entries"), "{out}");
    let e = entries(&l);
    // FM-101's day 2026-01-05 (each timestamp's own offset): 1250.5 t × 0.985 + 500 kg × 0.985.
    assert_eq!(e[0]["meter"], "FM-101");
    assert_eq!(e[0]["co2_g"], 1_231_742_500i64 + 492_500);
    assert_eq!(e[0]["reading"][3], serde_json::json!(["lines", "2-4"]));
    assert_eq!(e[0]["evidence_name"], "export.csv");
    // FM-201: 100 Mscf × 28.316846592 m³ × 1.8682 kg/m³ × 0.99 (40 CFR 98.443 D, read).
    let fm201 =
        (100.0 * 1000.0 * 0.028316846592 * 1.8682 * 1000.0 * 0.99_f64).round_ties_even() as i64;
    assert_eq!(e[1]["co2_g"], fm201);
    assert_eq!(l.run(&["verify"]).code, 0);
}

#[test]
fn one_bad_row_in_the_middle_writes_nothing() {
    let l = Ledger::with_tfs();
    let mut csv = String::from("timestamp,site,quantity,unit,co2_fraction\n");
    for d in 1..=9 {
        let q = if d == 5 {
            "1,250.5".to_string()
        } else {
            format!("{}00", d)
        };
        let q = if q.contains(',') {
            format!("\"{q}\"")
        } else {
            q
        };
        csv.push_str(&format!("2026-02-0{d},TF-I1,{q},t,0.98\n"));
    }
    csv.push_str("2026-02-10,TF-I1,12,5,t\n");
    let f = write(&l, "bad.csv", csv.as_bytes());
    let r = l.run(&["import", "TFS", &f]);
    assert_eq!(r.code, 1);
    assert_eq!(r.err.trim_end().lines().count(), 1, "{}", r.err);
    assert!(r.err.contains("2 bad rows, nothing written"), "{}", r.err);
    assert!(
        r.err
            .contains(r#"line 6: quantity "1,250.5": commas are refused"#),
        "{}",
        r.err
    );
    assert!(r.err.contains("line 11: "), "{}", r.err);
    assert_eq!(l.count("TFS"), 0);
    // With --skip-bad the good rows go in and the bad ones are listed.
    let r = l.run(&["import", "TFS", &f, "--skip-bad"]);
    assert_eq!(r.code, 0, "{}", r.err);
    assert!(r.err.contains("warning: skipped line 6"), "{}", r.err);
    assert_eq!(l.count("TFS"), 8);
}

#[test]
fn the_same_file_twice_writes_nothing_the_second_time() {
    let l = Ledger::with_tfs();
    let f = write(&l, "a.csv", b"timestamp,site,quantity,unit,co2_fraction\n2026-03-01,TF-I1,100,t,1\n2026-03-02,TF-I1,100,t,1\n");
    l.ok(&["import", "TFS", &f]);
    let again = l.ok(&["import", "TFS", &f]);
    assert!(again.contains("was already imported into TFS"), "{again}");
    assert!(again.contains("nothing written"));
    assert_eq!(l.count("TFS"), 2);
    // The same file with one blank line more is another SHA-256, but its meter-days are counted
    // already: refused, nothing written, the earlier entries named.
    let mut more = std::fs::read(&f).unwrap();
    more.extend_from_slice(b"\n");
    let g = write(&l, "a-again.csv", &more);
    let r = l.run(&["import", "TFS", &g]);
    assert_eq!(r.code, 1, "{}", r.err);
    assert!(
        r.err.contains("2 meter-days are already counted in the ledger, nothing written")
            && r.err.contains("meter TF-I1 on 2026-03-01 is seq 0 (from a.csv); meter TF-I1 on 2026-03-02 is seq 1 (from a.csv)"),
        "{}",
        r.err
    );
    assert_eq!(l.count("TFS"), 2);
}

#[test]
fn a_re_export_replaces_its_meter_days_only_when_asked() {
    let l = Ledger::with_tfs();
    let feb = write(&l, "feb.csv", b"timestamp,site,quantity,unit,co2_fraction\n2026-02-01,TF-I1,100,t,1\n2026-02-02,TF-I1,100,t,1\n");
    l.ok(&["import", "TFS", &feb]);
    // The re-export revises 2 February and adds 3 February.
    let resent = write(&l, "feb-resent.csv", b"timestamp,site,quantity,unit,co2_fraction\n2026-02-02,TF-I1,120,t,1\n2026-02-03,TF-I1,90,t,1\n");
    let r = l.run(&["import", "TFS", &resent]);
    assert_eq!(r.code, 1);
    assert!(
        r.err
            .contains("meter TF-I1 on 2026-02-02 is seq 1 (from feb.csv)"),
        "{}",
        r.err
    );
    assert_eq!(l.count("TFS"), 2);
    let out = l.ok(&["import", "TFS", &resent, "--replace"]);
    assert!(
        out.contains("2 readings → 2 entries (1 replacing earlier meter-days)"),
        "{out}"
    );
    let e = entries(&l);
    assert_eq!(e[2]["corrects"], 1);
    let sha = l.ok(&["--format", "json", "entries", "TFS"]);
    assert!(
        e[2]["reason"]
            .as_str()
            .unwrap()
            .starts_with("replaced by the meter export feb-resent.csv (SHA-256 "),
        "{sha}"
    );
    assert_eq!(e[3]["corrects"], Value::Null);
    // February counts 100 + 120 + 90 t: the replaced 100 t of 2 February no longer counts.
    let b: Value =
        serde_json::from_str(&l.ok(&["--format", "json", "balance", "TFS", "--by", "month"]))
            .unwrap();
    assert!(b.to_string().contains("310"), "{b}");
    assert_eq!(l.run(&["verify"]).code, 0);
}
#[test]
fn columns_map_other_header_names() {
    let l = Ledger::with_tfs();
    let f = write(
        &l,
        "c.csv",
        b"Time,Well,Flow,Unit,Purity\n2026-03-01T00:00:00Z,TF-I2,2.5,kt,0.99\n",
    );
    let r = l.run(&["import", "TFS", &f]);
    assert_eq!(r.code, 1);
    assert!(
        r.err.contains("the header has no column \"timestamp\""),
        "{}",
        r.err
    );
    l.ok(&[
        "import",
        "TFS",
        &f,
        "--columns",
        "timestamp=Time,site=Well,quantity=Flow,unit=Unit,co2_fraction=Purity",
    ]);
    assert_eq!(entries(&l)[0]["co2_g"], 2_475_000_000i64);
}

#[test]
fn refused_rows_name_the_line_and_reason() {
    let l = Ledger::with_tfs();
    for (row, needle) in [
        ("2026-03-01T06:00:00,TF-I1,1,t,1", "no UTC offset"),
        ("2026-03-01,TF-M1,1,t,1", "site TF-M1 is a monitoring-well"),
        (
            "2026-03-01,TF-X,1,t,1",
            "site \"TF-X\" is not a site of project TFS",
        ),
        ("2026-03-01,TF-I1,1,t,0", "co2_fraction \"0\""),
        ("2026-03-01,TF-I1,1,m3,1", "reference conditions"),
        ("2026-03-01,TF-I1,\"12,5\",t,1", "commas are refused"),
    ] {
        let f = write(
            &l,
            "r.csv",
            format!("timestamp,site,quantity,unit,co2_fraction\n{row}\n").as_bytes(),
        );
        let r = l.run(&["import", "TFS", &f]);
        assert_eq!(r.code, 1, "{row}");
        assert!(
            r.err.contains("line 2: ") && r.err.contains(needle),
            "{row}: {}",
            r.err
        );
    }
    assert_eq!(l.count("TFS"), 0);
}

#[test]
fn an_import_stopped_by_the_fault_point_leaves_the_ledger_as_before() {
    let l = Ledger::with_tfs();
    l.inject("TF-I1", "10 t", "2026-01-01", "2026-01-01", "before");
    let before = l.ok(&["--format", "json", "entries", "TFS"]);
    let mut csv = String::from("timestamp,site,quantity,unit,co2_fraction,meter\n");
    for i in 0..3_000u64 {
        let day = 1 + i / 200;
        csv.push_str(&format!(
            "2026-04-{day:02}T00:{:02}:{:02}Z,TF-I1,{}.5,kg,0.99,FM-101\n",
            i / 60 % 60,
            i % 60,
            i % 900
        ));
    }
    let f = write(&l, "big.csv", csv.as_bytes());
    let r = std::process::Command::new(assert_cmd::cargo::cargo_bin("sinkbook"))
        .env("SINKBOOK_NOW", common::NOW)
        .env("SINKBOOK_FAULT_AFTER_ROWS", "2000")
        .arg("--db")
        .arg(&l.path)
        .args(["import", "TFS", &f])
        .output()
        .unwrap();
    assert!(
        !r.status.success() && r.status.code().is_none(),
        "the fault point did not stop the import: {r:?}"
    );
    assert_eq!(
        l.ok(&["--format", "json", "entries", "TFS"]),
        before,
        "the ledger changed"
    );
    assert_eq!(l.run(&["verify"]).code, 0);
    // And the same file imports whole afterwards.
    l.ok(&["import", "TFS", &f]);
    assert_eq!(l.count("TFS"), 1 + 15);
}

#[test]
fn a_row_given_twice_is_refused_or_listed() {
    let l = Ledger::with_tfs();
    let f = write(&l, "twice.csv", b"timestamp,site,quantity,unit,co2_fraction,meter\n2026-05-01T06:00:00Z,TF-I1,10,t,1,FM-101\n2026-05-01T07:00:00Z,TF-I1,10,t,1,FM-101\n2026-05-01T06:00:00Z,TF-I1,10,t,1,FM-101\n");
    let r = l.run(&["import", "TFS", &f]);
    assert_eq!(r.code, 1);
    assert!(
        r.err.contains(
            "line 4: a second reading of meter FM-101 at the same time as an earlier row"
        ),
        "{}",
        r.err
    );
    let r = l.run(&["import", "TFS", &f, "--skip-bad"]);
    assert_eq!(r.code, 0, "{}", r.err);
    assert!(
        r.err.contains("warning: skipped line 4: a second reading"),
        "{}",
        r.err
    );
    assert_eq!(entries(&l)[0]["co2_g"], 20_000_000i64);
}

#[test]
fn an_open_quote_is_counted_with_every_line_it_swallows() {
    let l = Ledger::with_tfs();
    let mut csv = String::from(
        "timestamp,site,quantity,unit,co2_fraction\n2026-06-01,TF-I1,10,t,1\n2026-06-02,TF-I1,\"10,t,1\n",
    );
    for d in 3..=30 {
        csv.push_str(&format!("2026-06-{d:02},TF-I1,10,t,1\n"));
    }
    let f = write(&l, "quote.csv", csv.as_bytes());
    let r = l.run(&["import", "TFS", &f]);
    assert_eq!(r.code, 1);
    assert!(
        r.err.contains("1 bad row taking 29 lines")
            && r.err
                .contains("lines 3–31: a quoted field runs over 29 lines"),
        "{}",
        r.err
    );
    let out = l.ok(&["import", "TFS", &f, "--skip-bad"]);
    assert!(
        out.contains("1 readings → 1 entries, 1 bad rows skipped (29 lines)"),
        "{out}"
    );
}

#[test]
fn readings_are_read_back_from_the_kept_file_and_a_changed_byte_is_caught() {
    // A ledger file: the kept bytes are changed through the sqlite3 shell.
    let l = common::on_file(Ledger::with_tfs);
    let f = write(&l, "may.csv", b"timestamp,site,quantity,unit,co2_fraction,meter\n2026-05-01T06:00:00Z,TF-I2,310,t,0.99,FM-201\n2026-05-01T18:00:00Z,TF-I2,290,t,0.99,FM-201\n2026-05-02T06:00:00Z,TF-I2,305,t,0.99,FM-201\n");
    l.ok(&["import", "TFS", &f]);
    let out = l.ok(&[
        "readings",
        "TFS",
        "--meter",
        "FM-201",
        "--day",
        "2026-05-01",
    ]);
    assert!(
        out.contains("2026-05-01T18:00:00Z") && out.contains("may.csv"),
        "{out}"
    );
    assert!(!out.contains("2026-05-02T06"), "{out}");
    // The report agrees with the two meter-days: (310 + 290) × 0.99 + 305 × 0.99 = 895.95 t.
    let rec = l.ok(&[
        "reconcile",
        "TFS",
        &write(
            &l,
            "r.csv",
            b"period,quantity,value,unit\n2026,injected,895.95,t\n",
        ),
        "--recompute",
    ]);
    assert!(
        rec.contains("2 imported meter-days recomputed from their raw readings; 0 differ"),
        "{rec}"
    );
    // Change one byte of the kept file (triggers dropped, as an attacker would).
    let conn = sqlite(&l);
    conn(&[
        "DROP TRIGGER import_evidence_append_only_update;",
        "UPDATE import_evidence SET bytes = CAST(replace(CAST(bytes AS TEXT), '290', '390') AS BLOB);",
    ]);
    let r = l.run(&["verify"]);
    assert_eq!(r.code, 3, "{}", r.err);
    assert!(
        r.err
            .contains("project TFS import 1 (may.csv): its kept bytes"),
        "{}",
        r.err
    );
}

/// Runs SQL on the ledger file with the sqlite3 shell.
fn sqlite(l: &Ledger) -> impl Fn(&[&str]) + '_ {
    move |sql: &[&str]| {
        let o = std::process::Command::new("sqlite3")
            .arg(&l.path)
            .arg(sql.join(" "))
            .output()
            .expect("the sqlite3 shell is needed for this test");
        assert!(o.status.success(), "{}", String::from_utf8_lossy(&o.stderr));
    }
}

#[test]
fn a_meter_day_is_one_kind_of_reading_and_its_volumes_keep_their_conditions() {
    // FM-201 reads 100 Mscf (60 °F, 14.696 psia) at 06:00 and 2 000 Sm3 (15 °C, 101.325 kPa)
    // at 07:00 of the same day: two volumes at different conditions do not add, so the second
    // row is refused; a mass row on that meter-day is refused the same way.
    let l = Ledger::with_tfs();
    let f = write(
        &l,
        "mixed.csv",
        b"timestamp,site,quantity,unit,co2_fraction,meter\n\
          2026-05-01T06:00:00Z,TF-I2,100,Mscf,0.99,FM-201\n\
          2026-05-01T07:00:00Z,TF-I2,2000,Sm3,0.99,FM-201\n\
          2026-05-01T08:00:00Z,TF-I2,3,t,0.99,FM-201\n",
    );
    let r = l.run(&["import", "TFS", &f]);
    assert_eq!(r.code, 1);
    for why in [
        "line 3: meter FM-201 on 2026-05-01 reads volumes at 288.706 K, 101.325 kPa in earlier rows (line 2), here volumes at 288.150 K, 101.325 kPa",
        "line 4: meter FM-201 on 2026-05-01 reads volumes at 288.706 K, 101.325 kPa in earlier rows (line 2), here mass",
    ] {
        assert!(r.err.contains(why), "{why}\n{}", r.err);
    }
    assert_eq!(l.count("TFS"), 0);
    // Skipping them, the day is the 100 Mscf = 2 831.684659 m³ alone, its conditions recorded
    // with it and named in the meters table's unit.
    assert_eq!(l.run(&["import", "TFS", &f, "--skip-bad"]).code, 0);
    let e = entries(&l);
    let reading = e[0]["reading"].as_array().unwrap();
    let field = |k: &str| {
        reading
            .iter()
            .find(|p| p[0] == k)
            .map(|p| p[1].as_str().unwrap().to_string())
    };
    assert_eq!(field("volume_m3").as_deref(), Some("2831.684659"));
    assert_eq!(
        field("reference_conditions").as_deref(),
        Some("288.706 K, 101.325 kPa")
    );
    let m = l.json(&["meters", "TFS", "--year", "2026"]);
    assert_eq!(m[0]["unit"], "m³ at 288.706 K, 101.325 kPa");
    assert_eq!(m[0]["co2_basis"], "mole");
}

/// The permit reads an import's meter-days summed by day: two meters' readings of one day
/// count together toward the permitted capacity (TFS: 2.5 Mt), exactly to the gram.
#[test]
fn an_import_is_held_to_the_permit_by_its_days_summed() {
    let l = Ledger::with_tfs();
    let f = write(
        &l,
        "big.csv",
        b"timestamp,site,quantity,unit,co2_fraction,meter\n\
          2026-01-10,TF-I1,1300000,t,1,FM-101\n\
          2026-01-10,TF-I2,1200000.000001,t,1,FM-201\n",
    );
    let r = l.run(&["import", "TFS", &f]);
    assert_eq!(r.code, 1, "{}", r.err);
    assert!(
        r.err.contains(
            "cumulative stored 2,500,000.000 t would be 100.00 % of the permitted capacity 2,500,000.000 t; nothing written"
        ),
        "{}",
        r.err
    );
    assert_eq!(entries(&l).as_array().unwrap().len(), 0, "nothing written");
    let r = l.run(&["import", "TFS", &f, "--over-permit"]);
    assert_eq!(r.code, 0, "{}", r.err);
    assert_eq!(entries(&l).as_array().unwrap().len(), 2);
}
