//! Feedstocks: the crushed rock a weathering project spreads, registered once with the analysis
//! every later figure is computed from.

use super::project::{Method, Project};
use chrono::{DateTime, Utc};

/// A feedstock as registered: every number kept as the text given (normalised to its exact
/// decimal), so the row hash covers what the laboratory reported.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct Feedstock {
    pub project: String,
    pub code: String,
    /// Oxide analysis, `(oxide, value)` in the order given, in `oxide_unit`.
    pub oxides: Vec<(String, String)>,
    /// `wt%`, `mg/kg` or `mol/kg`.
    pub oxide_unit: String,
    /// Immobile (and other) elements, `(symbol, value)`, in `element_unit`; may be empty when
    /// the oxides carry TiO2.
    pub elements: Vec<(String, String)>,
    pub element_unit: String,
    /// Density as given, e.g. `2.9 t/m3`.
    pub density: String,
    /// Size that 80 % of the particles pass, as given, e.g. `90 um`.
    pub d80: Option<String>,
    pub registered_at: DateTime<Utc>,
}

/// Why a feedstock may not be registered.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Refusal {
    /// Only enhanced-weathering projects spread feedstock; the project has this method.
    Method(Method),
    /// The project already holds a feedstock of the code.
    Registered,
}

/// A feedstock may join `project` when it spreads rock and does not hold the code already
/// (`held` is what it holds under the code).
pub fn admissible(project: &Project, held: Option<&Feedstock>) -> Result<(), Refusal> {
    if project.method != Method::EnhancedWeathering {
        return Err(Refusal::Method(project.method));
    }
    match held {
        Some(_) => Err(Refusal::Registered),
        None => Ok(()),
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::ledger::canonical::encode_feedstock;
    use crate::ledger::hash::leaf_hash;
    use crate::ledger::tests::project;

    #[test]
    fn only_a_weathering_project_takes_a_feedstock_once() {
        let mut p = project(Method::EnhancedWeathering);
        let held = Feedstock {
            project: "EVW".into(),
            code: "EVB-1".into(),
            oxides: vec![],
            oxide_unit: "wt%".into(),
            elements: vec![],
            element_unit: "wt%".into(),
            density: "2.9 t/m3".into(),
            d80: None,
            registered_at: DateTime::UNIX_EPOCH,
        };
        assert_eq!(admissible(&p, None), Ok(()));
        assert_eq!(admissible(&p, Some(&held)), Err(Refusal::Registered));
        p.method = Method::SalineAquifer;
        assert_eq!(
            admissible(&p, None),
            Err(Refusal::Method(Method::SalineAquifer))
        );
    }

    /// Pins the feedstock encoding of docs/ledger-format.md, byte by byte; the row hash was
    /// computed from the same bytes with python3's hashlib.
    #[test]
    fn golden_feedstock_bytes() {
        let f = Feedstock {
            project: "EVW".into(),
            code: "EVB-1".into(),
            oxides: vec![("CaO".into(), "9.4".into()), ("TiO2".into(), "1.9".into())],
            oxide_unit: "wt%".into(),
            elements: vec![],
            element_unit: "wt%".into(),
            density: "2.9 t/m3".into(),
            d80: Some("90 um".into()),
            registered_at: DateTime::from_timestamp_micros(1_767_225_600_000_000).unwrap(),
        };
        let mut expect: Vec<u8> = vec![1];
        let s = |v: &mut Vec<u8>, t: &str| {
            v.extend_from_slice(&(t.len() as u32).to_le_bytes());
            v.extend_from_slice(t.as_bytes());
        };
        for t in ["feedstock", "EVW", "EVB-1"] {
            s(&mut expect, t);
        }
        expect.extend_from_slice(&2u32.to_le_bytes());
        for t in ["CaO", "9.4", "TiO2", "1.9", "wt%"] {
            s(&mut expect, t);
        }
        expect.extend_from_slice(&0u32.to_le_bytes());
        s(&mut expect, "wt%");
        s(&mut expect, "2.9 t/m3");
        expect.push(1);
        s(&mut expect, "90 um");
        expect.extend_from_slice(&1_767_225_600_000_000i64.to_le_bytes());
        assert_eq!(encode_feedstock(&f), expect);
        assert_eq!(
            leaf_hash(&expect).to_hex(),
            "4c3cbcc8eeae6d680a9e6012749b660c1113687e697df6e6173a10f3852e7ffa"
        );
        let other = Feedstock {
            d80: None,
            ..f.clone()
        };
        assert_ne!(
            leaf_hash(&encode_feedstock(&f)),
            leaf_hash(&encode_feedstock(&other))
        );
    }
}
