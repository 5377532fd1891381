//! How a run came about, as every folder states it, and why a folder
//! could not be rendered.

use crate::density::geotiff::GeoTiffError;
use crate::html::Provenance;
use std::time::SystemTime;

/// What the outputs say about the run itself, beside its results: given
/// by the front end, never looked up here, so the same results and
/// context give the same bytes.
#[derive(Debug, Clone, Default)]
pub struct RunContext {
    /// The command line, as typed (arguments joined by spaces, quoted
    /// where needed by [`crate::html::shell_quote`]).
    pub command_line: String,
    /// Time of the run, only when asked for (`--stamp`); without it the
    /// outputs carry no time and repeat byte for byte.
    pub stamp: Option<SystemTime>,
    /// The protocol the run followed, in words (its file and hash).
    pub protocol: Option<String>,
}

impl RunContext {
    /// What `index.html` says about the run (the stamp to the second).
    pub fn provenance(&self) -> Provenance {
        Provenance {
            command_line: self.command_line.clone(),
            protocol: self.protocol.clone(),
            stamp: self
                .stamp
                .map(|t| humantime::format_rfc3339_seconds(t).to_string()),
        }
    }

    /// The `last_change` of a GeoPackage: the stamp to the millisecond,
    /// or the fixed time that keeps the bytes reproducible.
    pub fn last_change(&self) -> String {
        match self.stamp {
            Some(t) => humantime::format_rfc3339_millis(t).to_string(),
            None => patternproof_gpkg::write::FIXED_LAST_CHANGE.to_string(),
        }
    }
}

/// Why a folder could not be rendered. The first two are the user's
/// choices; the rest are bugs, since everything renders into memory.
#[derive(Debug, thiserror::Error)]
pub enum RenderError {
    /// The picture's window (`--picture-window`) is not among the windows.
    #[error("no window has the id {id}")]
    UnknownWindow {
        /// The id asked for.
        id: String,
        /// The ids there are.
        known: Vec<String>,
    },
    /// The picture's window has no simulations to draw.
    #[error("window {id} has no simulations")]
    NoSimulations {
        /// The id asked for.
        id: String,
    },
    /// A writer failed in memory.
    #[error("could not render {file} in memory: {source}")]
    Io {
        /// The file being rendered.
        file: &'static str,
        /// The error.
        source: std::io::Error,
    },
    /// A JSON document could not be serialised.
    #[error("could not write {file}: {source}")]
    Json {
        /// The file being rendered.
        file: &'static str,
        /// The error.
        source: serde_json::Error,
    },
    /// The GeoPackage writer failed.
    #[error("could not write windows.gpkg in memory: {0}")]
    Gpkg(#[from] patternproof_gpkg::GpkgError),
    /// The GeoTIFF writer failed.
    #[error("could not write reference.tif: {0}")]
    GeoTiff(#[from] GeoTiffError),
}

/// Render into a buffer with an `io::Write` writer, naming the file on failure.
pub(crate) fn bytes(
    file: &'static str,
    write: impl FnOnce(&mut Vec<u8>) -> std::io::Result<()>,
) -> Result<Vec<u8>, RenderError> {
    let mut buf = Vec::new();
    write(&mut buf).map_err(|source| RenderError::Io { file, source })?;
    Ok(buf)
}
