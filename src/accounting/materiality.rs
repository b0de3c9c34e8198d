//! Reconciliation of the ledger with an independent monitoring report, line by line, and the
//! verdict per reporting year: is the total misstatement within materiality?
//!
//! Rules chosen here (docs/uncertainty.md, "Materiality", says why):
//! - difference = ledger − report, so a positive difference is what the ledger states beyond the
//!   report; its percentage is of the ledger figure.
//! - every line is judged: the route's stored figure and every quantity it is computed from
//!   count toward the misstatement, at the finest period the report gives; a period the report
//!   leaves out is "not reported", never a misstatement; a report figure the ledger lacks
//!   counts whole.
//! - an error in a term shows in the stored figure too: where both cover one stretch of time,
//!   the larger of the two sums counts, never both.
//! - the threshold is a share of the ledger's stored total for the year: the ledger is the
//!   operator's reported figure under verification.

use crate::quantity::Mass;
use std::cmp::Ordering;
use std::collections::{BTreeMap, BTreeSet};
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

/// How a quantity bears on its year's misstatement, for one project's route and balance.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Bearing {
    /// The figure the route claims: stored, or a rock route's mineralized tonnes or net removal.
    Headline,
    /// A term the stored figure is computed from.
    Term,
    /// Compared line by line, but no term of the stored figure (received under Subpart RR).
    Listed,
    /// The ledger keeps no such figure for this route.
    NotKept,
}

/// Whether a line counts toward its year's misstatement, and if not, why.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Judgement {
    Counted,
    /// The ledger has the figure, the report gives none for the period.
    NotReported,
    /// Finer periods of the same quantity inside this one are counted instead.
    FinerCounted,
    /// Not a term of the stored figure.
    NotATerm,
    /// The ledger keeps no such figure.
    NotKept,
    /// The year is judged on another headline figure (one headline a year, so no tonne twice).
    JudgedOn(ReportedQuantity),
}

impl Judgement {
    /// The words the lines table shows.
    pub fn text(self) -> String {
        match self {
            Self::Counted => "counted".into(),
            Self::NotReported => "not reported".into(),
            Self::FinerCounted => "not added: its finer periods are counted".into(),
            Self::NotATerm => "not added: not a term of the stored figure".into(),
            Self::NotKept => "this ledger keeps no such figure".into(),
            Self::JudgedOn(q) => format!("not added: the year is judged on {q}"),
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
    pub judgement: Judgement,
}

/// The materiality level: a share of the year's stored total.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct MaterialityPolicy {
    pub share: f64,
}

/// 5 %: the level Regulation (EU) 2018/2067 Art. 23 sets for all but the largest installations
/// (read). Its 2 % belongs to installations above 500 kt of annual *emissions* (category C, from
/// memory), a boundary about emissions that stored tonnes do not cross, so it is never applied
/// by stored tonnes; a programme that wants it says so (`--materiality 2%`).
impl Default for MaterialityPolicy {
    fn default() -> Self {
        Self { share: 0.05 }
    }
}

#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Verdict {
    /// The misstatement does not exceed the threshold.
    WithinMateriality,
    Material,
    /// No line of the year counts: nothing was assessed.
    NotAssessed,
}

impl Verdict {
    pub fn text(self) -> &'static str {
        match self {
            Self::WithinMateriality => "within materiality",
            Self::Material => "MATERIAL",
            Self::NotAssessed => "not assessed",
        }
    }
}

/// One reporting year's verdict.
#[derive(Debug, Clone, PartialEq)]
pub struct YearVerdict {
    pub year: i32,
    /// The quantities whose lines were added, in their order.
    pub counted: Vec<ReportedQuantity>,
    /// Lines added into the misstatement.
    pub lines: usize,
    pub misstatement: Mass,
    /// The ledger's stored total for the year (of the headline judged): the base of the threshold.
    pub ledger_total: Mass,
    pub threshold_share: f64,
    pub threshold: Mass,
    pub verdict: Verdict,
}

/// Every line, in (period, quantity) order, and a verdict for every year either side names.
#[derive(Debug, Clone, PartialEq)]
pub struct Reconciliation {
    pub lines: Vec<ReconciledLine>,
    pub years: Vec<YearVerdict>,
}

impl Reconciliation {
    /// Material when any year is; not assessed when no year is; within materiality otherwise.
    pub fn overall(&self) -> Verdict {
        if self.years.iter().any(|y| y.verdict == Verdict::Material) {
            Verdict::Material
        } else if self.years.iter().all(|y| y.verdict == Verdict::NotAssessed) {
            Verdict::NotAssessed
        } else {
            Verdict::WithinMateriality
        }
    }
}

/// The headline figures, in the order a year is judged on the first the report gives.
const HEADLINE: [ReportedQuantity; 3] = [
    ReportedQuantity::Stored,
    ReportedQuantity::WeatheringNet,
    ReportedQuantity::Mineralized,
];

/// Compares the two sides line by line and judges each year against `policy`. `bearing` says
/// what each quantity is to the project's stored figure; `totals` holds the ledger's yearly
/// headline figures, the base of each year's threshold.
pub fn reconcile(
    ledger: &[Figure],
    report: &[Figure],
    totals: &[Figure],
    bearing: impl Fn(ReportedQuantity) -> Bearing,
    policy: &MaterialityPolicy,
) -> Result<Reconciliation, MaterialityError> {
    if !(policy.share > 0.0 && policy.share < 1.0) {
        return Err(MaterialityError::Fraction {
            field: "materiality",
            value: policy.share,
        });
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
    let mut lines = pairs
        .into_iter()
        .map(|((period, quantity), presence)| line(period, quantity, presence, &bearing))
        .collect::<Result<Vec<_>, _>>()?;
    let years: BTreeSet<i32> = lines.iter().map(|l| l.period.year()).collect();
    let years = years
        .into_iter()
        .map(|y| judge_year(y, &mut lines, totals, &bearing, policy))
        .collect::<Result<Vec<_>, _>>()?;
    Ok(Reconciliation { lines, years })
}

fn line(
    period: ReportingPeriod,
    quantity: ReportedQuantity,
    presence: Presence,
    bearing: &impl Fn(ReportedQuantity) -> Bearing,
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
    let judgement = match (bearing(quantity), presence) {
        (Bearing::NotKept, _) => Judgement::NotKept,
        (Bearing::Listed, _) => Judgement::NotATerm,
        (_, Presence::LedgerOnly(_)) => Judgement::NotReported,
        _ => Judgement::Counted,
    };
    Ok(ReconciledLine {
        period,
        quantity,
        presence,
        difference: Mass::from_grams(difference),
        difference_pct,
        judgement,
    })
}

/// Whether period `outer` holds period `inner` (a period holds itself).
fn holds(outer: ReportingPeriod, inner: ReportingPeriod) -> bool {
    use ReportingPeriod::{Month, Quarter, Year};
    match (outer, inner) {
        (Year(y), i) => i.year() == y,
        (Quarter(y, q), Quarter(z, r)) => y == z && q == r,
        (Quarter(y, q), Month(z, m)) => y == z && (m - 1) / 3 + 1 == q,
        (Month(..), Month(..)) => outer == inner,
        _ => false,
    }
}

fn overlap(a: ReportingPeriod, b: ReportingPeriod) -> bool {
    holds(a, b) || holds(b, a)
}

/// Settles which of year `year`'s lines count, and the year's verdict.
fn judge_year(
    year: i32,
    lines: &mut [ReconciledLine],
    totals: &[Figure],
    bearing: &impl Fn(ReportedQuantity) -> Bearing,
    policy: &MaterialityPolicy,
) -> Result<YearVerdict, MaterialityError> {
    let idx: Vec<usize> = (0..lines.len())
        .filter(|&i| lines[i].period.year() == year)
        .collect();
    let counted = |l: &ReconciledLine| l.judgement == Judgement::Counted;
    // One headline a year: the first the report gives.
    let headline = HEADLINE.into_iter().find(|q| {
        idx.iter()
            .any(|&i| lines[i].quantity == *q && counted(&lines[i]))
    });
    for &i in &idx {
        let l = &mut lines[i];
        if let Some(h) = headline
            && counted(l)
            && bearing(l.quantity) == Bearing::Headline
            && l.quantity != h
        {
            l.judgement = Judgement::JudgedOn(h);
        }
    }
    // Finest periods first: a line whose period holds a finer counted line of its quantity is
    // not added again.
    let mut by_fineness = idx.clone();
    by_fineness.sort_by_key(|&i| std::cmp::Reverse(lines[i].period.granularity()));
    for (n, &i) in by_fineness.iter().enumerate() {
        let covered = by_fineness[..n].iter().any(|&j| {
            counted(&lines[j])
                && lines[j].quantity == lines[i].quantity
                && lines[j].period != lines[i].period
                && holds(lines[i].period, lines[j].period)
        });
        if covered && counted(&lines[i]) {
            lines[i].judgement = Judgement::FinerCounted;
        }
    }
    let added: Vec<&ReconciledLine> = idx
        .iter()
        .map(|&i| &lines[i])
        .filter(|l| counted(l))
        .collect();
    // Lines covering one stretch of time are one group: in it, the headline's differences and
    // the terms' differences are two readings of one misstatement, so the larger counts.
    let mut group: Vec<usize> = (0..added.len()).collect();
    fn root(group: &[usize], mut i: usize) -> usize {
        while group[i] != i {
            i = group[i];
        }
        i
    }
    for a in 0..added.len() {
        for b in a + 1..added.len() {
            if overlap(added[a].period, added[b].period) {
                let (ra, rb) = (root(&group, a), root(&group, b));
                group[ra.max(rb)] = ra.min(rb);
            }
        }
    }
    let too_large = |l: &ReconciledLine| MaterialityError::TooLarge {
        period: l.period,
        quantity: l.quantity,
    };
    let mut sums: BTreeMap<usize, (i64, i64)> = BTreeMap::new();
    for (n, l) in added.iter().enumerate() {
        let r = root(&group, n);
        let (h, t) = sums.entry(r).or_default();
        let slot = if bearing(l.quantity) == Bearing::Headline {
            h
        } else {
            t
        };
        *slot = l
            .difference
            .grams()
            .checked_abs()
            .and_then(|d| slot.checked_add(d))
            .ok_or_else(|| too_large(l))?;
    }
    let misstatement = sums
        .values()
        .try_fold(0i64, |acc, (h, t)| acc.checked_add(*h.max(t)))
        .ok_or(MaterialityError::TooLarge {
            period: ReportingPeriod::Year(year),
            quantity: headline.unwrap_or(ReportedQuantity::Stored),
        })?;
    let base_quantity = headline.unwrap_or_else(|| {
        HEADLINE
            .into_iter()
            .find(|q| bearing(*q) == Bearing::Headline)
            .unwrap_or(ReportedQuantity::Stored)
    });
    let ledger_total = totals
        .iter()
        .find(|f| f.period == ReportingPeriod::Year(year) && f.quantity == base_quantity)
        .map_or(Mass::ZERO, |f| f.mass);
    let threshold = Mass::from_grams(ledger_total.grams().saturating_abs()).scale(policy.share);
    let misstatement = Mass::from_grams(misstatement);
    let mut quantities: Vec<ReportedQuantity> = added.iter().map(|l| l.quantity).collect();
    quantities.sort();
    quantities.dedup();
    Ok(YearVerdict {
        year,
        lines: added.len(),
        counted: quantities,
        misstatement,
        ledger_total,
        threshold_share: policy.share,
        threshold,
        verdict: if added.is_empty() {
            Verdict::NotAssessed
        } else if misstatement > threshold {
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
            .filter(|f| {
                matches!(f.period, ReportingPeriod::Year(_)) && f.quantity.key() == "stored"
            })
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
}
