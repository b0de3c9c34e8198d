//! A reconciliation recorded in the ledger: a verifier's (or the operator's) comparison of the
//! ledger with one monitoring report — the report's name and SHA-256, every line with both
//! figures and whether it counted, each year's misstatement against the materiality level and
//! the verdict — kept in its own append-only table. Each record's hash covers the record before
//! it, so a record deleted from the middle or altered breaks the run of hashes `verify` walks.
//! It is evidence about periods, not a figure of them: it changes no entry and no seal.

use super::canonical::encode_reconciliation;
use super::hash::{Hash, leaf_hash};
use super::signature::Role;
use chrono::{DateTime, Utc};
use serde::{Deserialize, Serialize};

/// One compared line as recorded: grams, the note the table showed (counted or why not).
#[derive(Debug, Clone, PartialEq, Eq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct RecordedLine {
    pub period: String,
    pub quantity: String,
    pub ledger_g: Option<i64>,
    pub report_g: Option<i64>,
    pub difference_g: i64,
    pub note: String,
}

/// One reporting year's verdict as recorded.
#[derive(Debug, Clone, PartialEq, Eq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct RecordedYear {
    pub year: i32,
    /// The ledger's stored total for the year, the base of the threshold.
    pub stored_g: i64,
    /// The quantities whose lines were added, comma separated.
    pub counted: String,
    pub misstatement_g: i64,
    pub threshold_g: i64,
    pub verdict: String,
}

/// A recorded reconciliation (its canonical bytes: `canonical::encode_reconciliation`).
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct Recorded {
    pub project: String,
    pub seq: u64,
    /// The row hash of the project's record before this one; 32 zero bytes for the first.
    pub previous: Hash,
    pub report_name: String,
    pub report_sha256: Hash,
    /// The mass balance the ledger's figures came from (`rr`, `iso27916`).
    pub method: String,
    /// The materiality level as a share (`0.05`), and how it was set, in words.
    pub materiality: String,
    pub basis: String,
    /// The project's chain when reconciled: its entries and its head.
    pub chain_size: u64,
    pub chain_head: Hash,
    pub lines: Vec<RecordedLine>,
    pub years: Vec<RecordedYear>,
    /// The overall verdict: `within materiality`, `MATERIAL` or `not assessed`.
    pub verdict: String,
    pub role: Role,
    /// Who reconciled, as they gave it (not checked: the ledger has no identities).
    pub by: Option<String>,
    /// The registry role that recorded it (a ledger file has none).
    pub recorded_by: Option<String>,
    pub recorded_at: DateTime<Utc>,
}

impl Recorded {
    pub fn row_hash(&self) -> Hash {
        leaf_hash(&encode_reconciliation(self))
    }

    /// Whether the reconciliation judged year `year`.
    pub fn covers(&self, year: i32) -> bool {
        self.years.iter().any(|y| y.year == year)
    }

    /// The years judged, as `2026` or `2025, 2026`.
    pub fn years_text(&self) -> String {
        let years: Vec<String> = self.years.iter().map(|y| y.year.to_string()).collect();
        years.join(", ")
    }
}

/// Follows a project's records in seq order, as `verify` and `bundle check` do: seqs dense from
/// 0, each record's hash its content's and each naming the one before it.
#[derive(Debug)]
pub struct RecordRun {
    next: u64,
    previous: Hash,
}

impl Default for RecordRun {
    fn default() -> Self {
        RecordRun {
            next: 0,
            previous: Hash::GENESIS,
        }
    }
}

impl RecordRun {
    /// Checks the next record against its stored row hash; the error names the row.
    pub fn push(&mut self, r: &Recorded, stored: Hash) -> Result<(), String> {
        if r.seq != self.next {
            return Err(format!(
                "reconciliations row seq {} where seq {} was due (a row is missing)",
                r.seq, self.next
            ));
        }
        if r.row_hash() != stored {
            return Err(format!(
                "reconciliations row seq {} differs from its row hash",
                r.seq
            ));
        }
        if r.previous != self.previous {
            return Err(format!(
                "reconciliations row seq {} does not name the row before it (previous hash)",
                r.seq
            ));
        }
        self.next += 1;
        self.previous = stored;
        Ok(())
    }

    /// How many records were followed, and the last one's hash (what the next one names).
    pub fn head(&self) -> (u64, Hash) {
        (self.next, self.previous)
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn record(seq: u64, previous: Hash) -> Recorded {
        Recorded {
            project: "TFS".into(),
            seq,
            previous,
            report_name: "tfs-monitoring-report-2026.csv".into(),
            report_sha256: Hash::of(b"report"),
            method: "rr".into(),
            materiality: "0.05".into(),
            basis: "5.0 %".into(),
            chain_size: 740,
            chain_head: Hash::of(b"head"),
            lines: vec![RecordedLine {
                period: "2026-Q1".into(),
                quantity: "injected".into(),
                ledger_g: Some(166_773_100_000),
                report_g: None,
                difference_g: 166_773_100_000,
                note: "not reported".into(),
            }],
            years: vec![RecordedYear {
                year: 2026,
                stored_g: 1,
                counted: "stored".into(),
                misstatement_g: 0,
                threshold_g: 0,
                verdict: "within materiality".into(),
            }],
            verdict: "within materiality".into(),
            role: Role::Verifier,
            by: Some("Thistlemoor Verification Partners".into()),
            recorded_by: None,
            recorded_at: DateTime::from_timestamp_micros(1_800_000_000_000_000).unwrap(),
        }
    }

    #[test]
    fn every_field_is_covered_by_the_row_hash() {
        let r = record(0, Hash::GENESIS);
        let alter: [fn(&mut Recorded); 20] = [
            |x| x.project = "KRE".into(),
            |x| x.seq += 1,
            |x| x.previous = Hash::of(b"x"),
            |x| x.report_name.push('x'),
            |x| x.report_sha256 = Hash::of(b"x"),
            |x| x.method = "iso27916".into(),
            |x| x.materiality = "0.02".into(),
            |x| x.basis.push('.'),
            |x| x.chain_size += 1,
            |x| x.chain_head = Hash::of(b"x"),
            |x| x.lines[0].ledger_g = None,
            |x| x.lines[0].report_g = Some(0),
            |x| x.lines[0].difference_g -= 1,
            |x| x.lines[0].note = "counted".into(),
            |x| x.years[0].misstatement_g = 1,
            |x| x.years[0].verdict = "MATERIAL".into(),
            |x| x.verdict = "MATERIAL".into(),
            |x| x.role = Role::Operator,
            |x| x.by = None,
            |x| x.recorded_at += chrono::Duration::microseconds(1),
        ];
        for f in alter {
            let mut t = r.clone();
            f(&mut t);
            assert_ne!(t.row_hash(), r.row_hash(), "{t:?}");
        }
        let mut t = r.clone();
        t.recorded_by = Some("verifier_1".into());
        assert_ne!(t.row_hash(), r.row_hash());
    }

    #[test]
    fn a_run_of_records_catches_a_missing_or_altered_row() {
        let first = record(0, Hash::GENESIS);
        let second = record(1, first.row_hash());
        let third = record(2, second.row_hash());
        let mut run = RecordRun::default();
        for r in [&first, &second, &third] {
            run.push(r, r.row_hash()).unwrap();
        }
        assert_eq!(run.head(), (3, third.row_hash()));
        // Row 1 deleted: row 2 stands where row 1 was due.
        let mut run = RecordRun::default();
        run.push(&first, first.row_hash()).unwrap();
        let e = run.push(&third, third.row_hash()).unwrap_err();
        assert!(e.contains("seq 2 where seq 1 was due"), "{e}");
        // Row 1 altered (its hash left as stored).
        let mut altered = second.clone();
        altered.verdict = "MATERIAL".into();
        let mut run = RecordRun::default();
        run.push(&first, first.row_hash()).unwrap();
        let e = run.push(&altered, second.row_hash()).unwrap_err();
        assert_eq!(e, "reconciliations row seq 1 differs from its row hash");
        // Row 1 replaced by a record rehashed over itself but not naming row 0.
        let forged = record(1, Hash::GENESIS);
        let mut run = RecordRun::default();
        run.push(&first, first.row_hash()).unwrap();
        let e = run.push(&forged, forged.row_hash()).unwrap_err();
        assert!(e.contains("does not name the row before it"), "{e}");
    }
}
