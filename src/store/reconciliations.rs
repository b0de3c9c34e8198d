//! The reconciliations table: recorded reconciliations, read back as one checked run per project
//! (seqs dense from 0, each row's hash its content's and naming the row before it).

use super::schema::reconciliations;
use super::{Tx, inconsistent};
use crate::error::Result;
use crate::ledger::Hash;
use crate::ledger::ledger_chain::Record;
use crate::ledger::reconciliation::{RecordRun, Recorded};
use crate::ledger::signature::Role;
use chrono::NaiveDateTime;
use diesel::prelude::*;

#[derive(Queryable, Selectable, Insertable)]
#[diesel(table_name = reconciliations, check_for_backend(diesel::sqlite::Sqlite))]
pub(super) struct ReconciliationRow {
    project: String,
    seq: i64,
    previous: String,
    report_name: String,
    report_sha256: String,
    method: String,
    materiality: String,
    basis: String,
    chain_size: i64,
    chain_head: String,
    lines: String,
    years: String,
    verdict: String,
    role: String,
    by_name: Option<String>,
    recorded_by: Option<String>,
    recorded_at: NaiveDateTime,
    pub(super) row_hash: String,
}

impl ReconciliationRow {
    fn from_recorded(r: &Recorded) -> Self {
        Self {
            project: r.project.clone(),
            seq: r.seq as i64,
            previous: r.previous.to_hex(),
            report_name: r.report_name.clone(),
            report_sha256: r.report_sha256.to_hex(),
            method: r.method.clone(),
            materiality: r.materiality.clone(),
            basis: r.basis.clone(),
            chain_size: r.chain_size as i64,
            chain_head: r.chain_head.to_hex(),
            lines: serde_json::to_string(&r.lines).expect("lines serialize"),
            years: serde_json::to_string(&r.years).expect("years serialize"),
            verdict: r.verdict.clone(),
            role: r.role.name().into(),
            by_name: r.by.clone(),
            recorded_by: r.recorded_by.clone(),
            recorded_at: r.recorded_at.naive_utc(),
            row_hash: r.row_hash().to_hex(),
        }
    }

    /// The record as stored and the row hash stored beside it (checked by the caller's run).
    pub(super) fn to_recorded(&self) -> std::result::Result<(Recorded, Hash), String> {
        let at = || {
            format!(
                "reconciliations row seq {} of project {}",
                self.seq, self.project
            )
        };
        let hash = |column: &str, text: &str| {
            Hash::from_hex(text)
                .ok_or_else(|| format!("{}: {column} is not a SHA-256 hex digest", at()))
        };
        let unsigned = |v: i64, column: &str| {
            u64::try_from(v).map_err(|_| format!("{}: {column} {v} is negative", at()))
        };
        let r = Recorded {
            project: self.project.clone(),
            seq: unsigned(self.seq, "seq")?,
            previous: hash("previous", &self.previous)?,
            report_name: self.report_name.clone(),
            report_sha256: hash("report_sha256", &self.report_sha256)?,
            method: self.method.clone(),
            materiality: self.materiality.clone(),
            basis: self.basis.clone(),
            chain_size: unsigned(self.chain_size, "chain_size")?,
            chain_head: hash("chain_head", &self.chain_head)?,
            lines: serde_json::from_str(&self.lines)
                .map_err(|e| format!("{}: lines do not read back: {e}", at()))?,
            years: serde_json::from_str(&self.years)
                .map_err(|e| format!("{}: years do not read back: {e}", at()))?,
            verdict: self.verdict.clone(),
            role: Role::from_name(&self.role)
                .ok_or_else(|| format!("{}: unknown role {:?}", at(), self.role))?,
            by: self.by_name.clone(),
            recorded_by: self.recorded_by.clone(),
            recorded_at: self.recorded_at.and_utc(),
        };
        Ok((r, hash("row_hash", &self.row_hash)?))
    }
}

impl Tx<'_> {
    /// A project's recorded reconciliations in seq order, the whole run checked: a row missing,
    /// altered or out of its place is an inconsistency naming the table and the row.
    pub fn reconciliations(&mut self, project: &str) -> Result<Vec<Recorded>> {
        let rows: Vec<ReconciliationRow> = reconciliations::table
            .filter(reconciliations::project.eq(project))
            .order(reconciliations::seq)
            .select(ReconciliationRow::as_select())
            .load(self.conn)?;
        let mut run = RecordRun::default();
        rows.iter()
            .map(|row| {
                let (r, stored) = row.to_recorded().map_err(inconsistent)?;
                run.push(&r, stored)
                    .map_err(|w| inconsistent(format!("project {project}: {w}")))?;
                Ok(r)
            })
            .collect()
    }

    /// The seq and previous hash the next record of a project takes (locked first in a write
    /// on the registry, so two writers never take the same seq).
    pub fn next_reconciliation(&mut self, project: &str) -> Result<(u64, Hash)> {
        self.hold(project)?;
        let last: Option<(i64, String)> = reconciliations::table
            .filter(reconciliations::project.eq(project))
            .order(reconciliations::seq.desc())
            .select((reconciliations::seq, reconciliations::row_hash))
            .first(self.conn)
            .optional()?;
        match last {
            None => Ok((0, Hash::GENESIS)),
            Some((seq, h)) => {
                let h = Hash::from_hex(&h).ok_or_else(|| {
                    inconsistent(format!(
                        "project {project}: reconciliations row seq {seq}: row_hash is not a SHA-256 hex digest"
                    ))
                })?;
                Ok((seq as u64 + 1, h))
            }
        }
    }

    /// Appends the record `made` makes of the project's next seq and previous row hash, and of
    /// the registry role writing it (None in a ledger file).
    pub fn add_next_reconciliation(
        &mut self,
        project: &str,
        made: impl FnOnce(u64, Hash, Option<String>) -> Recorded,
    ) -> Result<Recorded> {
        let (seq, previous) = self.next_reconciliation(project)?;
        let r = made(seq, previous, self.recorded_by()?);
        self.add_reconciliation(&r)?;
        Ok(r)
    }

    pub fn add_reconciliation(&mut self, r: &Recorded) -> Result<()> {
        let row = ReconciliationRow::from_recorded(r);
        diesel::insert_into(reconciliations::table)
            .values(&row)
            .execute(self.conn)?;
        let item = r.seq.to_string();
        self.link(Record::Reconciliation, &r.project, &item, &row.row_hash)
    }
}
