//! An entry's recorded_at as read back. A ledger file holds it as the text diesel writes
//! (`2026-12-04 18:03:44.954531`); every entry row the walk reads holds one, so that form is
//! read here digit by digit, and any other goes through diesel's own reading, whose result and
//! refusal stay the ones a reader sees. A registry's timestamps are diesel's to read.

use super::backend::{MultiBackend, MultiRawValue};
use chrono::{NaiveDate, NaiveDateTime, NaiveTime};
use diesel::deserialize::{self, FromSql};
use diesel::pg::Pg;
use diesel::sql_types::Timestamp;
use diesel::sqlite::{Sqlite, SqliteValue};

/// A recorded_at read back from the entries table.
#[derive(diesel::deserialize::FromSqlRow)]
pub struct StoredTime(NaiveDateTime);

impl From<StoredTime> for NaiveDateTime {
    fn from(t: StoredTime) -> Self {
        t.0
    }
}

impl FromSql<Timestamp, Sqlite> for StoredTime {
    fn from_sql(mut value: SqliteValue<'_, '_, '_>) -> deserialize::Result<Self> {
        match written(value.read_text()) {
            Some(t) => Ok(StoredTime(t)),
            None => <NaiveDateTime as FromSql<Timestamp, Sqlite>>::from_sql(value).map(StoredTime),
        }
    }
}

impl FromSql<Timestamp, Pg> for StoredTime {
    fn from_sql(value: diesel::pg::PgValue<'_>) -> deserialize::Result<Self> {
        <NaiveDateTime as FromSql<Timestamp, Pg>>::from_sql(value).map(StoredTime)
    }
}

impl FromSql<Timestamp, MultiBackend> for StoredTime {
    fn from_sql(value: MultiRawValue<'_>) -> deserialize::Result<Self> {
        value.from_sql::<Self, Timestamp>()
    }
}

/// `YYYY-MM-DD HH:MM:SS`, then a dot and 1 to 9 digits of the second or nothing: the form
/// diesel writes (`%F %T%.f`), which its reading accepts first and reads to the same instant.
/// None for any other text, and for a leap second (diesel's reading decides those).
fn written(text: &str) -> Option<NaiveDateTime> {
    let b = text.as_bytes();
    let (head, fraction) = (b.get(..19)?, &b[19..]);
    let num = |r: std::ops::Range<usize>| {
        head[r].iter().try_fold(0u32, |n, &c| {
            c.is_ascii_digit().then(|| n * 10 + u32::from(c - b'0'))
        })
    };
    let punctuated = [(4, b'-'), (7, b'-'), (10, b' '), (13, b':'), (16, b':')]
        .iter()
        .all(|&(i, c)| head[i] == c);
    if !punctuated {
        return None;
    }
    let nanos = match fraction {
        [] => 0,
        [b'.', digits @ ..] if (1..=9).contains(&digits.len()) => {
            let n = digits.iter().try_fold(0u32, |n, &c| {
                c.is_ascii_digit().then(|| n * 10 + u32::from(c - b'0'))
            })?;
            n * 10u32.pow(9 - digits.len() as u32)
        }
        _ => return None,
    };
    let date = NaiveDate::from_ymd_opt(i32::try_from(num(0..4)?).ok()?, num(5..7)?, num(8..10)?)?;
    let second = num(17..19)?;
    let time = (second < 60)
        .then(|| NaiveTime::from_hms_nano_opt(num(11..13)?, num(14..16)?, second, nanos))??;
    Some(date.and_time(time))
}

#[cfg(test)]
mod tests {
    use super::*;

    /// Diesel's own reading of a stored recorded_at (its formats, in its order).
    fn diesel(text: &str) -> Option<NaiveDateTime> {
        ["%F %T%.f", "%F %T%.f%:z", "%F %T"]
            .iter()
            .find_map(|f| NaiveDateTime::parse_from_str(text, f).ok())
    }

    #[test]
    fn the_written_form_reads_as_diesel_reads_it() {
        for text in [
            "2026-12-04 18:03:44.954531",
            "2026-12-04 18:03:44",
            "2026-12-04 18:03:44.9",
            "2026-12-04 18:03:44.123456789",
            "0001-01-01 00:00:00.000000",
            "2024-02-29 23:59:59.999999",
        ] {
            assert_eq!(written(text), diesel(text), "{text}");
            assert!(written(text).is_some(), "{text}");
        }
        let t = NaiveDate::from_ymd_opt(2026, 1, 2)
            .unwrap()
            .and_hms_micro_opt(3, 4, 5, 60)
            .unwrap();
        assert_eq!(written(&t.format("%F %T%.f").to_string()), Some(t));
    }

    #[test]
    fn any_other_form_is_left_to_diesel() {
        for text in [
            "2026-12-04T18:03:44",
            "2026-12-04 18:03:44.",
            "2026-12-04 18:03:44.1234567890",
            "2026-12-04 18:03:44+00:00",
            "2026-12-04 18:03:60",
            "2026-13-04 18:03:44",
            "2026-02-30 18:03:44",
            "2026-12-04 24:03:44",
            "2026-12-04 18:3:44",
            "+026-12-04 18:03:44",
            "2026-12-04",
            "",
            "2460000.5",
        ] {
            assert_eq!(written(text), None, "{text}");
        }
    }
}
