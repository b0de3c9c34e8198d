//! The parser: one pass over the characters, counts multiplied out as groups and parts close.

use super::{ElementCount, FormulaError, MAX_COUNT};
use crate::chem::elements::{self, Element, WITHOUT_STANDARD_WEIGHT};

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

/// The element counts of `text`, in order of first appearance, each element once.
pub(super) fn element_counts(text: &str) -> Result<Vec<ElementCount>, FormulaError> {
    let counts = Parser {
        chars: text.chars().collect(),
        pos: 0,
    }
    .formula()?;
    Ok(counts.0)
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
