//! The ledger chain in the database: every writer of a linked row appends its link here, in the
//! same transaction; `verify` walks the links a page at a time, looks up the row each names,
//! and finds rows no link names.

use super::backend::{Conn, placeholders};
use super::reconciliations::ReconciliationRow;
use super::rows::{FeedstockRow, ImportRow, ProjectRow, SettingRow, SignatureRow, SiteRow};
use super::schema::{
    entries, feedstocks, imports, ledger_chain, projects, reconciliations, settings, signatures,
    sites,
};
use super::{Tx, inconsistent};
use crate::error::{Error, Result};
use crate::ledger::Hash;
use crate::ledger::ledger_chain::{Link, Record, SealedLink, seal_link};
use diesel::prelude::*;
use diesel::sql_types::{BigInt, Text};

/// Links read per query while walking: the chain is never held whole.
const PAGE: i64 = 1000;

#[derive(Queryable, Selectable, Insertable)]
#[diesel(table_name = ledger_chain, check_for_backend(diesel::sqlite::Sqlite))]
struct LinkRow {
    seq: i64,
    record: String,
    project: String,
    item: String,
    row_hash: String,
    leaf_hash: String,
    chain_hash: String,
}

impl LinkRow {
    fn to_link(&self) -> std::result::Result<SealedLink, String> {
        let at = |what: String| format!("ledger link {}: {what}", self.seq);
        let hash = |col: &str, v: &str| {
            Hash::from_hex(v).ok_or_else(|| at(format!("{col} {v:?} is not a SHA-256 hex digest")))
        };
        Ok(SealedLink {
            link: Link {
                seq: u64::try_from(self.seq).map_err(|_| at("seq is negative".into()))?,
                record: Record::from_name(&self.record)
                    .ok_or_else(|| at(format!("unknown record {:?}", self.record)))?,
                project: self.project.clone(),
                item: self.item.clone(),
                row: hash("row_hash", &self.row_hash)?,
            },
            leaf: hash("leaf_hash", &self.leaf_hash)?,
            chain: hash("chain_hash", &self.chain_hash)?,
        })
    }
}

#[derive(QueryableByName)]
struct Unlinked {
    #[diesel(sql_type = Text)]
    project: String,
    #[diesel(sql_type = Text)]
    item: String,
}

#[derive(QueryableByName)]
struct Found {
    #[diesel(sql_type = BigInt)]
    n: i64,
}

/// The rows of each record's table as (project, item), for finding those no link names.
fn keys_sql(r: Record) -> &'static str {
    match r {
        Record::Project => "SELECT code AS project, '' AS item FROM projects",
        Record::Site => "SELECT project, code AS item FROM sites",
        Record::Setting => "SELECT project, CAST(seq AS TEXT) AS item FROM settings",
        Record::Feedstock => "SELECT project, code AS item FROM feedstocks",
        Record::Import => "SELECT project, CAST(id AS TEXT) AS item FROM imports",
        Record::Signature => "SELECT project, CAST(seq AS TEXT) AS item FROM signatures",
        Record::Seal => {
            "SELECT project, CAST(seq AS TEXT) AS item FROM entries WHERE kind = 'seal'"
        }
        Record::Reconciliation => "SELECT project, CAST(seq AS TEXT) AS item FROM reconciliations",
    }
}

fn seq_item(item: &str) -> Option<i64> {
    item.parse::<i64>().ok().filter(|_| !item.starts_with('+'))
}

impl ImportRow {
    /// The hash of the import's row (docs/ledger-format.md), which its link names.
    pub fn record_hash(&self) -> Result<Hash> {
        let bad = |what: &str| {
            inconsistent(format!(
                "project {} import {}: {what}",
                self.project, self.id
            ))
        };
        Ok(crate::ledger::ledger_chain::ImportRecord {
            project: &self.project,
            file_name: &self.file_name,
            file_sha256: Hash::from_hex(&self.file_sha256)
                .ok_or_else(|| bad("file_sha256 is not a SHA-256 hex digest"))?,
            kind: &self.kind,
            row_count: u64::try_from(self.row_count).map_err(|_| bad("row_count is negative"))?,
            columns_map: &self.columns_map,
            density: &self.density,
            byte_count: u64::try_from(self.byte_count)
                .map_err(|_| bad("byte_count is negative"))?,
            imported_at: self.imported_at.and_utc(),
        }
        .hash())
    }
}

impl Tx<'_> {
    /// Appends the link of a row just written. On the registry the ledger chain is locked
    /// first, until the transaction ends (SQLite's BEGIN IMMEDIATE holds the whole file).
    pub(super) fn link(
        &mut self,
        record: Record,
        project: &str,
        item: &str,
        row: &str,
    ) -> Result<()> {
        if let Conn::Pg(c) = &mut *self.conn {
            super::postgres::lock_ledger_chain(c)?;
        }
        let row = Hash::from_hex(row)
            .ok_or_else(|| Error::internal(format!("row hash {row:?} of a new row is not hex")))?;
        let tip: Option<(i64, String)> = ledger_chain::table
            .order(ledger_chain::seq.desc())
            .select((ledger_chain::seq, ledger_chain::chain_hash))
            .first(self.conn)
            .optional()?;
        let (seq, prev) = match tip {
            None => (0, Hash::GENESIS),
            Some((seq, chain)) => (
                seq + 1,
                Hash::from_hex(&chain).ok_or_else(|| {
                    inconsistent(format!(
                        "ledger link {seq}: chain_hash is not a SHA-256 hex digest"
                    ))
                })?,
            ),
        };
        let s = seal_link(
            Link {
                seq: seq as u64,
                record,
                project: project.into(),
                item: item.into(),
                row,
            },
            prev,
        );
        diesel::insert_into(ledger_chain::table)
            .values(LinkRow {
                seq,
                record: record.name().into(),
                project: project.into(),
                item: item.into(),
                row_hash: row.to_hex(),
                leaf_hash: s.leaf.to_hex(),
                chain_hash: s.chain.to_hex(),
            })
            .execute(self.conn)?;
        Ok(())
    }

    /// Up to a page of ledger links from seq `from` on, in order, each decoded.
    pub fn links_from(&mut self, from: u64) -> Result<Vec<SealedLink>> {
        let rows: Vec<LinkRow> = ledger_chain::table
            .filter(ledger_chain::seq.ge(from as i64))
            .order(ledger_chain::seq)
            .limit(PAGE)
            .select(LinkRow::as_select())
            .load(self.conn)?;
        rows.iter()
            .map(|r| r.to_link().map_err(inconsistent))
            .collect()
    }

    /// The hash the row a link names has now, checked against the row's own fields; None when
    /// there is no such row.
    pub fn linked_row(
        &mut self,
        record: Record,
        project: &str,
        item: &str,
    ) -> Result<Option<Hash>> {
        let seq = || {
            seq_item(item).ok_or_else(|| {
                inconsistent(format!(
                    "a ledger link names {} whose key is not a seq",
                    record.describe(project, item)
                ))
            })
        };
        // The row found by its key, checked against its own hash, and that hash.
        macro_rules! checked {
            ($conn:expr, $found:expr, $row:ty, $check:ident) => {
                $found
                    .select(<$row>::as_select())
                    .first::<$row>($conn)
                    .optional()?
                    .map(|r| r.$check().map(|_| r.row_hash))
                    .transpose()
            };
        }
        let c = &mut *self.conn;
        let stored = match record {
            Record::Project => checked!(c, projects::table.find(project), ProjectRow, to_project),
            Record::Site => checked!(c, sites::table.find((project, item)), SiteRow, to_site),
            Record::Setting => {
                checked!(
                    c,
                    settings::table.find((project, seq()?)),
                    SettingRow,
                    to_setting
                )
            }
            Record::Feedstock => {
                let found = feedstocks::table.find((project, item));
                checked!(c, found, FeedstockRow, to_feedstock)
            }
            Record::Signature => {
                let found = signatures::table.find((project, seq()?));
                checked!(c, found, SignatureRow, to_statement)
            }
            Record::Reconciliation => {
                let found = reconciliations::table.find((project, seq()?));
                checked!(c, found, ReconciliationRow, to_recorded)
            }
            Record::Import => {
                let row: Option<ImportRow> = imports::table
                    .find(seq()?)
                    .filter(imports::project.eq(project))
                    .select(ImportRow::as_select())
                    .first(c)
                    .optional()?;
                return row.map(|r| r.record_hash()).transpose();
            }
            Record::Seal => Ok(entries::table
                .find((project, seq()?))
                .filter(entries::kind.eq("seal"))
                .select(entries::chain_hash)
                .first::<String>(c)
                .optional()?),
        }
        .map_err(inconsistent)?;
        stored
            .map(|h| {
                Hash::from_hex(&h).ok_or_else(|| {
                    inconsistent(format!(
                        "{}: its hash {h:?} is not a SHA-256 hex digest",
                        record.describe(project, item)
                    ))
                })
            })
            .transpose()
    }

    /// The first row of `record`'s table (of `project`, if given) that no link names.
    pub fn unlinked(
        &mut self,
        record: Record,
        project: Option<&str>,
    ) -> Result<Option<(String, String)>> {
        let sql = format!(
            "SELECT k.project AS project, k.item AS item FROM ({}) k WHERE {} NOT EXISTS \
             (SELECT 1 FROM ledger_chain l WHERE l.record = ? AND l.project = k.project \
             AND l.item = k.item) ORDER BY k.project, k.item LIMIT 1",
            keys_sql(record),
            if project.is_some() {
                "k.project = ? AND"
            } else {
                ""
            }
        );
        let sql = placeholders(self.conn, &sql).into_owned();
        let q = diesel::sql_query(sql);
        let found: Option<Unlinked> = match project {
            Some(p) => q
                .bind::<Text, _>(p)
                .bind::<Text, _>(record.name())
                .get_result(self.conn)
                .optional()?,
            None => q
                .bind::<Text, _>(record.name())
                .get_result(self.conn)
                .optional()?,
        };
        Ok(found.map(|u| (u.project, u.item)))
    }

    /// Whether the rows written before the ledger chain existed still wait for their links.
    pub(super) fn links_pending(&mut self) -> Result<bool> {
        let sql = match &*self.conn {
            Conn::Sqlite(_) => {
                "SELECT count(*) AS n FROM sqlite_master WHERE type = 'table' \
                 AND name = 'ledger_chain_to_link'"
            }
            Conn::Pg(_) => {
                "SELECT CAST(count(*) AS BIGINT) AS n FROM pg_tables \
                 WHERE schemaname = 'public' AND tablename = 'ledger_chain_to_link'"
            }
        };
        Ok(diesel::sql_query(sql).get_result::<Found>(self.conn)?.n > 0)
    }

    /// Links every row a ledger held before the ledger chain existed, table by table, each row
    /// checked against its own hash first (a row that does not check out is not blessed with a
    /// link: the command stops, exit 3); then drops the marker, in the same transaction.
    pub(super) fn link_pending(&mut self) -> Result<()> {
        for record in Record::ALL {
            let sql = format!("{} ORDER BY project, item", keys_sql(record));
            let keys: Vec<Unlinked> = diesel::sql_query(sql).load(self.conn)?;
            for k in keys {
                let row = self
                    .linked_row(record, &k.project, &k.item)?
                    .ok_or_else(|| {
                        Error::internal(format!(
                            "{} vanished while linked",
                            record.describe(&k.project, &k.item)
                        ))
                    })?;
                self.link(record, &k.project, &k.item, &row.to_hex())?;
            }
        }
        diesel::sql_query("DROP TABLE ledger_chain_to_link").execute(self.conn)?;
        Ok(())
    }
}
