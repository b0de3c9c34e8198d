//! Appending to a chain: checking a new entry against its project and site, and deciding
//! what a re-submitted idempotency key means.

use super::bounds::{self, OutOfBounds};
use super::canonical::encode;
use super::chain::seal;
use super::entry::{Entry, SealedEntry};
use super::hash::Hash;
use super::project::Site;
use super::seal::{Replaced, Seal, SealRefusal, admit};
use crate::quantity::Mass;
use chrono::{DateTime, NaiveDate};

/// What an append came to.
#[derive(Debug, Clone, PartialEq, Eq)]
pub enum Appended {
    /// A new entry, sealed onto the chain.
    New(SealedEntry),
    /// The same entry was recorded before under this key; nothing is written.
    Existing(SealedEntry),
}

impl Appended {
    /// The entry sealed onto the chain, or the one recorded before under its key.
    pub fn into_sealed(self) -> SealedEntry {
        match self {
            Appended::New(s) | Appended::Existing(s) => s,
        }
    }
}

/// Why an entry cannot be appended.
#[derive(Debug, Clone, PartialEq, Eq)]
pub enum AppendError {
    /// The site is not one of the kinds this entry kind is recorded at.
    WrongSiteKind {
        site: String,
        kind: String,
        entry: String,
        allowed: String,
    },
    /// The entry names no site, and its kind is recorded at one.
    NoSite { entry: String },
    /// The key is held by an entry with different content.
    KeyTaken { key: String, seq: u64 },
    /// The project's entries would sum, in magnitude, beyond [`Mass::LIMIT`].
    BeyondLimit { project: String },
    /// The entry is dated in a sealed period.
    Sealed(SealRefusal),
    /// A text of the entry is too long, or its period leaves the window of activity dates.
    OutOfBounds(OutOfBounds),
}

/// What the project's seals say about a new entry: the seals, whether it may go in late, the
/// day it would then be dated, and what a correction replaces.
#[derive(Debug, Clone, Copy)]
pub struct SealRule<'a> {
    pub seals: &'a [Seal],
    pub late: bool,
    pub today: NaiveDate,
    pub replaced: Option<Replaced>,
}

impl std::fmt::Display for AppendError {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        match self {
            Self::WrongSiteKind {
                site,
                kind,
                entry,
                allowed,
            } => write!(
                f,
                "site {site} is a {kind}; {entry} entries are recorded at sites of kind {allowed}"
            ),
            Self::NoSite { entry } => write!(
                f,
                "{entry} entries are recorded at a site (only leakage and reversal may name a pathway instead)"
            ),
            Self::KeyTaken { key, seq } => write!(
                f,
                "key {key:?} already holds seq {seq} with a different reading; nothing written (use `correct` to change it)"
            ),
            Self::BeyondLimit { project } => write!(
                f,
                "project {project}'s entries would sum to more than the largest mass the ledger keeps (1,000,000 Mt, 10^18 g); nothing written"
            ),
            Self::Sealed(r) => r.fmt(f),
            Self::OutOfBounds(b) => b.fmt(f),
        }
    }
}

/// Refuses new entries that would take the project's entries, summed in magnitude, beyond
/// [`Mass::LIMIT`]: then no sum a report forms can leave the range of whole grams. `before` is
/// that sum over the entries already held (the chain tip's `Tally::magnitude`).
pub fn within_limit(before: i64, new: &[Entry]) -> Result<(), AppendError> {
    let limit = i128::from(Mass::LIMIT.grams());
    let mut total = i128::from(before);
    for e in new {
        total += i128::from(e.mass.grams()).abs();
        if total > limit {
            return Err(AppendError::BeyondLimit {
                project: e.project.clone(),
            });
        }
    }
    Ok(())
}

/// A key derived from what the entry says, so that re-running the same command is harmless,
/// whoever runs it.
pub fn content_key(e: &Entry) -> String {
    let neutral = Entry {
        seq: 0,
        key: String::new(),
        recorded_at: DateTime::UNIX_EPOCH,
        recorded_by: None,
        ..e.clone()
    };
    format!("auto-{}", &Hash::of(&encode(&neutral)).to_hex()[..20])
}

/// Checks `entry` (its seq is set here) against its site (None: it names none) and the
/// project's seals, and seals it onto the tip `(next_seq, head)`, unless `holder` — the entry
/// that already holds its key — records the same thing. Every entry but a seal comes in this way.
pub fn append(
    entry: Entry,
    site: Option<&Site>,
    tip: (u64, Hash),
    holder: Option<SealedEntry>,
    rule: SealRule<'_>,
) -> Result<Appended, AppendError> {
    bounds::entry(&entry, rule.today).map_err(AppendError::OutOfBounds)?;
    let allowed = entry.kind.site_kinds();
    let Some(site) = site else {
        if entry.kind.site_optional() && entry.site.is_empty() {
            return seal_onto(entry, tip, holder, rule);
        }
        return Err(AppendError::NoSite {
            entry: entry.kind.name().into(),
        });
    };
    if !allowed.contains(&site.kind) {
        return Err(AppendError::WrongSiteKind {
            site: site.code.clone(),
            kind: site.kind.name().into(),
            entry: entry.kind.name().into(),
            allowed: allowed
                .iter()
                .map(|k| k.name())
                .collect::<Vec<_>>()
                .join(" or "),
        });
    }
    seal_onto(entry, tip, holder, rule)
}

/// The seal rule, the key's holder and the chain, once the site is settled.
fn seal_onto(
    entry: Entry,
    tip: (u64, Hash),
    holder: Option<SealedEntry>,
    rule: SealRule<'_>,
) -> Result<Appended, AppendError> {
    let mut entry = admit(rule.seals, entry, rule.replaced, rule.late, rule.today)
        .map_err(AppendError::Sealed)?;
    if let Some(h) = holder {
        if h.entry.same_content(&entry) {
            return Ok(Appended::Existing(h));
        }
        return Err(AppendError::KeyTaken {
            key: entry.key,
            seq: h.entry.seq,
        });
    }
    entry.seq = tip.0;
    Ok(Appended::New(seal(entry, tip.1)))
}
