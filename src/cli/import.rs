//! `import`: a meter export in, raw readings kept, one entry per meter per day, all or nothing.

use super::Context;
use super::record::DensityArg;
use super::setup::known_project;
use crate::accounting::permit;
use crate::error::{Error, Result};
use crate::import::hash_file;
use crate::import::meter_csv::{ColumnMap, MeterRow, RowError, for_each_row};
use crate::ledger::append::{Appended, append};
use crate::ledger::correction::effective;
use crate::ledger::{Entry, EntryKind, Evidence, Period, Reading, Site};
use crate::quantity::Mass;
use crate::quantity::volume::DensityMethod;
use crate::report::{Cell, Report, Table, columns};
use crate::store::{NewImport, ReadingRow};
use chrono::NaiveDate;
use clap::Args;
use std::collections::{BTreeMap, HashMap};
use std::io::IsTerminal;
use std::path::PathBuf;

#[derive(Debug, Args)]
pub struct ImportArgs {
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
}

/// A meter's day, rolled up from its rows.
#[derive(Default)]
struct Day {
    grams: i64,
    rows: u64,
    first_line: u64,
    last_line: u64,
    mass_rows: u64,
    volume_rows: u64,
    /// Grams of stream read by mass meters, and standard m³ read by volumetric ones.
    mass_read: f64,
    volume_read: f64,
    /// Σ read × CO2 fraction, for the day's weighted mean concentration.
    weighted_fraction: f64,
}

/// Rows handed from the parser thread at a time.
const CHUNK: usize = 4_096;

/// Bad rows listed in the one-line refusal before "and N more".
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
    let (sha, size) = hash_file(&a.file)?;
    let show_progress = std::io::stderr().is_terminal() && size > 16 << 20;
    ctx.open()?.write(|tx| {
        let project = known_project(tx, &a.project)?;
        if let Some(prev) = tx.import_of(&a.project, sha)? {
            return Ok(Report::default().line(format!(
                "{file_name} (SHA-256 {}) was already imported into {} on {} as import {} ({} rows); nothing written",
                sha.head(),
                a.project,
                prev.imported_at.format("%Y-%m-%d %H:%M:%S UTC"),
                prev.id,
                prev.rows
            )));
        }
        let sites: HashMap<String, Site> = tx.sites(&a.project)?.into_iter().map(|s| (s.code.clone(), s)).collect();
        let import_id = tx.next_import_id()?;
        let key_prefix = format!("import-{}", &sha.to_hex()[..16]);
        // Per meter (looked up by reference, so a row costs no key copies): its site and days.
        let mut meter_index: HashMap<String, usize> = HashMap::new();
        let mut meters: Vec<(String, String, BTreeMap<NaiveDate, Day>)> = Vec::new();
        let mut batch: Vec<ReadingRow> = Vec::with_capacity(20_000);
        let mut bad: Vec<RowError> = Vec::new();
        let mut accepted = 0i64;
        let check_site = |r: &MeterRow| -> std::result::Result<(), String> {
            match sites.get(&r.site) {
                None => Err(format!("site {:?} is not a site of project {}", r.site, a.project)),
                Some(s) if !kind.site_kinds().contains(&s.kind) => Err(format!("site {} is a {}; {kind} entries are recorded at sites of kind {}", s.code, s.kind, kind.site_kinds().iter().map(|k| k.name()).collect::<Vec<_>>().join(" or "))),
                Some(_) => Ok(()),
            }
        };
        // Parsing runs on a second thread while this one writes: the file is converted and
        // checked in chunks handed over a bounded channel, so memory stays flat.
        let (sender, receiver) = std::sync::mpsc::sync_channel::<Vec<std::result::Result<MeterRow, RowError>>>(8);
        let (file, columns, name) = (&a.file, &columns, &file_name);
        std::thread::scope(|scope| -> Result<()> {
            let parser = scope.spawn(move || {
                let mut chunk = Vec::with_capacity(CHUNK);
                let parsed = for_each_row(
                    file,
                    columns,
                    density,
                    |row| {
                        chunk.push(row);
                        if chunk.len() == CHUNK {
                            sender.send(std::mem::take(&mut chunk)).map_err(|_| Error::Store("import stopped".into()))?;
                        }
                        Ok(())
                    },
                    |bytes| {
                        if show_progress {
                            eprint!("\rimporting {name}: {:>3} %", bytes * 100 / size.max(1));
                        }
                    },
                );
                if !chunk.is_empty() {
                    let _ = sender.send(chunk);
                }
                parsed
            });
            let receiver = receiver;
            for row in receiver.into_iter().flatten() {
                let row = row.and_then(|r| match check_site(&r) {
                    Ok(()) => Ok(r),
                    Err(why) => Err(RowError { line: r.line, why }),
                });
                match row {
                    Err(e) => bad.push(e),
                    Ok(r) => {
                        let i = match meter_index.get(r.meter.as_str()) {
                            Some(&i) => i,
                            None => {
                                meter_index.insert(r.meter.clone(), meters.len());
                                meters.push((r.site.clone(), r.meter.clone(), BTreeMap::new()));
                                meters.len() - 1
                            }
                        };
                        if meters[i].0 != r.site {
                            bad.push(RowError { line: r.line, why: format!("meter {} is at site {} in earlier rows, here at site {}", r.meter, meters[i].0, r.site) });
                            continue;
                        }
                        let d = meters[i].2.entry(r.day).or_default();
                        if d.rows == 0 {
                            d.first_line = r.line;
                        }
                        d.last_line = r.line;
                        d.rows += 1;
                        d.grams = d.grams.checked_add(r.grams).ok_or_else(|| Error::field("FILE", &file_name, "totals too large for the ledger"))?;
                        if r.volumetric {
                            d.volume_rows += 1;
                            d.volume_read += r.read;
                        } else {
                            d.mass_rows += 1;
                            d.mass_read += r.read;
                        }
                        d.weighted_fraction += r.read * r.fraction;
                        accepted += 1;
                        batch.push(ReadingRow {
                            import_id,
                            line: r.line as i64,
                            meter: r.meter,
                            day: r.day.to_string(),
                            grams: r.grams,
                            raw: r.raw,
                        });
                        if batch.len() == batch.capacity() {
                            tx.add_readings(import_id, &batch)?;
                            batch.clear();
                        }
                    }
                }
            }
            parser.join().map_err(|_| Error::Store("the import's parser thread failed".into()))?
        })?;
        if show_progress {
            eprintln!("\rimporting {file_name}: 100 %");
        }
        if !bad.is_empty() && !a.skip_bad {
            let listed: Vec<String> = bad.iter().take(LISTED).map(ToString::to_string).collect();
            let more = if bad.len() > LISTED { format!("; and {} more", bad.len() - LISTED) } else { String::new() };
            return Err(Error::Refused(format!(
                "{file_name}: {} bad row{}, nothing written (fix them, or import the rest with --skip-bad): {}{more}",
                bad.len(),
                if bad.len() == 1 { "" } else { "s" },
                listed.join("; ")
            )));
        }
        if accepted == 0 {
            return Err(Error::field("FILE", &file_name, format!("has no readings to import ({} bad rows skipped); nothing written", bad.len())));
        }
        tx.add_readings(import_id, &batch)?;

        // One entry per meter per day, in day order, each naming the file and its lines.
        let existing = tx.entries(&a.project)?;
        let (mut seq, mut head) = tx.chain_tip(&a.project)?;
        let mut days: Vec<(NaiveDate, &str, &str, &Day)> = meters
            .iter()
            .flat_map(|(site, meter, ds)| ds.iter().map(move |(day, d)| (*day, site.as_str(), meter.as_str(), d)))
            .collect();
        days.sort_by_key(|&(day, site, meter, _)| (day, site, meter));
        let mut sealed = Vec::with_capacity(days.len());
        for &(day, site, meter, d) in &days {
            let mut reading = Reading::default();
            reading.push("source", "meter import");
            reading.push("file", file_name.clone());
            reading.push("file_sha256", sha.to_hex());
            reading.push("lines", format!("{}-{}", d.first_line, d.last_line));
            reading.push("readings", d.rows.to_string());
            let meter_type = match (d.mass_rows, d.volume_rows) {
                (_, 0) => "mass",
                (0, _) => "volumetric",
                _ => "mixed",
            };
            reading.push("meter_type", meter_type);
            if d.mass_rows > 0 {
                reading.push("mass", Mass::from_grams(d.mass_read.round_ties_even() as i64).to_string());
            }
            if d.volume_rows > 0 {
                reading.push("volume_m3", format!("{:.6}", d.volume_read));
            }
            let read = d.mass_read + d.volume_read;
            if read > 0.0 && meter_type != "mixed" {
                reading.push("co2_fraction_mean", format!("{:.6}", d.weighted_fraction / read));
            }
            reading.push("density_method", density.name());
            let entry = Entry {
                project: a.project.clone(),
                seq: 0,
                kind,
                site: site.to_string(),
                period: Period::day(day),
                reading,
                mass: Mass::from_grams(d.grams),
                sign: kind.sign(),
                recorded_at: ctx.now,
                key: format!("{key_prefix}-{meter}-{day}"),
                meter: Some(meter.to_string()),
                note: None,
                corrects: None,
                reason: None,
                evidence: Some(Evidence { file_name: file_name.clone(), sha256: sha }),
            };
            let s = match append(entry, &sites[site], (seq, head), None) {
                Ok(Appended::New(s)) => s,
                Ok(Appended::Existing(_)) => unreachable!("append without a key holder never finds one"),
                Err(e) => return Err(Error::field("FILE", &file_name, e)),
            };
            seq += 1;
            head = s.chain;
            sealed.push(s);
        }
        let new: Vec<Entry> = sealed.iter().map(|s| s.entry.clone()).collect();
        let mut warnings = if kind == EntryKind::Injection || kind == EntryKind::Production || kind == EntryKind::EquipmentLeak {
            permit::check(&project, &existing, &new, a.over_permit)?
        } else {
            Vec::new()
        };
        warnings.extend(overlaps(&existing, &new));
        warnings.extend(bad.iter().map(|b| format!("skipped {b}")));
        tx.append(&sealed)?;
        tx.add_import(&NewImport {
            id: import_id,
            project: &a.project,
            file_name: &file_name,
            sha256: sha,
            kind: kind.name(),
            rows: accepted,
            at: ctx.now,
        })?;
        let mut report = Report::default()
            .line(format!(
                "imported {file_name} (SHA-256 {}) into {} as import {import_id}: {accepted} readings → {} entries{}",
                sha.head(),
                a.project,
                sealed.len(),
                if bad.is_empty() { String::new() } else { format!(", {} bad rows skipped", bad.len()) }
            ))
            .table(summary_table(&a.project, &sealed));
        report.warnings = warnings;
        Ok(report)
    })
}

/// Meter-days that an earlier entry already covers: a re-sent export would count twice.
fn overlaps(existing: &[crate::ledger::SealedEntry], new: &[Entry]) -> Vec<String> {
    let seen: HashMap<(EntryKind, Option<&str>, NaiveDate), u64> = effective(existing)
        .filter(|e| e.period.from == e.period.to)
        .map(|e| ((e.kind, e.meter.as_deref(), e.period.from), e.seq))
        .collect();
    new.iter()
        .filter_map(|e| {
            seen.get(&(e.kind, e.meter.as_deref(), e.period.from)).map(|seq| {
                format!(
                    "meter {} on {} is also in seq {seq}; if this file replaces that export, correct seq {seq}",
                    e.meter.as_deref().unwrap_or(""),
                    e.period.from
                )
            })
        })
        .collect()
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

/// Per meter: days, readings and CO2 of the import.
fn summary_table(project: &str, sealed: &[crate::ledger::SealedEntry]) -> Table {
    let mut by: BTreeMap<(String, String), MeterSummary> = BTreeMap::new();
    for s in sealed {
        let e = &s.entry;
        let k = (e.meter.clone().unwrap_or_default(), e.site.clone());
        let v = by.entry(k).or_insert(MeterSummary {
            days: 0,
            readings: 0,
            mass: Mass::ZERO,
            first: e.period.from,
            last: e.period.to,
            seqs: (e.seq, e.seq),
        });
        v.days += 1;
        v.readings += e
            .reading
            .get("readings")
            .and_then(|r| r.parse::<u64>().ok())
            .unwrap_or(0);
        v.mass += e.mass;
        v.first = v.first.min(e.period.from);
        v.last = v.last.max(e.period.to);
        v.seqs = (v.seqs.0.min(e.seq), v.seqs.1.max(e.seq));
    }
    let mut t = Table::new(
        "import",
        format!("Import into project {project}, by meter"),
        columns(&[
            ("Meter", "meter"),
            ("Site", "site"),
            ("First day", "first_day"),
            ("Last day", "last_day"),
            ("Days", "days"),
            ("Readings", "readings"),
            ("CO2 (t)", "co2_t"),
            ("Seq range", "seq_range"),
        ]),
    );
    for ((meter, site), m) in by {
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
    t.note("Each entry is one meter's day: the sum of its readings' grams, each reading converted and rounded on its own. The raw readings are kept with the file's SHA-256 and line numbers.");
    t
}
