//! The reading column as stored: the JSON array of `[name, value]` pairs that serde_json
//! writes. Every entry row a report or `verify` reads holds one, so the form sinkbook writes
//! (no spaces, no escapes) is read here by hand; anything else goes to serde_json, whose result
//! and refusal stay the ones a reader sees.

/// The pairs of a stored reading, in their stored order.
pub fn parse(text: &str) -> serde_json::Result<Vec<(String, String)>> {
    let mut pairs = Vec::new();
    parse_into(text, &mut pairs)?;
    Ok(pairs)
}

/// [`parse`] into `pairs`, whose strings are written over where there are enough of them (the
/// walk reads every row's reading into the one before's, so no row allocates its own).
pub fn parse_into(text: &str, pairs: &mut Vec<(String, String)>) -> serde_json::Result<()> {
    if plain(text, pairs).is_none() {
        *pairs = serde_json::from_str(text)?;
    }
    Ok(())
}

/// `[["n","v"],…]` with no whitespace and no backslash or control character in a string: the
/// text serde_json writes for pairs that need no escape, which it reads back to the same
/// strings. None for any other text (`pairs` then holds a part of it).
fn plain(text: &str, pairs: &mut Vec<(String, String)>) -> Option<()> {
    let mut rest = text.strip_prefix('[')?;
    let mut n = 0;
    if let Some(end) = rest.strip_prefix(']') {
        pairs.clear();
        return end.is_empty().then_some(());
    }
    loop {
        let (name, after) = string(rest.strip_prefix("[\"")?)?;
        let (value, after) = string(after.strip_prefix(",\"")?)?;
        rest = after.strip_prefix(']')?;
        match pairs.get_mut(n) {
            Some((old_name, old_value)) => {
                old_name.clear();
                old_name.push_str(name);
                old_value.clear();
                old_value.push_str(value);
            }
            None => pairs.push((name.to_string(), value.to_string())),
        }
        n += 1;
        match rest.as_bytes() {
            [b',', ..] => rest = &rest[1..],
            [b']'] => {
                pairs.truncate(n);
                return Some(());
            }
            _ => return None,
        }
    }
}

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
            let mut over = vec![("old".to_string(), "pairs".to_string()); 4];
            if parse_into(text, &mut over).is_ok() {
                assert_eq!(Ok(over), json(text), "{text:?}");
            }
        }
    }

    #[test]
    fn the_written_form_is_read_by_hand() {
        let pairs = vec![
            ("mass".to_string(), "80.000000 t".to_string()),
            ("file".to_string(), "m.csv".to_string()),
        ];
        let text = serde_json::to_string(&pairs).unwrap();
        let mut read = vec![("x".repeat(40), String::new()); 3];
        assert_eq!(plain(&text, &mut read), Some(()));
        assert_eq!(read, pairs);
        assert_eq!(plain("[]", &mut read), Some(()));
        assert_eq!(read, []);
        assert_eq!(plain("[[\"a\",\"\\n\"]]", &mut read), None);
    }
}
