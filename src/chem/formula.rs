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

use std::fmt;
use std::str::FromStr;

use crate::chem::elements::{self, Element, WITHOUT_STANDARD_WEIGHT};

/// Upper bound for any element's count, written or multiplied out. No mineral or gas formula
/// comes near it; it keeps every count and molar mass finite whatever the input.
const MAX_COUNT: f64 = 1e9;

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
        let counts = Parser {
            chars: text.chars().collect(),
            pos: 0,
        }
        .formula()?;
        Ok(Formula { counts: counts.0 })
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

fn is_separator(c: char) -> bool {
    matches!(c, '.' | '·' | '⋅' | '∙' | '*')
}

fn check_range(count: f64, text: &str, position: usize) -> Result<(), FormulaError> {
    if count > 0.0 && count <= MAX_COUNT {
        Ok(())
    } else {
        Err(FormulaError::CountOutOfRange {
            text: text.to_string(),
            position,
        })
    }
}

/// Counts under construction, in order of first appearance.
#[derive(Default)]
struct Counts(Vec<ElementCount>);

impl Counts {
    fn add(
        &mut self,
        element: &'static Element,
        count: f64,
        text: &str,
        position: usize,
    ) -> Result<(), FormulaError> {
        let total = match self
            .0
            .iter_mut()
            .find(|c| c.element.number == element.number)
        {
            Some(slot) => {
                slot.count += count;
                slot.count
            }
            None => {
                self.0.push(ElementCount { element, count });
                count
            }
        };
        check_range(total, text, position)
    }

    fn add_scaled(
        &mut self,
        other: &Counts,
        factor: f64,
        text: &str,
        position: usize,
    ) -> Result<(), FormulaError> {
        for c in &other.0 {
            let scaled = c.count * factor;
            check_range(scaled, text, position)?;
            self.add(c.element, scaled, text, position)?;
        }
        Ok(())
    }
}

/// A count as written, with where it starts; `1` when none was written.
struct Count {
    value: f64,
    text: String,
    position: usize,
}

/// Walks the characters with an explicit group stack (no recursion, so deep nesting cannot
/// overflow the call stack); indexing only through `get`, so no input can make it panic.
struct Parser {
    chars: Vec<char>,
    pos: usize,
}

impl Parser {
    fn peek(&self) -> Option<char> {
        self.chars.get(self.pos).copied()
    }

    fn digit_at(&self, i: usize) -> bool {
        self.chars.get(i).is_some_and(char::is_ascii_digit)
    }

    fn text(&self, from: usize) -> String {
        self.chars
            .get(from..self.pos)
            .unwrap_or_default()
            .iter()
            .collect()
    }

    fn formula(&mut self) -> Result<Counts, FormulaError> {
        if self.chars.is_empty() {
            return Err(FormulaError::Empty);
        }
        let mut total = Counts::default();
        loop {
            if let Some(separator) = self.peek().filter(|&c| is_separator(c)) {
                return Err(FormulaError::DanglingSeparator {
                    separator,
                    position: self.pos,
                });
            }
            let multiplier = self.count(false)?;
            let part = self.sequence()?;
            if part.0.is_empty() {
                return Err(FormulaError::ExpectedFormula { position: self.pos });
            }
            total.add_scaled(
                &part,
                multiplier.value,
                &multiplier.text,
                multiplier.position,
            )?;
            // `sequence` stops only at the end or at a separator.
            let Some(separator) = self.peek() else {
                return Ok(total);
            };
            let position = self.pos;
            self.pos += 1;
            if self.peek().is_none() {
                return Err(FormulaError::DanglingSeparator {
                    separator,
                    position,
                });
            }
        }
    }

    /// Items up to the end of the text or a separator outside any group.
    fn sequence(&mut self) -> Result<Counts, FormulaError> {
        let mut open: Vec<(char, usize, Counts)> = Vec::new();
        let mut current = Counts::default();
        while let Some(c) = self.peek() {
            let at = self.pos;
            match c {
                'A'..='Z' => {
                    let element = self.symbol()?;
                    let n = self.count(true)?;
                    current.add(element, n.value, &n.text, n.position)?;
                }
                '(' | '[' => {
                    self.pos += 1;
                    open.push((c, at, std::mem::take(&mut current)));
                }
                ')' | ']' => {
                    self.pos += 1;
                    let Some((bracket, open_position, outer)) = open.pop() else {
                        return Err(FormulaError::UnmatchedClose {
                            bracket: c,
                            position: at,
                        });
                    };
                    if (bracket == '(') != (c == ')') {
                        return Err(FormulaError::MismatchedClose {
                            open: bracket,
                            open_position,
                            close: c,
                            position: at,
                        });
                    }
                    if current.0.is_empty() {
                        return Err(FormulaError::EmptyGroup {
                            position: open_position,
                        });
                    }
                    let n = self.count(true)?;
                    let group = std::mem::replace(&mut current, outer);
                    current.add_scaled(&group, n.value, &n.text, n.position)?;
                }
                c if is_separator(c) => {
                    if !open.is_empty() {
                        return Err(FormulaError::SeparatorInGroup {
                            separator: c,
                            position: at,
                        });
                    }
                    break;
                }
                _ => {
                    return Err(FormulaError::StrayCharacter {
                        character: c,
                        position: at,
                    });
                }
            }
        }
        match open.pop() {
            Some((bracket, position, _)) => Err(FormulaError::UnclosedGroup { bracket, position }),
            None => Ok(current),
        }
    }

    /// An element symbol: one capital letter and at most one small letter.
    fn symbol(&mut self) -> Result<&'static Element, FormulaError> {
        let start = self.pos;
        self.pos += 1;
        if self.peek().is_some_and(|c| c.is_ascii_lowercase()) {
            self.pos += 1;
        }
        let symbol = self.text(start);
        if let Some(element) = elements::element(&symbol) {
            Ok(element)
        } else if WITHOUT_STANDARD_WEIGHT.contains(&symbol.as_str()) {
            Err(FormulaError::NoStandardWeight {
                symbol,
                position: start,
            })
        } else {
            Err(FormulaError::UnknownSymbol {
                symbol,
                position: start,
            })
        }
    }

    /// An optional count. After a symbol or group (`subscript`) a point between digits is
    /// read by the rules in the module documentation; in front of a part it is always a
    /// decimal point, since a separator cannot follow a bare count.
    fn count(&mut self, subscript: bool) -> Result<Count, FormulaError> {
        let position = self.pos;
        while self.digit_at(self.pos) {
            self.pos += 1;
        }
        if self.pos == position {
            return Ok(Count {
                value: 1.0,
                text: String::new(),
                position,
            });
        }
        if self.peek() == Some('.') && self.digit_at(self.pos + 1) {
            let decimal = !subscript || self.point_is_decimal(position)?;
            if decimal {
                self.pos += 1;
                while self.digit_at(self.pos) {
                    self.pos += 1;
                }
            }
        }
        let text = self.text(position);
        // digits with at most one inner point always parse; overflow gives infinity.
        let value = text.parse::<f64>().unwrap_or(f64::INFINITY);
        if value == 0.0 {
            return Err(FormulaError::ZeroCount { text, position });
        }
        check_range(value, &text, position)?;
        Ok(Count {
            value,
            text,
            position,
        })
    }

    /// Rules 1–3 for the point at `self.pos`, which follows the subscript digits that start
    /// at `start` and precedes a digit.
    fn point_is_decimal(&self, start: usize) -> Result<bool, FormulaError> {
        let mut i = self.pos + 1;
        while self.digit_at(i) {
            i += 1;
        }
        let whole_is_zero = self
            .chars
            .get(start..self.pos)
            .is_some_and(|digits| digits.iter().all(|&d| d == '0'));
        if self.chars.get(i) == Some(&'.') && self.digit_at(i + 1) && !whole_is_zero {
            return Ok(false);
        }
        let water = self.chars.get(i..i + 3) == Some(&['H', '2', 'O'][..])
            && self.chars.get(i + 3).is_none_or(|&c| is_separator(c));
        if water {
            return Err(FormulaError::AmbiguousPoint { position: self.pos });
        }
        Ok(true)
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use proptest::prelude::*;

    fn parse(text: &str) -> Formula {
        match Formula::parse(text) {
            Ok(f) => f,
            Err(e) => panic!("{text}: {e}"),
        }
    }

    fn err(text: &str) -> FormulaError {
        match Formula::parse(text) {
            Ok(f) => panic!("{text} parsed as {f}"),
            Err(e) => e,
        }
    }

    fn counts(text: &str) -> Vec<(&'static str, f64)> {
        parse(text)
            .counts()
            .iter()
            .map(|c| (c.element.symbol, c.count))
            .collect()
    }

    /// REFERENCES.md, "Molar masses and CO2 content" — computed from the CIAAW 2021 abridged
    /// weights; printed to 3 decimals, so checked to half a unit of the last digit.
    #[test]
    fn references_md_molar_masses() {
        for (text, printed) in [
            ("CO2", 44.009),
            ("CaCO3", 100.086),
            ("MgCO3", 84.313),
            ("FeCO3", 115.853),
            ("CaMg(CO3)2", 184.399),
        ] {
            let m = parse(text).molar_mass();
            assert!((m - printed).abs() <= 0.0005, "{text}: {m}");
        }
    }

    /// Computed here from the same weights (no outside source): groups, brackets, decimals
    /// and hydrates.
    #[test]
    fn syntax_forms() {
        assert_eq!(
            counts("Ca(Mg(OH)2)2"),
            [("Ca", 1.0), ("Mg", 2.0), ("O", 4.0), ("H", 4.0)]
        );
        assert_eq!(parse("Ca[Mg(OH)2]2"), parse("Ca(Mg(OH)2)2"));
        assert_eq!(
            counts("Mg1.8Fe0.2SiO4"),
            [("Mg", 1.8), ("Fe", 0.2), ("Si", 1.0), ("O", 4.0)]
        );
        assert_eq!(
            counts("MgCO3·3H2O"),
            [("Mg", 1.0), ("C", 1.0), ("O", 6.0), ("H", 6.0)]
        );
        assert_eq!(
            counts("CaSO4.0.5H2O"),
            [("Ca", 1.0), ("S", 1.0), ("O", 4.5), ("H", 1.0)]
        );
        // 40.078 + 32.06 + 4.5 × 15.999 + 1.0080 = 145.1415
        assert!((parse("CaSO4.0.5H2O").molar_mass() - 145.1415).abs() < 1e-9);
        for same in ["MgCO3*3H2O", "MgCO3⋅3H2O", "MgCO3∙3H2O", "MgCO3.(H2O)3"] {
            assert_eq!(parse(same), parse("MgCO3·3H2O"), "{same}");
        }
        assert!(matches!(
            Formula::parse("MgCO3.3H2O"),
            Err(FormulaError::AmbiguousPoint { position: 5 })
        ));
        // The decimal reading stays available by writing the water as a group.
        assert_eq!(parse("CaSO4.2(H2O)").count("O"), 5.2);
        assert_eq!(parse("(OH)0.1.2H2O"), parse("(OH)0.1·2H2O"));
        assert_eq!(parse("CaCl2.H2O"), parse("CaCl2·H2O"));
        assert_eq!(parse("2H2O"), parse("H4O2"));
        assert_eq!(parse("Co").counts().len(), 1);
        assert_eq!(parse("CO").counts().len(), 2);
        assert_eq!(parse("CaCO3").carbon_count(), 1.0);
        assert_eq!(parse("CaMg(CO3)2").carbon_count(), 2.0);
        assert_eq!(parse("Mg2SiO4").carbon_count(), 0.0);
        assert_eq!(parse("OH"), parse("HO"));
        assert_ne!(parse("OH"), parse("OH2"));
    }

    #[test]
    fn errors_name_the_part_and_its_character_position() {
        assert_eq!(err(""), FormulaError::Empty);
        assert_eq!(
            err("CaXx3"),
            FormulaError::UnknownSymbol {
                symbol: "Xx".into(),
                position: 2
            }
        );
        assert_eq!(
            err("Tc2O7"),
            FormulaError::NoStandardWeight {
                symbol: "Tc".into(),
                position: 0
            }
        );
        assert_eq!(
            err("Ca(OH"),
            FormulaError::UnclosedGroup {
                bracket: '(',
                position: 2
            }
        );
        assert_eq!(
            err("CaOH)2"),
            FormulaError::UnmatchedClose {
                bracket: ')',
                position: 4
            }
        );
        assert_eq!(
            err("Ca(OH]2"),
            FormulaError::MismatchedClose {
                open: '(',
                open_position: 2,
                close: ']',
                position: 5
            }
        );
        assert_eq!(err("Ca()2"), FormulaError::EmptyGroup { position: 2 });
        assert_eq!(
            err("H0"),
            FormulaError::ZeroCount {
                text: "0".into(),
                position: 1
            }
        );
        assert_eq!(
            err("MgCO3·0H2O"),
            FormulaError::ZeroCount {
                text: "0".into(),
                position: 6
            }
        );
        assert_eq!(
            err("MgCO3·"),
            FormulaError::DanglingSeparator {
                separator: '·',
                position: 5
            }
        );
        assert_eq!(
            err("·H2O"),
            FormulaError::DanglingSeparator {
                separator: '·',
                position: 0
            }
        );
        assert_eq!(
            err("MgCO3··H2O"),
            FormulaError::DanglingSeparator {
                separator: '·',
                position: 6
            }
        );
        assert_eq!(
            err("(MgCO3·H2O)"),
            FormulaError::SeparatorInGroup {
                separator: '·',
                position: 6
            }
        );
        assert_eq!(
            err("MgCO3·3"),
            FormulaError::ExpectedFormula { position: 7 }
        );
        assert_eq!(
            err("CaSO4.2H2O"),
            FormulaError::AmbiguousPoint { position: 5 }
        );
        assert_eq!(
            err("Ca O"),
            FormulaError::StrayCharacter {
                character: ' ',
                position: 2
            }
        );
        // After a two-byte '·' the character position (10) is not the byte offset (11).
        assert_eq!(
            err("MgCO3·3H2O$"),
            FormulaError::StrayCharacter {
                character: '$',
                position: 10
            }
        );
        assert_eq!(
            err("mgO"),
            FormulaError::StrayCharacter {
                character: 'm',
                position: 0
            }
        );
        let huge = format!("H{}", "9".repeat(400));
        assert!(matches!(
            err(&huge),
            FormulaError::CountOutOfRange { position: 1, .. }
        ));
        let deep = format!("{}H{}", "(".repeat(40), ")1000".repeat(40));
        assert!(matches!(err(&deep), FormulaError::CountOutOfRange { .. }));
        let unclosed = "(".repeat(100_000);
        assert_eq!(
            err(&unclosed),
            FormulaError::UnclosedGroup {
                bracket: '(',
                position: 99_999
            }
        );
    }

    #[test]
    fn error_messages_are_one_line() {
        let e = err("MgCO3·3H2O$");
        assert_eq!(
            e.to_string(),
            "unexpected character '$' at character 10 (0-based)"
        );
        for text in ["", "Xx", "Ca(OH", "H0", "·", "CaSO4.2H2O", "Ca()", "Ca(OH]"] {
            assert!(!err(text).to_string().contains('\n'), "{text}");
        }
    }

    #[test]
    fn display_is_canonical() {
        assert_eq!(parse("Ca(OH)2").to_string(), "CaO2H2");
        assert_eq!(parse("MgCO3·3H2O").to_string(), "MgCO6H6");
        assert_eq!(parse("Mg1.8Fe0.2SiO4").to_string(), "Mg1.8Fe0.2SiO4");
        // Without the explicit 1 this would end in "2.5H2O" and be refused as ambiguous.
        let f = parse("Fe2.5(H2O)");
        assert_eq!(f.to_string(), "Fe2.5H2O1");
        assert_eq!(parse(&f.to_string()), f);
    }

    const SYMBOLS: [&str; 12] = [
        "H", "C", "O", "Na", "Mg", "Al", "Si", "S", "K", "Ca", "Fe", "Co",
    ];

    fn count_text() -> impl Strategy<Value = String> {
        prop_oneof![
            Just(String::new()),
            (2u32..20).prop_map(|n| n.to_string()),
            (1u32..100).prop_map(|n| (f64::from(n) / 10.0).to_string()),
        ]
    }

    /// Formula text made from the grammar: nested groups, counts, hydrate separators.
    fn formula_text() -> impl Strategy<Value = String> {
        let atom =
            (prop::sample::select(&SYMBOLS[..]), count_text()).prop_map(|(s, n)| format!("{s}{n}"));
        let item = atom.prop_recursive(3, 12, 3, |inner| {
            (
                prop::collection::vec(inner, 1..4),
                prop::bool::ANY,
                count_text(),
            )
                .prop_map(|(items, square, n)| {
                    let (l, r) = if square { ('[', ']') } else { ('(', ')') };
                    format!("{l}{}{r}{n}", items.concat())
                })
        });
        let part = (count_text(), prop::collection::vec(item, 1..4))
            .prop_map(|(n, items)| format!("{n}{}", items.concat()));
        (
            prop::collection::vec(part, 1..4),
            prop::sample::select(vec!["·", ".", "*"]),
        )
            .prop_map(|(parts, sep)| parts.join(sep))
    }

    proptest! {
        #![proptest_config(ProptestConfig::with_cases(256))]

        #[test]
        fn never_panics_on_any_text(text in any::<String>()) {
            let _ = Formula::parse(&text);
        }

        #[test]
        fn never_panics_on_formula_like_text(text in "[A-Za-z0-9()\\[\\].·⋅* ]{0,24}") {
            if let Err(e) = Formula::parse(&text) {
                prop_assert!(e.position() <= text.chars().count());
            }
        }

        /// parse(display(f)) == f. With '.' as separator the generated text may read other
        /// than it was built (the rules prefer decimals) or be refused as ambiguous; any text
        /// that parses must round-trip.
        #[test]
        fn display_round_trips(text in formula_text()) {
            match Formula::parse(&text) {
                Ok(f) => {
                    let again = Formula::parse(&f.to_string());
                    prop_assert_eq!(again.as_ref(), Ok(&f), "{} -> {}", text, f);
                    prop_assert_eq!(again.map(|g| g.molar_mass()), Ok(f.molar_mass()));
                }
                Err(e) => prop_assert!(
                    matches!(
                        e,
                        FormulaError::AmbiguousPoint { .. } | FormulaError::ExpectedFormula { .. }
                    ),
                    "{} refused: {}", text, e
                ),
            }
        }
    }
}
