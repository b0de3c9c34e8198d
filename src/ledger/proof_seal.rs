//! The seal an inclusion proof leads to: the one asked for, or the latest whose tree holds the
//! entry; either way its tree must hold the entry.

use super::seal::Seal;

/// Why no seal can carry the proof of an entry.
#[derive(Debug, PartialEq, Eq)]
pub enum NoSeal {
    /// The seq asked for is not a seal of the project.
    NotASeal(u64),
    /// No seal's tree holds the entry yet.
    Unsealed,
    /// The entry comes after the seal asked for.
    After { seal: u64, tree_size: u64 },
}

impl std::fmt::Display for NoSeal {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        match self {
            NoSeal::NotASeal(_) => f.write_str("is not the seq of a seal of this project"),
            NoSeal::Unsealed => f.write_str("is under no seal yet"),
            NoSeal::After { seal, tree_size } => write!(
                f,
                "comes after seal seq {seal}, whose tree holds seq 0 to {}",
                tree_size.saturating_sub(1)
            ),
        }
    }
}

/// The seal of `seals` (in seq order) that proves entry `seq`: seal `asked`, or the latest
/// whose tree holds the entry.
pub fn proving_seal(seals: Vec<Seal>, seq: u64, asked: Option<u64>) -> Result<Seal, NoSeal> {
    let found = match asked {
        Some(n) => seals
            .into_iter()
            .find(|s| s.seq == n)
            .ok_or(NoSeal::NotASeal(n))?,
        None => seals
            .into_iter()
            .rev()
            .find(|s| s.tree_size > seq)
            .ok_or(NoSeal::Unsealed)?,
    };
    if seq >= found.tree_size {
        return Err(NoSeal::After {
            seal: found.seq,
            tree_size: found.tree_size,
        });
    }
    Ok(found)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::ledger::seal::tests::seal;

    #[test]
    fn the_latest_seal_holding_the_entry_unless_one_is_asked_for() {
        let seals = || vec![seal("2026-01", 3), seal("2026-02", 8)];
        assert_eq!(proving_seal(seals(), 2, None).map(|s| s.seq), Ok(8));
        assert_eq!(proving_seal(seals(), 2, Some(3)).map(|s| s.seq), Ok(3));
        assert_eq!(proving_seal(seals(), 2, Some(4)), Err(NoSeal::NotASeal(4)));
        assert_eq!(proving_seal(seals(), 8, None), Err(NoSeal::Unsealed));
        let after = proving_seal(seals(), 5, Some(3)).unwrap_err();
        assert_eq!(
            after.to_string(),
            "comes after seal seq 3, whose tree holds seq 0 to 2"
        );
    }
}
