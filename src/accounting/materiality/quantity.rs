//! The quantities a ledger and a monitoring report are compared on.

use super::MaterialityError;
use std::fmt;
use std::str::FromStr;

/// The quantities a ledger and a monitoring report are compared on (a closed list).
#[derive(Debug, Clone, Copy, PartialEq, Eq, PartialOrd, Ord, Hash)]
pub enum ReportedQuantity {
    Received,
    Injected,
    Produced,
    Leakage,
    EquipmentLeak,
    Stored,
    Mineralized,
    WeatheringNet,
}

impl ReportedQuantity {
    pub const ALL: [Self; 8] = [
        Self::Received,
        Self::Injected,
        Self::Produced,
        Self::Leakage,
        Self::EquipmentLeak,
        Self::Stored,
        Self::Mineralized,
        Self::WeatheringNet,
    ];

    /// The spelling inputs and outputs use.
    pub fn key(self) -> &'static str {
        match self {
            Self::Received => "received",
            Self::Injected => "injected",
            Self::Produced => "produced",
            Self::Leakage => "leakage",
            Self::EquipmentLeak => "equipment-leak",
            Self::Stored => "stored",
            Self::Mineralized => "mineralized",
            Self::WeatheringNet => "weathering-net",
        }
    }
}

impl FromStr for ReportedQuantity {
    type Err = MaterialityError;

    fn from_str(text: &str) -> Result<Self, Self::Err> {
        Self::ALL
            .into_iter()
            .find(|q| q.key() == text)
            .ok_or_else(|| MaterialityError::Quantity(text.to_string()))
    }
}

impl fmt::Display for ReportedQuantity {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(self.key())
    }
}
