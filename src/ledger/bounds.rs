//! The bounds every value is held to before it goes into the ledger, in one place: free text
//! has a length, activity dates a window (from 1900 to the ledger's clock). Without them one
//! absurd value (a 10 MB meter name, a period of a hundred thousand years) costs gigabytes or
//! hours in every later report.

use super::entry::Entry;
use crate::quantity::Mass;
use chrono::NaiveDate;

/// Characters a free-text field (a name, note, reason, meter, pathway, key ...) may hold.
pub const TEXT_MAX: usize = 200;

/// Characters one value of an entry's reading may hold. Free-text options are held to
/// [`TEXT_MAX`] where they are given; a value composed from several of them (a calculation
/// spelled out with its factor's source) may run longer.
pub const READING_MAX: usize = 1_000;

/// Characters a signed statement may hold: a paragraph or two of a verifier's opinion.
pub const STATEMENT_MAX: usize = 2_000;

/// The earliest activity date the ledger takes.
pub const EARLIEST: NaiveDate = NaiveDate::from_ymd_opt(1900, 1, 1).expect("a calendar date");

/// Characters of a refused value an error message repeats.
const SHOWN: usize = 40;

/// Refuses text longer than `max` characters.
pub fn text(value: &str, max: usize) -> Result<(), String> {
    let n = value.chars().count();
    if n > max {
        return Err(format!("is {n} characters long; at most {max} are kept"));
    }
    Ok(())
}

/// Why free text is refused.
#[derive(Debug, Clone, PartialEq, Eq)]
pub enum TextRefusal {
    /// Longer than its bound (see [`text`]).
    TooLong(String),
    Empty,
    /// A control character, which would garble reports.
    Control,
}

impl std::fmt::Display for TextRefusal {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        match self {
            Self::TooLong(why) => f.write_str(why),
            Self::Empty => f.write_str("must not be empty"),
            Self::Control => f.write_str("must not contain control characters"),
        }
    }
}

/// Free text that goes into the ledger: at most `max` characters, not blank, no control
/// characters.
pub fn free_text(value: &str, max: usize) -> Result<(), TextRefusal> {
    text(value, max).map_err(TextRefusal::TooLong)?;
    if value.trim().is_empty() {
        return Err(TextRefusal::Empty);
    }
    if value.chars().any(char::is_control) {
        return Err(TextRefusal::Control);
    }
    Ok(())
}

/// The value as an error message repeats it: whole when short, else its start and length.
pub fn shown(value: &str) -> String {
    if value.chars().count() <= SHOWN {
        return value.to_string();
    }
    let head: String = value.chars().take(SHOWN).collect();
    format!("{head}…")
}

/// Refuses a reporting year outside 1900 to 9999.
pub fn reporting_year(year: i32) -> Result<(), String> {
    if !(1900..=9999).contains(&year) {
        return Err("is not a plausible reporting year".into());
    }
    Ok(())
}

/// Refuses a reading whose CO2 rounds to 0 g: the ledger keeps whole grams, and a reading that
/// holds none is refused like a zero.
pub fn grams(m: Mass) -> Result<(), String> {
    if m.grams() == 0 {
        return Err("rounds to 0 g of CO2: a reading must hold at least 1 g".into());
    }
    Ok(())
}

/// Refuses an activity date before [`EARLIEST`] or after `today`, the ledger's clock: nothing
/// happens in the future, and nothing the ledger counts happened before 1900.
pub fn activity_date(d: NaiveDate, today: NaiveDate) -> Result<(), String> {
    if d < EARLIEST {
        return Err(format!(
            "is before {EARLIEST}, the earliest date the ledger takes"
        ));
    }
    if d > today {
        return Err(format!(
            "is after the ledger's clock ({today}): activity cannot be recorded before it happens"
        ));
    }
    Ok(())
}

/// A field of an entry that is out of bounds: which, its value, and why.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct OutOfBounds {
    /// The entry's field: `key`, `meter`, `note`, `reason`, a reading field's name (`pathway`
    /// ...), `period_from` or `period_to`; the command line names its option.
    pub field: String,
    pub value: String,
    pub why: String,
}

impl std::fmt::Display for OutOfBounds {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        write!(f, "{} {:?}: {}", self.field, shown(&self.value), self.why)
    }
}

/// Checks every free-text field, each value of the reading and both ends of the period of an
/// entry about to be appended, whichever command or file it came from.
pub fn entry(e: &Entry, today: NaiveDate) -> Result<(), OutOfBounds> {
    let out = |field: &str, value: &str, why: String| OutOfBounds {
        field: field.to_string(),
        value: value.to_string(),
        why,
    };
    let texts = [
        ("key", Some(e.key.as_str())),
        ("meter", e.meter.as_deref()),
        ("note", e.note.as_deref()),
        ("reason", e.reason.as_deref()),
    ];
    for (field, value) in texts {
        if let Some(v) = value {
            text(v, TEXT_MAX).map_err(|why| out(field, v, why))?;
        }
    }
    for (name, v) in &e.reading.0 {
        text(v, READING_MAX).map_err(|why| out(name, v, why))?;
    }
    for (field, d) in [("period_from", e.period.from), ("period_to", e.period.to)] {
        activity_date(d, today).map_err(|why| out(field, &d.to_string(), why))?;
    }
    Ok(())
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn text_is_counted_in_characters() {
        assert!(text(&"é".repeat(200), TEXT_MAX).is_ok());
        let e = text(&"é".repeat(201), TEXT_MAX).unwrap_err();
        assert_eq!(e, "is 201 characters long; at most 200 are kept");
        assert_eq!(shown(&"x".repeat(41)), format!("{}…", "x".repeat(40)));
        assert_eq!(shown("short"), "short");
    }

    #[test]
    fn free_text_is_bounded_not_blank_and_free_of_control_characters() {
        assert_eq!(free_text("TF-I1 annulus", TEXT_MAX), Ok(()));
        assert!(matches!(
            free_text(&"x".repeat(201), TEXT_MAX),
            Err(TextRefusal::TooLong(_))
        ));
        assert_eq!(free_text("  ", TEXT_MAX), Err(TextRefusal::Empty));
        assert_eq!(free_text("a\tb", TEXT_MAX), Err(TextRefusal::Control));
    }

    #[test]
    fn reporting_years_from_1900_to_9999() {
        assert!(reporting_year(1900).is_ok() && reporting_year(9999).is_ok());
        assert!(reporting_year(1899).is_err() && reporting_year(10_000).is_err());
    }

    #[test]
    fn dates_from_1900_to_the_clock() {
        let d = |s| NaiveDate::parse_from_str(s, "%Y-%m-%d").unwrap();
        let today = d("2027-01-15");
        assert!(activity_date(d("1900-01-01"), today).is_ok());
        assert!(activity_date(today, today).is_ok());
        assert!(activity_date(d("1899-12-31"), today).is_err());
        assert!(activity_date(d("2027-01-16"), today).is_err());
    }
}
