//! A signed statement judged again: its signature over its bytes, and whether the seal it names
//! still stands as signed (in the chain, with the tree size and root signed, and that root still
//! the head of the leaves before it).

use super::Hash;
use super::seal::Seal;
use super::signature::Statement;

/// A statement with what re-checking it found: its signature, and whether the seal it signs
/// still stands as signed.
pub struct Judged {
    pub statement: Statement,
    pub signature: std::result::Result<(), String>,
    pub seal: std::result::Result<(), String>,
}

pub fn judged(statement: Statement, seal: std::result::Result<(), String>) -> Judged {
    let signature = statement.verify();
    Judged {
        statement,
        signature,
        seal,
    }
}

pub fn seal_stands(
    s: &Statement,
    seals: &[Seal],
    heads: &[(u64, Hash)],
) -> std::result::Result<(), String> {
    let g = &s.signed;
    let seal = seals
        .iter()
        .find(|x| x.seq == g.seal_seq)
        .ok_or_else(|| format!("seq {} is no longer a seal", g.seal_seq))?;
    if seal.tree_size != g.tree_size || seal.root != g.root || seal.label != g.period {
        return Err(format!(
            "seal seq {} now holds {} entries, head {}; the statement signed {} entries, head {}",
            seal.seq,
            seal.tree_size,
            seal.root.head(),
            g.tree_size,
            g.root.head()
        ));
    }
    match heads.iter().find(|(n, _)| *n == g.tree_size) {
        Some((_, h)) if *h == g.root => Ok(()),
        _ => Err(format!(
            "the leaves before seal seq {} no longer give head {}",
            seal.seq,
            g.root.head()
        )),
    }
}
