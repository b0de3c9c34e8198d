//! An oxide composition as typed, `NAME=wt%,…`: each part's name and number, in the order
//! given, before the composition's own checks read them.

use crate::quantity::Decimal;

/// The parts of `text`; a refusal gives the part that does not read and why.
pub fn oxide_list(text: &str) -> Result<Vec<(String, f64)>, (String, String)> {
    text.split(',')
        .map(|part| {
            let (name, value) = part
                .split_once('=')
                .ok_or_else(|| (part.to_string(), "write NAME=wt%, e.g. CaO=10".to_string()))?;
            let v = Decimal::parse(value.trim()).map_err(|e| (part.to_string(), e.to_string()))?;
            Ok((name.trim().to_string(), v.to_f64()))
        })
        .collect()
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn parts_in_the_order_given() {
        assert_eq!(
            oxide_list("CaO=10, MgO=7.5").unwrap(),
            vec![("CaO".into(), 10.0), ("MgO".into(), 7.5)]
        );
        assert_eq!(oxide_list("CaO=10,MgO").unwrap_err().0, "MgO");
        assert_eq!(oxide_list("CaO=x").unwrap_err().0, "CaO=x");
    }
}
