//! The facade's errors as Python exceptions: one class per kind, defined
//! in `patternproof/errors.py` (so that the invalid-input classes can also
//! be `ValueError`s), with the command line's message word for word.

use patternproof::{Error, ErrorKind, Refusal};
use pyo3::prelude::*;

/// The exception class that stands for `kind`.
pub fn class_name(kind: ErrorKind) -> &'static str {
    match kind {
        ErrorKind::Input => "InputError",
        ErrorKind::Refused(Refusal::TooFewPoints) => "TooFewPointsError",
        ErrorKind::Refused(Refusal::NoTestableWindow) => "NoTestableWindowError",
        ErrorKind::Refused(Refusal::Protocol) => "ProtocolError",
        ErrorKind::Refused(Refusal::Sites) => "SitesError",
        ErrorKind::Refused(Refusal::Setting) => "SettingError",
        ErrorKind::Refused(Refusal::InputGone) => "InputGoneError",
        ErrorKind::Refused(Refusal::NotFinite) => "NotFiniteError",
        ErrorKind::Refused(Refusal::Stopped) => "StoppedError",
        ErrorKind::Internal => "InternalError",
    }
}

/// The message the command line prints after `patternproof: error: `.
pub fn message(e: &Error) -> String {
    match e.kind() {
        ErrorKind::Internal => format!(
            "{e}\n  this is a bug in patternproof; please report it with the command you ran"
        ),
        _ => e.to_string(),
    }
}

/// The Python exception of `e`.
pub fn to_py(e: Error) -> PyErr {
    Python::attach(|py| {
        let raised = py
            .import("patternproof.errors")
            .and_then(|m| m.getattr(class_name(e.kind())))
            .and_then(|class| class.call1((message(&e),)));
        match raised {
            Ok(exception) => PyErr::from_value(exception),
            // The package is broken (the module cannot be imported): say
            // so rather than lose the message.
            Err(import) => import,
        }
    })
}

/// A refused setting, in the command line's words: `subject: what`, then
/// what to do.
pub fn setting(
    subject: impl Into<String>,
    what: impl Into<String>,
    hint: impl Into<String>,
) -> Error {
    Error::refused(Refusal::Setting, subject, what, hint)
}
