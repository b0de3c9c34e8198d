//! Reporting periods: the days an entry covers (both ends included) and the calendar buckets
//! reports group them into.

use chrono::{DateTime, Datelike, NaiveDate, Utc};
use std::fmt;

/// The days an entry covers, `from` and `to` both included.
#[derive(Debug, Clone, Copy, PartialEq, Eq, PartialOrd, Ord)]
pub struct Period {
    pub from: NaiveDate,
    pub to: NaiveDate,
}

impl Period {
    /// A period whose end is not before its start.
    pub fn new(from: NaiveDate, to: NaiveDate) -> Result<Self, String> {
        if to < from {
            return Err(format!("ends before it starts ({from} to {to})"));
        }
        Ok(Self { from, to })
    }

    pub fn day(d: NaiveDate) -> Self {
        Self { from: d, to: d }
    }

    pub fn days(self) -> i64 {
        (self.to - self.from).num_days() + 1
    }
}

impl fmt::Display for Period {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        if self.from == self.to {
            write!(f, "{}", self.from)
        } else {
            write!(f, "{} – {}", self.from, self.to)
        }
    }
}

/// The last instant of a calendar day in UTC, to the microsecond an entry's recorded time
/// keeps: what the ledger held "as of" that day includes everything recorded up to it.
pub fn end_of_day(d: NaiveDate) -> DateTime<Utc> {
    d.and_hms_micro_opt(23, 59, 59, 999_999)
        .expect("valid time")
        .and_utc()
}

/// Parses an ISO 8601 calendar date (`2026-03-31`).
pub fn parse_date(s: &str) -> Result<NaiveDate, String> {
    let s = s.trim();
    padded_date(s)
        .or_else(|| NaiveDate::parse_from_str(s, "%Y-%m-%d").ok())
        .ok_or_else(|| "is not an ISO 8601 date (YYYY-MM-DD)".to_string())
}

/// The form every stored date has (`2026-03-31`), read without chrono's format parser: each
/// entry row read holds two.
fn padded_date(s: &str) -> Option<NaiveDate> {
    let b: &[u8; 10] = s.as_bytes().try_into().ok()?;
    let num = |r: std::ops::Range<usize>| {
        b[r].iter().try_fold(0u32, |n, &c| {
            c.is_ascii_digit().then(|| n * 10 + u32::from(c - b'0'))
        })
    };
    if b[4] != b'-' || b[7] != b'-' {
        return None;
    }
    NaiveDate::from_ymd_opt(i32::try_from(num(0..4)?).ok()?, num(5..7)?, num(8..10)?)
}

/// Days since 1970-01-01, the canonical encoding of a date.
pub fn epoch_days(d: NaiveDate) -> i32 {
    let epoch = NaiveDate::from_ymd_opt(1970, 1, 1).expect("valid date");
    i32::try_from((d - epoch).num_days()).expect("chrono dates fit in i32 days")
}

/// How reports group periods.
#[derive(Debug, Clone, Copy, PartialEq, Eq, PartialOrd, Ord)]
pub enum Grouping {
    Month,
    Quarter,
    Year,
}

/// One calendar month, quarter or year.
#[derive(Debug, Clone, Copy, PartialEq, Eq, PartialOrd, Ord, Hash)]
pub struct Bucket {
    pub year: i32,
    /// Month 1–12, quarter 1–4, or 0 for a whole year.
    pub part: u32,
    pub grouping_rank: u8,
}

impl Grouping {
    pub fn bucket(self, d: NaiveDate) -> Bucket {
        let (part, grouping_rank) = match self {
            Grouping::Month => (d.month(), 0),
            Grouping::Quarter => ((d.month() - 1) / 3 + 1, 1),
            Grouping::Year => (0, 2),
        };
        Bucket {
            year: d.year(),
            part,
            grouping_rank,
        }
    }
}

impl Bucket {
    /// First day of the bucket.
    pub fn first_day(self) -> NaiveDate {
        let month = match self.grouping_rank {
            0 => self.part,
            1 => self.part * 3 - 2,
            _ => 1,
        };
        NaiveDate::from_ymd_opt(self.year, month, 1).expect("valid calendar date")
    }

    /// Last day of the bucket.
    pub fn last_day(self) -> NaiveDate {
        let (y, m) = match self.grouping_rank {
            0 => (self.year, self.part),
            1 => (self.year, self.part * 3),
            _ => (self.year, 12),
        };
        let next = if m == 12 {
            NaiveDate::from_ymd_opt(y + 1, 1, 1)
        } else {
            NaiveDate::from_ymd_opt(y, m + 1, 1)
        };
        next.and_then(|n| n.pred_opt())
            .expect("valid calendar date")
    }
}

impl fmt::Display for Bucket {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self.grouping_rank {
            0 => write!(f, "{}-{:02}", self.year, self.part),
            1 => write!(f, "{}-Q{}", self.year, self.part),
            _ => write!(f, "{}", self.year),
        }
    }
}

/// Splits whole grams over the buckets a period touches, in proportion to its days in each;
/// the parts sum exactly to the whole (largest remainder, ties to the earlier bucket).
pub fn apportion(grams: i64, period: Period, grouping: Grouping) -> Vec<(Bucket, i64)> {
    let mut spans: Vec<(Bucket, i64)> = Vec::new();
    let mut day = period.from;
    while day <= period.to {
        let b = grouping.bucket(day);
        let end = b.last_day().min(period.to);
        spans.push((b, (end - day).num_days() + 1));
        match end.succ_opt() {
            Some(n) => day = n,
            None => break,
        }
    }
    split_by_days(grams, &spans)
}

/// The grams of a period's days up to and including `day`, split from the rest as
/// [`apportion`] splits a period between buckets: by days, in whole grams, largest remainder,
/// a tie to the earlier part. All of them when the period ends by `day`, none when it starts
/// after it.
pub fn share_through(grams: i64, period: Period, day: NaiveDate) -> i64 {
    if period.to <= day {
        return grams;
    }
    if period.from > day {
        return 0;
    }
    let before = (day - period.from).num_days() + 1;
    let after = (period.to - day).num_days();
    split_by_days(grams, &[(true, before), (false, after)])[0].1
}

/// Splits whole grams over parts of a period by their days, exactly (largest remainder, ties to
/// the earlier part).
fn split_by_days<K: Copy>(grams: i64, spans: &[(K, i64)]) -> Vec<(K, i64)> {
    if spans.len() == 1 {
        return vec![(spans[0].0, grams)];
    }
    let total: i128 = spans.iter().map(|s| i128::from(s.1)).sum();
    let mut parts: Vec<(K, i64, i128)> = spans
        .iter()
        .map(|&(b, days)| {
            let share = i128::from(grams) * i128::from(days);
            let q = share.div_euclid(total);
            (b, q as i64, share.rem_euclid(total))
        })
        .collect();
    let mut left = grams - parts.iter().map(|p| p.1).sum::<i64>();
    let mut order: Vec<usize> = (0..parts.len()).collect();
    order.sort_by(|&a, &b| parts[b].2.cmp(&parts[a].2).then(a.cmp(&b)));
    for i in order {
        if left == 0 {
            break;
        }
        parts[i].1 += 1;
        left -= 1;
    }
    parts.into_iter().map(|(b, g, _)| (b, g)).collect()
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn the_end_of_a_day_is_its_last_microsecond() {
        let d = parse_date("2026-06-30").unwrap();
        let end = end_of_day(d);
        assert_eq!(end.to_rfc3339(), "2026-06-30T23:59:59.999999+00:00");
        assert_eq!(
            (end + chrono::Duration::microseconds(1)).date_naive(),
            d.succ_opt().unwrap()
        );
    }

    fn d(s: &str) -> NaiveDate {
        parse_date(s).unwrap()
    }

    #[test]
    fn buckets_and_last_days() {
        assert_eq!(
            Grouping::Quarter.bucket(d("2026-05-10")).to_string(),
            "2026-Q2"
        );
        assert_eq!(
            Grouping::Month.bucket(d("2026-02-10")).last_day(),
            d("2026-02-28")
        );
        assert_eq!(
            Grouping::Quarter.bucket(d("2026-12-31")).last_day(),
            d("2026-12-31")
        );
        assert_eq!(Grouping::Year.bucket(d("2028-02-29")).to_string(), "2028");
        assert_eq!(
            Grouping::Quarter.bucket(d("2026-05-10")).first_day(),
            d("2026-04-01")
        );
        assert_eq!(
            Grouping::Month.bucket(d("2026-05-10")).first_day(),
            d("2026-05-01")
        );
        assert_eq!(
            Grouping::Year.bucket(d("2026-05-10")).first_day(),
            d("2026-01-01")
        );
    }

    #[test]
    fn apportion_is_exact_and_by_days() {
        // 10 days: 1 in March, 9 in April → 10 % and 90 %.
        let p = Period::new(d("2026-03-31"), d("2026-04-09")).unwrap();
        let parts = apportion(1_000_001, p, Grouping::Quarter);
        assert_eq!(parts.iter().map(|p| p.1).sum::<i64>(), 1_000_001);
        assert_eq!(parts[0].1, 100_000);
        assert_eq!(parts[1].1, 900_001);
        let one = apportion(5, Period::day(d("2026-01-01")), Grouping::Year);
        assert_eq!(one, vec![(Grouping::Year.bucket(d("2026-01-01")), 5)]);
    }

    #[test]
    fn share_through_splits_as_apportion_does() {
        // 40 days, 30 in June: 985 t × 30/40 = 738.75 t exactly.
        let p = Period::new(d("2026-06-01"), d("2026-07-10")).unwrap();
        assert_eq!(share_through(985_000_000, p, d("2026-06-30")), 738_750_000);
        // At a quarter's end it is the quarters' split: 1 day of 10 is 100,000 g of 1,000,001.
        let q = Period::new(d("2026-03-31"), d("2026-04-09")).unwrap();
        assert_eq!(share_through(1_000_001, q, d("2026-03-31")), 100_000);
        // 985,000 g over 3 days, 1 day through: 328,333⅓ and 656,666⅔; the left gram goes to
        // the larger remainder, the later part.
        let r = Period::new(d("2026-06-30"), d("2026-07-02")).unwrap();
        assert_eq!(share_through(985_000, r, d("2026-06-30")), 328_333);
        assert_eq!(share_through(985_000, r, d("2026-07-02")), 985_000);
        assert_eq!(share_through(985_000, r, d("2026-06-29")), 0);
    }

    #[test]
    fn refuses_backwards_period() {
        assert!(Period::new(d("2026-02-01"), d("2026-01-31")).is_err());
        assert!(parse_date("2026-13-01").is_err());
        assert!(parse_date("01/02/2026").is_err());
    }

    proptest::proptest! {
        #[test]
        fn apportion_sums_exactly(g in -10i64.pow(15)..10i64.pow(15), start in 0i64..3000, len in 0i64..800) {
            let from = d("2024-01-01") + chrono::Days::new(start as u64);
            let p = Period::new(from, from + chrono::Days::new(len as u64)).unwrap();
            for grouping in [Grouping::Month, Grouping::Quarter, Grouping::Year] {
                let parts = apportion(g, p, grouping);
                proptest::prop_assert_eq!(parts.iter().map(|x| x.1).sum::<i64>(), g);
            }
            // Cut at a quarter's end inside the period, the part up to it is the first
            // quarter's share when the period touches two quarters.
            let end = Grouping::Quarter.bucket(p.from).last_day();
            let quarters = apportion(g, p, Grouping::Quarter);
            if quarters.len() == 2 {
                proptest::prop_assert_eq!(share_through(g, p, end), quarters[0].1);
            }
        }
    }
}
