//! A meter-day imported from a file and then corrected by hand no longer equals the file's
//! readings: `meters` says so for each such line of the year, walking back through
//! corrections of corrections to the imported entry.

mod common;
use common::Ledger;

#[test]
fn meters_warns_of_each_imported_day_corrected_by_hand_in_its_year() {
    let l = Ledger::with_tfs();
    let file = l.dir.path().join("export.csv");
    std::fs::write(
        &file,
        "timestamp,site,quantity,unit,co2_fraction,meter\n\
         2026-01-05T06:00:00Z,TF-I1,1250.5,t,0.985,FM-101\n",
    )
    .unwrap();
    assert_eq!(
        l.run(&["import", "TFS", &file.display().to_string()]).code,
        0
    );
    let before = l.run(&["meters", "TFS", "--year", "2026"]);
    assert!(!before.err.contains("by hand"), "{}", before.err);
    l.ok(&[
        "correct",
        "TFS",
        "0",
        "--reason",
        "read again",
        "--mass",
        "1250 t",
    ]);
    l.ok(&[
        "correct",
        "TFS",
        "1",
        "--reason",
        "and again",
        "--mass",
        "1249 t",
    ]);
    let r = l.run(&["meters", "TFS", "--year", "2026"]);
    assert_eq!(r.code, 0, "{}", r.err);
    assert!(
        r.err.contains(
            "meter FM-101 on 2026-01-05: seq 2 is a correction by hand of imported seq 0, so it no longer equals the readings of export.csv"
        ),
        "{}",
        r.err
    );
    let other_year = l.run(&["meters", "TFS", "--year", "2025"]);
    assert!(!other_year.err.contains("by hand"), "{}", other_year.err);
}
