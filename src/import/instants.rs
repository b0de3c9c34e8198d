//! The instants one meter was read at, to refuse a reading given twice. A meter's rows mostly
//! come in time order, so the instants are kept as a rising run (8 bytes each, a new one
//! checked against the last) and the few that come out of order in a set beside it.

use std::collections::HashSet;

#[derive(Debug, Default)]
pub struct Instants {
    /// Strictly rising, in file order.
    rising: Vec<i64>,
    /// Those that came at or before the run's last when read; each is below the run's last.
    others: HashSet<i64>,
}

impl Instants {
    /// Takes `t`; false when it was taken before.
    pub fn insert(&mut self, t: i64) -> bool {
        match self.rising.last() {
            Some(&last) if t <= last => {
                self.rising.binary_search(&t).is_err() && self.others.insert(t)
            }
            _ => {
                self.rising.push(t);
                true
            }
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn an_instant_is_taken_once_in_any_order() {
        let mut i = Instants::default();
        for t in [5, 7, 9] {
            assert!(i.insert(t));
        }
        assert!(!i.insert(7), "in the run");
        assert!(i.insert(6), "out of order, new");
        assert!(!i.insert(6), "out of order, again");
        assert!(i.insert(10));
        assert!(!i.insert(9));
        assert!(!i.insert(5));
        assert!(i.insert(-1));
    }

    proptest::proptest! {
        #[test]
        fn agrees_with_a_set(ts in proptest::collection::vec(0i64..40, 0..200)) {
            let mut i = Instants::default();
            let mut set = HashSet::new();
            for t in ts {
                proptest::prop_assert_eq!(i.insert(t), set.insert(t));
            }
        }
    }
}
