//! Projects and their sites: what a chain of entries belongs to.

use crate::quantity::Mass;
use chrono::{DateTime, Utc};

/// Declares a closed list of names with a stable spelling each, parsed and shown the same way.
macro_rules! named_enum {
    ($(#[$m:meta])* $name:ident { $($(#[$vm:meta])* $variant:ident => $text:literal),+ $(,)? }) => {
        $(#[$m])*
        #[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, PartialOrd, Ord)]
        pub enum $name { $($(#[$vm])* $variant),+ }

        impl $name {
            pub const ALL: &'static [$name] = &[$($name::$variant),+];

            pub fn name(self) -> &'static str {
                match self { $($name::$variant => $text),+ }
            }

            pub fn from_name(s: &str) -> Option<Self> {
                Self::ALL.iter().copied().find(|v| v.name() == s)
            }

            /// The accepted spellings, for error messages.
            pub fn choices() -> String {
                Self::ALL.iter().map(|v| v.name()).collect::<Vec<_>>().join(", ")
            }
        }

        impl std::fmt::Display for $name {
            fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
                f.write_str(self.name())
            }
        }
    };
}
pub(crate) use named_enum;

named_enum! {
    /// How a project keeps CO2 out of the atmosphere.
    Method {
        SalineAquifer => "saline-aquifer",
        DepletedField => "depleted-field",
        Eor => "eor",
        BasaltMineralization => "basalt-mineralization",
        ExSituMineralization => "ex-situ-mineralization",
        EnhancedWeathering => "enhanced-weathering",
    }
}

named_enum! {
    /// What a site of a project is.
    SiteKind {
        InjectionWell => "injection-well",
        ProductionWell => "production-well",
        MonitoringWell => "monitoring-well",
        Field => "field",
        Plant => "plant",
    }
}

/// A storage project as registered.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct Project {
    pub code: String,
    pub name: String,
    pub method: Method,
    pub operator: String,
    pub permit_ref: Option<String>,
    pub permit_capacity: Option<Mass>,
    /// Maximum injection in a calendar year, if the permit sets one.
    pub permit_annual: Option<Mass>,
    pub registered_at: DateTime<Utc>,
}

#[cfg(test)]
impl Project {
    /// Project `code` of `method` with no permit, registered at the epoch: a test's project.
    pub fn example(code: &str, method: Method) -> Project {
        Project {
            code: code.into(),
            name: code.into(),
            method,
            operator: "O".into(),
            permit_ref: None,
            permit_capacity: None,
            permit_annual: None,
            registered_at: DateTime::UNIX_EPOCH,
        }
    }
}

/// A well, field or plant of a project.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct Site {
    pub project: String,
    pub code: String,
    pub kind: SiteKind,
    /// A field's area as given (e.g. "12.5 ha").
    pub area: Option<String>,
    /// The meter or measurement uncertainty at 95 % as given (e.g. "0.5%"), until a calibration
    /// entry sets another.
    pub uncertainty: Option<String>,
    pub registered_at: DateTime<Utc>,
}

/// Project and site codes: short, stable identifiers people type and scripts rely on.
pub fn check_code(code: &str) -> Result<(), String> {
    let ok = !code.is_empty()
        && code.len() <= 32
        && code
            .chars()
            .all(|c| c.is_ascii_alphanumeric() || c == '-' || c == '_' || c == '.');
    if ok {
        Ok(())
    } else {
        Err("must be 1 to 32 characters of letters, digits, '-', '_' or '.'".into())
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn names_round_trip() {
        for m in Method::ALL {
            assert_eq!(Method::from_name(m.name()), Some(*m));
        }
        assert_eq!(SiteKind::from_name("field"), Some(SiteKind::Field));
        assert_eq!(SiteKind::from_name("well"), None);
    }

    #[test]
    fn codes() {
        assert!(check_code("TF-I1").is_ok());
        assert!(check_code("").is_err());
        assert!(check_code("a b").is_err());
        assert!(check_code(&"x".repeat(33)).is_err());
    }
}
