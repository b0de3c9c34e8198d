//! `import`: a meter export in, its bytes kept as evidence, one entry per meter per day, all
//! or nothing. The planner in `import/` does the reading; this file takes the arguments, writes
//! the plan and shows the summary.

use super::Context;
use super::import_write::{self, Target};
use super::record::DensityArg;
use super::setup::known_project;
use crate::error::{Error, Result};
use crate::import::meter_csv::ColumnMap;
use crate::import::meter_day::Source;
use crate::import::plan::{Options, Plan};
use crate::import::summary::Summary;
use crate::import::{name_and_size, plan_file};
use crate::ledger::{EntryKind, Project};
use crate::quantity::volume::DensityMethod;
use crate::report::Report;
use crate::report::tables::import::{already_line, bad_rows_why, imported_report, no_readings_why};
use crate::store::{ImportSummary, NewImport, Tx, disk_error, room_for, room_for_entries};
use clap::Args;
use std::path::{Path, PathBuf};

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

pub fn import(ctx: &Context, a: ImportArgs) -> Result<Report> {
    let kind = EntryKind::from_name(&a.kind)
        .filter(|k| k.is_meter_reading())
        .ok_or_else(|| Error::field("--kind", &a.kind, "is not a metered entry kind (injection, receipt, redelivery, production, equipment-leak, emission)"))?;
    let (file_name, size) = name_and_size(&a.file)?;
    let columns = ColumnMap::parse(a.columns.as_deref())?;
    room_for(&ctx.db, size, "the file, kept as its evidence")?;
    ctx.open()?
        .write(|tx| {
            let project = known_project(tx, &a.project)?;
            let sites = tx.sites_by_code(&a.project)?;
            let opts = Options {
                file_name: &file_name,
                project: &a.project,
                kind,
                columns: &columns,
                density: DensityMethod::from(a.density),
                sites: &sites,
                watch: None,
            };
            import_in(tx, ctx, &a, &project, &opts, size)
        })
        .map_err(disk_error)
}

/// The import inside the command's transaction: read the file, refuse what must be refused,
/// write the entries and the import's row, and sum up.
fn import_in(
    tx: &mut Tx<'_>,
    ctx: &Context,
    a: &ImportArgs,
    project: &Project,
    opts: &Options<'_>,
    size: u64,
) -> Result<Report> {
    let file_name = opts.file_name;
    let import_id = tx.next_import_id()?;
    let (plan, earlier) = read_file(tx, &a.file, opts, size, import_id)?;
    if let Some(prev) = earlier {
        return Ok(Report::default().line(already_line(file_name, &a.project, &plan, &prev)));
    }
    refuse_bad_rows(file_name, &plan, a.skip_bad)?;
    room_for_entries(&ctx.db, plan.bytes, plan.days.len())?;
    let mut source = Source::new(&a.project, opts.kind, file_name, plan.sha256);
    source.density = opts.density;
    source.recorded_at = ctx.now;
    source.recorded_by = tx.recorded_by()?;
    let to = Target {
        project,
        sites: opts.sites,
        replace: a.replace,
        over_permit: a.over_permit,
    };
    let mut summary = Summary::default();
    let warnings = import_write::write(tx, ctx, &to, &source, &plan.days, &mut summary)?;
    tx.add_import(&NewImport {
        id: import_id,
        project: &a.project,
        file_name,
        sha256: plan.sha256,
        bytes: plan.bytes,
        kind: opts.kind.name(),
        columns: a.columns.as_deref().unwrap_or(""),
        density: opts.density.name(),
        rows: i64::try_from(plan.accepted).unwrap_or(i64::MAX),
        at: ctx.now,
    })?;
    Ok(imported_report(
        file_name, &a.project, import_id, &plan, summary, warnings,
    ))
}

/// Reads the file once, its bytes kept as they are read and dropped again if they turn out to
/// be a file imported before (returned beside the plan).
fn read_file(
    tx: &mut Tx<'_>,
    file: &Path,
    opts: &Options<'_>,
    size: u64,
    import_id: i64,
) -> Result<(Plan, Option<ImportSummary>)> {
    tx.keep_file(import_id, opts.project, |keep| {
        let progress = super::progress::bytes(opts.file_name, size);
        let plan = plan_file(file, opts, |bytes| {
            keep(bytes)?;
            progress.inc(bytes.len() as u64);
            Ok(())
        })?;
        progress.finish_and_clear();
        let sha256 = plan.sha256;
        Ok((plan, sha256))
    })
}

/// Bad rows refuse the file unless `--skip-bad`; a file with nothing good is refused anyway.
fn refuse_bad_rows(file_name: &str, plan: &Plan, skip_bad: bool) -> Result<()> {
    if !plan.bad.is_empty() && !skip_bad {
        return Err(Error::input(file_name, bad_rows_why(plan)));
    }
    if plan.accepted == 0 {
        return Err(Error::field("FILE", file_name, no_readings_why(plan)));
    }
    Ok(())
}
