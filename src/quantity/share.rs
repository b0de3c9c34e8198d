//! A share as typed (`12.5%` or `0.125`, from 0 to 1) and a list of named values
//! (`Ca=0.12,Mg=0.08`), as exact decimals so a reading records what was typed. A refusal says
//! why in words that name no option; the caller names it.

use super::Decimal;

/// A share from 0 to 1; a refusal gives the text it could not read (the number of a
/// percentage) and why.
pub fn share(text: &str) -> Result<Decimal, (String, String)> {
    let t = text.trim();
    let number = |n: &str| Decimal::parse(n.trim()).map_err(|e| (n.to_string(), e.to_string()));
    let value = match t.strip_suffix('%') {
        Some(p) => number(p.trim())?
            .checked_mul(Decimal::parse("0.01").expect("valid"))
            .ok_or_else(|| (text.to_string(), "has too many digits".to_string()))?,
        None => number(t)?,
    };
    if !(0.0..=1.0).contains(&value.to_f64()) {
        return Err((text.into(), "must be from 0 to 1 (or 0% to 100%)".into()));
    }
    Ok(value)
}

/// `NAME=VALUE,…` as names and exact decimals, in the order given.
pub fn pairs(text: &str) -> Result<Vec<(String, Decimal)>, String> {
    text.split(',')
        .map(|part| {
            let (name, value) = part
                .split_once('=')
                .ok_or_else(|| format!("write NAME=VALUE, e.g. Ca=0.12 (at {part:?})"))?;
            let v = Decimal::parse(value.trim()).map_err(|e| format!("{}: {e}", name.trim()))?;
            Ok((name.trim().to_string(), v))
        })
        .collect()
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn shares_and_pairs() {
        assert_eq!(share(" 12.5% ").unwrap().to_string(), "0.125");
        assert_eq!(share("x%").unwrap_err().0, "x");
        assert_eq!(share("1.5").unwrap_err().0, "1.5");
        assert!(share("101%").is_err());
        assert!(share("-0.1").is_err());
        let p = pairs("Ca=0.10, Mg=1e-2").unwrap();
        assert_eq!(p[1].1.to_string(), "0.01");
        assert!(pairs("Ca:0.1").is_err());
    }
}
