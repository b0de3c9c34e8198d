//! `bundle load`: a checked bundle into the ledger at `--db`, in one transaction (the rules of
//! an extension are `store::BundleLoader`'s).

use super::Context;
use crate::bundle::Item;
use crate::error::{Error, Result};
use crate::import::bundle_file::read_checked;
use crate::report::Report;
use crate::report::tables::bundle::loaded_table;
use crate::store::BundleLoader;
use std::path::Path;

pub fn load(ctx: &Context, file: &Path) -> Result<Report> {
    // A first reading checks the whole file and learns its size, which the consistency proof
    // needs before the entries stream by; the second, inside the transaction, checks it all
    // again while writing, so a file changed in between writes nothing.
    let first = read_checked(file, |_| Ok(()))?.trailer;
    let mut store = ctx.open()?;
    let (project, trailer, new) = store.write(|tx| {
        let mut loader = BundleLoader::new(tx, first.entries)?;
        let mut code = String::new();
        let c = read_checked(file, |item| {
            if let Item::Header { project, .. } = item {
                code = project.clone();
            }
            loader.item(tx, &code, item)
        })?;
        if c.trailer != first {
            return Err(Error::ledger(format!(
                "bundle {} changed while it was being loaded; nothing written",
                file.display()
            )));
        }
        Ok((c.project, c.trailer, loader.added()))
    })?;
    let file = file.display().to_string();
    Ok(Report::default().table(loaded_table(&file, &project, &trailer, &new)))
}
