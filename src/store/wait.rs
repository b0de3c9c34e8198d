//! How long a writer waits for another writer to finish (`--wait`): SQLite's busy timeout and
//! PostgreSQL's lock timeout, and the words the command gives up with when the wait runs out.

use crate::error::{Error, Result, StoreKind};
use std::fmt;
use std::time::Duration;

/// A bounded wait for the ledger's write lock. Whole milliseconds, at most a day: both databases
/// take the timeout as a 32-bit count of milliseconds.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct Wait(Duration);

/// What `--wait` is when not given: long enough for a large import to commit.
pub const DEFAULT: &str = "60s";

const LONGEST: Duration = Duration::from_secs(24 * 3600);

impl Wait {
    /// Reads `--wait`: a whole number followed by `ms`, `s`, `m` or `h` (`500ms`, `30s`, `2m`).
    pub fn parse(text: &str) -> Result<Wait> {
        let refuse = |why: &str| Error::field("--wait", text, why);
        let digits = text.trim_end_matches(|c: char| c.is_ascii_alphabetic());
        let per_unit = match &text[digits.len()..] {
            "ms" => Some(1),
            "s" => Some(1_000),
            "m" => Some(60_000),
            "h" => Some(3_600_000),
            _ => None,
        }
        .filter(|_| !digits.is_empty() && digits.bytes().all(|b| b.is_ascii_digit()))
        .ok_or_else(|| {
            refuse("is not a duration: give a whole number followed by ms, s, m or h, e.g. 500ms, 30s, 2m")
        })?;
        let wait = digits
            .parse::<u64>()
            .ok()
            .and_then(|n| n.checked_mul(per_unit))
            .map(Duration::from_millis)
            .filter(|d| *d <= LONGEST)
            .ok_or_else(|| refuse("is longer than a writer may wait (at most 24h)"))?;
        Ok(Wait(wait))
    }

    /// The wait in whole milliseconds, as both databases take it.
    pub fn millis(self) -> u64 {
        self.0.as_millis() as u64
    }

    /// The refusal when another writer held the ledger past the wait; nothing was written.
    pub fn ran_out(self) -> Error {
        Error::store(
            StoreKind::Locked,
            format!(
                "waited {self} for another writer to finish, and it still holds the ledger; nothing was written (try again, or wait longer with --wait, e.g. --wait 10m)"
            ),
        )
    }
}

impl Default for Wait {
    fn default() -> Wait {
        Wait(Duration::from_secs(60))
    }
}

/// The wait as `--wait` would take it: `200ms`, `30s`, `2m`, `1h`.
impl fmt::Display for Wait {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        let ms = self.millis();
        match ms {
            0 => f.write_str("0s"),
            ms if ms % 3_600_000 == 0 => write!(f, "{}h", ms / 3_600_000),
            ms if ms % 60_000 == 0 => write!(f, "{}m", ms / 60_000),
            ms if ms % 1_000 == 0 => write!(f, "{}s", ms / 1_000),
            ms => write!(f, "{ms}ms"),
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn durations_read_in_their_unit_and_show_as_given() {
        for (text, ms) in [
            ("500ms", 500),
            ("30s", 30_000),
            ("2m", 120_000),
            ("1h", 3_600_000),
            ("0s", 0),
            ("24h", 86_400_000),
        ] {
            let w = Wait::parse(text).unwrap();
            assert_eq!(w.millis(), ms, "{text}");
            assert_eq!(w.to_string(), text);
        }
        assert_eq!(Wait::parse("90s").unwrap().to_string(), "90s");
        assert_eq!(Wait::parse("120s").unwrap().to_string(), "2m");
        assert_eq!(Wait::parse(DEFAULT).unwrap(), Wait::default());
    }

    #[test]
    fn what_is_not_a_duration_is_refused_naming_the_option_and_value() {
        for bad in [
            "", "30", "s", "1.5s", "-1s", "30 s", "2d", "10sec", "+3s", "25h",
        ] {
            let e = Wait::parse(bad).unwrap_err();
            assert!(
                matches!(&e, Error::Input { field, value: Some(v), .. } if field == "--wait" && v == bad),
                "{bad}: {e}"
            );
        }
        let e = Wait::parse("99999999999999999999h").unwrap_err();
        assert!(e.to_string().contains("at most 24h"), "{e}");
    }
}
