use super::super::composition::Unit;
use super::*;
use crate::accounting::weathering::three_end_member::forward_model;
use crate::ledger::period::Grouping;

fn day(s: &str) -> NaiveDate {
    NaiveDate::parse_from_str(s, "%Y-%m-%d").unwrap()
}

fn pairs(list: &[(&str, f64)]) -> Vec<(String, f64)> {
    list.iter().map(|&(n, v)| (n.to_string(), v)).collect()
}

fn feedstock(code: &str) -> Feedstock {
    let oxides = pairs(&[("CaO", 9.4), ("MgO", 7.8), ("TiO2", 1.9)]);
    Feedstock {
        code: code.into(),
        analysis: FeedstockAnalysis::new(&oxides, Unit::WtPct, &[], Unit::WtPct).unwrap(),
        density: 2900.0,
    }
}

fn core(seq: u64, date: &str, ca: f64, ti: f64, baseline: bool, bottom_m: f64) -> Core {
    Core {
        seq,
        field: "F1".into(),
        date: day(date),
        depth: Depth {
            top_m: 0.0,
            bottom_m,
        },
        bulk_density: 1300.0,
        analysis: SoilAnalysis::new(&pairs(&[("Ca", ca), ("Ti", ti)]), Unit::MolPerKg).unwrap(),
        baseline,
    }
}

fn settings() -> Settings {
    Settings {
        method: DissolutionMethod::ThreeEndMember,
        immobile: Immobile::Ti,
        mobile: vec![Cation::Ca],
        resolution: Resolution::DEFAULT,
        deductions: Deductions::default(),
    }
}

fn spread(date: &str, code: &str, t: i64) -> Application {
    Application {
        field: "F1".into(),
        date: day(date),
        feedstock: code.into(),
        rock_g: t * 1_000_000,
    }
}

/// Ca and Ti of a core after `kg_m3` of feedstock with `f` dissolved, from a soil of
/// 0.15 mol Ca and 0.075 mol Ti per kg (the model runs on charge, 2 per Ca).
fn mixed(kg_m3: f64, f: f64) -> (f64, f64) {
    let feed = feedstock("B");
    let soil = EndMember {
        analysis: Analysis::new(2.0 * 0.15, 0.075),
        bulk_density: 1300.0,
    };
    let fm = feedstock_member(&feed, &settings()).unwrap();
    let a = forward_model(&soil, &fm, kg_m3, f).unwrap();
    (a.mobile.unwrap() / 2.0, a.immobile.unwrap())
}

fn read(apps: &[Application], cores: &[Core], emissions: &[Emission<'_>]) -> Vec<CampaignLine> {
    let fields = [Field {
        code: "F1".into(),
        area_m2: Some(100_000.0),
    }];
    let feedstocks = [feedstock("B"), feedstock("C")];
    let inputs = Inputs {
        fields: &fields,
        feedstocks: &feedstocks,
        applications: apps,
        cores,
        emissions,
    };
    campaigns(&inputs, &settings()).unwrap()
}

fn finding(l: &CampaignLine) -> &str {
    match &l.reading {
        CampaignResult::Finding(Finding::Reading(w)) => w,
        CampaignResult::Finding(w) => panic!("{w}"),
        CampaignResult::Resolved(r) => panic!("resolved: {r:?}"),
    }
}

#[test]
fn campaigns_restate_and_rollup_credits_the_change() {
    // 500 t on 10 ha into 0.2 m: 25 kg/m³; a year later 900 t: 45 kg/m³.
    let (ca1, ti1) = mixed(25.0, 0.1);
    let (ca2, ti2) = mixed(45.0, 0.2);
    let cores = [
        core(0, "2025-03-01", 0.15, 0.075, true, 0.2),
        core(2, "2025-10-01", ca1, ti1, false, 0.2),
        core(4, "2026-10-01", ca2, ti2, false, 0.2),
    ];
    let apps = [
        spread("2025-04-01", "B", 500),
        spread("2026-04-01", "B", 400),
    ];
    let emissions = [Emission {
        site: "MILL",
        period: Period::new(day("2025-12-01"), day("2026-01-31")).unwrap(),
        mass: Mass::from_grams(62_000),
    }];
    let lines = read(&apps, &cores, &emissions);
    let resolved = |l: &CampaignLine| match &l.reading {
        CampaignResult::Resolved(r) => r.clone(),
        CampaignResult::Finding(w) => panic!("{w}"),
    };
    let (r1, r2) = (resolved(&lines[0]), resolved(&lines[1]));
    assert!((r1.dissolved_fraction - 0.1).abs() < 1e-9);
    assert!((r2.dissolved_fraction - 0.2).abs() < 1e-9);
    assert_eq!(lines[1].applied_g, 900_000_000);
    assert_eq!(lines[1].rate_t_per_ha, Some(90.0));
    let roll = rollup(&lines, &apps, &emissions, Grouping::Year);
    assert_eq!(roll[0].gross, r1.gross.total);
    assert_eq!(roll[1].gross, r2.gross.total - r1.gross.total);
    assert_eq!(roll[1].removal, r2.removal.net - r1.removal.net);
    // 62 kg over 31 + 31 days: half in each year.
    assert_eq!(roll[0].emissions, Mass::from_grams(31_000));
    assert_eq!(roll[1].net, roll[1].removal - Mass::from_grams(31_000));
    assert_eq!(roll[1].cumulative_net, roll[0].net + roll[1].net);
    assert_eq!(roll[1].applied_g, 400_000_000);
}

#[test]
fn replicate_cores_spread_and_baseline_replicates_add_in_quadrature() {
    // Three cores at 0.28, 0.30, 0.32 dissolved: U = 4.303 × 0.02 / √3 of fraction.
    let apps = [spread("2025-04-01", "B", 500)];
    let sampled: Vec<Core> = [0.28, 0.30, 0.32]
        .iter()
        .enumerate()
        .map(|(i, f)| {
            let (ca, ti) = mixed(25.0, *f);
            core(10 + i as u64, "2025-10-01", ca, ti, false, 0.2)
        })
        .collect();
    let spread_of = |baseline: &[Core]| {
        let mut all = baseline.to_vec();
        all.extend(sampled.iter().cloned());
        match &read(&apps, &all, &[])[0].reading {
            CampaignResult::Resolved(r) => r.spread.clone(),
            CampaignResult::Finding(w) => panic!("{w}"),
        }
    };
    let one = spread_of(&[core(0, "2025-03-01", 0.15, 0.075, true, 0.2)]).unwrap();
    assert!((one - 4.303 * 0.02 / 3f64.sqrt()).abs() < 1e-6, "{one}");
    // Two identical baseline cores have no spread: nothing added.
    let same = spread_of(&[
        core(0, "2025-03-01", 0.15, 0.075, true, 0.2),
        core(1, "2025-03-01", 0.15, 0.075, true, 0.2),
    ])
    .unwrap();
    assert!((same - one).abs() < 1e-12);
    // Two that differ widen it: √(U_sample² + U_baseline²) > U_sample.
    let apart = spread_of(&[
        core(0, "2025-03-01", 0.148, 0.075, true, 0.2),
        core(1, "2025-03-01", 0.152, 0.075, true, 0.2),
    ])
    .unwrap();
    assert!(apart > one, "{apart} vs {one}");
    // One core: no spread, and why.
    let (ca, ti) = mixed(25.0, 0.3);
    let single = [
        core(0, "2025-03-01", 0.15, 0.075, true, 0.2),
        core(2, "2025-10-01", ca, ti, false, 0.2),
    ];
    match &read(&apps, &single, &[])[0].reading {
        CampaignResult::Resolved(r) => assert!(
            r.spread.as_ref().unwrap_err().contains("one core"),
            "{:?}",
            r.spread
        ),
        CampaignResult::Finding(w) => panic!("{w}"),
    }
}

#[test]
fn findings_instead_of_numbers() {
    let base = core(0, "2025-03-01", 0.15, 0.075, true, 0.2);
    let (ca, ti) = mixed(25.0, 0.1);
    let later = core(2, "2025-10-01", ca, ti, false, 0.2);
    let none = read(&[], &[base.clone(), later.clone()], &[]);
    assert_eq!(
        finding(&none[0]),
        "no feedstock applied to F1 before 2025-10-01"
    );
    let two = [
        spread("2025-04-01", "B", 250),
        spread("2025-04-02", "C", 250),
    ];
    let mixed_up = read(&two, &[base.clone(), later.clone()], &[]);
    assert!(finding(&mixed_up[0]).contains("several feedstocks (B, C)"));
    let deeper = core(2, "2025-10-01", ca, ti, false, 0.3);
    let apps = [spread("2025-04-01", "B", 500)];
    let depth = read(&apps, &[base.clone(), deeper], &[]);
    assert!(finding(&depth[0]).contains("cores must cover the same depth"));
    // A field with no baseline at all is a refusal, not a finding.
    let inputs = Inputs {
        fields: &[],
        feedstocks: &[feedstock("B")],
        applications: &apps,
        cores: &[later],
        emissions: &[],
    };
    assert_eq!(
        campaigns(&inputs, &settings()),
        Err(CampaignError::NoBaseline {
            field: "F1".into(),
            date: day("2025-10-01")
        })
    );
}
