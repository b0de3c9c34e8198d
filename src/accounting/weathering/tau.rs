//! The mass transfer coefficient τ (Brimhall & Dietrich 1987; Anderson, Dietrich & Brimhall
//! 2002): τ_j = (C_j,w / C_j,p)·(C_i,p / C_i,w) − 1. Normalizing by the immobile element i
//! removes the concentration change that mass loss or gain alone would cause, so τ = −0.3 means
//! 30 % of the parent's j has left.

use super::{Analysis, Material, WeatheringError};
use crate::accounting::input::{Rule, check};

/// τ of the mobile element between a parent and a weathered material.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct MassTransfer {
    pub tau: f64,
}

impl MassTransfer {
    /// −τ, the dissolved fraction as the classic method reads it when the parent is the
    /// soil–feedstock mixture. That reading understates the feedstock's dissolution: the loss is
    /// shared out over the soil's j as well (docs/weathering.md). Negative means a gain.
    pub fn bulk_dissolved_fraction(&self) -> f64 {
        -self.tau
    }
}

/// τ from the parent's and the weathered material's analyses. The parent's mobile
/// concentration must be above 0: a loss from nothing has no meaning.
pub fn tau(parent: &Analysis, weathered: &Analysis) -> Result<MassTransfer, WeatheringError> {
    let (jp, ip) = parent.checked(Material::Parent)?;
    let (jw, iw) = weathered.checked(Material::Weathered)?;
    check("parent.mobile", jp, Rule::Positive)?;
    Ok(MassTransfer {
        tau: (jw / jp) * (ip / iw) - 1.0,
    })
}

#[cfg(test)]
mod tests {
    use super::*;
    use proptest::prelude::*;

    /// REFERENCES.md, mass transfer coefficient (Brimhall & Dietrich 1987; Anderson, Dietrich &
    /// Brimhall 2002; formula from memory): C_j,p 10, C_i,p 1, C_j,w 6, C_i,w 1.25 → τ = −0.52
    /// (computed).
    #[test]
    fn references_md_tau_example() {
        let t = tau(&Analysis::new(10.0, 1.0), &Analysis::new(6.0, 1.25));
        let t = t.unwrap_or_else(|e| panic!("{e}"));
        assert!((t.tau - (6.0 / 10.0 * 1.0 / 1.25 - 1.0)).abs() < 1e-15);
        assert!((t.tau + 0.52).abs() < 1e-12, "{}", t.tau);
        assert!((t.bulk_dissolved_fraction() - 0.52).abs() < 1e-12);
    }

    /// Losing only other constituents concentrates j and i alike: no transfer of j.
    #[test]
    fn residual_enrichment_is_not_loss() {
        let t = tau(&Analysis::new(4.0, 0.5), &Analysis::new(5.0, 0.625));
        assert!(t.is_ok_and(|t| t.tau.abs() < 1e-12));
    }

    #[test]
    fn refusals() {
        let ok = Analysis::new(1.0, 1.0);
        let no_ti = Analysis {
            mobile: Some(1.0),
            immobile: None,
        };
        assert_eq!(
            tau(&no_ti, &ok),
            Err(WeatheringError::Missing {
                material: Material::Parent,
                element: super::super::Role::Immobile
            })
        );
        for (p, w, field) in [
            (Analysis::new(0.0, 1.0), ok, "parent.mobile"),
            (ok, Analysis::new(1.0, 0.0), "weathered.immobile"),
            (ok, Analysis::new(-1.0, 1.0), "weathered.mobile"),
        ] {
            match tau(&p, &w) {
                Err(WeatheringError::Input(e)) => assert_eq!(e.field, field),
                other => panic!("{field}: {other:?}"),
            }
        }
        let text = tau(&no_ti, &ok).map_or_else(|e| e.to_string(), |_| String::new());
        assert_eq!(
            text,
            "parent.immobile is missing; the immobile element must be analysed in the parent"
        );
    }

    proptest! {
        #[test]
        fn never_panics(v in proptest::array::uniform4(proptest::num::f64::ANY)) {
            if let Ok(t) = tau(&Analysis::new(v[0], v[1]), &Analysis::new(v[2], v[3])) {
                let _ = t.bulk_dissolved_fraction();
            }
        }
    }
}
