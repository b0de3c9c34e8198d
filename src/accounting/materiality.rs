//! Reconciliation of the ledger with an independent monitoring report, line by line, and the
//! verdict per reporting year: is the total misstatement within materiality?
//!
//! Rules chosen here (docs/uncertainty.md, "Materiality", says why):
//! - difference = ledger − report, so a positive difference is what the ledger states beyond the
//!   report; its percentage is of the ledger figure.
//! - a line present on one side only is kept, and its missing figure counts as zero.
//! - a year's misstatement is the sum of |difference| over that year's `stored` lines, at one
//!   granularity, so no tonne is counted twice.
//! - the threshold is a share of the ledger's stored total for the year: the ledger is the
//!   operator's reported figure under verification.

use crate::quantity::Mass;
use std::cmp::Ordering;
use std::collections::BTreeMap;
use std::fmt;
use std::str::FromStr;

/// Why a reconciliation was refused; each names the field and the value.
#[derive(Debug, Clone, PartialEq)]
pub enum MaterialityError {
    Period {
        text: String,
        reason: &'static str,
    },
    Quantity(String),
    Duplicate {
        side: Side,
        period: ReportingPeriod,
        quantity: ReportedQuantity,
    },
    Fraction {
        field: &'static str,
        value: f64,
    },
    LargeAbove(Mass),
    TooLarge {
        period: ReportingPeriod,
        quantity: ReportedQuantity,
    },
}

impl fmt::Display for MaterialityError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            Self::Period { text, reason } => write!(f, "period {text:?} is not valid: {reason}"),
            Self::Quantity(q) => {
                let names: Vec<&str> = ReportedQuantity::ALL.iter().map(|q| q.key()).collect();
                write!(f, "quantity {q:?} is not one of {}", names.join(", "))
            }
            Self::Duplicate {
                side,
                period,
                quantity,
            } => write!(f, "{} has two lines for {period} {quantity}", side.key()),
            Self::Fraction { field, value } => {
                write!(f, "{field} is {value}: must be above 0 and below 1")
            }
            Self::LargeAbove(m) => write!(f, "large_above is {m}: must not be negative"),
            Self::TooLarge { period, quantity } => {
                write!(
                    f,
                    "the difference for {period} {quantity} is too large for the ledger"
                )
            }
        }
    }
}

/// How long a reporting period is.
#[derive(Debug, Clone, Copy, PartialEq, Eq, PartialOrd, Ord, Hash)]
pub enum Granularity {
    Year,
    Quarter,
    Month,
}

/// A calendar year (`2026`), quarter (`2026-Q1`) or month (`2026-03`). A quarter or month
/// belongs to its year.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash)]
pub enum ReportingPeriod {
    Year(i32),
    Quarter(i32, u8),
    Month(i32, u8),
}

impl ReportingPeriod {
    pub fn year(self) -> i32 {
        match self {
            Self::Year(y) | Self::Quarter(y, _) | Self::Month(y, _) => y,
        }
    }

    pub fn granularity(self) -> Granularity {
        match self {
            Self::Year(_) => Granularity::Year,
            Self::Quarter(..) => Granularity::Quarter,
            Self::Month(..) => Granularity::Month,
        }
    }

    /// Year, then coarse before fine, then in calendar order: `2026`, `2026-Q1` … `2026-Q4`,
    /// `2026-01` … `2026-12`, `2027`.
    fn sort_key(self) -> (i32, Granularity, u8) {
        let part = match self {
            Self::Year(_) => 0,
            Self::Quarter(_, n) | Self::Month(_, n) => n,
        };
        (self.year(), self.granularity(), part)
    }
}

impl Ord for ReportingPeriod {
    fn cmp(&self, other: &Self) -> Ordering {
        self.sort_key().cmp(&other.sort_key())
    }
}

impl PartialOrd for ReportingPeriod {
    fn partial_cmp(&self, other: &Self) -> Option<Ordering> {
        Some(self.cmp(other))
    }
}

impl FromStr for ReportingPeriod {
    type Err = MaterialityError;

    fn from_str(text: &str) -> Result<Self, Self::Err> {
        let refuse = |reason| MaterialityError::Period {
            text: text.to_string(),
            reason,
        };
        let digits = |s: &str, n| s.len() == n && s.bytes().all(|b| b.is_ascii_digit());
        let (y, rest) = text
            .split_once('-')
            .map_or((text, None), |(y, r)| (y, Some(r)));
        if !digits(y, 4) {
            return Err(refuse(
                "the year must be four digits (2026, 2026-Q1 or 2026-03)",
            ));
        }
        let year: i32 = y
            .parse()
            .map_err(|_| refuse("the year must be four digits"))?;
        match rest {
            None => Ok(Self::Year(year)),
            Some(q) if q.starts_with('Q') => match q[1..].parse::<u8>() {
                Ok(n @ 1..=4) if digits(&q[1..], 1) => Ok(Self::Quarter(year, n)),
                _ => Err(refuse("the quarter must be Q1 to Q4")),
            },
            Some(m) if digits(m, 2) => match m.parse::<u8>() {
                Ok(n @ 1..=12) => Ok(Self::Month(year, n)),
                _ => Err(refuse("the month must be 01 to 12")),
            },
            Some(_) => Err(refuse("after the year comes Q1 to Q4 or a month 01 to 12")),
        }
    }
}

impl fmt::Display for ReportingPeriod {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            Self::Year(y) => write!(f, "{y:04}"),
            Self::Quarter(y, q) => write!(f, "{y:04}-Q{q}"),
            Self::Month(y, m) => write!(f, "{y:04}-{m:02}"),
        }
    }
}

/// The quantities a ledger and a monitoring report are compared on (a closed list).
#[derive(Debug, Clone, Copy, PartialEq, Eq, PartialOrd, Ord, Hash)]
pub enum ReportedQuantity {
    Received,
    Injected,
    Produced,
    Leakage,
    EquipmentLeak,
    Stored,
    Mineralized,
    WeatheringNet,
}

impl ReportedQuantity {
    pub const ALL: [Self; 8] = [
        Self::Received,
        Self::Injected,
        Self::Produced,
        Self::Leakage,
        Self::EquipmentLeak,
        Self::Stored,
        Self::Mineralized,
        Self::WeatheringNet,
    ];

    /// The spelling inputs and outputs use.
    pub fn key(self) -> &'static str {
        match self {
            Self::Received => "received",
            Self::Injected => "injected",
            Self::Produced => "produced",
            Self::Leakage => "leakage",
            Self::EquipmentLeak => "equipment-leak",
            Self::Stored => "stored",
            Self::Mineralized => "mineralized",
            Self::WeatheringNet => "weathering-net",
        }
    }
}

impl FromStr for ReportedQuantity {
    type Err = MaterialityError;

    fn from_str(text: &str) -> Result<Self, Self::Err> {
        Self::ALL
            .into_iter()
            .find(|q| q.key() == text)
            .ok_or_else(|| MaterialityError::Quantity(text.to_string()))
    }
}

impl fmt::Display for ReportedQuantity {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(self.key())
    }
}

/// Which side a figure comes from.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Side {
    Ledger,
    Report,
}

impl Side {
    pub fn key(self) -> &'static str {
        match self {
            Self::Ledger => "ledger",
            Self::Report => "report",
        }
    }
}

/// One figure of one side.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct Figure {
    pub period: ReportingPeriod,
    pub quantity: ReportedQuantity,
    pub mass: Mass,
}

/// Which sides a line was found on.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Presence {
    Both { ledger: Mass, report: Mass },
    LedgerOnly(Mass),
    ReportOnly(Mass),
}

impl Presence {
    /// The ledger's figure, zero when the ledger has none.
    pub fn ledger(self) -> Mass {
        match self {
            Self::Both { ledger, .. } | Self::LedgerOnly(ledger) => ledger,
            Self::ReportOnly(_) => Mass::ZERO,
        }
    }

    /// The report's figure, zero when the report has none.
    pub fn report(self) -> Mass {
        match self {
            Self::Both { report, .. } | Self::ReportOnly(report) => report,
            Self::LedgerOnly(_) => Mass::ZERO,
        }
    }
}

/// One (period, quantity) line compared.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct ReconciledLine {
    pub period: ReportingPeriod,
    pub quantity: ReportedQuantity,
    pub presence: Presence,
    /// ledger − report, a missing figure taken as zero.
    pub difference: Mass,
    /// The difference in % of the ledger figure. `Some(0.0)` when there is no difference;
    /// `None` when there is one and the ledger figure is zero or missing, since no percentage
    /// of nothing is meaningful.
    pub difference_pct: Option<f64>,
}

/// The lines a year's misstatement adds up; named in the result so the output can say it.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum MisstatementRule {
    /// |ledger − report| summed over the year's `stored` lines of this granularity: the finest
    /// the two sides share, or the finest either has when they share none.
    StoredLines(Granularity),
}

/// The materiality levels: shares of the year's stored total, overridable per programme.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct MaterialityPolicy {
    pub standard: f64,
    pub large: f64,
    /// Above this annual stored total a project is large.
    pub large_above: Mass,
}

/// 5 % of the reported total, 2 % for the largest (Regulation (EU) 2018/2067 Art. 23, read),
/// where largest means above 500 kt a year (the category boundary from memory).
impl Default for MaterialityPolicy {
    fn default() -> Self {
        Self {
            standard: 0.05,
            large: 0.02,
            large_above: Mass::from_grams(500_000 * 1_000_000),
        }
    }
}

#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum MaterialityCategory {
    Standard,
    Large,
}

#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Verdict {
    /// The misstatement does not exceed the threshold.
    WithinMateriality,
    Material,
}

/// One reporting year's verdict.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct YearVerdict {
    pub year: i32,
    pub rule: MisstatementRule,
    /// Lines added into the misstatement, and how many of them were one-sided.
    pub lines: usize,
    pub one_sided: usize,
    pub misstatement: Mass,
    /// The ledger's stored total over the same lines: the base of the threshold.
    pub ledger_total: Mass,
    pub category: MaterialityCategory,
    pub threshold_share: f64,
    pub threshold: Mass,
    pub verdict: Verdict,
}

/// Every line, in (period, quantity) order, and a verdict for every year with `stored` lines.
#[derive(Debug, Clone, PartialEq)]
pub struct Reconciliation {
    pub lines: Vec<ReconciledLine>,
    pub years: Vec<YearVerdict>,
}

/// Compares the two sides line by line and judges each year against `policy`.
pub fn reconcile(
    ledger: &[Figure],
    report: &[Figure],
    policy: &MaterialityPolicy,
) -> Result<Reconciliation, MaterialityError> {
    for (field, value) in [
        ("materiality_standard", policy.standard),
        ("materiality_large", policy.large),
    ] {
        if !(value > 0.0 && value < 1.0) {
            return Err(MaterialityError::Fraction { field, value });
        }
    }
    if policy.large_above.grams() < 0 {
        return Err(MaterialityError::LargeAbove(policy.large_above));
    }
    let duplicate = |side, f: &Figure| MaterialityError::Duplicate {
        side,
        period: f.period,
        quantity: f.quantity,
    };
    let mut pairs: BTreeMap<(ReportingPeriod, ReportedQuantity), Presence> = BTreeMap::new();
    for f in ledger {
        if pairs
            .insert((f.period, f.quantity), Presence::LedgerOnly(f.mass))
            .is_some()
        {
            return Err(duplicate(Side::Ledger, f));
        }
    }
    for f in report {
        let key = (f.period, f.quantity);
        let presence = match pairs.get(&key) {
            None => Presence::ReportOnly(f.mass),
            Some(&Presence::LedgerOnly(ledger)) => Presence::Both {
                ledger,
                report: f.mass,
            },
            Some(_) => return Err(duplicate(Side::Report, f)),
        };
        pairs.insert(key, presence);
    }
    let lines = pairs
        .into_iter()
        .map(|((period, quantity), presence)| line(period, quantity, presence))
        .collect::<Result<Vec<_>, _>>()?;
    let years = verdicts(&lines, policy)?;
    Ok(Reconciliation { lines, years })
}

fn line(
    period: ReportingPeriod,
    quantity: ReportedQuantity,
    presence: Presence,
) -> Result<ReconciledLine, MaterialityError> {
    let (l, r) = (presence.ledger(), presence.report());
    let difference = l
        .grams()
        .checked_sub(r.grams())
        .ok_or(MaterialityError::TooLarge { period, quantity })?;
    let difference_pct = match (difference, l.grams()) {
        (0, _) => Some(0.0),
        (_, 0) => None,
        (d, l) => Some(100.0 * d as f64 / l as f64),
    };
    Ok(ReconciledLine {
        period,
        quantity,
        presence,
        difference: Mass::from_grams(difference),
        difference_pct,
    })
}

fn verdicts(
    lines: &[ReconciledLine],
    policy: &MaterialityPolicy,
) -> Result<Vec<YearVerdict>, MaterialityError> {
    // A year is judged on its stored lines; a weathering or mineralization project that reports
    // its net removal or mineralized tonnes instead is judged on those (one headline quantity a
    // year, so no tonne counts twice).
    const HEADLINE: [ReportedQuantity; 3] = [
        ReportedQuantity::Stored,
        ReportedQuantity::WeatheringNet,
        ReportedQuantity::Mineralized,
    ];
    let mut by_year: BTreeMap<i32, Vec<&ReconciledLine>> = BTreeMap::new();
    for l in lines.iter().filter(|l| HEADLINE.contains(&l.quantity)) {
        by_year.entry(l.period.year()).or_default().push(l);
    }
    by_year
        .into_iter()
        .map(|(year, all)| {
            let q = HEADLINE
                .iter()
                .find(|q| all.iter().any(|l| l.quantity == **q))
                .expect("lines of a headline quantity");
            let chosen: Vec<&ReconciledLine> =
                all.into_iter().filter(|l| l.quantity == *q).collect();
            year_verdict(year, &chosen, policy)
        })
        .collect()
}

fn year_verdict(
    year: i32,
    stored: &[&ReconciledLine],
    policy: &MaterialityPolicy,
) -> Result<YearVerdict, MaterialityError> {
    let finest = |both_only: bool| {
        stored
            .iter()
            .filter(|l| !both_only || matches!(l.presence, Presence::Both { .. }))
            .map(|l| l.period.granularity())
            .max()
    };
    let granularity = finest(true)
        .or(finest(false))
        .expect("a year is judged only when it has stored lines");
    let counted: Vec<&&ReconciledLine> = stored
        .iter()
        .filter(|l| l.period.granularity() == granularity)
        .collect();
    let too_large = |l: &ReconciledLine| MaterialityError::TooLarge {
        period: l.period,
        quantity: l.quantity,
    };
    let (mut misstatement, mut ledger_total) = (0i64, 0i64);
    for l in &counted {
        misstatement = l
            .difference
            .grams()
            .checked_abs()
            .and_then(|d| misstatement.checked_add(d))
            .ok_or_else(|| too_large(l))?;
        ledger_total = ledger_total
            .checked_add(l.presence.ledger().grams())
            .ok_or_else(|| too_large(l))?;
    }
    let base = Mass::from_grams(ledger_total.saturating_abs());
    let (category, threshold_share) = if base > policy.large_above {
        (MaterialityCategory::Large, policy.large)
    } else {
        (MaterialityCategory::Standard, policy.standard)
    };
    let threshold = base.scale(threshold_share);
    let misstatement = Mass::from_grams(misstatement);
    Ok(YearVerdict {
        year,
        rule: MisstatementRule::StoredLines(granularity),
        lines: counted.len(),
        one_sided: counted
            .iter()
            .filter(|l| !matches!(l.presence, Presence::Both { .. }))
            .count(),
        misstatement,
        ledger_total: Mass::from_grams(ledger_total),
        category,
        threshold_share,
        threshold,
        verdict: if misstatement > threshold {
            Verdict::Material
        } else {
            Verdict::WithinMateriality
        },
    })
}

#[cfg(test)]
mod tests {
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

    fn run(ledger: &[Figure], report: &[Figure]) -> Reconciliation {
        reconcile(ledger, report, &MaterialityPolicy::default()).unwrap()
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
            ],
            &[
                fig("2026-Q1", "injected", 98_000),
                fig("2026-Q1", "stored", 99_000),
                fig("2026-Q2", "leakage", 3),
                fig("2026-Q3", "stored", 20_000),
            ],
        );
        let find = |p: &str, q: &str| {
            let (p, q) = (p.parse().unwrap(), q.parse().unwrap());
            *r.lines
                .iter()
                .find(|l| l.period == p && l.quantity == q)
                .unwrap()
        };
        let inj = find("2026-Q1", "injected");
        assert_eq!(inj.difference, t(2_000));
        assert_eq!(inj.difference_pct, Some(2.0));
        assert_eq!(find("2026-Q1", "stored").difference_pct, Some(0.0));
        // Ledger figure zero, report not: a difference with no percentage.
        let leak = find("2026-Q2", "leakage");
        assert_eq!((leak.difference, leak.difference_pct), (t(-3), None));
        // One-sided lines are kept, the missing side counted as zero.
        let q2 = find("2026-Q2", "stored");
        assert_eq!(q2.presence, Presence::LedgerOnly(t(50_000)));
        assert_eq!((q2.difference, q2.difference_pct), (t(50_000), Some(100.0)));
        let q3 = find("2026-Q3", "stored");
        assert_eq!(q3.presence, Presence::ReportOnly(t(20_000)));
        assert_eq!((q3.difference, q3.difference_pct), (t(-20_000), None));
        assert_eq!(r.lines.len(), 5);
        let y = r.years[0];
        assert_eq!(y.rule, MisstatementRule::StoredLines(Granularity::Quarter));
        assert_eq!((y.lines, y.one_sided), (3, 2));
        assert_eq!(y.misstatement, t(70_000));
        assert_eq!(y.verdict, Verdict::Material);
    }

    #[test]
    fn five_percent_and_two_percent_thresholds() {
        // Regulation (EU) 2018/2067 Art. 23 (read): materiality 5 % of the reported total, 2 %
        // for the largest; the 500 kt a year boundary is from memory.
        let year = |ledger_t, report_t| {
            run(
                &[fig("2026", "stored", ledger_t)],
                &[fig("2026", "stored", report_t)],
            )
            .years[0]
        };
        let y = year(400_000, 381_000);
        assert_eq!(y.category, MaterialityCategory::Standard);
        assert_eq!(y.threshold, t(20_000));
        assert_eq!(y.misstatement, t(19_000));
        assert_eq!(y.verdict, Verdict::WithinMateriality);
        // Exactly at the threshold is within; one tonne more is material.
        assert_eq!(year(400_000, 380_000).verdict, Verdict::WithinMateriality);
        assert_eq!(year(400_000, 379_999).verdict, Verdict::Material);
        // 500 kt is not above 500 kt: still 5 %.
        assert_eq!(
            year(500_000, 500_000).category,
            MaterialityCategory::Standard
        );
        let y = year(600_000, 585_000);
        assert_eq!(y.category, MaterialityCategory::Large);
        assert_eq!(y.threshold, t(12_000));
        assert_eq!(y.verdict, Verdict::Material);
        // Overridden by the programme.
        let policy = MaterialityPolicy {
            large: 0.03,
            ..MaterialityPolicy::default()
        };
        let r = reconcile(
            &[fig("2026", "stored", 600_000)],
            &[fig("2026", "stored", 585_000)],
            &policy,
        )
        .unwrap();
        assert_eq!(r.years[0].verdict, Verdict::WithinMateriality);
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
            fig("2026-Q1", "injected", 1),
        ];
        let r = run(&ledger, &report);
        let y = r.years[0];
        assert_eq!(y.rule, MisstatementRule::StoredLines(Granularity::Quarter));
        assert_eq!(y.misstatement, t(20_000));
        assert_eq!(y.ledger_total, t(200_000));
        assert_eq!(y.verdict, Verdict::Material);
        // 2027 has a report line only: the ledger total is zero and any misstatement material.
        let y = r.years[1];
        assert_eq!(
            (y.year, y.rule),
            (2027, MisstatementRule::StoredLines(Granularity::Month))
        );
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
            &p,
        )
        .unwrap_err();
        assert_eq!(e.to_string(), "ledger has two lines for 2026 stored");
        let bad = MaterialityPolicy { standard: 0.0, ..p };
        let e = reconcile(&[], &[], &bad).unwrap_err();
        assert_eq!(
            e.to_string(),
            "materiality_standard is 0: must be above 0 and below 1"
        );
        let bad = MaterialityPolicy {
            large_above: t(-1),
            ..p
        };
        let e = reconcile(&[], &[], &bad).unwrap_err();
        assert_eq!(
            e.to_string(),
            "large_above is -1.000000 t: must not be negative"
        );
        let huge = |g| Figure {
            mass: Mass::from_grams(g),
            ..fig("2026", "stored", 0)
        };
        let e = reconcile(&[huge(i64::MAX)], &[huge(-1)], &p).unwrap_err();
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
        let figure = (period, 0usize..8, -1_000_000_000_000i64..1_000_000_000_000).prop_map(
            |(period, q, g)| Figure {
                period,
                quantity: ReportedQuantity::ALL[q],
                mass: Mass::from_grams(g),
            },
        );
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
            let r = reconcile(&ledger, &report, &MaterialityPolicy::default()).unwrap();
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
                proptest::prop_assert!(y.misstatement.grams() >= 0);
                proptest::prop_assert_eq!(
                    y.verdict == Verdict::Material,
                    y.misstatement > y.threshold
                );
            }
        }
    }
}
