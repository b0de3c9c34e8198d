use super::period::holds;
use super::*;

fn t(tonnes: i64) -> Mass {
    Mass::from_grams(tonnes * 1_000_000)
}

fn fig(period: &str, quantity: &str, tonnes: i64) -> Figure {
    Figure {
        period: period.parse().unwrap(),
        quantity: quantity.parse().unwrap(),
        mass: t(tonnes),
    }
}

/// A saline-aquifer project under Subpart RR.
fn rr(q: ReportedQuantity) -> Bearing {
    use ReportedQuantity as Q;
    match q {
        Q::Stored => Bearing::Headline,
        Q::Injected | Q::Produced | Q::Leakage | Q::EquipmentLeak => Bearing::Term,
        Q::Received => Bearing::Listed,
        Q::Mineralized | Q::WeatheringNet => Bearing::NotKept,
    }
}

fn run_with(ledger: &[Figure], report: &[Figure], totals: &[Figure]) -> Reconciliation {
    reconcile(ledger, report, totals, rr, &MaterialityPolicy::default()).unwrap()
}

fn run(ledger: &[Figure], report: &[Figure]) -> Reconciliation {
    let totals: Vec<Figure> = ledger
        .iter()
        .filter(|f| matches!(f.period, ReportingPeriod::Year(_)) && f.quantity.key() == "stored")
        .copied()
        .collect();
    run_with(ledger, report, &totals)
}

fn find(r: &Reconciliation, p: &str, q: &str) -> ReconciledLine {
    let (p, q) = (p.parse().unwrap(), q.parse().unwrap());
    *r.lines
        .iter()
        .find(|l| l.period == p && l.quantity == q)
        .unwrap()
}

#[test]
fn periods_parse_and_belong_to_their_year() {
    let p = |s: &str| s.parse::<ReportingPeriod>().unwrap();
    assert_eq!(p("2026"), ReportingPeriod::Year(2026));
    assert_eq!(p("2026-Q1"), ReportingPeriod::Quarter(2026, 1));
    assert_eq!(p("2026-03"), ReportingPeriod::Month(2026, 3));
    assert_eq!(p("2026-Q4").year(), 2026);
    assert_eq!(p("2026-12").year(), 2026);
    for s in ["2026", "2026-Q2", "2026-09"] {
        assert_eq!(p(s).to_string(), s);
    }
    let mut v = [
        p("2027"),
        p("2026-02"),
        p("2026-Q2"),
        p("2026"),
        p("2026-Q1"),
    ];
    v.sort();
    let v: Vec<String> = v.iter().map(|p| p.to_string()).collect();
    assert_eq!(v, ["2026", "2026-Q1", "2026-Q2", "2026-02", "2027"]);
    assert!(holds(p("2026-Q2"), p("2026-06")));
    assert!(!holds(p("2026-Q2"), p("2026-07")));
    assert!(holds(p("2026"), p("2026-07")));
    assert!(!holds(p("2026-07"), p("2026")));
}

#[test]
fn bad_periods_and_quantities_are_refused_by_name() {
    let e = |s: &str| s.parse::<ReportingPeriod>().unwrap_err().to_string();
    assert_eq!(
        e("2026-13"),
        "period \"2026-13\" is not valid: the month must be 01 to 12"
    );
    assert_eq!(
        e("2026-00"),
        "period \"2026-00\" is not valid: the month must be 01 to 12"
    );
    assert_eq!(
        e("2026-Q5"),
        "period \"2026-Q5\" is not valid: the quarter must be Q1 to Q4"
    );
    assert!(e("2026-Q+1").contains("Q1 to Q4"));
    assert!(e("2026-3").contains("a month 01 to 12"));
    assert!(e("26").contains("four digits"));
    assert!(e("+2026").contains("four digits"));
    assert!(e("").contains("four digits"));
    let e = "stord".parse::<ReportedQuantity>().unwrap_err();
    assert_eq!(
        e.to_string(),
        "quantity \"stord\" is not one of received, injected, produced, leakage, \
         equipment-leak, stored, mineralized, weathering-net"
    );
    for q in ReportedQuantity::ALL {
        assert_eq!(q.key().parse::<ReportedQuantity>(), Ok(q));
    }
}

#[test]
fn differences_and_one_sided_lines() {
    let r = run(
        &[
            fig("2026-Q1", "injected", 100_000),
            fig("2026-Q1", "stored", 99_000),
            fig("2026-Q2", "leakage", 0),
            fig("2026-Q2", "stored", 50_000),
            fig("2026", "stored", 149_000),
        ],
        &[
            fig("2026-Q1", "injected", 98_000),
            fig("2026-Q1", "stored", 99_000),
            fig("2026-Q2", "leakage", 3),
            fig("2026-Q3", "stored", 20_000),
        ],
    );
    let inj = find(&r, "2026-Q1", "injected");
    assert_eq!(inj.difference, t(2_000));
    assert_eq!(inj.difference_pct, Some(2.0));
    assert_eq!(find(&r, "2026-Q1", "stored").difference_pct, Some(0.0));
    // Ledger figure zero, report not: a difference with no percentage.
    let leak = find(&r, "2026-Q2", "leakage");
    assert_eq!((leak.difference, leak.difference_pct), (t(-3), None));
    // A period the report leaves out is not reported, not misstated.
    let q2 = find(&r, "2026-Q2", "stored");
    assert_eq!(q2.presence, Presence::LedgerOnly(t(50_000)));
    assert_eq!(q2.judgement, Judgement::NotReported);
    // A report figure the ledger lacks counts whole.
    let q3 = find(&r, "2026-Q3", "stored");
    assert_eq!(q3.presence, Presence::ReportOnly(t(20_000)));
    assert_eq!((q3.difference, q3.difference_pct), (t(-20_000), None));
    assert_eq!(q3.judgement, Judgement::Counted);
    assert_eq!(r.lines.len(), 6);
    let y = &r.years[0];
    // Q1: stored 0 against injected 2 000 → 2 000; Q2: leakage 3 (no stored line counts
    // there); Q3: stored 20 000. 2 000 + 3 + 20 000 = 22 003 t, over 5 % of 149 000 = 7 450.
    assert_eq!(y.lines, 4);
    assert_eq!(y.misstatement, t(22_003));
    assert_eq!(y.threshold, Mass::from_grams(7_450 * 1_000_000));
    assert_eq!(y.verdict, Verdict::Material);
}

#[test]
fn a_report_of_injected_alone_is_judged() {
    // The report gives only the year's injected tonnes, 7 % under the ledger's 100 000 t:
    // 7 000 t misstated against 5 % of the ledger's 98 000 t stored = 4 900 t → material.
    let r = run_with(
        &[fig("2026", "injected", 100_000)],
        &[fig("2026", "injected", 93_000)],
        &[fig("2026", "stored", 98_000)],
    );
    assert_eq!(find(&r, "2026", "injected").judgement, Judgement::Counted);
    let y = &r.years[0];
    assert_eq!(y.counted, [ReportedQuantity::Injected]);
    assert_eq!((y.misstatement, y.ledger_total), (t(7_000), t(98_000)));
    assert_eq!(y.threshold, t(4_900));
    assert_eq!(y.verdict, Verdict::Material);
    assert_eq!(r.overall(), Verdict::Material);
}

#[test]
fn a_term_and_stored_over_one_period_count_once() {
    // Q1: injected 1 000 t over, stored 1 000 t over (the same error): max(1 000, 1 000).
    // Q2: injected and leakage each 500 t over, stored agrees (they offset): max(0, 1 000).
    // 1 000 + 1 000 = 2 000 t.
    let r = run_with(
        &[
            fig("2026-Q1", "injected", 51_000),
            fig("2026-Q1", "stored", 51_000),
            fig("2026-Q2", "injected", 50_500),
            fig("2026-Q2", "leakage", 500),
            fig("2026-Q2", "stored", 50_000),
        ],
        &[
            fig("2026-Q1", "injected", 50_000),
            fig("2026-Q1", "stored", 50_000),
            fig("2026-Q2", "injected", 50_000),
            fig("2026-Q2", "leakage", 0),
            fig("2026-Q2", "stored", 50_000),
        ],
        &[fig("2026", "stored", 101_000)],
    );
    let y = &r.years[0];
    assert_eq!(y.misstatement, t(2_000));
    assert_eq!(y.lines, 5);
    // 5 % of 101 000 = 5 050 t: within.
    assert_eq!(y.verdict, Verdict::WithinMateriality);
}

#[test]
fn received_under_rr_is_listed_and_a_report_of_nothing_assessable_is_not_assessed() {
    let r = run_with(
        &[fig("2026", "received", 10_000)],
        &[
            fig("2026", "received", 5_000),
            fig("2026", "weathering-net", 1),
        ],
        &[fig("2026", "stored", 9_000)],
    );
    assert_eq!(find(&r, "2026", "received").judgement, Judgement::NotATerm);
    assert_eq!(
        find(&r, "2026", "weathering-net").judgement,
        Judgement::NotKept
    );
    assert_eq!(r.years[0].verdict, Verdict::NotAssessed);
    assert_eq!(r.years[0].misstatement, Mass::ZERO);
    assert_eq!(r.overall(), Verdict::NotAssessed);
}

#[test]
fn five_percent_unless_the_programme_sets_another_level() {
    // Regulation (EU) 2018/2067 Art. 23 (read): 5 %; its 2 % is for installations above
    // 500 kt of annual emissions, never applied by stored tonnes.
    let year = |ledger_t, report_t, share| {
        reconcile(
            &[fig("2026", "stored", ledger_t)],
            &[fig("2026", "stored", report_t)],
            &[fig("2026", "stored", ledger_t)],
            rr,
            &MaterialityPolicy { share },
        )
        .unwrap()
        .years[0]
            .clone()
    };
    let y = year(400_000, 381_000, 0.05);
    assert_eq!(y.threshold, t(20_000));
    assert_eq!(y.misstatement, t(19_000));
    assert_eq!(y.verdict, Verdict::WithinMateriality);
    // Exactly at the threshold is within; one tonne more is material.
    assert_eq!(
        year(400_000, 380_000, 0.05).verdict,
        Verdict::WithinMateriality
    );
    assert_eq!(year(400_000, 379_999, 0.05).verdict, Verdict::Material);
    // 600 kt stored, 15 kt off: 2.5 %, within the default 5 % (30 kt) — stored tonnes
    // above 500 kt do not tighten it; a programme's 2 % (12 kt) does.
    assert_eq!(
        year(600_000, 585_000, 0.05).verdict,
        Verdict::WithinMateriality
    );
    let y = year(600_000, 585_000, 0.02);
    assert_eq!(y.threshold, t(12_000));
    assert_eq!(y.verdict, Verdict::Material);
}

#[test]
fn offsetting_errors_add_up_and_tonnes_count_once() {
    // Quarters over- and understated by 10 kt each: the year total agrees, the misstatement
    // does not vanish. The year line is reconciled but not added again.
    let ledger: Vec<Figure> = ["2026", "2026-Q1", "2026-Q2"]
        .iter()
        .zip([200_000, 110_000, 90_000])
        .map(|(p, v)| fig(p, "stored", v))
        .collect();
    let report = [
        fig("2026", "stored", 200_000),
        fig("2026-Q1", "stored", 100_000),
        fig("2026-Q2", "stored", 100_000),
        fig("2027-01", "stored", 5),
    ];
    let r = run(&ledger, &report);
    assert_eq!(
        find(&r, "2026", "stored").judgement,
        Judgement::FinerCounted
    );
    let y = &r.years[0];
    assert_eq!(y.misstatement, t(20_000));
    assert_eq!(y.ledger_total, t(200_000));
    assert_eq!(y.verdict, Verdict::Material);
    // 2027 has a report line only: the ledger total is zero and any misstatement material.
    let y = &r.years[1];
    assert_eq!((y.year, y.lines), (2027, 1));
    assert_eq!(
        (y.ledger_total, y.threshold, y.verdict),
        (Mass::ZERO, Mass::ZERO, Verdict::Material)
    );
    assert_eq!(r.years.len(), 2);
}

#[test]
fn refusals() {
    let p = MaterialityPolicy::default();
    let e = reconcile(
        &[fig("2026", "stored", 1), fig("2026", "stored", 2)],
        &[],
        &[],
        rr,
        &p,
    )
    .unwrap_err();
    assert_eq!(e.to_string(), "ledger has two lines for 2026 stored");
    let e = reconcile(&[], &[], &[], rr, &MaterialityPolicy { share: 0.0 }).unwrap_err();
    assert_eq!(
        e.to_string(),
        "materiality is 0: must be above 0 and below 1"
    );
    let huge = |g| Figure {
        mass: Mass::from_grams(g),
        ..fig("2026", "stored", 0)
    };
    let e = reconcile(&[huge(i64::MAX)], &[huge(-1)], &[], rr, &p).unwrap_err();
    assert_eq!(
        e.to_string(),
        "the difference for 2026 stored is too large for the ledger"
    );
}

fn figures() -> impl proptest::strategy::Strategy<Value = Vec<Figure>> {
    use proptest::prelude::*;
    let period = prop_oneof![
        (2025i32..2028).prop_map(ReportingPeriod::Year),
        (2025i32..2028, 1u8..=4).prop_map(|(y, q)| ReportingPeriod::Quarter(y, q)),
        (2025i32..2028, 1u8..=12).prop_map(|(y, m)| ReportingPeriod::Month(y, m)),
    ];
    let figure =
        (period, 0usize..8, -1_000_000_000_000i64..1_000_000_000_000).prop_map(|(period, q, g)| {
            Figure {
                period,
                quantity: ReportedQuantity::ALL[q],
                mass: Mass::from_grams(g),
            }
        });
    proptest::collection::vec(figure, 0..30).prop_map(|mut v| {
        v.sort_by_key(|f| (f.period, f.quantity));
        v.dedup_by_key(|f| (f.period, f.quantity));
        v
    })
}

proptest::proptest! {
    #[test]
    fn period_text_never_panics(s in "\\PC{0,10}") {
        if let Ok(p) = s.parse::<ReportingPeriod>() {
            proptest::prop_assert_eq!(p.to_string(), s);
        }
    }

    #[test]
    fn no_line_is_dropped_and_grams_are_exact(ledger in figures(), report in figures()) {
        let r = run(&ledger, &report);
        for f in ledger.iter().chain(&report) {
            proptest::prop_assert!(
                r.lines.iter().any(|l| l.period == f.period && l.quantity == f.quantity)
            );
        }
        let diffs: i64 = r.lines.iter().map(|l| l.difference.grams()).sum();
        let sides: i64 = ledger.iter().map(|f| f.mass.grams()).sum::<i64>()
            - report.iter().map(|f| f.mass.grams()).sum::<i64>();
        proptest::prop_assert_eq!(diffs, sides);
        for y in &r.years {
            let counted: i64 = r.lines.iter()
                .filter(|l| l.period.year() == y.year && l.judgement == Judgement::Counted)
                .map(|l| l.difference.grams().abs())
                .sum();
            // Never more than every counted line added, never a line the report lacks.
            proptest::prop_assert!(y.misstatement.grams() >= 0);
            proptest::prop_assert!(y.misstatement.grams() <= counted);
            proptest::prop_assert_eq!(y.verdict == Verdict::NotAssessed, y.lines == 0);
            proptest::prop_assert_eq!(
                y.verdict == Verdict::Material,
                y.lines > 0 && y.misstatement > y.threshold
            );
        }
        for l in &r.lines {
            if matches!(l.presence, Presence::LedgerOnly(_)) {
                proptest::prop_assert!(l.judgement != Judgement::Counted);
            }
        }
    }
}
