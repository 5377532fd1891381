//! Test-only helper shared by the readers' unit tests: the readers choose
//! the format by the file's extension, so each case needs a real file.

use std::io::Write;

/// A temporary file named `*{ext}` that holds `body`.
#[allow(clippy::unwrap_used)] // a failed unwrap is a failed test
pub(crate) fn file(ext: &str, body: &str) -> tempfile::NamedTempFile {
    let mut f = tempfile::Builder::new().suffix(ext).tempfile().unwrap();
    f.write_all(body.as_bytes()).unwrap();
    f
}
