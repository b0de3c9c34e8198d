//! Why a formula was refused.

use super::MAX_COUNT;
use std::fmt;

/// Why a formula was refused. Every `position` is a 0-based character position.
#[derive(Debug, Clone, PartialEq)]
pub enum FormulaError {
    Empty,
    UnknownSymbol {
        symbol: String,
        position: usize,
    },
    NoStandardWeight {
        symbol: String,
        position: usize,
    },
    StrayCharacter {
        character: char,
        position: usize,
    },
    UnclosedGroup {
        bracket: char,
        position: usize,
    },
    UnmatchedClose {
        bracket: char,
        position: usize,
    },
    MismatchedClose {
        open: char,
        open_position: usize,
        close: char,
        position: usize,
    },
    EmptyGroup {
        position: usize,
    },
    ZeroCount {
        text: String,
        position: usize,
    },
    CountOutOfRange {
        text: String,
        position: usize,
    },
    DanglingSeparator {
        separator: char,
        position: usize,
    },
    SeparatorInGroup {
        separator: char,
        position: usize,
    },
    ExpectedFormula {
        position: usize,
    },
    AmbiguousPoint {
        position: usize,
    },
}

impl FormulaError {
    /// 0-based character position of the offending part (0 for an empty formula).
    pub fn position(&self) -> usize {
        match self {
            FormulaError::Empty => 0,
            FormulaError::UnknownSymbol { position, .. }
            | FormulaError::NoStandardWeight { position, .. }
            | FormulaError::StrayCharacter { position, .. }
            | FormulaError::UnclosedGroup { position, .. }
            | FormulaError::UnmatchedClose { position, .. }
            | FormulaError::MismatchedClose { position, .. }
            | FormulaError::EmptyGroup { position }
            | FormulaError::ZeroCount { position, .. }
            | FormulaError::CountOutOfRange { position, .. }
            | FormulaError::DanglingSeparator { position, .. }
            | FormulaError::SeparatorInGroup { position, .. }
            | FormulaError::ExpectedFormula { position }
            | FormulaError::AmbiguousPoint { position } => *position,
        }
    }
}

impl fmt::Display for FormulaError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        let at = self.position();
        match self {
            FormulaError::Empty => write!(f, "empty formula"),
            FormulaError::UnknownSymbol { symbol, .. } => {
                write!(
                    f,
                    "unknown element symbol '{symbol}' at character {at} (0-based)"
                )
            }
            FormulaError::NoStandardWeight { symbol, .. } => write!(
                f,
                "element '{symbol}' at character {at} (0-based) has no standard atomic weight"
            ),
            FormulaError::StrayCharacter { character, .. } => {
                write!(
                    f,
                    "unexpected character '{character}' at character {at} (0-based)"
                )
            }
            FormulaError::UnclosedGroup { bracket, .. } => {
                write!(f, "'{bracket}' at character {at} (0-based) is never closed")
            }
            FormulaError::UnmatchedClose { bracket, .. } => {
                write!(f, "'{bracket}' at character {at} (0-based) closes no group")
            }
            FormulaError::MismatchedClose {
                open,
                open_position,
                close,
                ..
            } => write!(
                f,
                "'{close}' at character {at} (0-based) does not close '{open}' at character {open_position}"
            ),
            FormulaError::EmptyGroup { .. } => {
                write!(f, "empty group at character {at} (0-based)")
            }
            FormulaError::ZeroCount { text, .. } => {
                write!(f, "count '{text}' at character {at} (0-based) is zero")
            }
            FormulaError::CountOutOfRange { text, .. } => write!(
                f,
                "count '{text}' at character {at} (0-based) takes an element count outside 0 < n <= {MAX_COUNT:e}"
            ),
            FormulaError::DanglingSeparator { separator, .. } => write!(
                f,
                "separator '{separator}' at character {at} (0-based) lacks a formula on one side"
            ),
            FormulaError::SeparatorInGroup { separator, .. } => write!(
                f,
                "separator '{separator}' at character {at} (0-based) is inside a group"
            ),
            FormulaError::ExpectedFormula { .. } => write!(
                f,
                "expected an element symbol or a group at character {at} (0-based)"
            ),
            FormulaError::AmbiguousPoint { .. } => write!(
                f,
                "'.' at character {at} (0-based) could be a decimal point or a hydrate separator: \
                 join a hydrate with '·', or write the water as (H2O)"
            ),
        }
    }
}

impl std::error::Error for FormulaError {}
