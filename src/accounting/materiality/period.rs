//! Reporting periods: a calendar year, quarter or month, and which holds which.

use super::MaterialityError;
use std::cmp::Ordering;
use std::fmt;
use std::str::FromStr;

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

/// Whether period `outer` holds period `inner` (a period holds itself).
pub(super) fn holds(outer: ReportingPeriod, inner: ReportingPeriod) -> bool {
    use ReportingPeriod::{Month, Quarter, Year};
    match (outer, inner) {
        (Year(y), i) => i.year() == y,
        (Quarter(y, q), Quarter(z, r)) => y == z && q == r,
        (Quarter(y, q), Month(z, m)) => y == z && (m - 1) / 3 + 1 == q,
        (Month(..), Month(..)) => outer == inner,
        _ => false,
    }
}

pub(super) fn overlap(a: ReportingPeriod, b: ReportingPeriod) -> bool {
    holds(a, b) || holds(b, a)
}
