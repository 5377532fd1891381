//! The input error: every problem with a user's file says which file,
//! where in it, what is wrong, and what to do about it; its kind says
//! which sort of problem it is, for callers (and tests) that act on it
//! without reading the words.

use std::path::{Path, PathBuf};

/// Which sort of problem an [`InputError`] is. Every kind is a problem
/// with the user's input (the CLI exits 2 for all of them); the kinds let
/// a caller tell them apart without matching on the message.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash)]
#[non_exhaustive]
pub enum InputErrorKind {
    /// The file does not exist.
    NotFound,
    /// The file exists but cannot be read: permissions, an I/O failure,
    /// bytes that are not UTF-8 text.
    Unreadable,
    /// The file (or the part of it that was asked for) holds nothing to
    /// analyse: no text, no point, no polygon, no feature layer.
    Empty,
    /// The text is not valid in its format: broken GeoJSON, WKT or CSV
    /// rows, a JSON key written twice, text after a WKT geometry, a file
    /// that is not a GeoPackage or is damaged.
    Malformed,
    /// The header does not say which columns to read: no coordinate
    /// columns, a column name repeated, a requested column missing.
    BadHeader,
    /// Fewer than two distinct points to analyse: the nearest-neighbour
    /// test needs pairs.
    TooFewPoints,
    /// A coordinate that is not a usable number: not a number, not
    /// finite, a decimal comma in a comma-separated file, outside the
    /// lon/lat range.
    BadCoordinate,
    /// Coordinates that floating point cannot measure: beyond
    /// [`crate::magnitude::MAX_COORDINATE`], or spread too little for
    /// their size.
    Magnitude,
    /// A geometry of the wrong type, or one that is not a valid study
    /// area: a polygon in a point file, lines as a boundary, an unclosed
    /// ring, an invalid or zero-area polygon, a feature without geometry.
    BadGeometry,
    /// How to read the coordinates cannot be told, or the files disagree:
    /// projected and lon/lat columns together, degree-like numbers under
    /// planar names, an unknown coordinate system, a boundary in another
    /// system than the points.
    CoordSystem,
    /// Lon/lat that the equal-area projection cannot take: spread over
    /// more than a hemisphere, or a point it cannot map.
    Projection,
    /// A row or feature lacks the value asked for (the site name of
    /// `--field`, the name property of site boundaries).
    MissingValue,
    /// `--where FIELD=VALUE` names no column, or keeps nothing.
    Filter,
    /// Which GeoPackage layer or column to read: none named, several to
    /// choose from, or the named one is missing.
    Layer,
    /// Too large to read: a CSV line beyond [`crate::points::MAX_LINE`]
    /// bytes, a GeoPackage query beyond its step budget.
    TooLarge,
    /// An option that does not fit the input: `--unit` that is not a
    /// unit name, `--layer` on a file that is not a GeoPackage.
    Option,
    /// The boundary covers none of the points.
    NoOverlap,
}

/// A problem with user input. The CLI prints it and exits with code 2.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
#[error("{}: {what}\n  what to do: {hint}", self.place())]
pub struct InputError {
    /// Which sort of problem this is.
    pub kind: InputErrorKind,
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
    /// An error of `kind` about `file` as a whole.
    pub fn new(
        kind: InputErrorKind,
        file: &Path,
        what: impl Into<String>,
        hint: impl Into<String>,
    ) -> Self {
        Self {
            kind,
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

    /// The file and, when known, the place in it: the head of the message.
    fn place(&self) -> String {
        match &self.location {
            Some(loc) => format!("{}, {loc}", self.file.display()),
            None => self.file.display().to_string(),
        }
    }
}

/// An I/O failure on `path`, in the words every reader uses.
pub(crate) fn cannot_read(path: &Path, e: std::io::Error) -> InputError {
    let kind = match e.kind() {
        std::io::ErrorKind::NotFound => InputErrorKind::NotFound,
        _ => InputErrorKind::Unreadable,
    };
    InputError::new(
        kind,
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
            InputErrorKind::Unreadable,
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

#[cfg(test)]
#[allow(clippy::unwrap_used)] // a failed unwrap is a failed test
mod tests {
    use super::InputErrorKind as Kind;
    use crate::test_files::file;
    use crate::{CoordChoice, Dataset, LoadOptions};
    use std::path::{Path, PathBuf};

    fn load(points: &Path, boundaries: &[PathBuf]) -> Result<Dataset, super::InputError> {
        Dataset::load(points, boundaries, &LoadOptions::default())
    }

    /// The kinds that only whole files produce, each from a real file: a
    /// missing path (CSV and GeoPackage alike), a folder, bytes that are
    /// not UTF-8, an empty file, a collection without points, one distinct
    /// point, a boundary away from the points.
    #[test]
    fn whole_file_problems_name_their_kind() {
        let dir = tempfile::tempdir().unwrap();
        for name in ["missing.csv", "missing.gpkg"] {
            let e = load(&dir.path().join(name), &[]).unwrap_err();
            assert_eq!(e.kind, Kind::NotFound, "{e}");
            assert!(e.what.starts_with("cannot read the file ("), "{e}");
        }
        let e = load(dir.path(), &[]).unwrap_err();
        assert_eq!(e.kind, Kind::Unreadable, "{e}");
        let latin1 = dir.path().join("latin1.geojson");
        std::fs::write(&latin1, b"{\"type\":\"Point\",\"name\":\"Wiese S\xfcd\"}").unwrap();
        let e = load(&latin1, &[]).unwrap_err();
        assert_eq!(e.kind, Kind::Unreadable, "{e}");
        assert!(e.what.contains("first bad byte at offset 31"), "{e}");

        let e = load(file(".csv", " \n\n").path(), &[]).unwrap_err();
        assert_eq!(e.kind, Kind::Empty, "{e}");
        let none = file(".geojson", r#"{"type":"FeatureCollection","features":[]}"#);
        let e = load(none.path(), &[]).unwrap_err();
        assert_eq!(
            (e.kind, e.what.as_str()),
            (Kind::Empty, "the file holds no points")
        );

        let twice = file(".csv", "x,y\n5,7\n5,7\n");
        let options = LoadOptions {
            coords: CoordChoice::Projected,
            drop_duplicates: true,
            ..LoadOptions::default()
        };
        let e = Dataset::load(twice.path(), &[], &options).unwrap_err();
        assert_eq!(e.kind, Kind::TooFewPoints, "{e}");
        assert!(e.what.contains("only 1 distinct point(s)"), "{e}");

        let points = file(
            ".csv",
            "x,y\n512000,5600000\n512010,5600004\n512003,5600011\n",
        );
        let away = file(".wkt", "POLYGON ((0 0, 100 0, 100 100, 0 100, 0 0))");
        let e = load(points.path(), &[away.path().to_path_buf()]).unwrap_err();
        assert_eq!(e.kind, Kind::NoOverlap, "{e}");
        assert!(e.what.contains("covers none of the 3 points"), "{e}");
    }
}
