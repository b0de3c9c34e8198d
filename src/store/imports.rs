//! Imports in the ledger file: which file went into which project and how it was read, its
//! bytes kept verbatim in parts, and the meter-days already covered.

use super::Tx;
use super::backend::{Conn, placeholders};
use super::rows::ImportRow;
use super::schema::{import_evidence, imports};
use crate::error::{Error, Result, StoreKind};
use crate::ledger::Hash;
use chrono::NaiveDate;
use diesel::prelude::*;
use diesel::sql_types::{BigInt, Text};

/// An import to record: which file went into which project, as what, how read, when.
pub struct NewImport<'a> {
    pub id: i64,
    pub project: &'a str,
    pub file_name: &'a str,
    pub sha256: Hash,
    pub bytes: u64,
    pub kind: &'a str,
    /// The `--columns` map as given ("" for the default names).
    pub columns: &'a str,
    pub density: &'a str,
    pub rows: i64,
    pub at: chrono::DateTime<chrono::Utc>,
}

/// A file imported earlier.
#[derive(Debug, Clone)]
pub struct ImportSummary {
    pub id: i64,
    pub file_name: String,
    pub rows: i64,
    pub imported_at: chrono::DateTime<chrono::Utc>,
}

/// An import as stored, with what is needed to read its evidence again.
#[derive(Debug, Clone)]
pub struct StoredImport {
    pub id: i64,
    pub file_name: String,
    pub sha256: String,
    pub bytes: i64,
    pub kind: String,
    pub columns: String,
    pub density: String,
}

/// An effective imported-style entry: one meter's day.
#[derive(Debug, Clone, QueryableByName)]
pub struct CoveredDay {
    #[diesel(sql_type = BigInt)]
    pub seq: i64,
    #[diesel(sql_type = Text)]
    pub meter: String,
    #[diesel(sql_type = Text)]
    pub day: String,
    #[diesel(sql_type = diesel::sql_types::Nullable<Text>)]
    pub evidence_name: Option<String>,
}

#[derive(QueryableByName)]
struct Part {
    #[diesel(sql_type = diesel::sql_types::Binary)]
    bytes: Vec<u8>,
}

impl Tx<'_> {
    /// Runs `f` in a savepoint. When `f` says its writes are not to be kept (a file found to
    /// be imported already, once read), they are rolled back and its value returned.
    fn savepoint<T>(&mut self, f: impl FnOnce(&mut Tx<'_>) -> Result<(T, bool)>) -> Result<T> {
        let mut discarded = None;
        let (writing, project) = (self.writing, self.project);
        let kept = self.conn.transaction(|conn| {
            let (value, keep) = f(&mut Tx {
                conn,
                writing,
                project,
            })?;
            if keep {
                return Ok(value);
            }
            discarded = Some(value);
            Err(Error::internal("discarded"))
        });
        match kept {
            Ok(v) => Ok(v),
            Err(e) => discarded.ok_or(e),
        }
    }

    /// Keeps import `import_id`'s bytes, part by part, as `read` hands them over while it reads
    /// the file; `read` gives what it made of them and their SHA-256. When `project` imported
    /// that file before, the parts are dropped again and the earlier import is returned beside.
    pub fn keep_file<T>(
        &mut self,
        import_id: i64,
        project: &str,
        read: impl FnOnce(&mut dyn FnMut(&[u8]) -> Result<()>) -> Result<(T, Hash)>,
    ) -> Result<(T, Option<ImportSummary>)> {
        self.savepoint(|tx| {
            let mut part = 0;
            let (value, sha256) = read(&mut |bytes| {
                tx.add_evidence(import_id, part, bytes)?;
                part += 1;
                Ok(())
            })?;
            let earlier = tx.import_of(project, sha256)?;
            let keep = earlier.is_none();
            Ok(((value, earlier), keep))
        })
    }

    /// The import of this file into this project, if it was imported before.
    pub fn import_of(&mut self, project: &str, sha256: Hash) -> Result<Option<ImportSummary>> {
        let row: Option<ImportRow> = imports::table
            .filter(
                imports::project
                    .eq(project)
                    .and(imports::file_sha256.eq(sha256.to_hex())),
            )
            .select(ImportRow::as_select())
            .first(self.conn)
            .optional()?;
        Ok(row.map(|r| ImportSummary {
            id: r.id,
            file_name: r.file_name,
            rows: r.row_count,
            imported_at: r.imported_at.and_utc(),
        }))
    }

    /// The id the next import takes.
    pub fn next_import_id(&mut self) -> Result<i64> {
        if let Conn::Pg(c) = &mut *self.conn {
            return super::postgres::next_import_id(c);
        }
        let max: Option<i64> = imports::table
            .select(diesel::dsl::max(imports::id))
            .first(self.conn)?;
        Ok(max.unwrap_or(0) + 1)
    }

    /// Keeps part `part` of an import's file bytes.
    pub fn add_evidence(&mut self, import_id: i64, part: i64, bytes: &[u8]) -> Result<()> {
        diesel::insert_into(import_evidence::table)
            .values((
                import_evidence::import_id.eq(import_id),
                import_evidence::part.eq(part),
                import_evidence::bytes.eq(bytes),
            ))
            .execute(self.conn)?;
        Ok(())
    }

    /// Part `part` of an import's bytes, if kept.
    pub fn evidence_part(&mut self, import_id: i64, part: i64) -> Result<Option<Vec<u8>>> {
        let sql = placeholders(
            self.conn,
            "SELECT bytes FROM import_evidence WHERE import_id = ? AND part = ?",
        );
        let p: Option<Part> = diesel::sql_query(sql)
            .bind::<BigInt, _>(import_id)
            .bind::<BigInt, _>(part)
            .get_result(self.conn)
            .optional()?;
        Ok(p.map(|p| p.bytes))
    }

    /// How many parts of an import's bytes are kept.
    pub fn evidence_parts(&mut self, import_id: i64) -> Result<i64> {
        Ok(import_evidence::table
            .filter(import_evidence::import_id.eq(import_id))
            .count()
            .get_result(self.conn)?)
    }

    /// Records that a file was imported (after its evidence and entries, in the same
    /// transaction).
    pub fn add_import(&mut self, import: &NewImport<'_>) -> Result<()> {
        let bytes = i64::try_from(import.bytes)
            .map_err(|_| Error::field("FILE", import.file_name, "is too large"))?;
        let row = ImportRow {
            id: import.id,
            project: import.project.into(),
            file_name: import.file_name.into(),
            file_sha256: import.sha256.to_hex(),
            kind: import.kind.into(),
            row_count: import.rows,
            imported_at: import.at.naive_utc(),
            columns_map: import.columns.into(),
            density: import.density.into(),
            byte_count: bytes,
        };
        diesel::insert_into(imports::table)
            .values(&row)
            .execute(self.conn)?;
        let hash = row.record_hash()?;
        self.link(
            crate::ledger::ledger_chain::Record::Import,
            import.project,
            &import.id.to_string(),
            &hash.to_hex(),
        )
    }

    /// A project's imports, in the order made.
    pub fn imports(&mut self, project: &str) -> Result<Vec<StoredImport>> {
        let rows: Vec<ImportRow> = imports::table
            .filter(imports::project.eq(project))
            .order(imports::id)
            .select(ImportRow::as_select())
            .load(self.conn)?;
        Ok(rows
            .into_iter()
            .map(|r| StoredImport {
                id: r.id,
                file_name: r.file_name,
                sha256: r.file_sha256,
                bytes: r.byte_count,
                kind: r.kind,
                columns: r.columns_map,
                density: r.density,
            })
            .collect())
    }

    /// The effective single-day entries of `kind` with a meter, from `from` to `to`: the
    /// meter-days the ledger already counts.
    pub fn covered_days(
        &mut self,
        project: &str,
        kind: &str,
        from: NaiveDate,
        to: NaiveDate,
    ) -> Result<Vec<CoveredDay>> {
        let sql = placeholders(
            self.conn,
            "SELECT e.seq AS seq, e.meter AS meter, e.period_from AS day, \
             e.evidence_name AS evidence_name FROM entries e \
             WHERE e.project = ? AND e.kind = ? AND e.meter IS NOT NULL \
             AND e.period_from = e.period_to AND e.period_from BETWEEN ? AND ? \
             AND NOT EXISTS (SELECT 1 FROM entries c WHERE c.project = e.project AND c.corrects = e.seq) \
             ORDER BY e.period_from, e.meter",
        );
        Ok(diesel::sql_query(sql)
            .bind::<Text, _>(project)
            .bind::<Text, _>(kind)
            .bind::<Text, _>(from.to_string())
            .bind::<Text, _>(to.to_string())
            .load(self.conn)?)
    }
}

/// An import's kept bytes as a reader, one part in memory at a time.
pub struct EvidenceBytes<'t, 'c> {
    tx: &'t mut Tx<'c>,
    import_id: i64,
    next: i64,
    part: Vec<u8>,
    at: usize,
}

impl<'c> Tx<'c> {
    /// Reads an import's bytes back in order.
    pub fn evidence<'t>(&'t mut self, import_id: i64) -> EvidenceBytes<'t, 'c> {
        EvidenceBytes {
            tx: self,
            import_id,
            next: 0,
            part: Vec::new(),
            at: 0,
        }
    }
}

impl std::io::Read for EvidenceBytes<'_, '_> {
    fn read(&mut self, buf: &mut [u8]) -> std::io::Result<usize> {
        if self.at == self.part.len() {
            match self.tx.evidence_part(self.import_id, self.next) {
                Ok(Some(p)) => {
                    self.part = p;
                    self.at = 0;
                    self.next += 1;
                }
                Ok(None) => return Ok(0),
                Err(e) => return Err(std::io::Error::other(e.to_string())),
            }
        }
        let n = buf.len().min(self.part.len() - self.at);
        buf[..n].copy_from_slice(&self.part[self.at..self.at + n]);
        self.at += n;
        Ok(n)
    }
}

/// Bytes of ledger per entry an import adds: the row with its reading, and its two indexes.
pub const BYTES_PER_ENTRY: u64 = 1024;

/// Refuses to go on when the disk beside the ledger cannot hold `bytes` more, twice over: a
/// transaction's pages are written to the write-ahead log first and copied into the ledger
/// file afterwards. `what` says what the bytes are.
pub fn room_for(db: &std::path::Path, bytes: u64, what: &str) -> Result<()> {
    if super::postgres::url(db).is_some() {
        // The registry's disk is its server's to watch; PostgreSQL answers a full one itself.
        return Ok(());
    }
    let dir = match db.parent() {
        Some(d) if !d.as_os_str().is_empty() => d,
        _ => std::path::Path::new("."),
    };
    let Ok(fs) = rustix::fs::statvfs(dir) else {
        // Where the file system cannot say, SQLite's own error on a full disk is the answer.
        return Ok(());
    };
    let free = fs.f_bavail.saturating_mul(fs.f_frsize);
    let needed = bytes.saturating_mul(2);
    if free < needed {
        let mb = |b: u64| format!("{:.1} MB", b as f64 / 1e6);
        return Err(Error::Refused(format!(
            "the import needs about {} free beside the ledger ({what}: {}, once in the write-ahead log and once in the ledger file); {} has {} free; nothing written",
            mb(needed),
            mb(bytes),
            dir.display(),
            mb(free)
        )));
    }
    Ok(())
}

/// [`room_for`] an import's `entries` and its `evidence` bytes copied into the ledger file (half
/// of them again, beside what was counted when the file was kept).
pub fn room_for_entries(db: &std::path::Path, evidence: u64, entries: usize) -> Result<()> {
    let entry_bytes = (entries as u64).saturating_mul(BYTES_PER_ENTRY);
    room_for(
        db,
        evidence / 2 + entry_bytes,
        &format!("{entries} entries, and the evidence copied into the ledger file"),
    )
}

/// A write that failed for want of disk, said plainly; other errors pass unchanged.
pub fn disk_error(e: Error) -> Error {
    match &e {
        Error::Store {
            kind: StoreKind::Disk,
            message,
        } => Error::store(
            StoreKind::Disk,
            format!(
                "could not write the ledger file ({message}): the disk is full or the file is larger than this process may write; nothing was written, the ledger is as it was"
            ),
        ),
        _ => e,
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn room_is_checked_against_the_disk_beside_the_ledger() {
        let dir = tempfile::tempdir().unwrap();
        let db = dir.path().join("ledger.db");
        assert!(room_for(&db, 1, "a byte").is_ok());
        let e = room_for(&db, u64::MAX / 4, "more than any disk").unwrap_err();
        assert!(
            e.to_string().contains("more than any disk")
                && e.to_string().contains("nothing written"),
            "{e}"
        );
    }

    #[test]
    fn disk_errors_are_said_plainly() {
        let e = disk_error(Error::store(
            StoreKind::Disk,
            "ledger database error: database or disk is full",
        ));
        assert!(
            e.to_string()
                .contains("the disk is full or the file is larger"),
            "{e}"
        );
        let other = Error::store(
            StoreKind::Locked,
            "ledger database error: database is locked",
        );
        assert_eq!(disk_error(other.clone()), other);
    }
}
