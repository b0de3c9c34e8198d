//! Rebuilds when a migration changes: the store embeds migrations/ at compile time, and cargo
//! does not otherwise notice a new migration folder.

fn main() {
    println!("cargo:rerun-if-changed=migrations");
}
