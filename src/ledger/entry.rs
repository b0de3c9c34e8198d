//! Ledger entries: what was recorded, when, from which reading, and with which hashes.

use super::hash::Hash;
use super::period::Period;
use super::project::{SiteKind, named_enum};
use crate::quantity::Mass;
use chrono::{DateTime, Utc};

named_enum! {
    /// What an entry records. The order of this list is the canonical ordinal: append new kinds
    /// at the end, never reorder (docs/ledger-format.md).
    EntryKind {
        Injection => "injection",
        Receipt => "receipt",
        Redelivery => "redelivery",
        Production => "production",
        Leakage => "leakage",
        EquipmentLeak => "equipment-leak",
        Emission => "emission",
        Survey => "survey",
        TracerSample => "tracer-sample",
        Carbonation => "carbonation",
        Application => "application",
        SoilSample => "soil-sample",
        Reversal => "reversal",
        Calibration => "calibration",
        Seal => "seal",
    }
}

impl EntryKind {
    /// Ordinal in the canonical encoding.
    pub fn ordinal(self) -> u8 {
        Self::ALL.iter().position(|k| *k == self).expect("listed") as u8
    }

    /// Whether the entry adds to storage, deducts from it, or is a term reported beside it.
    pub fn sign(self) -> Sign {
        match self {
            Self::Injection | Self::Carbonation => Sign::Adds,
            Self::Production | Self::Leakage | Self::EquipmentLeak | Self::Reversal => {
                Sign::Deducts
            }
            Self::Receipt
            | Self::Redelivery
            | Self::Emission
            | Self::Survey
            | Self::TracerSample
            | Self::Application
            | Self::SoilSample
            | Self::Calibration
            | Self::Seal => Sign::Neutral,
        }
    }

    /// Whether the entry is a metered term of the geological mass balance (received,
    /// redelivered, injected, produced, leaked, vented).
    pub fn is_balance_term(self) -> bool {
        matches!(
            self,
            Self::Receipt
                | Self::Redelivery
                | Self::Injection
                | Self::Production
                | Self::Leakage
                | Self::EquipmentLeak
        )
    }

    /// Whether a meter export's readings can make entries of this kind: the metered flows
    /// (received, redelivered, injected, produced, leaked from equipment, emitted). Surveys,
    /// samples, batches, calibrations, reversals and seals are not rows of a meter file.
    pub fn is_meter_reading(self) -> bool {
        matches!(
            self,
            Self::Injection
                | Self::Receipt
                | Self::Redelivery
                | Self::Production
                | Self::EquipmentLeak
                | Self::Emission
        )
    }

    /// Whether an entry of this kind may name no site: a leak or a loss leaves by a pathway (a
    /// fault, a legacy well) that need not be a site of the project.
    pub fn site_optional(self) -> bool {
        matches!(self, Self::Leakage | Self::Reversal)
    }

    /// The site kinds an entry of this kind may be recorded at.
    pub fn site_kinds(self) -> &'static [SiteKind] {
        use SiteKind::*;
        match self {
            Self::Injection => &[InjectionWell],
            Self::Receipt => &[Plant, InjectionWell],
            Self::Redelivery => &[Plant],
            Self::Production => &[ProductionWell, Plant],
            Self::EquipmentLeak => &[InjectionWell, ProductionWell, Plant],
            Self::TracerSample => &[MonitoringWell],
            Self::Carbonation => &[Plant],
            Self::Application | Self::SoilSample => &[Field],
            Self::Leakage | Self::Emission | Self::Survey | Self::Reversal | Self::Calibration => {
                &[InjectionWell, ProductionWell, MonitoringWell, Field, Plant]
            }
            // A seal closes a period of the whole project and stands at no site.
            Self::Seal => &[],
        }
    }
}

named_enum! {
    /// Whether an entry's grams add to what is stored, deduct from it, or are an observation.
    Sign {
        Adds => "adds",
        Deducts => "deducts",
        Neutral => "neutral",
    }
}

impl Sign {
    pub fn ordinal(self) -> u8 {
        Self::ALL.iter().position(|k| *k == self).expect("listed") as u8
    }
}

/// The reading an entry came from, as given: named fields in the order recorded
/// (e.g. `mass = 1250.5 t`, `co2_fraction = 0.985`, `co2_basis = mass`).
#[derive(Debug, Clone, PartialEq, Eq, Default)]
pub struct Reading(pub Vec<(String, String)>);

impl Reading {
    pub fn get(&self, name: &str) -> Option<&str> {
        self.0
            .iter()
            .find(|(n, _)| n == name)
            .map(|(_, v)| v.as_str())
    }

    pub fn push(&mut self, name: &str, value: impl Into<String>) {
        self.0.push((name.to_string(), value.into()));
    }
}

impl std::fmt::Display for Reading {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        let parts: Vec<String> = self.0.iter().map(|(n, v)| format!("{n}={v}")).collect();
        f.write_str(&parts.join("; "))
    }
}

/// A file that backs an entry: its name and SHA-256.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct Evidence {
    pub file_name: String,
    pub sha256: Hash,
}

/// One ledger entry, before or after it is hashed.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct Entry {
    pub project: String,
    pub seq: u64,
    pub kind: EntryKind,
    pub site: String,
    pub period: Period,
    pub reading: Reading,
    pub mass: Mass,
    pub sign: Sign,
    /// UTC, whole microseconds (what both SQLite text and PostgreSQL timestamps keep exactly).
    pub recorded_at: DateTime<Utc>,
    pub key: String,
    pub meter: Option<String>,
    pub note: Option<String>,
    pub corrects: Option<u64>,
    pub reason: Option<String>,
    pub evidence: Option<Evidence>,
    /// The registry role that appended the entry, in its canonical bytes (encoding v2); `None`
    /// for an entry written to a ledger file, which has no database roles (encoding v1).
    pub recorded_by: Option<String>,
}

impl Entry {
    /// A new entry of `kind` before the append gives it its seq and key: it adds to or
    /// deducts from storage as its kind does, and corrects nothing.
    pub fn draft(
        kind: EntryKind,
        project: String,
        site: String,
        period: Period,
        reading: Reading,
        mass: Mass,
        recorded_at: DateTime<Utc>,
    ) -> Entry {
        Entry {
            project,
            seq: 0,
            kind,
            site,
            period,
            reading,
            mass,
            sign: kind.sign(),
            recorded_at,
            key: String::new(),
            meter: None,
            note: None,
            corrects: None,
            reason: None,
            evidence: None,
            recorded_by: None,
        }
    }

    /// Whether two entries record the same thing, ignoring position, time and role of
    /// recording; a re-submission of the same key with the same content is a harmless retry.
    pub fn same_content(&self, other: &Entry) -> bool {
        let strip = |e: &Entry| Entry {
            seq: 0,
            recorded_at: DateTime::UNIX_EPOCH,
            recorded_by: None,
            ..e.clone()
        };
        strip(self) == strip(other)
    }
}

/// An entry with the hashes the ledger stored for it.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct SealedEntry {
    pub entry: Entry,
    pub leaf: Hash,
    pub chain: Hash,
}
