//! The inputs of a job: points and boundaries in one plane, what the
//! report says about them, and the checksums of the files they came from.
//!
//! Files are read with [`load`] (any format the `patternproof-io` crate
//! knows) and turned into an [`Input`] with [`Input::from_dataset`]; points
//! already in memory (a notebook's array) become one with
//! [`Input::from_points`].

use crate::document::{BoundarySource, FileDigest, InputSummary};
use crate::error::Error;
use geo::MultiPolygon;
use patternproof_audit::window::NamedShape;
use patternproof_core::Xy;
use patternproof_io::{Dataset, LoadOptions};
use sha2::Digest;
use std::path::{Path, PathBuf};

/// Read points and boundary files into one planar data set (projecting
/// lon/lat, checking every value); see [`patternproof_io::Dataset::load`].
pub fn load(
    points: &Path,
    boundaries: &[PathBuf],
    options: &LoadOptions,
) -> Result<Dataset, Error> {
    Ok(Dataset::load(points, boundaries, options)?)
}

/// What a job analyses.
#[derive(Debug, Clone)]
pub struct Input {
    /// The points, in a planar system.
    pub points: Vec<Xy>,
    /// Surveyed boundaries, each a window of its own.
    pub boundaries: Vec<NamedShape>,
    /// What the report says about the input.
    pub summary: InputSummary,
    /// SHA-256 of every input file, in reading order.
    pub digests: Vec<FileDigest>,
    /// The points file, for messages about the points as a whole.
    pub subject: String,
}

impl Input {
    /// The input of a loaded data set, without checksums: for jobs whose
    /// documents record none (`scales`, `density`, `recheck`), so their
    /// files are not read a second time.
    pub fn from_dataset(data: &Dataset) -> Self {
        Self {
            points: data.points.clone(),
            boundaries: named_shapes(data),
            summary: input_summary(data),
            digests: Vec::new(),
            subject: data.points_file.display().to_string(),
        }
    }

    /// The input of a loaded data set with the SHA-256 of every file it was
    /// read from (parts given in memory have none), as `report.json`
    /// records them: each file is read once more, so a report names
    /// exactly the bytes it was made from.
    pub fn checksummed(data: &Dataset) -> Result<Self, Error> {
        let files: Vec<PathBuf> = std::iter::once(data.points_file.clone())
            .chain(data.boundaries.iter().map(|b| b.file.clone()))
            .filter(|f| !crate::memory::in_memory(f))
            .collect();
        Ok(Self {
            digests: digests(&files, "while the audit runs")?,
            ..Self::from_dataset(data)
        })
    }

    /// Points held in memory, in a planar system whose unit is `unit`.
    /// Nothing was read from a file, so there are no checksums.
    pub fn from_points(points: Vec<Xy>, unit: &str) -> Self {
        let n = points.len();
        Self {
            points,
            boundaries: Vec::new(),
            summary: InputSummary {
                points_file: "(points given in memory)".into(),
                n,
                n_read: n,
                duplicates: 0,
                duplicates_dropped: false,
                coords: "projected".into(),
                projection: None,
                unit: unit.into(),
                boundaries: Vec::new(),
                warnings: Vec::new(),
            },
            digests: Vec::new(),
            subject: "(points given in memory)".into(),
        }
    }

    /// Add a surveyed boundary called `name`, in the points' system.
    pub fn with_boundary(mut self, name: &str, shape: MultiPolygon<f64>) -> Self {
        self.boundaries.push(NamedShape {
            name: name.into(),
            source: "(given in memory)".into(),
            shape,
        });
        self.summary.boundaries.push(BoundarySource {
            name: name.into(),
            file: "(given in memory)".into(),
        });
        self
    }
}

/// SHA-256 of each file once (a file named twice is hashed once).
/// `while_what` ends the advice when a file has gone ("keep the input
/// files in place …").
pub fn digests(files: &[PathBuf], while_what: &str) -> Result<Vec<FileDigest>, Error> {
    let mut out: Vec<FileDigest> = Vec::new();
    for f in files {
        let name = f.display().to_string();
        if out.iter().any(|d| d.file == name) {
            continue;
        }
        let bytes = std::fs::read(f).map_err(|e| {
            Error::refused(
                crate::Refusal::InputGone,
                name.clone(),
                format!("could not be read again for its checksum: {e}"),
                format!("keep the input files in place {while_what}"),
            )
        })?;
        out.push(FileDigest {
            file: name,
            sha256: sha2::Sha256::digest(&bytes)
                .iter()
                .map(|b| format!("{b:02x}"))
                .collect(),
        });
    }
    Ok(out)
}

/// The boundaries of a data set as the window builder wants them.
pub fn named_shapes(data: &Dataset) -> Vec<NamedShape> {
    data.boundaries
        .iter()
        .map(|b| NamedShape {
            name: b.name.clone(),
            source: b.file.display().to_string(),
            shape: b.shape.clone(),
        })
        .collect()
}

/// What the report says about a data set.
pub fn input_summary(data: &Dataset) -> InputSummary {
    InputSummary {
        points_file: match &data.layer {
            Some(layer) => format!("{} ({layer})", data.points_file.display()),
            None => data.points_file.display().to_string(),
        },
        n: data.points.len(),
        n_read: data.n_read,
        duplicates: data.duplicates,
        duplicates_dropped: data.duplicates_dropped,
        coords: data.system.as_str().to_string(),
        projection: data.projection.as_ref().map(|p| p.describe()),
        unit: data.unit.clone(),
        boundaries: data
            .boundaries
            .iter()
            .map(|b| BoundarySource {
                name: b.name.clone(),
                file: b.file.display().to_string(),
            })
            .collect(),
        warnings: data.warnings.clone(),
    }
}
