//! Chemical formulas: parser, element counts and molar mass.
//!
//! Grammar (whitespace is not allowed anywhere):
//! ```text
//! formula := part (separator part)*
//! part    := [count] item+
//! item    := (symbol | "(" item+ ")" | "[" item+ "]") [count]
//! count   := digits ["." digits]
//! ```
//! A separator joins a hydrate or adduct and may be `·` (U+00B7), `⋅` (U+22C5), `∙` (U+2219),
//! `*` or `.`; the count in front of a part multiplies it (`MgCO3·3H2O`, `CaSO4.0.5H2O`).
//!
//! A `.` between digits after a symbol or group is read by these rules, because plain text
//! uses the same point for decimal subscripts (`Mg1.8Fe0.2SiO4`) and for hydrates
//! (`CaSO4.2H2O`):
//! 1. A number holds one point, so in `4.0.5` the first point separates: `CaSO4.0.5H2O` is
//!    CaSO4 with half a water (nobody writes a subscript 4 as 4.0). Not so when the digits
//!    before it are zero, as a count cannot be: `(OH)0.1.2H2O` is (OH)0.1 and 2H2O.
//! 2. If the digits after the point are followed by `H2O` and then the end or a separator
//!    (`CaSO4.2H2O`), the text could be gypsum or CaSO4.2 plus H2O. That is refused with
//!    [`FormulaError::AmbiguousPoint`] rather than guessed: a wrong guess changes the molar
//!    mass by a tenth and nobody would notice in a ledger.
//! 3. Otherwise the point is a decimal point.
//!
//! Error positions are 0-based character positions (not byte offsets), so a `·` counts as one.

mod error;
mod parser;

pub use error::FormulaError;

use std::fmt;
use std::str::FromStr;

use crate::chem::elements::Element;

/// Upper bound for any element's count, written or multiplied out. No mineral or gas formula
/// comes near it; it keeps every count and molar mass finite whatever the input.
pub(super) const MAX_COUNT: f64 = 1e9;

/// How many atoms of one element a formula unit holds (may be fractional).
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct ElementCount {
    pub element: &'static Element,
    pub count: f64,
}

/// A parsed formula: element counts in order of first appearance in the text, each element
/// once. Equality compares composition, so `OH` equals `HO`.
#[derive(Debug, Clone)]
pub struct Formula {
    counts: Vec<ElementCount>,
}

impl Formula {
    /// Parses formula text; see the module documentation for the accepted syntax.
    pub fn parse(text: &str) -> Result<Formula, FormulaError> {
        Ok(Formula {
            counts: parser::element_counts(text)?,
        })
    }

    /// Element counts, ordered by first appearance in the parsed text.
    pub fn counts(&self) -> &[ElementCount] {
        &self.counts
    }

    /// Count of the element with this symbol; 0 when absent.
    pub fn count(&self, symbol: &str) -> f64 {
        self.counts
            .iter()
            .find(|c| c.element.symbol == symbol)
            .map_or(0.0, |c| c.count)
    }

    /// Carbon atoms per formula unit.
    pub fn carbon_count(&self) -> f64 {
        self.count("C")
    }

    /// Molar mass in g/mol from the CIAAW 2021 abridged atomic weights.
    pub fn molar_mass(&self) -> f64 {
        self.counts
            .iter()
            .map(|c| c.count * c.element.atomic_weight)
            .sum()
    }

    /// True when writing a final `O` without its count would make the text end in
    /// `<decimal>H2O`, which the parser refuses as ambiguous (rule 2).
    fn needs_explicit_final_one(&self) -> bool {
        let n = self.counts.len();
        if n < 3 {
            return false;
        }
        let (before, h, o) = (
            &self.counts[n - 3],
            &self.counts[n - 2],
            &self.counts[n - 1],
        );
        h.element.symbol == "H"
            && h.count == 2.0
            && o.element.symbol == "O"
            && o.count == 1.0
            && before.count.fract() != 0.0
    }
}

impl PartialEq for Formula {
    fn eq(&self, other: &Self) -> bool {
        self.counts.len() == other.counts.len()
            && self
                .counts
                .iter()
                .all(|c| other.counts.iter().any(|o| o == c))
    }
}

/// Canonical text: the flattened counts in order, a count of 1 left out (except where the
/// result would read as a hydrate, see [`FormulaError::AmbiguousPoint`]), counts in Rust's
/// shortest round-trip form. `Ca(OH)2` displays as `CaO2H2`; parsing the text gives back an
/// equal formula.
impl fmt::Display for Formula {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        let last = self.counts.len().saturating_sub(1);
        for (i, c) in self.counts.iter().enumerate() {
            f.write_str(c.element.symbol)?;
            if c.count != 1.0 || (i == last && self.needs_explicit_final_one()) {
                write!(f, "{}", c.count)?;
            }
        }
        Ok(())
    }
}

impl FromStr for Formula {
    type Err = FormulaError;
    fn from_str(text: &str) -> Result<Self, Self::Err> {
        Formula::parse(text)
    }
}

#[cfg(test)]
mod tests;
