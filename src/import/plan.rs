//! The import planner: one pass over a meter file's bytes that hashes them as it parses,
//! checks every row and rolls the readings up into meter-days. It writes nothing; the command
//! decides what the plan becomes in the ledger.

use super::csv_records::{Record, Records};
use super::evidence::Witnessed;
use super::instants::Instants;
use super::meter_csv::{ColumnMap, Converter, Layout, RowError};
use super::meter_day::MeterDay;
use crate::error::{Error, Result};
use crate::ledger::{EntryKind, Hash, Site};
use crate::quantity::volume::DensityMethod;
use chrono::NaiveDate;
use std::collections::{BTreeMap, HashMap};
use std::io::Read;
use std::sync::Arc;

/// Test hook: when set to N, the planner aborts the process (as a crash would) after reading N
/// rows, so tests can stop an import at a chosen point instead of racing a timer.
pub const FAULT_AFTER_ROWS: &str = "SINKBOOK_FAULT_AFTER_ROWS";

/// What the planner needs to know about the file and the project.
pub struct Options<'a> {
    pub file_name: &'a str,
    pub project: &'a str,
    pub kind: EntryKind,
    pub columns: &'a ColumnMap,
    pub density: DensityMethod,
    pub sites: &'a HashMap<String, Site>,
    /// A meter-day whose rows the plan lists one by one (to show the readings behind an entry).
    pub watch: Option<(&'a str, NaiveDate)>,
}

/// A row of the watched meter-day, as read.
#[derive(Debug, Clone, PartialEq)]
pub struct WatchedRow {
    pub line: u64,
    pub timestamp: String,
    pub quantity: String,
    pub unit: String,
    pub co2_fraction: String,
    pub co2: crate::quantity::Mass,
}

/// What a file comes to.
#[derive(Debug)]
pub struct Plan {
    pub sha256: Hash,
    pub bytes: u64,
    /// Meter-days in the order they become entries: day, site, meter.
    pub days: Vec<MeterDay>,
    pub bad: Vec<RowError>,
    pub accepted: u64,
    pub watched: Vec<WatchedRow>,
}

impl Plan {
    /// Lines of the file the refused rows took (more than the rows when a quote ran on).
    pub fn bad_lines(&self) -> u64 {
        self.bad.iter().map(RowError::lines).sum()
    }
}

/// Per meter, where it is and its days.
struct Meter {
    site: Arc<str>,
    days: BTreeMap<NaiveDate, MeterDay>,
    /// When it was read, to refuse a reading given twice.
    instants: Instants,
}

struct Rollup<'a> {
    opts: &'a Options<'a>,
    index: HashMap<String, u32>,
    meters: Vec<(Arc<str>, Meter)>,
    bad: Vec<RowError>,
    accepted: u64,
    watched: Vec<WatchedRow>,
}

impl Rollup<'_> {
    fn site_allowed(&self, site: &str) -> std::result::Result<(), String> {
        let kind = self.opts.kind;
        match self.opts.sites.get(site) {
            None => Err(format!(
                "site {site:?} is not a site of project {}",
                self.opts.project
            )),
            Some(s) if !kind.site_kinds().contains(&s.kind) => Err(format!(
                "site {} is a {}; {kind} entries are recorded at sites of kind {}",
                s.code,
                s.kind,
                kind.site_kinds()
                    .iter()
                    .map(|k| k.name())
                    .collect::<Vec<_>>()
                    .join(" or ")
            )),
            Some(_) => Ok(()),
        }
    }

    fn row(&mut self, rec: &Record, layout: &Layout, conv: &mut Converter) -> Result<()> {
        let refuse = |why: String| RowError {
            line: rec.line,
            last_line: rec.last_line,
            why,
        };
        if rec.extra_lines() > 0 {
            self.bad.push(refuse(format!(
                "a quoted field runs over {} lines (a quote left open?); those lines are not read as rows",
                rec.extra_lines() + 1
            )));
            return Ok(());
        }
        let fields = match layout.fields(rec) {
            Ok(f) => f,
            Err(why) => {
                self.bad.push(refuse(why));
                return Ok(());
            }
        };
        let r = match conv.row(rec.line, fields) {
            Ok(r) => r,
            Err(why) => {
                self.bad.push(refuse(why));
                return Ok(());
            }
        };
        if let Err(why) = self.site_allowed(r.site) {
            self.bad.push(refuse(why));
            return Ok(());
        }
        let i = match self.index.get(r.meter) {
            Some(&i) => i,
            None => {
                let i = u32::try_from(self.meters.len()).map_err(|_| {
                    Error::field("FILE", self.opts.file_name, "has too many meters")
                })?;
                self.index.insert(r.meter.to_string(), i);
                let m = Meter {
                    site: r.site.into(),
                    days: BTreeMap::new(),
                    instants: Instants::default(),
                };
                self.meters.push((r.meter.into(), m));
                i
            }
        };
        let (meter, m) = &mut self.meters[i as usize];
        if *m.site != *r.site {
            let why = format!(
                "meter {meter} is at site {} in earlier rows, here at site {}",
                m.site, r.site
            );
            self.bad.push(refuse(why));
            return Ok(());
        }
        if !m.instants.insert(r.instant) {
            let why = format!(
                "a second reading of meter {meter} at the same time as an earlier row (a repeated row?)"
            );
            self.bad.push(refuse(why));
            return Ok(());
        }
        let day = m
            .days
            .entry(r.day)
            .or_insert_with(|| MeterDay::new(r.day, m.site.clone(), meter.clone(), r.line));
        if let Some(why) = day.mismatch(&r) {
            self.bad.push(refuse(why));
            return Ok(());
        }
        day.add(&r).ok_or_else(|| {
            Error::field(
                "FILE",
                self.opts.file_name,
                "totals too large for the ledger",
            )
        })?;
        self.accepted += 1;
        if self.opts.watch == Some((r.meter, r.day)) {
            self.watched.push(WatchedRow {
                line: r.line,
                timestamp: fields[0].to_string(),
                quantity: fields[2].to_string(),
                unit: fields[3].to_string(),
                co2_fraction: fields[4].to_string(),
                co2: r.co2,
            });
        }
        Ok(())
    }
}

/// Reads `input` once: every byte is hashed and handed to `evidence` in parts (false from it
/// stops the import), every row is checked and rolled up. A file that cannot be read, or whose
/// header lacks a column, is refused as a whole; bad rows are listed in the plan.
pub fn plan(
    input: impl Read,
    opts: &Options<'_>,
    evidence: impl FnMut(Vec<u8>) -> bool,
) -> Result<Plan> {
    let file_error = |e: &dyn std::fmt::Display| Error::field("FILE", opts.file_name, e);
    let fault_after: Option<u64> = std::env::var(FAULT_AFTER_ROWS)
        .ok()
        .and_then(|n| n.parse().ok());
    let mut records = Records::new(Witnessed::new(input, evidence));
    let headers = match records.next_record() {
        None => return Err(file_error(&"is empty: a header row is needed")),
        Some(Err(e)) => return Err(file_error(&e)),
        Some(Ok(r)) => r.fields(),
    };
    let layout = Layout::find(&headers, opts.columns).map_err(|e| file_error(&e))?;
    let mut conv = Converter::new(opts.density);
    let mut rollup = Rollup {
        opts,
        index: HashMap::new(),
        meters: Vec::new(),
        bad: Vec::new(),
        accepted: 0,
        watched: Vec::new(),
    };
    let mut rec = Record::default();
    let mut rows = 0u64;
    while records.next_into(&mut rec).map_err(|e| file_error(&e))? {
        rows += 1;
        if fault_after == Some(rows) {
            std::process::abort();
        }
        rollup.row(&rec, &layout, &mut conv)?;
    }
    let (sha256, bytes) = records
        .into_inner()
        .finish()
        .map_err(|e| file_error(&e))?
        .ok_or_else(|| Error::internal("the import stopped: its evidence could not be kept"))?;
    // Sized once: a file of a million meter-days would otherwise hold two copies while growing.
    let mut days = Vec::with_capacity(rollup.meters.iter().map(|(_, m)| m.days.len()).sum());
    days.extend(
        rollup
            .meters
            .into_iter()
            .flat_map(|(_, m)| m.days.into_values()),
    );
    days.sort_by(|a, b| (a.day, &a.site, &a.meter).cmp(&(b.day, &b.site, &b.meter)));
    Ok(Plan {
        sha256,
        bytes,
        days,
        bad: rollup.bad,
        accepted: rollup.accepted,
        watched: rollup.watched,
    })
}
