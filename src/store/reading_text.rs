//! The reading column as stored: the JSON array of `[name, value]` pairs that serde_json
//! writes. Every entry row a report or `verify` reads holds one, so the form sinkbook writes
//! (no spaces, no escapes) is read here by hand; anything else goes to serde_json, whose result
//! and refusal stay the ones a reader sees.

/// The pairs of a stored reading, in their stored order.
pub fn parse(text: &str) -> serde_json::Result<Vec<(String, String)>> {
    match plain(text) {
        Some(pairs) => Ok(pairs),
        None => serde_json::from_str(text),
    }
}

/// `[["n","v"],…]` with no whitespace and no backslash or control character in a string: the
/// text serde_json writes for pairs that need no escape, which it reads back to the same
/// strings. None for any other text.
fn plain(text: &str) -> Option<Vec<(String, String)>> {
    let mut rest = text.strip_prefix('[')?;
    let mut pairs = Vec::with_capacity(FEW);
    if let Some(end) = rest.strip_prefix(']') {
        return end.is_empty().then_some(pairs);
    }
    loop {
        let (name, after) = string(rest.strip_prefix("[\"")?)?;
        let (value, after) = string(after.strip_prefix(",\"")?)?;
        rest = after.strip_prefix(']')?;
        pairs.push((name.to_string(), value.to_string()));
        match rest.as_bytes() {
            [b',', ..] => rest = &rest[1..],
            [b']'] => return Some(pairs),
            _ => return None,
        }
    }
}

/// Room for a reading's pairs from the start: metered readings hold about ten.
const FEW: usize = 16;

/// The string up to its closing quote, and the text after the quote; None if a backslash or a
/// control character comes first.
fn string(text: &str) -> Option<(&str, &str)> {
    let end = text
        .bytes()
        .position(|b| b == b'"' || b == b'\\' || b < 0x20)?;
    (text.as_bytes()[end] == b'"').then(|| (&text[..end], &text[end + 1..]))
}

#[cfg(test)]
mod tests {
    use super::*;

    fn json(text: &str) -> Result<Vec<(String, String)>, String> {
        serde_json::from_str(text).map_err(|e| e.to_string())
    }

    #[test]
    fn reads_what_serde_json_reads() {
        for text in [
            "[]",
            "[[\"mass\",\"12.5 t\"]]",
            "[[\"mass\",\"12.5 t\"],[\"co2_fraction\",\"0.985\"],[\"\",\"\"]]",
            "[[\"note\",\"a \\\"quoted\\\" word\"]]",
            "[[\"site\",\"Ça va ☃\"]]",
            "[ [\"a\",\"b\"] ]",
            "[[\"a\",\"b\"]] ",
            "[[\"a\",\"b\",\"c\"]]",
            "[[\"a\"]]",
            "[[\"a\",\"b\"],]",
            "[[\"a\",\"b\"]]x",
            "[[\"a\",\"b\"]",
            "[[\"a\",\"b\u{1}\"]]",
            "[[\"a\",1]]",
            "",
            "[",
            "{}",
        ] {
            assert_eq!(
                parse(text).map_err(|e| e.to_string()),
                json(text),
                "{text:?}"
            );
        }
    }

    #[test]
    fn the_written_form_is_read_by_hand() {
        let pairs = vec![
            ("mass".to_string(), "80.000000 t".to_string()),
            ("file".to_string(), "m.csv".to_string()),
        ];
        let text = serde_json::to_string(&pairs).unwrap();
        assert_eq!(plain(&text), Some(pairs));
        assert_eq!(plain("[[\"a\",\"\\n\"]]"), None);
    }
}
