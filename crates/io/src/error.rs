//! The input error: every problem with a user's file says which file,
//! where in it, what is wrong, and what to do about it.

use std::fmt;
use std::path::{Path, PathBuf};

/// A problem with user input. The CLI prints it and exits with code 2.
#[derive(Debug, Clone, PartialEq)]
pub struct InputError {
    /// The file concerned (or the flag, for problems with options).
    pub file: PathBuf,
    /// Line, record or feature, when known ("line 14", "feature 3").
    pub location: Option<String>,
    /// What is wrong.
    pub what: String,
    /// What to do about it.
    pub hint: String,
}

impl InputError {
    /// An error about `file` as a whole.
    pub fn new(file: &Path, what: impl Into<String>, hint: impl Into<String>) -> Self {
        Self {
            file: file.to_path_buf(),
            location: None,
            what: what.into(),
            hint: hint.into(),
        }
    }

    /// The same error pinned to a place in the file.
    pub fn at(mut self, location: impl Into<String>) -> Self {
        self.location = Some(location.into());
        self
    }
}

impl fmt::Display for InputError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        write!(f, "{}", self.file.display())?;
        if let Some(loc) = &self.location {
            write!(f, ", {loc}")?;
        }
        write!(f, ": {}\n  what to do: {}", self.what, self.hint)
    }
}

impl std::error::Error for InputError {}

/// An I/O failure on `path`, in the words every reader uses.
pub(crate) fn cannot_read(path: &Path, e: std::io::Error) -> InputError {
    InputError::new(
        path,
        format!("cannot read the file ({e})"),
        "check the path and that the file is readable",
    )
}

/// Read a whole file as UTF-8 text without a leading byte-order mark,
/// mapping I/O failures to an [`InputError`].
pub fn read_text(path: &Path) -> Result<String, InputError> {
    let bytes = std::fs::read(path).map_err(|e| cannot_read(path, e))?;
    let text = String::from_utf8(bytes).map_err(|e| {
        InputError::new(
            path,
            format!(
                "the file is not UTF-8 text (first bad byte at offset {})",
                e.utf8_error().valid_up_to()
            ),
            "save it as UTF-8 (plain CSV, GeoJSON or WKT text)",
        )
    })?;
    // A byte-order mark (written by some Windows editors) is not part of
    // the text: RFC 8259 §8.1 lets a JSON reader ignore it.
    Ok(match text.strip_prefix('\u{feff}') {
        Some(rest) => rest.to_string(),
        None => text,
    })
}
