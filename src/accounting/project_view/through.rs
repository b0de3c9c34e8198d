//! Activity up to a date (`--through`): what the project's entries add up to counting only
//! the days up to and including it. This is activity time, not knowledge time (`--as-of`
//! leaves out what was recorded later, whatever days it covers).
//!
//! An entry whose grams the view splits between periods by days (metered quantities,
//! emissions, carbonation batches) counts for its days up to the date, split the same way;
//! an entry the view dates by its first day (samples, applications, surveys, calibrations,
//! reversals, seals) counts whole when that day is on or before the date.

use super::evidence::Batch;
use crate::ledger::period::{Period, share_through};
use crate::ledger::{Entry, EntryKind};
use crate::quantity::Mass;
use chrono::NaiveDate;
use std::borrow::Cow;

/// Whether the view splits an entry's grams between periods by its days.
fn split_by_days(kind: EntryKind) -> bool {
    matches!(
        kind,
        EntryKind::Injection
            | EntryKind::Receipt
            | EntryKind::Redelivery
            | EntryKind::Production
            | EntryKind::Leakage
            | EntryKind::EquipmentLeak
            | EntryKind::Emission
            | EntryKind::Carbonation
    )
}

/// The part of an entry up to `day`: none when it starts after, the whole entry when it ends
/// by then (or is dated by its first day), else the entry shortened to end on `day` with the
/// grams of those days.
pub fn entry_through(e: &Entry, day: NaiveDate) -> Option<Cow<'_, Entry>> {
    if e.period.from > day {
        return None;
    }
    if e.period.to <= day || !split_by_days(e.kind) {
        return Some(Cow::Borrowed(e));
    }
    let mut cut = e.clone();
    cut.mass = Mass::from_grams(share_through(e.mass.grams(), e.period, day));
    cut.period = Period {
        from: e.period.from,
        to: day,
    };
    Some(Cow::Owned(cut))
}

/// A carbonation batch's feed and product over the days of `period` up to `day`.
pub fn batch_through(b: Batch, period: Period, day: NaiveDate) -> Batch {
    Batch {
        fed_g: share_through(b.fed_g, period, day),
        product_g: share_through(b.product_g, period, day),
        released_g: share_through(b.released_g, period, day),
        rel_u: b.rel_u,
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::ledger::period::parse_date;

    fn d(s: &str) -> NaiveDate {
        parse_date(s).unwrap()
    }

    #[test]
    fn batch_splits_by_days() {
        // 10 days, 4 through the date: 40 % of 1,000 g fed and 1,100 g product.
        let p = Period::new(d("2026-06-27"), d("2026-07-06")).unwrap();
        let b = batch_through(
            Batch {
                fed_g: 1_000,
                product_g: 1_100,
                released_g: 0,
                rel_u: None,
            },
            p,
            d("2026-06-30"),
        );
        assert_eq!((b.fed_g, b.product_g), (400, 440));
    }
}
