//! Errors for users and the exit codes they map to.

use std::io;

use crate::catalogue::LoadError;
use crate::survey::SurveyError;

/// An error for the user, with the exit code it maps to.
#[derive(Debug, thiserror::Error)]
pub enum CliError {
    #[error(transparent)]
    Load(#[from] LoadError),
    #[error(transparent)]
    Survey(#[from] SurveyError),
    #[error("{0}")]
    Input(String),
    #[error(transparent)]
    Model(#[from] crate::odds::ModelError),
    #[error(transparent)]
    Ledger(#[from] crate::ledger::LedgerError),
    #[error("{0}")]
    Io(#[from] io::Error),
}

impl From<csv::Error> for CliError {
    fn from(e: csv::Error) -> CliError {
        if e.is_io_error() {
            match e.into_kind() {
                csv::ErrorKind::Io(io) => CliError::Io(io),
                other => CliError::Input(format!("{other:?}")),
            }
        } else {
            CliError::Input(e.to_string())
        }
    }
}

impl CliError {
    pub fn exit_code(&self) -> i32 {
        use crate::ledger::LedgerError;
        match self {
            CliError::Io(_) => 1,
            CliError::Ledger(LedgerError::Unwritable { .. } | LedgerError::Open { .. }) => 3,
            CliError::Ledger(LedgerError::Damaged { .. }) => 4,
            CliError::Ledger(LedgerError::DiskFull { .. }) => 5,
            _ => 2,
        }
    }
}
