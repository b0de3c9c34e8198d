//! What an append reads besides the chain tip: one entry by its seq and the entry that corrects
//! a seq (each through an index), the running figures the tip keeps, and two sums SQL filters
//! for the rules that need them: the late differences recorded against an entry (rows after it,
//! only in a project with seals) and a year's injection (only under an annual maximum). No
//! append loads the project's chain.

use super::Tx;
use super::backend::placeholders;
use super::rows::EntryRow;
use super::schema::entries;
use crate::error::{Error, Result};
use crate::ledger::canonical::encode;
use crate::ledger::correction::{CorrectionError, checked_target};
use crate::ledger::hash::leaf_hash;
use crate::ledger::period::{Period, parse_date};
use crate::ledger::seal::late_replaces;
use crate::ledger::tally::{Tally, in_year, stored_share};
use crate::ledger::{Entry, EntryKind, SealedEntry};
use crate::quantity::Mass;
use chrono::{DateTime, NaiveDate, NaiveDateTime, Utc};
use diesel::dsl::sql;
use diesel::prelude::*;
use diesel::sql_types::{BigInt, Bool, Nullable, Text};

/// The chain tip as an append needs it: its seq, its recorded_at, and the running figures
/// through it (None on a row written before the figures were kept).
pub struct TipTally {
    pub seq: u64,
    pub recorded_at: DateTime<Utc>,
    pub tally: Option<Tally>,
}

/// One effective injection entry touching a year: its grams and its days.
#[derive(QueryableByName)]
struct InjectionRow {
    #[diesel(sql_type = BigInt)]
    grams: i64,
    #[diesel(sql_type = Text)]
    period_from: String,
    #[diesel(sql_type = Text)]
    period_to: String,
}

impl Tx<'_> {
    /// The entry at `seq`, decoded and checked against its stored leaf hash (a row changed
    /// behind the ledger's back is reported, never used).
    pub fn entry_at(&mut self, project: &str, seq: u64) -> Result<Option<SealedEntry>> {
        let Ok(at) = i64::try_from(seq) else {
            return Ok(None);
        };
        let row: Option<EntryRow> = entries::table
            .find((project, at))
            .select(EntryRow::as_select())
            .first(self.conn)
            .optional()?;
        row.map(|r| checked(project, &r)).transpose()
    }

    /// The first entry that corrects `seq`, found through the (project, corrects) index.
    pub fn corrected_by(&mut self, project: &str, seq: u64) -> Result<Option<u64>> {
        let Ok(at) = i64::try_from(seq) else {
            return Ok(None);
        };
        // `+ 0`: see stream.rs; it keeps SQLite from answering min() along the primary key.
        let by: Option<i64> = entries::table
            .filter(entries::project.eq(project).and(entries::corrects.eq(at)))
            .select(sql::<Nullable<BigInt>>("min(seq + 0)"))
            .first(self.conn)?;
        Ok(by.and_then(|s| u64::try_from(s).ok()))
    }

    /// The entry a correction of `seq` would replace, checked by `ledger::correction`'s rule: it
    /// exists and no entry corrects it yet.
    pub fn correction_target(
        &mut self,
        project: &str,
        seq: u64,
    ) -> Result<std::result::Result<Entry, CorrectionError>> {
        let found = self.entry_at(project, seq)?.map(|s| s.entry);
        let by = self.corrected_by(project, seq)?;
        Ok(checked_target(found.as_ref(), seq, by).cloned())
    }

    /// The entries of `kind` at `site` that no correction replaces, in seq order, each checked:
    /// the few a field's rule reads (its baseline cores, its spreadings).
    pub fn effective_at_site(
        &mut self,
        project: &str,
        kind: EntryKind,
        site: &str,
    ) -> Result<Vec<Entry>> {
        let rows: Vec<EntryRow> = entries::table
            .filter(
                entries::project
                    .eq(project)
                    .and(entries::kind.eq(kind.name()))
                    .and(entries::site.eq(site))
                    .and(sql::<Bool>(
                        "NOT EXISTS (SELECT 1 FROM entries c \
                         WHERE c.project = entries.project AND c.corrects = entries.seq)",
                    )),
            )
            .order(entries::seq)
            .select(EntryRow::as_select())
            .load(self.conn)?;
        rows.iter()
            .map(|r| checked(project, r).map(|s| s.entry))
            .collect()
    }

    /// What `target` counts for now: its grams plus the late differences recorded against it
    /// (entries after it whose reading names it in `late_replaces`), each checked as read.
    pub fn late_counted(&mut self, target: &Entry) -> Result<Mass> {
        let pattern = format!("%[\"late_replaces\",\"{}\"]%", target.seq);
        let rows: Vec<EntryRow> = entries::table
            .filter(
                entries::project
                    .eq(&target.project)
                    .and(entries::seq.gt(target.seq as i64))
                    .and(entries::reading.like(pattern)),
            )
            .order(entries::seq)
            .select(EntryRow::as_select())
            .load(self.conn)?;
        let mut counted = target.mass;
        for r in &rows {
            let s = checked(&target.project, r)?;
            if late_replaces(&s.entry) == Some(target.seq) {
                counted += s.entry.mass;
            }
        }
        Ok(counted)
    }

    /// The chain tip's seq, recorded_at and running figures; None for an empty chain.
    pub(super) fn tip_tally(&mut self, project: &str) -> Result<Option<TipTally>> {
        type Tip = (i64, NaiveDateTime, Option<i64>, Option<i64>);
        let last: Option<Tip> = entries::table
            .filter(entries::project.eq(project))
            .order(entries::seq.desc())
            .select((
                entries::seq,
                entries::recorded_at,
                entries::tally_magnitude_g,
                entries::tally_stored_g,
            ))
            .first(self.conn)
            .optional()?;
        Ok(last.map(|(seq, at, magnitude, stored)| TipTally {
            seq: seq as u64,
            recorded_at: at.and_utc(),
            tally: magnitude
                .zip(stored)
                .map(|(magnitude, stored)| Tally { magnitude, stored }),
        }))
    }

    /// The running figures through the project's chain tip (zero for an empty chain).
    pub fn tally(&mut self, project: &str) -> Result<Tally> {
        let tip = self.tip_tally(project)?;
        self.tally_at(project, tip.as_ref())
    }

    /// The running figures through `tip`, counted over the chain once when the tip was written
    /// before they were kept.
    pub(super) fn tally_at(&mut self, project: &str, tip: Option<&TipTally>) -> Result<Tally> {
        match tip {
            None => Ok(Tally::default()),
            Some(TipTally { tally: Some(t), .. }) => Ok(*t),
            Some(TipTally { tally: None, .. }) => self.recount(project),
        }
    }

    /// The running figures counted over the whole chain, for a ledger whose tip was written
    /// before they were kept: once, by the first append after.
    fn recount(&mut self, project: &str) -> Result<Tally> {
        let mut t = Tally::default();
        self.walk_chain(project, None, |row| {
            t.magnitude = t
                .magnitude
                .saturating_add(row.sealed.entry.mass.grams().saturating_abs());
            if row.replaced_by.is_none() {
                t.stored = t.stored.saturating_add(stored_share(&row.sealed.entry));
            }
            Ok(())
        })?;
        Ok(t)
    }

    /// The project's injection in `year` over the entries no correction replaces, an entry
    /// spanning years counted by its days in it, split exactly as the balance splits it.
    pub fn injected_in_year(&mut self, project: &str, year: i32) -> Result<Mass> {
        let (Some(first), Some(last)) = (
            NaiveDate::from_ymd_opt(year, 1, 1),
            NaiveDate::from_ymd_opt(year, 12, 31),
        ) else {
            return Ok(Mass::ZERO);
        };
        let query = placeholders(
            self.conn,
            "SELECT e.grams AS grams, e.period_from AS period_from, e.period_to AS period_to \
             FROM entries e WHERE e.project = ? AND e.kind = 'injection' \
             AND e.period_to >= ? AND e.period_from <= ? \
             AND NOT EXISTS (SELECT 1 FROM entries c WHERE c.project = e.project AND c.corrects = e.seq)",
        );
        let rows: Vec<InjectionRow> = diesel::sql_query(query)
            .bind::<Text, _>(project)
            .bind::<Text, _>(first.to_string())
            .bind::<Text, _>(last.to_string())
            .load(self.conn)?;
        let mut injected = Mass::ZERO;
        for r in rows {
            let day = |v: &str| {
                parse_date(v)
                    .map_err(|e| Error::entry(project, None, format!("period date {v:?} {e}")))
            };
            let period = Period {
                from: day(&r.period_from)?,
                to: day(&r.period_to)?,
            };
            injected += in_year(r.grams, period, year);
        }
        Ok(injected)
    }
}

/// A row decoded and checked against its own leaf hash.
fn checked(project: &str, r: &EntryRow) -> Result<SealedEntry> {
    let bad = |what: String| Error::entry(project, Some(r.seq), what);
    let s = r.to_sealed().map_err(bad)?;
    if leaf_hash(&encode(&s.entry)) != s.leaf {
        return Err(bad("its fields differ from its leaf hash".into()));
    }
    Ok(s)
}
