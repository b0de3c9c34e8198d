//! Feedstocks: the crushed rock a weathering project spreads, registered once with the analysis
//! every later figure is computed from.

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
