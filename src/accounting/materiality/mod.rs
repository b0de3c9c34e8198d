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

mod judge;
mod level;
mod period;
mod quantity;
mod record;

pub use level::{Level, LevelError};
pub use period::{Granularity, ReportingPeriod};
pub use quantity::ReportedQuantity;
pub use record::{recorded_lines, recorded_years};

use crate::quantity::Mass;
use judge::judge_year;
use std::collections::{BTreeMap, BTreeSet};
use std::fmt;

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

#[cfg(test)]
mod tests;
