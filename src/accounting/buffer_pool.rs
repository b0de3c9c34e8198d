//! The buffer pool: tonnes withheld from each claim against later losses. A reversal (a loss
//! found after tonnes were claimed) cancels buffer tonnes first, then claimable tonnes; what
//! neither covers is a shortfall the project still owes.

use crate::quantity::Mass;
use std::fmt;

/// Why a claim or reversal was refused; the pool is left as it was.
#[derive(Debug, Clone, PartialEq, Eq)]
pub enum BufferPoolError {
    /// A contribution below zero (`field` is `buffer_withheld` or `claimable`).
    Negative { field: &'static str, mass: Mass },
    /// A reversal of zero or less is no loss.
    NotALoss(Mass),
    /// A running total beyond the i64 grams the ledger can hold.
    TooLarge { field: &'static str },
}

impl fmt::Display for BufferPoolError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            Self::Negative { field, mass } => write!(f, "{field} is {mass}: must not be negative"),
            Self::NotALoss(m) => write!(f, "loss is {m}: must be greater than zero"),
            Self::TooLarge { field } => write!(f, "{field} is too large for the ledger"),
        }
    }
}

/// What one reversal cancelled, in the order it cancels.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct Reversal {
    pub loss: Mass,
    pub buffer_cancelled: Mass,
    pub claimable_cancelled: Mass,
    /// The part of the loss neither the pool nor the claimable tonnes left could cover.
    pub shortfall: Mass,
}

/// Running totals of a pool. Apply claims and reversals in the order they happened: a reversal
/// can only draw on buffer tonnes contributed before it.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
pub struct BufferPool {
    contributed: Mass,
    cancelled: Mass,
    claimable_counted: Mass,
    claimable_cancelled: Mass,
    shortfall: Mass,
}

impl BufferPool {
    pub fn new() -> Self {
        Self::default()
    }

    /// Adds one claim's buffer contribution and the claimable tonnes counted with it.
    pub fn add_claim(
        &mut self,
        buffer_withheld: Mass,
        claimable: Mass,
    ) -> Result<(), BufferPoolError> {
        for (field, mass) in [
            ("buffer_withheld", buffer_withheld),
            ("claimable", claimable),
        ] {
            if mass.grams() < 0 {
                return Err(BufferPoolError::Negative { field, mass });
            }
        }
        let contributed = add(self.contributed, buffer_withheld, "buffer contributed")?;
        let claimable_counted = add(self.claimable_counted, claimable, "claimable counted")?;
        self.contributed = contributed;
        self.claimable_counted = claimable_counted;
        Ok(())
    }

    /// Cancels `loss`: buffer tonnes first, then claimable tonnes, the rest a shortfall.
    pub fn reverse(&mut self, loss: Mass) -> Result<Reversal, BufferPoolError> {
        if !loss.is_positive() {
            return Err(BufferPoolError::NotALoss(loss));
        }
        let buffer_cancelled = loss.min(self.remaining());
        let rest = loss - buffer_cancelled;
        let claimable_cancelled = rest.min(self.claimable_left());
        let shortfall = rest - claimable_cancelled;
        // Only the shortfall total can outgrow what was contributed and counted.
        self.shortfall = add(self.shortfall, shortfall, "shortfall")?;
        self.cancelled += buffer_cancelled;
        self.claimable_cancelled += claimable_cancelled;
        Ok(Reversal {
            loss,
            buffer_cancelled,
            claimable_cancelled,
            shortfall,
        })
    }

    /// All buffer tonnes ever contributed.
    pub fn contributed(&self) -> Mass {
        self.contributed
    }

    /// Buffer tonnes cancelled by reversals.
    pub fn cancelled(&self) -> Mass {
        self.cancelled
    }

    /// Buffer tonnes still in the pool: contributed − cancelled.
    pub fn remaining(&self) -> Mass {
        self.contributed - self.cancelled
    }

    /// Claimable tonnes counted by the claims so far.
    pub fn claimable_counted(&self) -> Mass {
        self.claimable_counted
    }

    /// Claimable tonnes cancelled once the pool ran dry.
    pub fn claimable_cancelled(&self) -> Mass {
        self.claimable_cancelled
    }

    /// Claimable tonnes still standing: counted − cancelled.
    pub fn claimable_left(&self) -> Mass {
        self.claimable_counted - self.claimable_cancelled
    }

    /// Losses no tonnes were left to cover, summed over all reversals.
    pub fn shortfall(&self) -> Mass {
        self.shortfall
    }
}

fn add(a: Mass, b: Mass, field: &'static str) -> Result<Mass, BufferPoolError> {
    a.checked_add(b).ok_or(BufferPoolError::TooLarge { field })
}

#[cfg(test)]
mod tests {
    use super::*;

    fn t(tonnes: i64) -> Mass {
        Mass::from_grams(tonnes * 1_000_000)
    }

    /// Two claims: 1 000 t and 500 t withheld, 9 000 t and 4 500 t claimable.
    fn pool() -> BufferPool {
        let mut p = BufferPool::new();
        p.add_claim(t(1_000), t(9_000)).unwrap();
        p.add_claim(t(500), t(4_500)).unwrap();
        p
    }

    fn parts(r: Reversal) -> (Mass, Mass, Mass) {
        (r.buffer_cancelled, r.claimable_cancelled, r.shortfall)
    }

    #[test]
    fn smaller_than_the_pool() {
        let mut p = pool();
        let r = p.reverse(t(600)).unwrap();
        assert_eq!(parts(r), (t(600), Mass::ZERO, Mass::ZERO));
        assert_eq!(
            (p.contributed(), p.cancelled(), p.remaining()),
            (t(1_500), t(600), t(900))
        );
        assert_eq!(p.claimable_left(), t(13_500));
    }

    #[test]
    fn equal_to_the_pool() {
        let mut p = pool();
        let r = p.reverse(t(1_500)).unwrap();
        assert_eq!(parts(r), (t(1_500), Mass::ZERO, Mass::ZERO));
        assert_eq!(p.remaining(), Mass::ZERO);
        assert_eq!(p.claimable_cancelled(), Mass::ZERO);
    }

    #[test]
    fn larger_than_the_pool() {
        let mut p = pool();
        let r = p.reverse(t(2_000)).unwrap();
        assert_eq!(parts(r), (t(1_500), t(500), Mass::ZERO));
        assert_eq!(p.claimable_cancelled(), t(500));
        assert_eq!(p.claimable_left(), t(13_000));
        // Larger than the pool and the claimable left together: the rest is a shortfall.
        let r = p.reverse(t(20_000)).unwrap();
        assert_eq!(parts(r), (Mass::ZERO, t(13_000), t(7_000)));
        assert_eq!(p.shortfall(), t(7_000));
        assert_eq!(p.claimable_left(), Mass::ZERO);
    }

    #[test]
    fn several_reversals_in_order() {
        let mut p = BufferPool::new();
        p.add_claim(t(100), t(900)).unwrap();
        let first = p.reverse(t(60)).unwrap();
        assert_eq!(parts(first), (t(60), Mass::ZERO, Mass::ZERO));
        // 40 t left in the pool; this one takes it and 10 t of claimable.
        let second = p.reverse(t(50)).unwrap();
        assert_eq!(parts(second), (t(40), t(10), Mass::ZERO));
        // A later claim refills the pool; the next reversal draws on it first.
        p.add_claim(t(200), t(1_800)).unwrap();
        let third = p.reverse(t(150)).unwrap();
        assert_eq!(parts(third), (t(150), Mass::ZERO, Mass::ZERO));
        assert_eq!(
            (p.contributed(), p.cancelled(), p.remaining()),
            (t(300), t(250), t(50))
        );
        assert_eq!(
            (p.claimable_counted(), p.claimable_cancelled()),
            (t(2_700), t(10))
        );
    }

    #[test]
    fn refusals_leave_the_pool_as_it_was() {
        let mut p = pool();
        let before = p;
        let e = p.add_claim(t(-1), t(1)).unwrap_err();
        assert_eq!(
            e.to_string(),
            "buffer_withheld is -1.000000 t: must not be negative"
        );
        let e = p.add_claim(t(1), Mass::from_grams(i64::MAX)).unwrap_err();
        assert_eq!(
            e.to_string(),
            "claimable counted is too large for the ledger"
        );
        let e = p.reverse(Mass::ZERO).unwrap_err();
        assert_eq!(
            e.to_string(),
            "loss is 0.000000 t: must be greater than zero"
        );
        assert_eq!(p, before);
    }

    #[derive(Debug, Clone)]
    enum Event {
        Claim(i64, i64),
        Reversal(i64),
    }

    fn event() -> impl proptest::strategy::Strategy<Value = Event> {
        use proptest::prelude::*;
        prop_oneof![
            (0i64..1_000_000_000_000, 0i64..1_000_000_000_000)
                .prop_map(|(b, c)| Event::Claim(b, c)),
            (1i64..3_000_000_000_000).prop_map(Event::Reversal),
        ]
    }

    proptest::proptest! {
        #[test]
        fn every_gram_of_loss_is_accounted(events in proptest::collection::vec(event(), 0..30)) {
            let mut p = BufferPool::new();
            let mut losses = 0i64;
            let mut covered = 0i64;
            for e in events {
                match e {
                    Event::Claim(b, c) => {
                        p.add_claim(Mass::from_grams(b), Mass::from_grams(c)).unwrap()
                    }
                    Event::Reversal(l) => {
                        let r = p.reverse(Mass::from_grams(l)).unwrap();
                        losses += l;
                        covered += (r.buffer_cancelled + r.claimable_cancelled + r.shortfall)
                            .grams();
                        // A shortfall only once nothing is left to cancel.
                        if r.shortfall.is_positive() {
                            proptest::prop_assert_eq!(p.remaining(), Mass::ZERO);
                            proptest::prop_assert_eq!(p.claimable_left(), Mass::ZERO);
                        }
                    }
                }
                proptest::prop_assert_eq!(p.contributed(), p.cancelled() + p.remaining());
                proptest::prop_assert!(p.remaining().grams() >= 0);
                proptest::prop_assert!(p.claimable_left().grams() >= 0);
            }
            proptest::prop_assert_eq!(losses, covered);
            proptest::prop_assert_eq!(
                losses,
                (p.cancelled() + p.claimable_cancelled() + p.shortfall()).grams()
            );
        }
    }
}
