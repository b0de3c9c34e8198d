//! A materiality level as given: a share of the year's stored total, above 0 % and below 100 %.

use super::MaterialityPolicy;
use crate::quantity::fraction::{FractionError, parse_uncertainty};

/// Why a given level is refused.
#[derive(Debug)]
pub enum LevelError {
    Share(FractionError),
    /// 0 %: nothing would be within materiality.
    NotAbove0,
}

impl std::fmt::Display for LevelError {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        match self {
            LevelError::Share(e) => e.fmt(f),
            LevelError::NotAbove0 => f.write_str("must be above 0 % and below 100 %"),
        }
    }
}

/// The materiality level a reconciliation is judged at, and the text it was given as (None for
/// the default level).
pub struct Level {
    pub policy: MaterialityPolicy,
    pub given: Option<String>,
}

impl Level {
    /// The level `text` gives, or the default one when no text is given.
    pub fn parse(text: Option<&str>) -> Result<Level, LevelError> {
        let policy = match text {
            None => MaterialityPolicy::default(),
            Some(t) => MaterialityPolicy::from_text(t)?,
        };
        Ok(Level {
            policy,
            given: text.map(str::to_string),
        })
    }
}

impl MaterialityPolicy {
    /// The level `text` gives (`5%`, `0.05`).
    pub fn from_text(text: &str) -> Result<Self, LevelError> {
        let share = parse_uncertainty(text)
            .map(|d| d.to_f64())
            .map_err(LevelError::Share)?;
        if !(share > 0.0 && share < 1.0) {
            return Err(LevelError::NotAbove0);
        }
        Ok(MaterialityPolicy { share })
    }
}
