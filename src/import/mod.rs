//! Reading user files: the only module that reads them (`export` writes the files commands hand
//! out). Meter exports in CSV, streamed: the planner reads a file once, hashing and parsing
//! together, and hands its bytes on to be kept verbatim as the import's evidence.

pub mod bundle_file;
pub mod csv_records;
pub mod evidence;
pub mod instants;
pub mod meter_csv;
pub mod meter_day;
pub mod monitoring_report;
pub mod overlap;
pub mod plan;
pub mod replan;
pub mod script;
pub mod summary;

use crate::error::{Error, Result};
use plan::{Options, Plan};
use std::path::Path;

/// Evidence parts in flight between the planner and the writer.
const PARTS_IN_FLIGHT: usize = 4;

/// Plans the import of the file at `path` on a second thread while this one keeps its bytes:
/// `keep` gets each evidence part in order (on the calling thread, so it may write to the
/// ledger). Memory holds a few parts and the meter-days, whatever the file's size.
pub fn plan_file(
    path: &Path,
    opts: &Options<'_>,
    mut keep: impl FnMut(&[u8]) -> Result<()>,
) -> Result<Plan> {
    let file = std::fs::File::open(path)
        .map_err(|e| Error::field("FILE", &path.display().to_string(), e))?;
    let (sender, receiver) = std::sync::mpsc::sync_channel::<Vec<u8>>(PARTS_IN_FLIGHT);
    std::thread::scope(|scope| {
        let planner = scope.spawn(move || plan::plan(file, opts, |part| sender.send(part).is_ok()));
        let mut kept = Ok(());
        for part in receiver {
            if let Err(e) = keep(&part) {
                kept = Err(e);
                break;
            }
        }
        // Dropping the receiver (on a failed write) stops the planner at its next part.
        let planned = planner
            .join()
            .map_err(|_| Error::internal("the import's planner thread failed"))?;
        kept.and(planned)
    })
}

/// The file's name (without its directory) and its size in bytes.
pub fn name_and_size(path: &Path) -> Result<(String, u64)> {
    let name = path
        .file_name()
        .map(|n| n.to_string_lossy().into_owned())
        .unwrap_or_default();
    let size = std::fs::metadata(path)
        .map_err(|e| Error::field("FILE", &path.display().to_string(), e))?
        .len();
    Ok((name, size))
}

/// Reads a small JSON file (a proof) into `T`; a file that is missing or not of that shape is
/// refused, naming it.
pub fn read_json<T: serde::de::DeserializeOwned>(path: &Path) -> Result<T> {
    let text = read_text(path)?;
    serde_json::from_str(&text).map_err(|e| Error::field("FILE", &path.display().to_string(), e))
}

/// Reads a small text file (a key); a missing or unreadable file is refused, naming it.
pub fn read_text(path: &Path) -> Result<String> {
    std::fs::read_to_string(path).map_err(|e| Error::field("FILE", &path.display().to_string(), e))
}
