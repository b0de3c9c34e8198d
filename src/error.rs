//! The errors a command can end with, each mapped to its exit code by the binary.

use std::fmt;

/// Why a command did not complete.
#[derive(Debug, Clone, PartialEq, Eq)]
pub enum Error {
    /// The input or the request was refused; the message names the field and the value. Exit 1.
    Refused(String),
    /// The ledger is inconsistent or has been tampered with. Exit 3.
    Inconsistent(String),
    /// The ledger file could not be read or written (disk, permissions, lock). Exit 1.
    Store(String),
}

pub type Result<T> = std::result::Result<T, Error>;

impl Error {
    /// A refusal that names the field and the value: `--mass "0 t": must be greater than zero`.
    pub fn field(field: &str, value: &str, why: impl fmt::Display) -> Self {
        Error::Refused(format!("{field} {value:?}: {why}"))
    }

    pub fn exit_code(&self) -> u8 {
        match self {
            Error::Refused(_) | Error::Store(_) => 1,
            Error::Inconsistent(_) => 3,
        }
    }
}

impl fmt::Display for Error {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            Error::Refused(m) | Error::Store(m) => f.write_str(m),
            Error::Inconsistent(m) => write!(f, "ledger inconsistent: {m}"),
        }
    }
}

impl std::error::Error for Error {}

impl From<crate::accounting::project_view::ViewError> for Error {
    fn from(e: crate::accounting::project_view::ViewError) -> Self {
        use crate::accounting::project_view::ViewError;
        match e {
            e if e.is_inconsistency() => Error::Inconsistent(e.to_string()),
            ViewError::Campaign(e) => Error::Refused(format!(
                "the project's figures read soil campaigns by three-end-member with Ti: {e}"
            )),
            e => Error::Refused(e.to_string()),
        }
    }
}
