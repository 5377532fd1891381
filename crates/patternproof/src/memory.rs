//! Points and boundaries handed over in memory (a notebook's array, a
//! shapely polygon) rather than read from a file.
//!
//! Nothing is guessed: the caller says whether the numbers are projected
//! or lon/lat. Lon/lat points are put on the same equal-area plane the
//! file readers use ([`patternproof_io::coords::spherical_centre`] and
//! [`Projection::centred_at`]), boundaries go through the readers' own
//! [`Dataset::planar`] (projection, size and validity checks), and the
//! points take the same canonical order, so a run on memory gives the
//! same figures as a run on a file holding the same points.

use crate::error::{Error, Refusal};

use geo::{Intersects, MultiPolygon};
use patternproof_core::Xy;
use patternproof_core::order::{canonical_permutation, permute};
use patternproof_io::boundary::{RawBoundary, read_boundary};
use patternproof_io::coords::{in_lat_range, in_lon_range, spherical_centre};
use patternproof_io::geopackage::is_geopackage;
use patternproof_io::magnitude::{MAX_COORDINATE, MIN_SPREAD, MIN_STEPS};
use patternproof_io::{CoordChoice, CoordSystem, Dataset, Projection};
use std::path::{Path, PathBuf};

/// The name that stands for the points file of points given in memory.
pub const POINTS_IN_MEMORY: &str = "(points given in memory)";

/// The name that stands for the file of a boundary given in memory.
pub const BOUNDARY_IN_MEMORY: &str = "(boundary given in memory)";

/// A data set of points held in memory, read as `coords` says
/// ([`CoordChoice::Auto`] is refused: numbers alone do not say what they
/// are). Projected points are in `unit`; lon/lat points are projected to
/// metres on the equal-area plane centred on them.
pub fn points_in_memory(
    coords: Vec<Xy>,
    choice: CoordChoice,
    unit: &str,
) -> Result<Dataset, Error> {
    let subject = POINTS_IN_MEMORY;
    let system = match choice {
        CoordChoice::Projected => CoordSystem::Projected,
        CoordChoice::LonLat => CoordSystem::LonLat,
        CoordChoice::Auto => {
            return Err(Error::refused(
                Refusal::Setting,
                subject,
                "numbers in memory do not say whether they are planar coordinates or lon/lat degrees",
                "say which with coords=\"projected\" (with unit=...) or coords=\"lonlat\"",
            ));
        }
    };
    if unit.trim().is_empty() || unit.chars().any(char::is_control) || unit.chars().count() > 40 {
        return Err(Error::refused(
            Refusal::Setting,
            "unit",
            format!(
                "`{}` is not a unit name (it is printed beside every distance and area)",
                unit.escape_debug()
            ),
            "give the unit as a short word on one line, e.g. \"m\", \"ft\" or \"km\"",
        ));
    }
    for (i, c) in coords.iter().enumerate() {
        if !(c[0].is_finite() && c[1].is_finite()) {
            return Err(Error::refused(
                Refusal::Setting,
                format!("{subject}, row {i}"),
                format!("({}, {}) is not a pair of finite numbers", c[0], c[1]),
                "remove or fill the missing coordinates",
            ));
        }
        if system == CoordSystem::LonLat && !(in_lon_range(c[0]) && in_lat_range(c[1])) {
            return Err(Error::refused(
                Refusal::Setting,
                format!("{subject}, row {i}"),
                format!(
                    "({}, {}) is outside the lon/lat range (lon −180..180, lat −90..90)",
                    c[0], c[1]
                ),
                "if these are planar coordinates, pass coords=\"projected\"",
            ));
        }
    }
    if system == CoordSystem::Projected {
        check_magnitude(&coords)?;
    }
    let n_read = coords.len();
    let distinct_points = distinct(&coords);
    if distinct_points < 2 {
        return Err(Error::refused(
            Refusal::TooFewPoints,
            subject,
            format!("only {distinct_points} distinct point(s) to analyse"),
            "the nearest-neighbour test needs at least two points",
        ));
    }
    let (points, projection, unit, reading) = match system {
        CoordSystem::Projected => (
            coords,
            None,
            unit.to_string(),
            format!("projected coordinates in {unit} (coords=\"projected\")"),
        ),
        CoordSystem::LonLat => {
            let projection = lonlat_plane(&coords)?;
            let mut planar = Vec::with_capacity(coords.len());
            for (i, c) in coords.iter().enumerate() {
                planar.push(projection.forward(c[0], c[1]).ok_or_else(|| {
                    Error::refused(
                        Refusal::Setting,
                        format!("{subject}, row {i}"),
                        format!("cannot project ({}, {})", c[0], c[1]),
                        "check the coordinate; points near the antipode of the data centre cannot be projected",
                    )
                })?);
            }
            let reading = format!(
                "lon/lat degrees on WGS84 (coords=\"lonlat\"), measured on the equal-area plane centred at lat {}, lon {}",
                projection.lat0, projection.lon0
            );
            (planar, Some(projection), "m".to_string(), reading)
        }
    };
    let duplicates = n_read - distinct_points;
    let points = match canonical_permutation(&points) {
        Some(order) => permute(&points, &order),
        None => points,
    };
    let mut warnings = Vec::new();
    if duplicates > 0 {
        warnings.push(format!(
            "{duplicates} point(s) repeat an earlier point exactly; kept at nearest-neighbour distance 0, which pulls R down"
        ));
    }
    Ok(Dataset {
        points_file: PathBuf::from(subject),
        points,
        places: Vec::new(),
        n_read,
        duplicates,
        duplicates_dropped: false,
        system,
        reading,
        projection,
        unit,
        boundaries: Vec::new(),
        warnings,
        field_values: None,
        layer: None,
        srs: None,
    })
}

/// Refuse planar coordinates that floating point cannot measure, by the
/// limits the file readers apply ([`patternproof_io::magnitude`]): beyond
/// ±[`MAX_COORDINATE`], spread over less than [`MIN_SPREAD`], or with
/// fewer than [`MIN_STEPS`] representable values across the spread.
fn check_magnitude(coords: &[Xy]) -> Result<(), Error> {
    let subject = POINTS_IN_MEMORY;
    if let Some(i) = coords
        .iter()
        .position(|c| !(c[0].abs() <= MAX_COORDINATE && c[1].abs() <= MAX_COORDINATE))
    {
        return Err(Error::refused(
            Refusal::Setting,
            format!("{subject}, row {i}"),
            format!(
                "({:e}, {:e}) lies beyond ±{MAX_COORDINATE:e}, farther out than any map position in any unit; distances and areas this large cannot be computed reliably",
                coords[i][0], coords[i][1]
            ),
            "check the numbers and their unit: give planar coordinates of the study area in m, ft or mm",
        ));
    }
    let (mut lo, mut hi) = ([f64::INFINITY; 2], [f64::NEG_INFINITY; 2]);
    for c in coords {
        for k in 0..2 {
            lo[k] = lo[k].min(c[k]);
            hi[k] = hi[k].max(c[k]);
        }
    }
    let spread = (hi[0] - lo[0]).max(hi[1] - lo[1]);
    if coords.len() < 2 || spread == 0.0 {
        return Ok(());
    }
    if spread < MIN_SPREAD {
        return Err(Error::refused(
            Refusal::Setting,
            subject,
            format!(
                "the points spread over only {spread:e}: below {MIN_SPREAD:e}, areas and intensities leave the range floating point can hold"
            ),
            "express the coordinates in a smaller unit (multiply them) and name it with unit=",
        ));
    }
    let largest = lo.iter().chain(&hi).fold(0.0f64, |m, v| m.max(v.abs()));
    let ulp = f64::from_bits(largest.to_bits() + 1) - largest;
    if spread / ulp < MIN_STEPS {
        return Err(Error::refused(
            Refusal::Setting,
            subject,
            format!(
                "the points spread over only {spread:e} at coordinates as large as {largest:e}: floating point holds just {:.0} distinct values across that spread",
                (spread / ulp).floor()
            ),
            "subtract a local origin (e.g. the smallest x and y) from every coordinate and try again",
        ));
    }
    Ok(())
}

/// The number of distinct points (+0.0 and −0.0 are one place).
fn distinct(points: &[Xy]) -> usize {
    let mut keys: Vec<(u64, u64)> = points
        .iter()
        .map(|c| ((c[0] + 0.0).to_bits(), (c[1] + 0.0).to_bits()))
        .collect();
    keys.sort_unstable();
    keys.dedup();
    keys.len()
}

/// The equal-area plane of lon/lat points, as the file readers choose it:
/// centred at their [`spherical_centre`], refused beyond a hemisphere.
fn lonlat_plane(coords: &[Xy]) -> Result<Projection, Error> {
    let split = "analyse each region on its own, or project the points to a planar system that suits them and pass coords=\"projected\"";
    let Some(centre) = spherical_centre(coords) else {
        return Err(Error::refused(
            Refusal::Setting,
            POINTS_IN_MEMORY,
            "the points are spread evenly around the globe, so no single equal-area plane can be centred on them",
            split,
        ));
    };
    if centre.reach > 90.0 {
        return Err(Error::refused(
            Refusal::Setting,
            POINTS_IN_MEMORY,
            format!(
                "the points spread over more than a hemisphere: one lies {:.1}° from their centre at lat {}, lon {}",
                centre.reach, centre.lat, centre.lon
            ),
            split,
        ));
    }
    Projection::centred_at(centre.lon, centre.lat).ok_or_else(|| {
        Error::refused(
            Refusal::Setting,
            POINTS_IN_MEMORY,
            "cannot set up the equal-area projection for these points",
            "check that the coordinates are lon/lat in degrees",
        )
    })
}

/// Add a boundary given in memory, in the coordinates of `data`'s points
/// (lon/lat when they were lon/lat), with the checks a `--boundary` file
/// gets: projected like the points, a valid polygon, covering some point.
pub fn add_boundary(
    data: &mut Dataset,
    name: &str,
    shape: MultiPolygon<f64>,
    choice: CoordChoice,
) -> Result<(), Error> {
    let name = patternproof_io::points::one_line(name);
    let file = PathBuf::from(format!("(boundary {name} given in memory)"));
    let raw = RawBoundary {
        name,
        shape,
        declared: None,
        stated: false,
    };
    add_raw(data, &file, raw, choice)
}

/// Add a boundary file (GeoJSON, WKT, or a GeoPackage's polygon layer
/// `layer`, which may be left out when it has only one) to points given
/// in memory, read and checked as `--boundary`.
pub fn add_boundary_file(
    data: &mut Dataset,
    file: &Path,
    layer: Option<&str>,
    choice: CoordChoice,
) -> Result<(), Error> {
    let raw = if is_geopackage(file) {
        patternproof_io::geopackage::read_boundary(file, layer, choice)?.raw
    } else {
        read_boundary(file)?
    };
    add_raw(data, file, raw, choice)
}

fn add_raw(
    data: &mut Dataset,
    file: &Path,
    raw: RawBoundary,
    choice: CoordChoice,
) -> Result<(), Error> {
    let b = data.planar(file, raw, choice)?;
    if !data
        .points
        .iter()
        .any(|p| b.shape.intersects(&geo::Point::new(p[0], p[1])))
    {
        return Err(patternproof_io::InputError::new(
            patternproof_io::error::InputErrorKind::NoOverlap,
            file,
            format!("the boundary covers none of the {} points", data.points.len()),
            "check that the boundary and the points use the same coordinate system and belong to the same site",
        )
        .into());
    }
    data.boundaries.push(b);
    Ok(())
}

/// Whether `file` is one of the names standing for data given in memory.
pub fn in_memory(file: &Path) -> bool {
    let name = file.display().to_string();
    name.starts_with('(') && name.ends_with("given in memory)")
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::input::Input;
    use geo::{Rect, coord};

    #[test]
    fn numbers_alone_are_refused() {
        let e = points_in_memory(vec![[0.0, 0.0], [1.0, 1.0]], CoordChoice::Auto, "m")
            .expect_err("auto is refused");
        assert_eq!(e.kind(), crate::ErrorKind::Refused(Refusal::Setting));
        assert!(e.to_string().contains("coords=\"projected\""));
    }

    #[test]
    fn coordinates_floating_point_cannot_measure_are_refused() {
        // The limits of patternproof-io's magnitude module, the same as
        // for a points file.
        let refused = |coords: Vec<Xy>| {
            points_in_memory(coords, CoordChoice::Projected, "m")
                .expect_err("refused")
                .to_string()
        };
        assert!(refused(vec![[0.0, 0.0], [2e13, 1.0]]).contains("row 1"));
        assert!(refused(vec![[0.0, 0.0], [1e-13, 1e-13]]).contains("spread over only 1e-13"));
        assert!(refused(vec![[1e12, 0.0], [1e12 + 0.5, 0.0]]).contains("distinct values"));
        let one = points_in_memory(vec![[3.0, 4.0], [3.0, 4.0]], CoordChoice::Projected, "m")
            .expect_err("one place");
        assert_eq!(one.kind(), crate::ErrorKind::Refused(Refusal::TooFewPoints));
        assert!(one.to_string().contains("only 1 distinct point(s)"));
    }

    #[test]
    fn lonlat_in_memory_lands_where_a_file_does() {
        // The same three points as a lon/lat CSV file: the reader's plane
        // and this one must agree to the bit.
        let dir = tempfile::tempdir().expect("temp dir");
        let file = dir.path().join("p.csv");
        std::fs::write(&file, "lon,lat\n10.0,50.0\n10.01,50.0\n10.0,50.01\n").expect("write");
        let read = crate::load(&file, &[], &patternproof_io::LoadOptions::default()).expect("load");
        let memory = points_in_memory(
            vec![[10.0, 50.0], [10.01, 50.0], [10.0, 50.01]],
            CoordChoice::LonLat,
            "m",
        )
        .expect("memory");
        assert_eq!(memory.points, read.points);
        assert_eq!(
            memory.projection.map(|p| p.describe()),
            read.projection.map(|p| p.describe())
        );
    }

    #[test]
    fn a_boundary_must_cover_a_point() {
        let mut data = points_in_memory(vec![[1.0, 1.0], [2.0, 2.0]], CoordChoice::Projected, "m")
            .expect("points");
        let far = Rect::new(coord! { x: 10.0, y: 10.0 }, coord! { x: 20.0, y: 20.0 });
        let e = add_boundary(
            &mut data,
            "far",
            MultiPolygon(vec![far.to_polygon()]),
            CoordChoice::Projected,
        )
        .expect_err("covers nothing");
        assert!(e.to_string().contains("covers none of the 2 points"), "{e}");
        let near = Rect::new(coord! { x: 0.0, y: 0.0 }, coord! { x: 3.0, y: 3.0 });
        add_boundary(
            &mut data,
            "near",
            MultiPolygon(vec![near.to_polygon()]),
            CoordChoice::Projected,
        )
        .expect("covers both");
        let input = Input::checksummed(&data).expect("input");
        assert!(input.digests.is_empty());
        assert_eq!(
            input.summary.boundaries[0].file,
            "(boundary near given in memory)"
        );
    }
}
