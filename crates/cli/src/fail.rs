//! The binary's one error type: what went wrong and which exit code it
//! earns.

use std::fmt;

/// A failure to report to the user.
#[derive(Debug)]
pub enum Failure {
    /// Bad input or usage: exit 2.
    Input(String),
    /// Something that should not happen: exit 1.
    Internal(String),
    /// A signal arrived while the report folder was being written: what
    /// became of it. The program then ends by the signal.
    Interrupted {
        /// The signal number.
        signal: i32,
        /// What is on disk now.
        message: String,
    },
}

impl Failure {
    /// The process exit code.
    pub fn exit_code(&self) -> u8 {
        match self {
            Failure::Input(_) => 2,
            Failure::Internal(_) => 1,
            Failure::Interrupted { signal, .. } => u8::try_from(128 + signal).unwrap_or(1),
        }
    }
}

impl fmt::Display for Failure {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        match self {
            Failure::Input(m) | Failure::Interrupted { message: m, .. } => f.write_str(m),
            Failure::Internal(m) => write!(
                f,
                "{m}\n  this is a bug in patternproof; please report it with the command you ran"
            ),
        }
    }
}

/// Every kind of input error is a problem with the user's files or
/// options: exit 2, with the file, the place and the hint the reader wrote.
impl From<patternproof::InputError> for Failure {
    fn from(e: patternproof::InputError) -> Self {
        Failure::Input(e.to_string())
    }
}

impl From<patternproof::Error> for Failure {
    fn from(e: patternproof::Error) -> Self {
        match e.kind() {
            patternproof::ErrorKind::Internal => Failure::Internal(e.to_string()),
            _ => Failure::Input(e.to_string()),
        }
    }
}

/// A folder that could not be rendered: the picture's window is the
/// user's to change; anything else is a bug.
impl From<patternproof_report::RenderError> for Failure {
    fn from(e: patternproof_report::RenderError) -> Self {
        use patternproof_report::RenderError;
        match e {
            RenderError::UnknownWindow { id, known } => Failure::Input(format!(
                "--picture-window {id}: no window has this id\n  what to do: choose one of {}",
                known.join(", ")
            )),
            RenderError::NoSimulations { id } => Failure::Input(format!(
                "--picture-window {id}: this window has no simulations (simulations need an outline and --sims above 0)\n  what to do: choose a window with an outline, or leave the option out"
            )),
            e => Failure::Internal(e.to_string()),
        }
    }
}
