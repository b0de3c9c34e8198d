//! Word wrapping measured in terminal columns, for table cells, headers and prose.

use unicode_width::UnicodeWidthStr;

/// Columns a text takes at a terminal (its widest line).
pub fn width(text: &str) -> usize {
    text.lines().map(UnicodeWidthStr::width).max().unwrap_or(0)
}

/// The pieces a line may break between, each with what joins it to the one before: a space
/// between words, nothing after a comma that runs into a letter (`SiO2=49.5,Al2O3=14.2`). A
/// comma between digits (`2,500,000`) is never a break.
fn pieces(line: &str) -> Vec<(&'static str, &str)> {
    let mut out = Vec::new();
    for word in line.split_whitespace() {
        let mut glue = " ";
        let mut start = 0;
        for (i, c) in word.char_indices() {
            let next = word[i + c.len_utf8()..].chars().next();
            if c == ',' && next.is_some_and(char::is_alphabetic) {
                out.push((glue, &word[start..=i]));
                (glue, start) = ("", i + 1);
            }
        }
        out.push((glue, &word[start..]));
    }
    out
}

/// The widest piece: a column narrower than this would have to break a word.
pub fn longest_word(text: &str) -> usize {
    text.lines()
        .flat_map(pieces)
        .map(|(_, p)| p.width())
        .max()
        .unwrap_or(0)
}

/// Greedy wrapping into lines of at most `max` columns, at spaces and at the commas of a list.
/// Words are never broken: a word wider than `max` stands on a line of its own. Existing line
/// breaks are kept.
pub fn wrap(text: &str, max: usize) -> Vec<String> {
    let mut out = Vec::new();
    for line in text.lines() {
        let mut current = String::new();
        for (glue, piece) in pieces(line) {
            if current.is_empty() {
                current.push_str(piece);
            } else if current.width() + glue.len() + piece.width() <= max {
                current.push_str(glue);
                current.push_str(piece);
            } else {
                out.push(std::mem::take(&mut current));
                current.push_str(piece);
            }
        }
        out.push(current);
    }
    if out.is_empty() {
        out.push(String::new());
    }
    out
}

/// The narrowest width, no narrower than its longest word, at which `text` wraps into at most
/// `lines` lines.
pub fn narrowest(text: &str, lines: usize) -> usize {
    let full = width(text);
    (longest_word(text)..full)
        .find(|&w| wrap(text, w).len() <= lines)
        .unwrap_or(full)
}

/// A paragraph wrapped to `max` columns, every line after the first indented like the first.
pub fn paragraph(text: &str, indent: &str, max: usize) -> String {
    wrap(text, max.saturating_sub(indent.width()).max(1))
        .iter()
        .map(|l| format!("{indent}{l}\n"))
        .collect()
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn wraps_at_spaces_and_never_inside_a_word() {
        assert_eq!(
            wrap("Cumulative sequestered (t)", 12),
            ["Cumulative", "sequestered", "(t)"]
        );
        assert_eq!(
            wrap("Cumulative sequestered (t)", 15),
            ["Cumulative", "sequestered (t)"]
        );
        assert_eq!(wrap("2,333,891.365", 5), ["2,333,891.365"]);
        assert_eq!(wrap("", 5), [""]);
        assert_eq!(wrap("a\nb c", 10), ["a", "b c"]);
        assert_eq!(
            wrap("SiO2=49.5,Al2O3=14.2,FeO=11.6 wt%", 22),
            ["SiO2=49.5,Al2O3=14.2,", "FeO=11.6 wt%"]
        );
        assert_eq!(wrap("up to 2,500,000 t", 8), ["up to", "2,500,000", "t"]);
    }

    #[test]
    fn measures_terminal_columns() {
        assert_eq!(width("± (t)"), 5);
        assert_eq!(width("m³ at 60 °F"), 11);
        assert_eq!(width("ab\nabcd"), 4);
        assert_eq!(longest_word("Leaks/vents inj. side (t)"), 11);
        assert_eq!(longest_word("SiO2=49.5,Al2O3=14.2 wt%"), 10);
    }

    #[test]
    fn narrowest_two_line_header() {
        // "Cumulative sequestered (t)" is 26 wide; on two lines "Cumulative" / "sequestered (t)".
        assert_eq!(narrowest("Cumulative sequestered (t)", 2), 15);
        assert_eq!(narrowest("Period", 2), 6);
        assert_eq!(narrowest("Received (t)", 2), 8);
        assert_eq!(narrowest("Received (t)", 1), 12);
    }

    #[test]
    fn paragraphs_keep_their_indent() {
        assert_eq!(paragraph("one two three", "  ", 9), "  one two\n  three\n");
    }
}
