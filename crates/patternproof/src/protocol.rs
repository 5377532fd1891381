//! Reading a protocol file: the locked choices a multi-site study fixed
//! before looking at the data, verified against the hash it records.

use crate::error::{Error, Refusal};
use patternproof_protocol::{Check, Protocol};
use std::path::Path;

/// Read a protocol file and say whether its choices still match the hash
/// it records.
pub fn read_protocol(path: &Path) -> Result<(Protocol, Check), Error> {
    let subject = path.display().to_string();
    let text = std::fs::read_to_string(path).map_err(|e| {
        Error::refused(
            Refusal::Protocol,
            subject.clone(),
            format!("cannot be read ({e})"),
            "give the protocol file written by `patternproof protocol new`",
        )
    })?;
    // A byte-order mark from an editor is not part of the JSON.
    let text = text.strip_prefix('\u{feff}').unwrap_or(&text);
    // A JSON object keeps the last of two equal keys, so a protocol that
    // says `"alpha": 0.5` and then `"alpha": 0.05` would read (and hash)
    // as 0.05 while a person reading it sees 0.5 first.
    if let Some((key, line, column)) = patternproof_io::json_keys::first_repeated_key(text) {
        return Err(Error::refused(
            Refusal::Protocol,
            format!("{subject}, line {line}, column {column}"),
            format!("the key `{key}` appears twice, so the protocol cannot be read unambiguously"),
            "use the protocol file as `patternproof protocol new` wrote it",
        ));
    }
    Protocol::from_file_text(text).map_err(|e| Error::ProtocolFile {
        file: subject,
        message: e.to_string(),
    })
}

/// Read a protocol file and refuse it when it was changed after it was
/// written.
///
/// ```
/// use patternproof::{ErrorKind, Refusal, read_verified};
///
/// let dir = std::env::temp_dir().join(format!("pp-doc-{}", std::process::id()));
/// std::fs::create_dir_all(&dir)?;
/// let path = dir.join("protocol.json");
/// std::fs::write(&path, "{ \"schema\": \"patternproof.protocol/1\" }")?;
/// let e = read_verified(&path).expect_err("not a whole protocol");
/// assert_eq!(e.kind(), ErrorKind::Refused(Refusal::Protocol));
/// std::fs::remove_dir_all(&dir)?;
/// # Ok::<(), Box<dyn std::error::Error>>(())
/// ```
pub fn read_verified(path: &Path) -> Result<Protocol, Error> {
    let (protocol, check) = read_protocol(path)?;
    match check {
        Check::Intact => Ok(protocol),
        Check::Changed { stored, actual } => Err(changed(path, &stored, &actual)),
    }
}

/// The refusal of a protocol whose choices no longer hash to the recorded
/// value.
pub fn changed(path: &Path, stored: &str, actual: &str) -> Error {
    Error::refused(
        Refusal::Protocol,
        path.display().to_string(),
        format!(
            "the protocol was CHANGED after it was written: its choices hash to {actual}, the file records {stored}"
        ),
        "use the original protocol file; if the change is intended, write a new protocol with `patternproof protocol new` and report both",
    )
}
