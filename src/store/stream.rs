//! Reading a project's chain one row at a time, each row decoded and checked (leaf hash, chain
//! link, recorded_at, correction links) before anything reads it, so a report never holds the
//! chain and never counts a forged figure.

use super::Tx;
use super::backend::on_backend;
use super::reading_text;
use super::rows::EntryRow;
use super::schema::entries;
use crate::error::{Error, Result};
use crate::ledger::chain::{ChainCheck, ChainWalk, Target};
use crate::ledger::tally::{Tally, share};
use crate::ledger::{EntryKind, Reading, SealedEntry};
use crate::quantity::Mass;
use chrono::{DateTime, NaiveDateTime, Utc};
use diesel::connection::DefaultLoadingMode;
use diesel::dsl::sql;
use diesel::prelude::*;
use diesel::sql_types::{BigInt, Bool, Nullable, Text, Timestamp};

/// The seq of the entry that replaces this one, among corrections recorded by the bound time
/// (every correction when it is NULL); found through the index on (project, corrects). The
/// `+ 0` keeps SQLite's planner from answering `min(seq)` by walking the primary key in order,
/// which scans the project's whole chain for every row (a report quadratic in its entries).
const REPLACED_BY: &str = "(SELECT min(c.seq + 0) FROM entries c \
     WHERE c.project = entries.project AND c.corrects = entries.seq \
     AND c.recorded_at <= coalesce(";

/// For a correction: the kind of the entry it names.
const TARGET_KIND: &str = "CASE WHEN entries.corrects IS NULL THEN NULL ELSE \
     (SELECT t.kind FROM entries t WHERE t.project = entries.project AND t.seq = entries.corrects) END";

/// For a correction: the first entry that corrects the same target (through the same index,
/// for the same reason).
const FIRST_CORRECTOR: &str = "CASE WHEN entries.corrects IS NULL THEN NULL ELSE \
     (SELECT min(x.seq + 0) FROM entries x WHERE x.project = entries.project AND x.corrects = entries.corrects) END";

/// For a correction: the grams and reading of the entry it names, for what that entry counted
/// in the running figures (`ledger::tally`).
const TARGET_GRAMS: &str = "CASE WHEN entries.corrects IS NULL THEN NULL ELSE \
     (SELECT t.grams FROM entries t WHERE t.project = entries.project AND t.seq = entries.corrects) END";
const TARGET_READING: &str = "CASE WHEN entries.corrects IS NULL THEN NULL ELSE \
     (SELECT t.reading FROM entries t WHERE t.project = entries.project AND t.seq = entries.corrects) END";

/// The evidence kinds, spelled as the partial index `entries_evidence` spells them so the
/// planner uses it.
const EVIDENCE_KINDS: &str = "entries.kind IN ('calibration', 'tracer-sample')";

/// A row as the walk reads it: the entry, what replaces it, what it corrects (kind, grams,
/// reading), its first fellow corrector, and the running figures stored with it.
type WalkRow = (
    EntryRow,
    Option<i64>,
    Option<String>,
    Option<i64>,
    Option<i64>,
    Option<String>,
    Option<i64>,
    Option<i64>,
);

/// One stored entry as read, with the seq of the entry that replaces it, if any.
pub struct ChainRow<'a> {
    pub sealed: &'a SealedEntry,
    pub replaced_by: Option<u64>,
}

/// What the entry a correction names counted in the running figures (`ledger::tally`), from
/// its kind, grams and stored reading; 0 for an entry that corrects nothing.
fn replaced_share(
    kind: Option<EntryKind>,
    grams: Option<i64>,
    reading: Option<&str>,
) -> std::result::Result<i64, String> {
    let (Some(kind), Some(grams), Some(reading)) = (kind, grams, reading) else {
        return Ok(0);
    };
    let reading = reading_text::parse(reading)
        .map(Reading)
        .map_err(|e| format!("the entry it corrects has a reading that is not readable: {e}"))?;
    Ok(share(kind, Mass::from_grams(grams), &reading))
}

/// The walk's checks on each row as it is read: the chain, the running figures, and where the
/// rows stopped decoding.
struct RowCheck<'p> {
    project: &'p str,
    cut: Option<NaiveDateTime>,
    walk: ChainWalk,
    tally: Tally,
    last_seq: Option<i64>,
    /// The reading of the row before, whose strings the next row's reading is read into.
    pairs: Vec<(String, String)>,
}

impl<'p> RowCheck<'p> {
    fn new(project: &'p str, cut: Option<NaiveDateTime>) -> Self {
        Self {
            project,
            cut,
            walk: ChainWalk::new(project),
            tally: Tally::default(),
            last_seq: None,
            pairs: Vec::new(),
        }
    }

    /// Checks every row and hands `f` those recorded by the cut; returns the decoding error a
    /// row stopped at, if one did.
    fn rows(
        &mut self,
        rows: impl Iterator<Item = QueryResult<WalkRow>>,
        f: &mut impl FnMut(ChainRow<'_>) -> Result<()>,
    ) -> Result<Option<diesel::result::Error>> {
        for row in rows {
            match row {
                Ok(r) => self.row(r, f)?,
                Err(e @ diesel::result::Error::DeserializationError(_)) => return Ok(Some(e)),
                Err(e) => return Err(e.into()),
            }
        }
        Ok(None)
    }

    fn row(&mut self, row: WalkRow, f: &mut impl FnMut(ChainRow<'_>) -> Result<()>) -> Result<()> {
        let (row, replaced_by, target_kind, first_corrector, t_grams, t_reading, kept_m, kept_s) =
            row;
        let (project, seq) = (self.project, row.seq);
        self.last_seq = Some(seq);
        let bad = |what: String| Error::entry(project, Some(seq), what);
        let mut sealed = row
            .into_sealed(std::mem::take(&mut self.pairs))
            .map_err(bad)?;
        let target = Target {
            kind: target_kind
                .map(|k| {
                    EntryKind::from_name(&k)
                        .ok_or_else(|| bad(format!("corrects an entry of unknown kind {k:?}")))
                })
                .transpose()?,
            first_corrector: first_corrector.and_then(|s| u64::try_from(s).ok()),
        };
        let corrected_kind = target.kind;
        self.walk
            .step(&sealed, target)
            .map_err(|finding| Error::ledger(finding.to_string()))?;
        let replaced =
            replaced_share(corrected_kind, t_grams, t_reading.as_deref()).map_err(bad)?;
        self.tally = self.tally.with(&sealed.entry, replaced);
        if let (Some(magnitude), Some(stored)) = (kept_m, kept_s)
            && (Tally { magnitude, stored }) != self.tally
        {
            return Err(bad(format!(
                "the running figures kept with it (Σ |grams| {magnitude}, stored {stored} g) differ from the chain's ({}, {} g)",
                self.tally.magnitude, self.tally.stored
            )));
        }
        if self
            .cut
            .is_none_or(|t| sealed.entry.recorded_at.naive_utc() <= t)
        {
            f(ChainRow {
                sealed: &sealed,
                replaced_by: replaced_by.and_then(|s| u64::try_from(s).ok()),
            })?;
        }
        self.pairs = std::mem::take(&mut sealed.entry.reading.0);
        Ok(())
    }
}

impl Tx<'_> {
    /// Every entry of a project in seq order, each checked as it is decoded; with `as_of`, only
    /// the entries recorded by then (the whole chain is still checked).
    pub fn for_each_entry(
        &mut self,
        project: &str,
        as_of: Option<DateTime<Utc>>,
        mut f: impl FnMut(&SealedEntry) -> Result<()>,
    ) -> Result<()> {
        self.walk_chain(project, as_of, |row| f(row.sealed))
            .map(drop)
    }

    /// The entries reports count, in seq order: those no correction (recorded by `as_of`)
    /// replaces, each checked as it is decoded.
    pub fn for_each_effective_entry(
        &mut self,
        project: &str,
        as_of: Option<DateTime<Utc>>,
        mut f: impl FnMut(&SealedEntry) -> Result<()>,
    ) -> Result<()> {
        self.walk_chain(project, as_of, |row| match row.replaced_by {
            None => f(row.sealed),
            Some(_) => Ok(()),
        })
        .map(drop)
    }

    /// Walks the whole chain of a project in seq order, checking every row, and hands `f` the
    /// rows recorded by `as_of` with the seq replacing each. Returns what the check covered.
    pub fn walk_chain(
        &mut self,
        project: &str,
        as_of: Option<DateTime<Utc>>,
        mut f: impl FnMut(ChainRow<'_>) -> Result<()>,
    ) -> Result<ChainCheck> {
        let cut = as_of.map(|t| t.naive_utc());
        let (lowest, highest) = self.corrected_span(project)?;
        let mut check = RowCheck::new(project, cut);
        // Built and run on the backend's own connection, so rows decode without the
        // multi-backend connection's wrapping of every field.
        let undecoded = on_backend!(&mut *self.conn, c => {
            let replaced_by = sql::<Nullable<BigInt>>("CASE WHEN entries.seq BETWEEN ")
                .bind::<Nullable<BigInt>, _>(lowest)
                .sql(" AND ")
                .bind::<Nullable<BigInt>, _>(highest)
                .sql(" THEN ")
                .sql(REPLACED_BY)
                .bind::<Nullable<Timestamp>, _>(cut)
                .sql(", c.recorded_at)) END");
            let rows = entries::table
                .filter(entries::project.eq(project))
                .order(entries::seq)
                .select((
                    EntryRow::as_select(),
                    replaced_by,
                    sql::<Nullable<Text>>(TARGET_KIND),
                    sql::<Nullable<BigInt>>(FIRST_CORRECTOR),
                    sql::<Nullable<BigInt>>(TARGET_GRAMS),
                    sql::<Nullable<Text>>(TARGET_READING),
                    entries::tally_magnitude_g,
                    entries::tally_stored_g,
                ))
                .load_iter::<WalkRow, DefaultLoadingMode>(c)?;
            check.rows(rows, &mut f)?
        });
        match undecoded {
            None => Ok(check.walk.finish()),
            Some(e) => Err(self.undecodable(project, check.last_seq, &e)),
        }
    }

    /// The project's entries of the kinds a report reads before the others (calibrations and
    /// tracer samples, `accounting::project_view::EVIDENCE`) that no correction recorded by
    /// `as_of` replaces, recorded by then, in seq order, through their partial index. Decoded,
    /// not checked: the walk that follows checks every row, and the view that it met these.
    pub fn effective_evidence(
        &mut self,
        project: &str,
        as_of: Option<DateTime<Utc>>,
    ) -> Result<Vec<SealedEntry>> {
        let cut = as_of.map(|t| t.naive_utc());
        let replaced_by = sql::<Nullable<BigInt>>(REPLACED_BY)
            .bind::<Nullable<Timestamp>, _>(cut)
            .sql(", c.recorded_at))");
        let rows: Vec<EntryRow> = entries::table
            .filter(entries::project.eq(project))
            .filter(sql::<Bool>(EVIDENCE_KINDS))
            .filter(replaced_by.is_null())
            .order(entries::seq)
            .select(EntryRow::as_select())
            .load(self.conn)?;
        let mut out = Vec::new();
        for row in rows {
            let sealed = row
                .to_sealed()
                .map_err(|what| Error::entry(project, Some(row.seq), what))?;
            if cut.is_none_or(|t| sealed.entry.recorded_at.naive_utc() <= t) {
                out.push(sealed);
            }
        }
        Ok(out)
    }

    /// The lowest and highest seq the project's corrections name, through the partial index on
    /// (project, corrects): only a row between them can be replaced, so the walk looks for what
    /// replaces a row there alone (nowhere, in a chain without corrections).
    fn corrected_span(&mut self, project: &str) -> Result<(Option<i64>, Option<i64>)> {
        Ok(entries::table
            .filter(entries::project.eq(project))
            .filter(entries::corrects.is_not_null())
            .select((
                diesel::dsl::min(entries::corrects),
                diesel::dsl::max(entries::corrects),
            ))
            .first(self.conn)?)
    }

    /// A stored row whose fields no longer decode (a byte changed in a text): named by its seq,
    /// the one after the last row that decoded.
    fn undecodable(
        &mut self,
        project: &str,
        after: Option<i64>,
        e: &diesel::result::Error,
    ) -> Error {
        let seq: Option<i64> = entries::table
            .filter(
                entries::project
                    .eq(project)
                    .and(entries::seq.gt(after.unwrap_or(-1))),
            )
            .order(entries::seq)
            .select(entries::seq)
            .first(self.conn)
            .optional()
            .ok()
            .flatten();
        let what = format!("a stored field does not decode ({e})");
        match (seq, after) {
            (Some(_), _) => Error::entry(project, seq, what),
            (None, Some(a)) => {
                Error::entry(project, None, format!("the row after seq {a}: {what}"))
            }
            (None, None) => Error::entry(project, None, format!("its first row: {what}")),
        }
    }
}

#[cfg(test)]
mod tests {
    use super::super::{Store, Wait};
    use crate::ledger::chain::seal;
    use crate::ledger::period::parse_date;
    use crate::ledger::{
        Entry, EntryKind, Hash, Method, Period, Project, Reading, SealedEntry, Sign, Site, SiteKind,
    };
    use crate::quantity::Mass;
    use chrono::{DateTime, Duration, Utc};

    fn at(day: i64) -> DateTime<Utc> {
        DateTime::UNIX_EPOCH + Duration::days(20_000 + day)
    }

    /// Project P with entries 0..=4 recorded on days 0..=4: seq 3 corrects seq 0 and seq 4
    /// corrects seq 3.
    fn ledger() -> (tempfile::TempDir, Store) {
        let dir = tempfile::tempdir().unwrap();
        let (mut store, _) = Store::init(&dir.path().join("l.db"), Wait::default()).unwrap();
        store
            .write(|tx| {
                tx.add_project(&Project {
                    code: "P".into(),
                    name: "P".into(),
                    method: Method::SalineAquifer,
                    operator: "O".into(),
                    permit_ref: None,
                    permit_capacity: None,
                    permit_annual: None,
                    registered_at: at(0),
                })?;
                tx.add_site(&Site {
                    project: "P".into(),
                    code: "W".into(),
                    kind: SiteKind::InjectionWell,
                    area: None,
                    uncertainty: None,
                    registered_at: at(0),
                })?;
                let mut head = Hash::GENESIS;
                let mut sealed: Vec<SealedEntry> = Vec::new();
                for (seq, corrects) in [None, None, None, Some(0), Some(3)].into_iter().enumerate()
                {
                    let day = parse_date("2026-01-01").unwrap();
                    let s = seal(
                        Entry {
                            project: "P".into(),
                            seq: seq as u64,
                            kind: EntryKind::Injection,
                            site: "W".into(),
                            period: Period::new(day, day).unwrap(),
                            reading: Reading::default(),
                            mass: Mass::from_grams(seq as i64 + 1),
                            sign: Sign::Adds,
                            recorded_at: at(seq as i64),
                            key: format!("k{seq}"),
                            meter: None,
                            note: None,
                            corrects,
                            reason: corrects.map(|_| "fix".into()),
                            evidence: None,
                            recorded_by: None,
                        },
                        head,
                    );
                    head = s.chain;
                    sealed.push(s);
                }
                tx.append(&sealed)
            })
            .unwrap();
        (dir, store)
    }

    fn effective(store: &mut Store, as_of: Option<DateTime<Utc>>) -> Vec<u64> {
        store
            .read(|tx| {
                let mut seqs = Vec::new();
                tx.for_each_effective_entry("P", as_of, |s| {
                    seqs.push(s.entry.seq);
                    Ok(())
                })?;
                Ok(seqs)
            })
            .unwrap()
    }

    #[test]
    fn effective_entries_follow_the_latest_correction_known_at_the_date() {
        let (_dir, mut store) = ledger();
        assert_eq!(effective(&mut store, None), [1, 2, 4]);
        assert_eq!(effective(&mut store, Some(at(3))), [1, 2, 3]);
        assert_eq!(effective(&mut store, Some(at(2))), [0, 1, 2]);
        assert_eq!(effective(&mut store, Some(at(-1))), Vec::<u64>::new());
    }

    #[test]
    fn every_entry_comes_with_what_replaces_it() {
        let (_dir, mut store) = ledger();
        let (rows, check) = store
            .read(|tx| {
                let mut rows = Vec::new();
                let c = tx.walk_chain("P", None, |r| {
                    rows.push((r.sealed.entry.seq, r.replaced_by));
                    Ok(())
                })?;
                Ok((rows, c))
            })
            .unwrap();
        assert_eq!(
            rows,
            [(0, Some(3)), (1, None), (2, None), (3, Some(4)), (4, None)]
        );
        assert_eq!(check.entries, 5);
    }
}
