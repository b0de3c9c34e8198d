//! The feedstocks table: registered once per project, read back checked against row hashes.

use super::rows::FeedstockRow;
use super::schema::feedstocks;
use super::{Tx, inconsistent};
use crate::error::Result;
use crate::ledger::feedstock::Feedstock;
use diesel::prelude::*;

impl Tx<'_> {
    /// A project's feedstocks by code; a row that differs from its hash is an inconsistency.
    pub fn feedstocks(&mut self, project: &str) -> Result<Vec<Feedstock>> {
        let rows: Vec<FeedstockRow> = feedstocks::table
            .filter(feedstocks::project.eq(project))
            .order(feedstocks::code)
            .select(FeedstockRow::as_select())
            .load(self.conn)?;
        rows.iter()
            .map(|r| r.to_feedstock().map_err(inconsistent))
            .collect()
    }

    pub fn feedstock(&mut self, project: &str, code: &str) -> Result<Option<Feedstock>> {
        let row: Option<FeedstockRow> = feedstocks::table
            .find((project, code))
            .select(FeedstockRow::as_select())
            .first(self.conn)
            .optional()?;
        row.map(|r| r.to_feedstock().map_err(inconsistent))
            .transpose()
    }

    pub fn add_feedstock(&mut self, f: &Feedstock) -> Result<()> {
        let row = FeedstockRow::from_feedstock(f);
        diesel::insert_into(feedstocks::table)
            .values(&row)
            .execute(self.conn)?;
        self.link(
            crate::ledger::ledger_chain::Record::Feedstock,
            &f.project,
            &f.code,
            &row.row_hash,
        )
    }
}
