//! The errors a command can end with, by kind; `Error::exit_code` is the one place a kind
//! becomes an exit code (docs/architecture.md, "Errors").

use std::fmt;

/// Why a command did not complete.
#[derive(Debug, Clone, PartialEq, Eq)]
pub enum Error {
    /// The command line does not parse (a demo script's line included). Exit 2.
    Usage(String),
    /// A value given (an option, a file's field) is not acceptable, or an option is missing or
    /// does not go with another; `field` is the option or field. With a value the line is
    /// `field "value": why`; without, `why` is the whole line and names the field. Exit 1.
    Input {
        field: String,
        value: Option<String>,
        why: String,
    },
    /// The request is understood, but the ledger's rules refuse it (a permit exceeded, a key
    /// reused with other content, a sealed period). Exit 1.
    Refused(String),
    /// The database could not do what was asked; `kind` keeps the backend's reason. Exit 1.
    Store { kind: StoreKind, message: String },
    /// The ledger does not check out: inconsistent, damaged or tampered. Exit 3.
    Ledger {
        project: Option<String>,
        seq: Option<i64>,
        what: String,
    },
    /// A fault in sinkbook itself, not in what it was given. Exit 1.
    Internal(String),
}

/// The reason a store error has, told apart without reading its text.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum StoreKind {
    /// A deadlock or serialization failure: the transaction left nothing and may be run again.
    Busy,
    /// Another writer held the ledger past `--wait`.
    Locked,
    /// The registry's roles do not allow the write.
    Denied,
    /// A row with the same key is already there.
    Unique,
    /// The ledger could not be opened or reached (a missing file, a server that does not answer).
    Connection,
    /// The file or database is not a sinkbook ledger.
    NotALedger,
    /// The disk is full or would not take the write.
    Disk,
    /// The operating system refused something besides the database (a file, randomness).
    System,
    /// Any other database error.
    Other,
}

pub type Result<T> = std::result::Result<T, Error>;

impl Error {
    /// Bad input naming the field and the value: `--mass "0 t": must be greater than zero`.
    pub fn field(field: &str, value: &str, why: impl fmt::Display) -> Self {
        Error::Input {
            field: field.into(),
            value: Some(value.into()),
            why: why.to_string(),
        }
    }

    /// Bad input that holds no one value (a file's line): `report line 4: quantity: …`.
    pub fn input(field: impl Into<String>, why: impl fmt::Display) -> Self {
        let field = field.into();
        Error::Input {
            why: format!("{field}: {why}"),
            field,
            value: None,
        }
    }

    /// An option missing, or given with one it does not go with; `line` names `option`.
    pub fn options(option: &str, line: impl Into<String>) -> Self {
        Error::Input {
            field: option.into(),
            value: None,
            why: line.into(),
        }
    }

    pub fn store(kind: StoreKind, message: impl Into<String>) -> Self {
        Error::Store {
            kind,
            message: message.into(),
        }
    }

    /// The ledger does not check out, at no one project's entry (a damaged file, a bundle).
    pub fn ledger(what: impl fmt::Display) -> Self {
        Error::Ledger {
            project: None,
            seq: None,
            what: what.to_string(),
        }
    }

    /// A project's ledger does not check out, at one entry when `seq` names it.
    pub fn entry(project: &str, seq: Option<i64>, what: impl fmt::Display) -> Self {
        Error::Ledger {
            project: Some(project.into()),
            seq,
            what: what.to_string(),
        }
    }

    pub fn internal(what: impl fmt::Display) -> Self {
        Error::Internal(what.to_string())
    }

    /// The same error, said to have happened at `place` (a script's line); its kind stays.
    pub fn at(self, place: &str) -> Self {
        let at = |m: String| format!("{place}: {m}");
        match self {
            Error::Usage(m) => Error::Usage(at(m)),
            Error::Refused(m) => Error::Refused(at(m)),
            Error::Internal(m) => Error::Internal(at(m)),
            Error::Store { kind, message } => Error::store(kind, at(message)),
            Error::Input {
                field,
                value: Some(v),
                why,
            } => Error::Input {
                field: at(field),
                value: Some(v),
                why,
            },
            Error::Input { field, value, why } => Error::Input {
                field,
                value,
                why: at(why),
            },
            Error::Ledger { project, seq, what } => Error::Ledger {
                project,
                seq,
                what: at(what),
            },
        }
    }

    /// The store error's kind, if it is one.
    pub fn store_kind(&self) -> Option<StoreKind> {
        match self {
            Error::Store { kind, .. } => Some(*kind),
            _ => None,
        }
    }

    /// The exit code of each kind (DESIGN.md: 1 refused, 2 usage, 3 ledger; 4 is an outcome).
    pub fn exit_code(&self) -> u8 {
        match self {
            Error::Usage(_) => 2,
            Error::Ledger { .. } => 3,
            Error::Input { .. } | Error::Refused(_) | Error::Store { .. } | Error::Internal(_) => 1,
        }
    }
}

impl fmt::Display for Error {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            Error::Usage(m) | Error::Refused(m) => f.write_str(m),
            Error::Store { message, .. } => f.write_str(message),
            Error::Input {
                field,
                value: Some(v),
                why,
            } => write!(f, "{field} {v:?}: {why}"),
            Error::Input {
                value: None, why, ..
            } => f.write_str(why),
            Error::Ledger { project, seq, what } => {
                f.write_str("ledger inconsistent: ")?;
                match (project, seq) {
                    (Some(p), Some(s)) => write!(f, "project {p} seq {s}: ")?,
                    (Some(p), None) => write!(f, "project {p}: ")?,
                    (None, Some(s)) => write!(f, "seq {s}: ")?,
                    (None, None) => {}
                }
                f.write_str(what)
            }
            Error::Internal(m) => write!(
                f,
                "internal error: {m} (a fault in sinkbook, not in what it was given; please report it)"
            ),
        }
    }
}

impl std::error::Error for Error {}

impl From<crate::accounting::project_view::ViewError> for Error {
    fn from(e: crate::accounting::project_view::ViewError) -> Self {
        use crate::accounting::project_view::ViewError;
        match e {
            ViewError::Undecodable {
                project,
                seq,
                kind,
                what,
            } => Error::entry(
                &project,
                Some(seq as i64),
                format!("stored {kind} reading: {what}"),
            ),
            ViewError::Feedstock {
                ref project,
                ref code,
                ref what,
            } => Error::entry(project, None, format!("feedstock {code}: {what}")),
            ViewError::Setting {
                ref project,
                ref what,
            } => Error::entry(project, None, format!("settings: {what}")),
            e if e.is_inconsistency() => Error::ledger(e),
            ViewError::Campaign(e) => Error::Refused(format!(
                "the project's figures read soil campaigns by three-end-member with Ti: {e}"
            )),
            e => Error::Refused(e.to_string()),
        }
    }
}

/// A recorded reconciliation that names a chain state the chain never had: the ledger does not
/// check out.
impl From<crate::ledger::reconciliation_states::UnseenState> for Error {
    fn from(e: crate::ledger::reconciliation_states::UnseenState) -> Self {
        Error::ledger(e.to_string())
    }
}

impl From<crate::ledger::reading_fields::ReadingError> for Error {
    fn from(e: crate::ledger::reading_fields::ReadingError) -> Self {
        Error::entry(&e.project, Some(e.seq as i64), e.field)
    }
}

/// A refusal by a pure check on a figure no single option holds, told by its field's name.
impl From<crate::accounting::input::InputError> for Error {
    fn from(e: crate::accounting::input::InputError) -> Self {
        let why = format!("must be {}", e.rule);
        Error::field(&e.field, &e.value.to_string(), why)
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn each_kind_has_its_exit_code_and_one_line() {
        let cases = [
            (Error::Usage("unexpected argument '--x'".into()), 2),
            (
                Error::field("--mass", "0 t", "must be greater than zero"),
                1,
            ),
            (Error::Refused("over the permit".into()), 1),
            (Error::store(StoreKind::Locked, "another writer"), 1),
            (
                Error::entry("TFS", Some(4), "reading uncertainty \"abc\""),
                3,
            ),
            (Error::internal("a thread failed"), 1),
        ];
        for (e, code) in cases {
            assert_eq!(e.exit_code(), code, "{e}");
            assert!(!e.to_string().contains('\n'), "{e}");
        }
        assert_eq!(
            Error::field("--mass", "0 t", "must be greater than zero").to_string(),
            "--mass \"0 t\": must be greater than zero"
        );
        assert_eq!(
            Error::entry("TFS", Some(4), "bad").to_string(),
            "ledger inconsistent: project TFS seq 4: bad"
        );
        assert!(Error::internal("x").to_string().contains("please report"));
        let placed = Error::field("--mass", "0 t", "must be greater than zero").at("kre line 4");
        assert_eq!(
            placed.to_string(),
            "kre line 4: --mass \"0 t\": must be greater than zero"
        );
        let busy = Error::store(StoreKind::Busy, "the ledger is busy").at("kre line 4");
        assert_eq!(busy.store_kind(), Some(StoreKind::Busy));
    }
}
