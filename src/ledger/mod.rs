//! The ledger core: projects, entries, their canonical bytes and hash chain, corrections and
//! periods. Pure: no database, files, printing or clock.

pub mod admission;
pub mod append;
pub mod baseline;
pub mod bounds;
pub mod canonical;
pub mod chain;
pub mod chain_structure;
pub mod correction;
pub mod dated_fact;
pub mod entry;
pub mod feedstock;
pub mod hash;
pub mod ledger_chain;
pub mod merkle;
pub mod period;
pub mod project;
pub mod project_filter;
pub mod proof;
pub mod proof_seal;
pub mod reading_fields;
pub mod recompute;
pub mod reconciliation;
pub mod reconciliation_states;
pub mod route_record;
pub mod seal;
pub mod seal_check;
pub mod setting;
pub mod setting_change;
pub mod signature;
pub mod statement_check;
pub mod tally;
pub mod unnamed_files;

pub use entry::{Entry, EntryKind, Evidence, Reading, SealedEntry, Sign};
pub use hash::Hash;
pub use period::Period;
pub use project::{Method, Project, Site, SiteKind};

#[cfg(test)]
mod tests {
    use super::*;
    use crate::quantity::Mass;
    use chrono::{DateTime, NaiveDate};

    /// The TFS project registered with `method`, for the ledger's tests.
    pub(crate) fn project(method: Method) -> Project {
        Project {
            code: "TFS".into(),
            name: "Tamsin Flats Storage".into(),
            method,
            operator: "Northdeep Storage Cooperative".into(),
            permit_ref: None,
            permit_capacity: None,
            permit_annual: None,
            registered_at: DateTime::UNIX_EPOCH,
        }
    }

    /// An injection entry at TFS, for the ledger's tests to vary.
    pub(crate) fn fixture(seq: u64) -> Entry {
        let d = |s| NaiveDate::parse_from_str(s, "%Y-%m-%d").unwrap();
        let mut reading = Reading::default();
        reading.push("mass", "1250.5 t");
        reading.push("co2_fraction", "0.985");
        reading.push("co2_basis", "mass");
        Entry {
            project: "TFS".into(),
            seq,
            kind: EntryKind::Injection,
            site: "TF-I1".into(),
            period: Period::new(d("2026-01-01"), d("2026-01-31")).unwrap(),
            reading,
            mass: Mass::from_grams(1_231_742_500),
            sign: Sign::Adds,
            recorded_at: DateTime::from_timestamp_micros(1_767_225_600_000_000).unwrap(),
            key: "tfs-2026-01-i1".into(),
            meter: Some("FM-101".into()),
            note: None,
            corrects: None,
            reason: None,
            evidence: None,
            recorded_by: None,
        }
    }

    /// Pins canonical encoding v1: if this changes, every stored chain stops verifying.
    /// The expected bytes follow docs/ledger-format.md by hand; the hashes were computed from those
    /// bytes with python3's hashlib, and tests/independent_chain.rs re-checks whole ledgers that way.
    #[test]
    fn golden_canonical_bytes_and_hashes() {
        let e = fixture(0);
        let bytes = canonical::encode(&e);
        let mut expect: Vec<u8> = vec![1];
        let s = |v: &mut Vec<u8>, t: &str| {
            v.extend_from_slice(&(t.len() as u32).to_le_bytes());
            v.extend_from_slice(t.as_bytes());
        };
        s(&mut expect, "TFS");
        expect.extend_from_slice(&0u64.to_le_bytes());
        expect.push(0); // injection
        s(&mut expect, "TF-I1");
        expect.extend_from_slice(&20454i32.to_le_bytes()); // 2026-01-01
        expect.extend_from_slice(&20484i32.to_le_bytes()); // 2026-01-31
        expect.extend_from_slice(&3u32.to_le_bytes());
        for t in [
            "mass",
            "1250.5 t",
            "co2_fraction",
            "0.985",
            "co2_basis",
            "mass",
        ] {
            s(&mut expect, t);
        }
        expect.extend_from_slice(&1_231_742_500i64.to_le_bytes());
        expect.push(0); // adds
        expect.extend_from_slice(&1_767_225_600_000_000i64.to_le_bytes());
        s(&mut expect, "tfs-2026-01-i1");
        expect.push(1);
        s(&mut expect, "FM-101");
        expect.extend_from_slice(&[0, 0, 0, 0]); // note, corrects, reason, evidence absent
        assert_eq!(bytes, expect);

        let sealed = chain::seal(e, Hash::GENESIS);
        assert_eq!(sealed.leaf.to_hex(), GOLDEN_LEAF);
        assert_eq!(sealed.chain.to_hex(), GOLDEN_CHAIN);
    }

    /// Encoding v2 is v1 with version byte 2 and the recording role appended as a `str`.
    #[test]
    fn an_entry_naming_its_role_is_v1_with_version_2_and_the_role_at_the_end() {
        let v1 = canonical::encode(&fixture(0));
        let e = Entry {
            recorded_by: Some("nsc_ops".into()),
            ..fixture(0)
        };
        let mut expect = v1.clone();
        expect[0] = 2;
        expect.extend_from_slice(&7u32.to_le_bytes());
        expect.extend_from_slice(b"nsc_ops");
        assert_eq!(canonical::encode(&e), expect);
        assert_ne!(chain::seal(e, Hash::GENESIS).leaf.to_hex(), GOLDEN_LEAF);
    }

    const GOLDEN_LEAF: &str = "7a684dfc897085a5930352be9bd9b2b417d1989125fead7ab3b1f33a808bb368";
    const GOLDEN_CHAIN: &str = "694c06f4a297dfdb788a7b317242263bf7c2078ddbd28d561e2b91ae01badfd3";

    fn sealed_chain(n: u64) -> Vec<SealedEntry> {
        let mut prev = Hash::GENESIS;
        (0..n)
            .map(|i| {
                let mut e = fixture(i);
                e.key = format!("k{i}");
                let s = chain::seal(e, prev);
                prev = s.chain;
                s
            })
            .collect()
    }

    /// Walks a chain held in memory, looking each correction's target up in it as the store
    /// does by index.
    fn check(c: &[SealedEntry]) -> Result<chain::ChainCheck, chain::Finding> {
        let mut walk = chain::ChainWalk::new("TFS");
        for s in c {
            let target = s
                .entry
                .corrects
                .map_or_else(Default::default, |t| chain::Target {
                    kind: c.get(t as usize).map(|x| x.entry.kind),
                    first_corrector: c
                        .iter()
                        .find(|x| x.entry.corrects == Some(t))
                        .map(|x| x.entry.seq),
                });
            walk.step(s, target)?;
        }
        Ok(walk.finish())
    }

    #[test]
    fn check_accepts_a_whole_chain_and_names_breaks() {
        let c = sealed_chain(4);
        assert_eq!(check(&c).unwrap().head, c[3].chain);

        let mut altered = c.clone();
        altered[2].entry.mass = Mass::from_grams(1);
        let f = check(&altered).unwrap_err();
        assert_eq!(f.seq, 2);
        assert!(f.what.contains("leaf hash"), "{f}");

        let mut gap = c.clone();
        gap.remove(1);
        assert_eq!(check(&gap).unwrap_err().seq, 1);

        let mut swapped = c.clone();
        swapped.swap(1, 2);
        assert_eq!(check(&swapped).unwrap_err().seq, 1);
    }

    #[test]
    fn corrections_replace_the_latest() {
        let mut c = sealed_chain(2);
        let mut fix = fixture(2);
        fix.key = "fix".into();
        fix.corrects = Some(0);
        fix.reason = Some("meter recalibrated".into());
        c.push(chain::seal(fix, c[1].chain));
        let live: Vec<u64> = correction::effective(&c).map(|e| e.seq).collect();
        assert_eq!(live, vec![1, 2]);
        assert_eq!(
            correction::target(&c, 0),
            Err(correction::CorrectionError::AlreadyCorrected { seq: 0, by: 2 })
        );
        assert!(correction::target(&c, 2).is_ok());
        assert_eq!(
            correction::target(&c, 9),
            Err(correction::CorrectionError::NoSuchSeq(9))
        );
        assert!(check(&c).is_ok());
    }

    #[test]
    fn check_names_a_clock_that_ran_backwards() {
        let mut c = sealed_chain(2);
        let mut late = fixture(2);
        late.key = "late".into();
        late.recorded_at = c[1].entry.recorded_at - chrono::Duration::seconds(1);
        c.push(chain::seal(late, c[1].chain));
        let f = check(&c).unwrap_err();
        assert_eq!(f.seq, 2);
        assert!(f.what.contains("earlier than the entry before"), "{f}");
    }

    #[test]
    fn check_names_a_correction_of_another_kind_or_a_second_correction() {
        let c = sealed_chain(2);
        let mut other = fixture(2);
        other.key = "other".into();
        other.kind = EntryKind::Production;
        other.corrects = Some(0);
        let mut wrong = c.clone();
        wrong.push(chain::seal(other, c[1].chain));
        let f = check(&wrong).unwrap_err();
        assert!(f.what.contains("of another kind (injection)"), "{f}");

        let mut twice = c.clone();
        for key in ["fix1", "fix2"] {
            let mut fix = fixture(twice.len() as u64);
            fix.key = key.into();
            fix.corrects = Some(0);
            twice.push(chain::seal(fix, twice.last().unwrap().chain));
        }
        let f = check(&twice).unwrap_err();
        assert_eq!(f.seq, 3);
        assert!(f.what.contains("already corrected by seq 2"), "{f}");
    }

    proptest::proptest! {
        /// Any single byte flipped in any entry's canonical content is caught: each stored
        /// field feeds the leaf, so a flip either changes the leaf or breaks the decoding.
        #[test]
        fn any_flipped_byte_changes_the_leaf(pos in 0usize..200, bit in 0u8..8) {
            let e = fixture(0);
            let mut bytes = canonical::encode(&e);
            let i = pos % bytes.len();
            bytes[i] ^= 1 << bit;
            proptest::prop_assert_ne!(hash::leaf_hash(&bytes), chain::seal(e, Hash::GENESIS).leaf);
        }
    }
}
