//! The facade's error: a kind a caller can match on, and the words a
//! person needs (what is wrong, what to do).

use patternproof_io::InputError;

/// Why a job could not be done.
#[derive(Debug, thiserror::Error)]
pub enum Error {
    /// An input file could not be read or makes no sense; the reader's
    /// error names the file and the place in it.
    #[error(transparent)]
    Input(#[from] InputError),
    /// The inputs were read but the job cannot be done with them.
    #[error("{}", refused_text(subject, what, hint))]
    Refused {
        /// Which refusal, for callers that act on it.
        kind: Refusal,
        /// The file or option concerned.
        subject: String,
        /// What is wrong.
        what: String,
        /// What to do about it.
        hint: String,
    },
    /// A protocol file whose content is not a valid protocol.
    #[error("{file}: {message}")]
    ProtocolFile {
        /// The file.
        file: String,
        /// What is wrong, and what to do.
        message: String,
    },
    /// Something that should not happen (a bug).
    #[error("{0}")]
    Internal(String),
}

/// The kinds of [`Error::Refused`].
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Refusal {
    /// Fewer points than the statistic needs.
    TooFewPoints,
    /// Every window was skipped, so nothing could be tested.
    NoTestableWindow,
    /// A protocol file was changed after it was written, or is not one.
    Protocol,
    /// The sites and their boundaries do not fit together.
    Sites,
    /// A setting that cannot be used with these inputs.
    Setting,
    /// An input file could not be read again for its checksum.
    InputGone,
    /// A coordinate is not a finite number (points given in memory; the
    /// readers refuse such files first).
    NotFinite,
    /// The caller's [`crate::Progress`] asked the run to stop.
    Stopped,
}

/// What kind of error, in one word: the command line maps it to an exit
/// code.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum ErrorKind {
    /// A reader refused an input file.
    Input,
    /// The job was refused; see [`Refusal`].
    Refused(Refusal),
    /// A bug.
    Internal,
}

impl Error {
    /// The kind of this error.
    pub fn kind(&self) -> ErrorKind {
        match self {
            Error::Input(_) => ErrorKind::Input,
            Error::Refused { kind, .. } => ErrorKind::Refused(*kind),
            Error::ProtocolFile { .. } => ErrorKind::Refused(Refusal::Protocol),
            Error::Internal(_) => ErrorKind::Internal,
        }
    }

    /// A refusal of `kind` about `subject`.
    pub fn refused(
        kind: Refusal,
        subject: impl Into<String>,
        what: impl Into<String>,
        hint: impl Into<String>,
    ) -> Self {
        Error::Refused {
            kind,
            subject: subject.into(),
            what: what.into(),
            hint: hint.into(),
        }
    }
}

/// `subject: what` and the advice; without a subject the sentence stands
/// alone.
fn refused_text(subject: &str, what: &str, hint: &str) -> String {
    if subject.is_empty() {
        format!("{what}\n  what to do: {hint}")
    } else {
        format!("{subject}: {what}\n  what to do: {hint}")
    }
}

/// The sweep's refusal as the facade's, about `subject`.
pub(crate) fn sweep_refused(subject: &str, e: patternproof_audit::AuditError) -> Error {
    use patternproof_audit::AuditError as E;
    match e {
        E::TooFewPoints { .. } => Error::refused(
            Refusal::TooFewPoints,
            subject,
            "the sweep needs at least two points",
            "check the point file",
        ),
        E::Alpha { .. } => Error::refused(
            Refusal::Setting,
            subject,
            e.to_string(),
            "use a significance level strictly between 0 and 1, e.g. 0.05",
        ),
        E::NotFinite { .. } => Error::refused(
            Refusal::NotFinite,
            subject,
            e.to_string(),
            "remove or repair the points whose coordinates are missing or infinite",
        ),
    }
}
