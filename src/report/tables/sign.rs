//! The signing tables: a key made, and the statements of a project judged.

use crate::ledger::signature::{fingerprint, hex};
use crate::report::names;
use crate::report::{Cell, Table, columns};
use std::path::Path;

pub fn key_table(public_key: &[u8; 32], file: &Path) -> Table {
    let mut t = Table::new(
        "key",
        format!("Key {}", file.display()),
        columns(&[names::PUBLIC_KEY, names::FINGERPRINT]),
    );
    t.push(vec![
        Cell::text(hex(public_key)),
        Cell::text(fingerprint(public_key)),
    ]);
    t.note("Fingerprint: the first 16 hex digits of the SHA-256 of the 32-byte public key.");
    t
}
