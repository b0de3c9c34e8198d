//! `import`: a meter export in, its bytes kept as evidence, one entry per meter per day, all
//! or nothing. The planner in `import/` does the reading; this file takes the arguments, writes
//! the plan and shows the summary.

use super::Context;
use super::record::DensityArg;
use super::setup::known_project;
use crate::error::{Error, Result};
use crate::import::meter_csv::ColumnMap;
use crate::import::meter_day::{MeterDay, Source};
use crate::import::overlap::{self, Covered};
use crate::import::plan::{Options, Plan};
use crate::import::plan_file;
use crate::ledger::append::{AppendError, Appended, SealRule, append};
use crate::ledger::{Entry, EntryKind, Reading, SealedEntry, Site};
use crate::quantity::Mass;
use crate::quantity::volume::DensityMethod;
use crate::report::names;
use crate::report::{Cell, Report, Table, columns};
use crate::store::{BYTES_PER_ENTRY, NewImport, Tx, disk_error, room_for};
use chrono::NaiveDate;
use clap::Args;
use std::collections::{BTreeMap, HashMap};
use std::path::PathBuf;

#[derive(Debug, Args)]
pub struct ImportArgs {
    /// Project code (e.g. TFS)
    pub project: String,
    /// CSV with a header row; default columns timestamp,site,quantity,unit,co2_fraction (optional basis, meter)
    pub file: PathBuf,
    /// Map sinkbook's column names to the file's: e.g. timestamp=Time,quantity=Flow
    #[arg(long, value_name = "OURS=THEIRS,…")]
    pub columns: Option<String>,
    /// The kind of entry the readings make
    #[arg(long, default_value = "injection")]
    pub kind: String,
    /// How volume units become mass
    #[arg(long, value_enum, default_value_t = DensityArg::Eos)]
    pub density: DensityArg,
    /// Skip bad rows (each is listed) instead of refusing the whole file
    #[arg(long)]
    pub skip_bad: bool,
    /// Record even though the file takes the project past its permit
    #[arg(long)]
    pub over_permit: bool,
    /// The file replaces an earlier export: each meter-day already counted is recorded as a
    /// correction of the entry that counts it
    #[arg(long)]
    pub replace: bool,
}

/// Entries sealed and written at a time.
const ENTRY_CHUNK: usize = 10_000;

/// Bad rows or overlaps listed in the one-line refusal before "and N more".
const LISTED: usize = 20;

pub fn import(ctx: &Context, a: ImportArgs) -> Result<Report> {
    let kind = EntryKind::from_name(&a.kind)
        .filter(|k| !matches!(k, EntryKind::Survey | EntryKind::Leakage))
        .ok_or_else(|| Error::field("--kind", &a.kind, "is not a metered entry kind (injection, receipt, redelivery, production, equipment-leak, emission)"))?;
    let columns = ColumnMap::parse(a.columns.as_deref())?;
    let density = DensityMethod::from(a.density);
    let file_name = a
        .file
        .file_name()
        .map(|n| n.to_string_lossy().into_owned())
        .unwrap_or_default();
    let size = std::fs::metadata(&a.file)
        .map_err(|e| Error::field("FILE", &a.file.display().to_string(), e))?
        .len();
    room_for(&ctx.db, size, "the file, kept as its evidence")?;
    ctx.open()?.write(|tx| {
        let project = known_project(tx, &a.project)?;
        let sites: HashMap<String, Site> = tx.sites(&a.project)?.into_iter().map(|s| (s.code.clone(), s)).collect();
        let import_id = tx.next_import_id()?;
        let opts = Options { file_name: &file_name, project: &a.project, kind, columns: &columns, density, sites: &sites, watch: None };
        // The file is read once, inside a savepoint: its bytes are kept as they are read, and
        // dropped again if they turn out to be a file imported before.
        let planned = tx.savepoint(|tx| {
            let progress = super::progress::bytes(&file_name, size);
            let mut part = 0;
            let plan = plan_file(&a.file, &opts, |bytes| {
                tx.add_evidence(import_id, part, bytes)?;
                part += 1;
                progress.inc(bytes.len() as u64);
                Ok(())
            })?;
            progress.finish_and_clear();
            let earlier = tx.import_of(&a.project, plan.sha256)?;
            let keep = earlier.is_none();
            Ok(((plan, earlier), keep))
        })?;
        let plan = match planned {
            (plan, Some(prev)) => return Ok(Report::default().line(format!(
                "{file_name} (SHA-256 {}) was already imported into {} on {} as import {} ({} rows); nothing written",
                plan.sha256.head(), a.project, prev.imported_at.format("%Y-%m-%d %H:%M:%S UTC"), prev.id, prev.rows
            ))),
            (plan, None) => plan,
        };
        refuse_bad_rows(&file_name, &plan, a.skip_bad)?;
        let entry_bytes = (plan.days.len() as u64).saturating_mul(BYTES_PER_ENTRY);
        room_for(&ctx.db, plan.bytes / 2 + entry_bytes, &format!("{} entries, and the evidence copied into the ledger file", plan.days.len()))?;
        let source = Source { project: &a.project, kind, file_name: &file_name, sha256: plan.sha256, density, recorded_at: ctx.now };
        let covered = covered_days(tx, &a.project, kind, &plan)?;
        let corrects = overlap::corrections(&plan.days, &covered, a.replace).map_err(|o| {
            Error::Refused(format!(
                "{file_name}: {} meter-day{} already counted in the ledger, nothing written (a meter-day counts once: if this file replaces the earlier export, import it with --replace): {}",
                o.len(),
                if o.len() == 1 { " is" } else { "s are" },
                listed(&o)
            ))
        })?;
        let mut warnings = if matches!(kind, EntryKind::Injection | EntryKind::Production | EntryKind::EquipmentLeak) {
            // The permit needs what each entry does to the balance, not its reading.
            let new: Vec<Entry> = plan.days.iter().zip(&corrects).map(|(d, c)| Entry { reading: Reading::default(), ..d.entry(&source, *c) }).collect();
            let mut gone = Vec::new();
            for t in corrects.iter().flatten() {
                let replaced = tx.entry_at(&a.project, *t)?.ok_or_else(|| Error::ledger(format!("project {} has no seq {t}, which an effective meter-day named", a.project)))?;
                gone.push(replaced.entry);
            }
            let tally = tx.tally(&a.project)?;
            let standing = super::record::standing(tx, &project, tally, &new)?;
            super::permit_check(&project, &standing, &new, &gone, a.over_permit)?
        } else {
            Vec::new()
        };
        // Sealed and written a chunk at a time, so memory holds one chunk of entries.
        let mut tip = tx.chain_tip(&a.project)?;
        let recorded_by = tx.recorded_by()?;
        let seals = tx.seals(&a.project)?;
        let mut summary = Summary::default();
        for (days, corrects) in plan.days.chunks(ENTRY_CHUNK).zip(corrects.chunks(ENTRY_CHUNK)) {
            let mut sealed = Vec::with_capacity(days.len());
            for (d, c) in days.iter().zip(corrects) {
                let replaced = match c.filter(|_| !seals.is_empty()) {
                    Some(t) => Some(super::record::replaced(tx, &a.project, t, &seals)?.0),
                    None => None,
                };
                let rule = SealRule { seals: &seals, late: ctx.late, today: ctx.now.date_naive(), replaced };
                match append(Entry { recorded_by: recorded_by.clone(), ..d.entry(&source, *c) }, Some(&sites[&d.site]), tip, None, rule).map_err(|e| refused_row(&file_name, e))? {
                    Appended::New(s) | Appended::Existing(s) => {
                        tip = (tip.0 + 1, s.chain);
                        summary.add(d, &s);
                        sealed.push(s);
                    }
                }
            }
            tx.append(&sealed)?;
        }
        tx.add_import(&NewImport {
            id: import_id,
            project: &a.project,
            file_name: &file_name,
            sha256: plan.sha256,
            bytes: plan.bytes,
            kind: kind.name(),
            columns: a.columns.as_deref().unwrap_or(""),
            density: density.name(),
            rows: i64::try_from(plan.accepted).unwrap_or(i64::MAX),
            at: ctx.now,
        })?;
        warnings.extend(plan.bad.iter().map(|b| format!("skipped {b}")));
        let mut report = Report::default()
            .line(summary_line(&file_name, &a.project, import_id, &plan, summary.entries, summary.replaced))
            .table(summary.table(&a.project));
        report.warnings = warnings;
        Ok(report)
    })
    .map_err(disk_error)
}

/// An append refused for one of the file's meter-days; a day out of the window is named as
/// the file's day, not as an option the file does not have.
fn refused_row(file_name: &str, e: AppendError) -> Error {
    match e {
        AppendError::OutOfBounds(b) if b.field == "period_from" || b.field == "period_to" => {
            Error::input(file_name, format!("meter-day {}: {}", b.value, b.why))
        }
        AppendError::Sealed(s) => Error::field("FILE", file_name, super::sealed(&s)),
        e => Error::field("FILE", file_name, e),
    }
}

fn listed<T: ToString>(items: &[T]) -> String {
    let shown: Vec<String> = items.iter().take(LISTED).map(ToString::to_string).collect();
    let more = if items.len() > LISTED {
        format!("; and {} more", items.len() - LISTED)
    } else {
        String::new()
    };
    format!("{}{more}", shown.join("; "))
}

/// Bad rows refuse the file unless `--skip-bad`; a file with nothing good is refused anyway.
fn refuse_bad_rows(file_name: &str, plan: &Plan, skip_bad: bool) -> Result<()> {
    let n = plan.bad.len();
    let lines = plan.bad_lines();
    let took = if lines as usize > n {
        format!(" taking {lines} lines")
    } else {
        String::new()
    };
    if n > 0 && !skip_bad {
        return Err(Error::input(
            file_name,
            format!(
                "{n} bad row{}{took}, nothing written (fix them, or import the rest with --skip-bad): {}",
                if n == 1 { "" } else { "s" },
                listed(&plan.bad)
            ),
        ));
    }
    if plan.accepted == 0 {
        return Err(Error::field(
            "FILE",
            file_name,
            format!("has no readings to import ({n} bad rows skipped{took}); nothing written"),
        ));
    }
    Ok(())
}

/// The meter-days of the plan's span that the ledger already counts, for this kind of entry.
fn covered_days(tx: &mut Tx<'_>, project: &str, kind: EntryKind, plan: &Plan) -> Result<Covered> {
    let (Some(first), Some(last)) = (
        plan.days.iter().map(|d| d.day).min(),
        plan.days.iter().map(|d| d.day).max(),
    ) else {
        return Ok(Covered::new());
    };
    let mut covered = Covered::new();
    for c in tx.covered_days(project, kind.name(), first, last)? {
        let day = NaiveDate::parse_from_str(&c.day, "%Y-%m-%d").map_err(|_| {
            Error::ledger(format!(
                "project {project} seq {}: period_from {:?} is not a date",
                c.seq, c.day
            ))
        })?;
        covered.insert((c.meter, day), (c.seq as u64, c.evidence_name));
    }
    Ok(covered)
}

fn summary_line(
    file_name: &str,
    project: &str,
    import_id: i64,
    plan: &Plan,
    entries: usize,
    replaced: usize,
) -> String {
    let mut s = format!(
        "imported {file_name} (SHA-256 {}) into {project} as import {import_id}: {} readings → {entries} entries",
        plan.sha256.head(),
        plan.accepted,
    );
    if replaced > 0 {
        s.push_str(&format!(" ({replaced} replacing earlier meter-days)"));
    }
    if !plan.bad.is_empty() {
        let lines = plan.bad_lines();
        s.push_str(&format!(", {} bad rows skipped", plan.bad.len()));
        if lines as usize > plan.bad.len() {
            s.push_str(&format!(" ({lines} lines)"));
        }
    }
    s
}

/// One meter's share of an import.
struct MeterSummary {
    days: u64,
    readings: u64,
    mass: Mass,
    first: NaiveDate,
    last: NaiveDate,
    seqs: (u64, u64),
}

/// Per meter: days, readings and CO2 of the import, added up as its entries are sealed.
#[derive(Default)]
struct Summary {
    by: BTreeMap<(String, String), MeterSummary>,
    entries: usize,
    replaced: usize,
}

impl Summary {
    fn add(&mut self, d: &MeterDay, s: &SealedEntry) {
        self.entries += 1;
        self.replaced += usize::from(s.entry.corrects.is_some());
        let seq = s.entry.seq;
        let v = self
            .by
            .entry((d.meter.clone(), d.site.clone()))
            .or_insert(MeterSummary {
                days: 0,
                readings: 0,
                mass: Mass::ZERO,
                first: d.day,
                last: d.day,
                seqs: (seq, seq),
            });
        v.days += 1;
        v.readings += d.rows;
        v.mass += d.co2;
        v.first = v.first.min(d.day);
        v.last = v.last.max(d.day);
        v.seqs = (v.seqs.0.min(seq), v.seqs.1.max(seq));
    }

    fn table(self, project: &str) -> Table {
        let mut t = Table::new(
            "import",
            format!("Import into project {project}, by meter"),
            columns(&[
                names::METER,
                names::SITE,
                names::FIRST_DAY,
                names::LAST_DAY,
                names::DAYS,
                names::READINGS,
                names::CO2_T,
                names::SEQ_RANGE,
            ]),
        );
        for ((meter, site), m) in self.by {
            t.push(vec![
                Cell::text(meter),
                Cell::text(site),
                Cell::text(m.first.to_string()),
                Cell::text(m.last.to_string()),
                Cell::Int(m.days as i64),
                Cell::Int(m.readings as i64),
                Cell::Tonnes(m.mass),
                Cell::text(format!("{}–{}", m.seqs.0, m.seqs.1)),
            ]);
        }
        t.note("Each entry is one meter's day: the sum of its readings' grams, each reading converted and rounded on its own. The file's bytes are kept as they were read, with their SHA-256, so every reading can be read again by its line.");
        t
    }
}
