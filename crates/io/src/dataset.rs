//! Loading one analysis's inputs together: the points and every boundary,
//! in one planar coordinate system.
//!
//! Lon/lat input is checked for range and projected with one equal-area
//! projection centred on the points; boundaries follow the points' system
//! (a boundary file that declares a different one is an error, not a guess).

use crate::boundary::{RawBoundary, read_boundary};
use crate::coords::{
    Basis, CoordChoice, CoordSystem, MEAN_RADIUS_M, Projection, in_lat_range, in_lon_range,
    plane_distortion, spherical_centre,
};
use crate::error::{InputError, InputErrorKind};
use crate::geopackage::{self, GpkgChoice, is_geopackage};
use crate::points::read_points;
use geo::Intersects;
use geo::{Area, MapCoords, MultiPolygon};
use patternproof_core::Xy;
use patternproof_core::order::{canonical_permutation, permute};
use patternproof_gpkg::SpatialRef;
use std::path::{Path, PathBuf};

/// How to read the inputs.
#[derive(Debug, Clone)]
pub struct LoadOptions {
    /// `--coords`.
    pub coords: CoordChoice,
    /// `--unit`: the unit of projected coordinates.
    pub unit: String,
    /// `--drop-duplicates`: remove exact repeats instead of keeping them.
    pub drop_duplicates: bool,
    /// An attribute to carry along per point (site field).
    pub field: Option<String>,
    /// GeoPackage layers and attribute filter.
    pub gpkg: GpkgChoice,
}

impl Default for LoadOptions {
    fn default() -> Self {
        Self {
            coords: CoordChoice::Auto,
            unit: "m".into(),
            drop_duplicates: false,
            field: None,
            gpkg: GpkgChoice::default(),
        }
    }
}

/// A validated study-area boundary in the planar system.
#[derive(Debug, Clone)]
pub struct Boundary {
    /// Name for the window id.
    pub name: String,
    /// The file it came from.
    pub file: PathBuf,
    /// Polygons in planar coordinates.
    pub shape: MultiPolygon<f64>,
}

/// Points and boundaries ready for analysis.
#[derive(Debug)]
pub struct Dataset {
    /// The point file.
    pub points_file: PathBuf,
    /// Planar coordinates in canonical order (x, then y; see
    /// `patternproof_core::order`), duplicates dropped if asked.
    pub points: Vec<Xy>,
    /// Where each point came from, in the order of `points`.
    pub places: Vec<crate::points::Place>,
    /// Points read from the file.
    pub n_read: usize,
    /// Points that repeat an earlier point exactly.
    pub duplicates: usize,
    /// Whether the duplicates were removed.
    pub duplicates_dropped: bool,
    /// The coordinate system of the input.
    pub system: CoordSystem,
    /// How the points were read and why, in words for the terminal:
    /// "projected coordinates in m (the CSV columns are named x,y)".
    pub reading: String,
    /// The projection applied, for lon/lat input.
    pub projection: Option<Projection>,
    /// Distance unit of `points` (metre for projected lon/lat).
    pub unit: String,
    /// The boundaries, in the order given.
    pub boundaries: Vec<Boundary>,
    /// Things the user should know that did not stop the run.
    pub warnings: Vec<String>,
    /// The carried attribute, per point.
    pub field_values: Option<Vec<String>>,
    /// The GeoPackage layer read and the `--where` filter, as the report
    /// names them beside the file.
    pub layer: Option<String>,
    /// For GeoPackage input: the layer's coordinate-system row.
    pub srs: Option<SpatialRef>,
}

impl Dataset {
    /// Read, check and project the points and boundaries.
    pub fn load(
        points_file: &Path,
        boundary_files: &[PathBuf],
        options: &LoadOptions,
    ) -> Result<Self, InputError> {
        check_unit_name(&options.unit)?;
        let mut warnings = Vec::new();
        let gpkg_points = is_geopackage(points_file);
        let (mut raw, file_unit, srs, layer) = if gpkg_points {
            let g = geopackage::read_points(
                points_file,
                options.coords,
                options.field.as_deref(),
                &options.gpkg,
            )?;
            warnings.extend(g.warnings);
            let layer = match &options.gpkg.filter {
                Some(f) => format!("layer \"{}\", {} = {}", g.layer, f.field, f.value),
                None => format!("layer \"{}\"", g.layer),
            };
            (g.raw, g.unit, g.srs, Some(layer))
        } else {
            if options.gpkg.layer.is_some() {
                return Err(InputError::new(
                    InputErrorKind::Option,
                    points_file,
                    "--layer applies to GeoPackage (.gpkg) input only",
                    "leave it out for CSV and GeoJSON point files",
                ));
            }
            let filter = options.gpkg.filter.as_ref();
            (
                read_points(
                    points_file,
                    options.coords,
                    options.field.as_deref(),
                    filter,
                )?,
                None,
                None,
                filter.map(|f| format!("{} = {}", f.field, f.value)),
            )
        };
        if raw.skipped_empty > 0 {
            warnings.push(format!(
                "{}: {} feature(s) without geometry skipped",
                points_file.display(),
                raw.skipped_empty
            ));
        }
        if let Some((place, text)) = &raw.decimal_comma {
            warnings.push(decimal_comma_note(points_file, place, text));
        }
        let n_read = raw.coords.len();
        if n_read == 0 {
            return Err(InputError::new(
                InputErrorKind::Empty,
                points_file,
                "the file holds no points",
                "add at least two points (the nearest-neighbour test needs pairs)",
            ));
        }
        crate::magnitude::check_points(
            points_file,
            &raw.coords,
            &raw.places,
            raw.system == CoordSystem::Projected,
        )?;
        // Which points repeat an earlier one exactly, found before the
        // coordinates move on: one flag per point, no copy of the points.
        let repeats = repeated_points(&raw.coords);
        let duplicates = repeats.iter().filter(|&&r| r).count();
        let (points, projection, unit) = match raw.system {
            CoordSystem::Projected => {
                let unit = match (&file_unit, options.coords) {
                    (Some(u), CoordChoice::Auto) => {
                        if options.unit != "m" && &options.unit != u {
                            warnings.push(format!(
                                "--unit {} ignored: the GeoPackage's coordinate system says {u} (pass --coords projected to force --unit)",
                                options.unit
                            ));
                        }
                        u.clone()
                    }
                    _ => options.unit.clone(),
                };
                (std::mem::take(&mut raw.coords), None, unit)
            }
            CoordSystem::LonLat => {
                for (c, place) in raw.coords.iter().zip(&raw.places) {
                    if !in_lon_range(c[0]) || !in_lat_range(c[1]) {
                        return Err(InputError::new(
                            InputErrorKind::BadCoordinate,
                            points_file,
                            format!("({}, {}) is outside the lon/lat range (lon −180..180, lat −90..90)", c[0], c[1]),
                            "if these are planar coordinates (metres on a local grid, UTM…), pass --coords projected",
                        )
                        .at(place.to_string()));
                    }
                }
                let projection = equal_area_plane(points_file, &raw.coords, &mut warnings)?;
                let mut planar = Vec::with_capacity(n_read);
                for (c, place) in raw.coords.iter().zip(&raw.places) {
                    planar.push(projection.forward(c[0], c[1]).ok_or_else(|| {
                        InputError::new(InputErrorKind::Projection, points_file, format!("cannot project ({}, {})", c[0], c[1]), "check the coordinate; points near the antipode of the data centre cannot be projected").at(place.to_string())
                    })?);
                }
                if options.unit != "m" {
                    warnings.push(format!(
                        "--unit {} ignored: lon/lat input is projected to metres",
                        options.unit
                    ));
                }
                warnings.extend(whole_degrees_far_apart(points_file, &raw.coords, &planar));
                (planar, Some(projection), "m".to_string())
            }
        };

        if duplicates > 0 {
            warnings.push(if options.drop_duplicates {
                format!("{duplicates} duplicate point(s) removed (--drop-duplicates)")
            } else {
                format!("{duplicates} point(s) repeat an earlier point exactly; kept at nearest-neighbour distance 0, which pulls R down (use --drop-duplicates to remove them)")
            });
        }
        let (points, places, field_values) = if options.drop_duplicates && duplicates > 0 {
            let kept = |i: &usize| !repeats[*i];
            (
                (0..n_read).filter(kept).map(|i| points[i]).collect(),
                (0..n_read).filter(kept).map(|i| raw.places[i]).collect(),
                raw.field_values
                    .map(|v| (0..n_read).filter(kept).map(|i| v[i].clone()).collect()),
            )
        } else {
            (points, raw.places, raw.field_values)
        };
        // One order that depends on the coordinates alone, so that every
        // sum downstream gives the same bits for any order of the rows.
        let (points, places, field_values) = match canonical_permutation(&points) {
            None => (points, places, field_values),
            Some(order) => (
                permute(&points, &order),
                permute(&places, &order),
                field_values.map(|v| permute(&v, &order)),
            ),
        };
        if points.len() < 2 {
            return Err(InputError::new(
                InputErrorKind::TooFewPoints,
                points_file,
                format!("only {} distinct point(s) to analyse", points.len()),
                "the nearest-neighbour test needs at least two points",
            ));
        }
        if raw.system == CoordSystem::Projected && file_unit.is_none() && unit == "m" {
            check_not_degrees(points_file, &raw.basis, &points)?;
        }
        let reading = match &projection {
            None => format!("projected coordinates in {unit} ({})", raw.basis.why),
            Some(p) => format!(
                "lon/lat degrees on WGS84 ({}), measured on the equal-area plane centred at lat {}, lon {}",
                raw.basis.why, p.lat0, p.lon0
            ),
        };

        let mut boundaries = Vec::new();
        if options.gpkg.boundary_layer.is_some() && !boundary_files.iter().any(|f| is_geopackage(f))
        {
            return Err(InputError::new(
                InputErrorKind::Option,
                points_file,
                "--boundary-layer was given but no --boundary file is a GeoPackage",
                "give the boundary as --boundary FILE.gpkg --boundary-layer NAME, or leave --boundary-layer out",
            ));
        }
        for file in boundary_files {
            let raw_b = if is_geopackage(file) {
                let g = geopackage::read_boundary(
                    file,
                    options.gpkg.boundary_layer.as_deref(),
                    options.coords,
                )?;
                if let (Some(a), Some(b), CoordSystem::Projected, CoordChoice::Auto) =
                    (&srs, &g.srs, raw.system, options.coords)
                    && !geopackage::same_system(a, b)
                {
                    return Err(InputError::new(
                        InputErrorKind::CoordSystem,
                        file,
                        format!(
                            "layer `{}` is in {} but the points are in {}",
                            g.layer,
                            b.label(),
                            a.label()
                        ),
                        "reproject the boundary to the points' coordinate system in a GIS and export it again",
                    ));
                }
                g.raw
            } else {
                read_boundary(file)?
            };
            let b = planar_boundary(
                file,
                raw_b,
                raw.system,
                options.coords,
                projection.as_ref(),
                &mut warnings,
            )?;
            // A boundary that covers none of the points is almost always
            // the wrong file or the wrong coordinate system.
            if !points
                .iter()
                .any(|p| b.shape.intersects(&geo::Point::new(p[0], p[1])))
            {
                return Err(InputError::new(
                    InputErrorKind::NoOverlap,
                    file,
                    format!("the boundary covers none of the {} points", points.len()),
                    "check that the boundary and the points use the same coordinate system and belong to the same site",
                ));
            }
            boundaries.push(b);
        }
        Ok(Self {
            points_file: points_file.to_path_buf(),
            points,
            places,
            n_read,
            duplicates,
            duplicates_dropped: options.drop_duplicates,
            system: raw.system,
            reading,
            projection,
            unit,
            boundaries,
            warnings,
            field_values,
            layer,
            srs,
        })
    }
}

impl Dataset {
    /// Bring a boundary read separately (e.g. one site's part of a shared
    /// site-boundaries file) into this data set's planar coordinates, with
    /// the same checks as `--boundary` files.
    pub fn planar(
        &mut self,
        file: &Path,
        raw: crate::boundary::RawBoundary,
        choice: CoordChoice,
    ) -> Result<Boundary, InputError> {
        planar_boundary(
            file,
            raw,
            self.system,
            choice,
            self.projection.as_ref(),
            &mut self.warnings,
        )
    }
}

/// `--unit` is printed beside every distance, in the terminal, Markdown,
/// CSV and SVG: it must be visible text on one line.
fn check_unit_name(unit: &str) -> Result<(), InputError> {
    if unit.trim().is_empty() || unit.chars().any(char::is_control) || unit.chars().count() > 40 {
        return Err(InputError::new(
            InputErrorKind::Option,
            Path::new("--unit"),
            format!(
                "`{}` is not a unit name (it is printed beside every distance and area)",
                unit.escape_debug()
            ),
            "give the unit as a short word on one line, e.g. --unit m, --unit ft or --unit km",
        ));
    }
    Ok(())
}

/// The reading of decimal commas, in words: which value first, what it was
/// read as, and (when three digits follow the comma, as in `512,045`) that
/// the comma might instead group thousands.
fn decimal_comma_note(file: &Path, place: &crate::points::Place, text: &str) -> String {
    let read_as = text.replace(',', ".");
    let digits_after = text
        .rsplit(',')
        .next()
        .map_or(0, |d| d.chars().take_while(char::is_ascii_digit).count());
    let thousands = if digits_after == 3 {
        format!(
            "; if the comma groups thousands ({} rather than {read_as}), remove the grouping and run again",
            text.replace(',', "")
        )
    } else {
        String::new()
    };
    format!(
        "{}: decimal commas read as decimal points ({place}: '{text}' read as {read_as}){thousands}",
        file.display()
    )
}

/// For each point, whether an earlier point has exactly the same
/// coordinates (+0.0 and −0.0 count as the same place).
///
/// An open-addressing table of point indices (4 bytes a slot, at most two
/// thirds full) instead of a map from coordinate pairs: ten million points
/// cost 64 MiB here rather than about 600 MiB, and the answer is the same.
fn repeated_points(coords: &[[f64; 2]]) -> Vec<bool> {
    let key = |c: &[f64; 2]| ((c[0] + 0.0).to_bits(), (c[1] + 0.0).to_bits());
    let n = coords.len();
    let mut repeats = vec![false; n];
    if n > u32::MAX as usize - 1 {
        // Beyond 32-bit indices: a plain map (never reached in practice).
        let mut seen = std::collections::HashSet::with_capacity(n);
        for (i, c) in coords.iter().enumerate() {
            repeats[i] = !seen.insert(key(c));
        }
        return repeats;
    }
    let slots = (n + n / 2).next_power_of_two().max(16);
    let mask = slots - 1;
    // u32::MAX marks an empty slot.
    let mut table = vec![u32::MAX; slots];
    for (i, c) in coords.iter().enumerate() {
        let (kx, ky) = key(c);
        // splitmix64 finaliser over both words: any fixed mix will do, the
        // table only has to spread the keys.
        let mut h = kx ^ ky.rotate_left(29) ^ 0x9E37_79B9_7F4A_7C15;
        h = (h ^ (h >> 30)).wrapping_mul(0xBF58_476D_1CE4_E5B9);
        h = (h ^ (h >> 27)).wrapping_mul(0x94D0_49BB_1331_11EB);
        h ^= h >> 31;
        let mut at = (h as usize) & mask;
        loop {
            let j = table[at];
            if j == u32::MAX {
                table[at] = i as u32;
                break;
            }
            if key(&coords[j as usize]) == (kx, ky) {
                repeats[i] = true;
                break;
            }
            at = (at + 1) & mask;
        }
    }
    repeats
}

/// The equal-area plane for lon/lat points: centred on their spherical
/// mean direction, refused when they spread over more than a hemisphere
/// around it, with a warning when distances at the edge are distorted by
/// more than 1 % or the pattern is implausibly wide for one study area.
fn equal_area_plane(
    file: &Path,
    coords: &[[f64; 2]],
    warnings: &mut Vec<String>,
) -> Result<Projection, InputError> {
    let split = "analyse each region on its own (split the file), or project the points to a planar system that suits them and pass --coords projected";
    let Some(centre) = spherical_centre(coords) else {
        return Err(InputError::new(
            InputErrorKind::Projection,
            file,
            "the points are spread evenly around the globe, so no single equal-area plane can be centred on them",
            split,
        ));
    };
    let km = |deg: f64| (deg.to_radians() * MEAN_RADIUS_M / 1000.0).round();
    let stretch = plane_distortion(centre.reach);
    let at = format!(
        "{:.1}° ({} km) from their centre at lat {}, lon {}",
        centre.reach,
        km(centre.reach),
        centre.lat,
        centre.lon
    );
    if centre.reach > 90.0 {
        return Err(InputError::new(
            InputErrorKind::Projection,
            file,
            format!(
                "the points spread over more than a hemisphere: one lies {at}, where the equal-area plane would distort distances by {:.0} %",
                100.0 * stretch
            ),
            split,
        ));
    }
    if centre.reach > 45.0 {
        warnings.push(format!(
            "{}: read as lon/lat, the points lie up to {at}: a pattern a quarter of the globe across is implausible for one study area; check that the coordinates are lon/lat degrees (if they are planar, pass --coords projected)",
            file.display()
        ));
    }
    if stretch > 0.01 {
        warnings.push(format!(
            "{}: the points lie up to {at}; there the equal-area plane distorts distances by up to {:.1} % (areas stay exact), so nearest-neighbour distances near the edge of the pattern are off by as much",
            file.display(),
            100.0 * stretch
        ));
    }
    Projection::centred_at(centre.lon, centre.lat).ok_or_else(|| {
        InputError::new(
            InputErrorKind::Projection,
            file,
            "cannot set up the equal-area projection for these points",
            "check that the coordinates are lon/lat in degrees",
        )
    })
}

/// Lon/lat points whose every coordinate is a whole number and whose
/// neighbours lie more than 100 km apart on average: the mark of a planar
/// grid (metres, or plot numbers) read as degrees. A warning, not a stop:
/// a coarse global grid is possible, but rarely a point pattern.
fn whole_degrees_far_apart(
    file: &Path,
    lonlat: &[[f64; 2]],
    planar: &[[f64; 2]],
) -> Option<String> {
    let whole = |v: f64| v.fract() == 0.0;
    if !lonlat.iter().all(|c| whole(c[0]) && whole(c[1])) {
        return None;
    }
    let mean = patternproof_core::nearest::nearest_distances(planar)
        .and_then(|d| patternproof_core::nearest::mean(&d))?;
    (mean > 100_000.0).then(|| {
        format!(
            "{}: every coordinate is a whole number and, read as lon/lat degrees, neighbouring points lie {:.0} km apart on average: if these are planar coordinates (a local grid), pass --coords projected",
            file.display(),
            mean / 1000.0
        )
    })
}

/// Stop when numbers read as metres only because of their column names
/// (or a default) look like degrees: every x within −180..180 and every
/// y within −90..90. Such a pattern, read as metres, spans at most a few
/// hundred metres, and is far more often lon/lat with columns named x,y.
/// `--coords` or a unit other than the default `m` says what they are.
fn check_not_degrees(file: &Path, basis: &Basis, points: &[[f64; 2]]) -> Result<(), InputError> {
    if basis.stated
        || !points
            .iter()
            .all(|p| in_lon_range(p[0]) && in_lat_range(p[1]))
    {
        return Ok(());
    }
    let (mut lo, mut hi) = ([f64::MAX; 2], [f64::MIN; 2]);
    for p in points {
        for k in 0..2 {
            lo[k] = lo[k].min(p[k]);
            hi[k] = hi[k].max(p[k]);
        }
    }
    Err(InputError::new(
        InputErrorKind::CoordSystem,
        file,
        format!(
            "the coordinates are read as projected metres because {}, but every x lies within −180..180 and every y within −90..90 (x {}..{}, y {}..{}), as longitude and latitude do",
            basis.why, lo[0], hi[0], lo[1], hi[1]
        ),
        "say which they are: --coords lonlat if they are longitude/latitude in degrees, --coords projected if they are planar metres (or --unit U for another unit)",
    ))
}

/// The shape without `EMPTY` members (WKT `MULTIPOLYGON (EMPTY, ...)`, a
/// hole written `EMPTY`, GeoJSON's empty coordinate arrays): they cover
/// nothing, so leaving them out reads the file exactly, and nothing
/// downstream has to expect a ring without vertices.
fn without_empty_parts(shape: MultiPolygon<f64>) -> MultiPolygon<f64> {
    MultiPolygon(
        shape
            .0
            .into_iter()
            .filter(|p| !p.exterior().0.is_empty())
            .map(|p| {
                let (shell, holes) = p.into_inner();
                let holes = holes.into_iter().filter(|h| !h.0.is_empty()).collect();
                geo::Polygon::new(shell, holes)
            })
            .collect(),
    )
}

fn planar_boundary(
    file: &Path,
    raw: RawBoundary,
    system: CoordSystem,
    choice: CoordChoice,
    projection: Option<&Projection>,
    warnings: &mut Vec<String>,
) -> Result<Boundary, InputError> {
    match (raw.declared, system) {
        (Some(CoordSystem::Projected), CoordSystem::LonLat) => {
            return Err(InputError::new(InputErrorKind::CoordSystem, file, "the boundary declares projected coordinates but the points are lon/lat", "give the boundary in the same coordinates as the points"));
        }
        (Some(CoordSystem::LonLat), CoordSystem::Projected) if choice == CoordChoice::Auto && raw.stated => {
            return Err(InputError::new(InputErrorKind::CoordSystem, file, "the boundary declares lon/lat coordinates but the points are projected", "give the boundary in the same coordinates as the points (reproject it in a GIS), or say how to read both with --coords"));
        }
        (Some(CoordSystem::LonLat), CoordSystem::Projected) if choice == CoordChoice::Auto => warnings.push(format!(
            "{}: GeoJSON without a 'crs' member is lon/lat by RFC 7946, but the points are projected; the boundary is read in the points' planar coordinates",
            file.display()
        )),
        _ => {}
    }
    crate::magnitude::check_boundary(file, &raw.shape, projection.is_none())?;
    let shape = match projection {
        None => without_empty_parts(raw.shape),
        Some(proj) => {
            let bad = std::cell::Cell::new(None);
            let bad_ref = &bad;
            let mapped = raw.shape.map_coords(|c| {
                if !in_lon_range(c.x) || !in_lat_range(c.y) {
                    if bad_ref.get().is_none() {
                        bad_ref.set(Some((c.x, c.y)));
                    }
                    return c;
                }
                match proj.forward(c.x, c.y) {
                    Some([x, y]) => geo::coord! { x: x, y: y },
                    None => {
                        if bad_ref.get().is_none() {
                            bad_ref.set(Some((c.x, c.y)));
                        }
                        c
                    }
                }
            });
            if let Some((x, y)) = bad.get() {
                return Err(InputError::new(
                    InputErrorKind::Projection,
                    file,
                    format!("vertex ({x}, {y}) is not a projectable lon/lat"),
                    "give the boundary in lon/lat degrees like the points",
                ));
            }
            without_empty_parts(mapped)
        }
    };
    if let Err(problem) = crate::validity::check(&shape) {
        return Err(InputError::new(
            InputErrorKind::BadGeometry,
            file,
            format!("the boundary is not a valid polygon: {problem}"),
            "repair it in a GIS (close rings, remove self-intersections, keep holes inside their shell) and try again",
        ));
    }
    if !(shape.unsigned_area() > 0.0) {
        return Err(InputError::new(
            InputErrorKind::BadGeometry,
            file,
            "the boundary has zero area",
            "give a polygon that encloses the study area",
        ));
    }
    Ok(Boundary {
        name: raw.name,
        file: file.to_path_buf(),
        shape,
    })
}

#[cfg(test)]
mod repeat_tests {
    use super::repeated_points;

    /// Against the plain definition (a set of the coordinate pairs seen so
    /// far), on 20 000 points drawn from a small lattice so that most repeat,
    /// with +0.0 and −0.0 as one place.
    #[test]
    fn repeats_match_a_set_of_seen_pairs() {
        let mut s: u64 = 7;
        let mut coords = Vec::new();
        for _ in 0..20_000 {
            s = s
                .wrapping_mul(6364136223846793005)
                .wrapping_add(1442695040888963407);
            let (a, b) = ((s >> 40) % 150, (s >> 20) % 90);
            coords.push([a as f64 * 0.5 - 10.0, b as f64 - 45.0]);
        }
        coords.push([0.0, 1.0]);
        coords.push([-0.0, 1.0]);
        let got = repeated_points(&coords);
        let mut seen = std::collections::HashSet::new();
        let want: Vec<bool> = coords
            .iter()
            .map(|c| !seen.insert(((c[0] + 0.0).to_bits(), (c[1] + 0.0).to_bits())))
            .collect();
        assert_eq!(got, want);
        assert!(got[20_001]);
        assert_eq!(got.iter().filter(|&&r| r).count(), 20_002 - seen.len());
        assert!(seen.len() < 13_600);
        assert_eq!(repeated_points(&[]), Vec::<bool>::new());
    }
}

#[cfg(test)]
#[allow(clippy::unwrap_used)] // a failed unwrap is a failed test
mod reading_tests {
    use super::*;
    use crate::test_files::file;
    use approx::abs_diff_eq;

    fn load(
        f: &tempfile::NamedTempFile,
        coords: CoordChoice,
        unit: &str,
    ) -> Result<Dataset, InputError> {
        Dataset::load(
            f.path(),
            &[],
            &LoadOptions {
                coords,
                unit: unit.into(),
                ..LoadOptions::default()
            },
        )
    }

    /// Issue 20, item 2: numbers read as metres only because of their
    /// column names stop when every x fits −180..180 and every y −90..90;
    /// `--coords`, a unit other than the default, or a file that states
    /// its system answers the question. Values by construction.
    #[test]
    fn degree_like_numbers_under_planar_names_ask_how_to_read_them() {
        let small = file(".csv", "x,y\n12.5,45.1\n12.6,45.2\n12.7,45.0\n");
        let e = load(&small, CoordChoice::Auto, "m").unwrap_err();
        assert_eq!(e.kind, InputErrorKind::CoordSystem, "{e}");
        assert!(
            e.what.contains("because the CSV columns are named x,y"),
            "{}",
            e.what
        );
        assert!(e.what.contains("(x 12.5..12.7, y 45..45.2)"), "{}", e.what);
        assert!(e.hint.contains("--coords lonlat") && e.hint.contains("--coords projected"));
        let d = load(&small, CoordChoice::Projected, "m").unwrap();
        assert_eq!(
            d.reading,
            "projected coordinates in m (--coords projected was given)"
        );
        let d = load(&small, CoordChoice::Auto, "ft").unwrap();
        assert_eq!(
            d.reading,
            "projected coordinates in ft (the CSV columns are named x,y)"
        );
        let d = load(&small, CoordChoice::LonLat, "m").unwrap();
        assert_eq!(d.system, CoordSystem::LonLat);
        let en = file(".csv", "easting;northing\n1;2\n3;4\n");
        let e = load(&en, CoordChoice::Auto, "m").unwrap_err();
        assert_eq!(e.kind, InputErrorKind::CoordSystem, "{e}");
        assert!(e.what.contains("named easting,northing"), "{e}");
        // One number out of range is enough to read them as planar.
        let far = file(".csv", "x,y\n12.5,45.1\n12.6,95.2\n");
        assert!(load(&far, CoordChoice::Auto, "m").is_ok());
        // A GeoJSON crs member that names a planar system states it.
        let stated = file(
            ".geojson",
            r#"{"type":"FeatureCollection","crs":{"type":"name","properties":{"name":"local survey grid, metres"}},"features":[
              {"type":"Feature","properties":{},"geometry":{"type":"Point","coordinates":[1,2]}},
              {"type":"Feature","properties":{},"geometry":{"type":"Point","coordinates":[3,5]}}]}"#,
        );
        let d = load(&stated, CoordChoice::Auto, "m").unwrap();
        assert_eq!(
            d.reading,
            "projected coordinates in m (the GeoJSON crs member names `local survey grid, metres`)"
        );
    }

    /// A unit that is empty, spans lines or runs on is refused before the
    /// file is read.
    #[test]
    fn unit_names_are_one_short_visible_word() {
        let f = file(
            ".csv",
            "x,y\n512000,5600000\n512010,5600003\n512004,5600009\n",
        );
        for bad in ["", "  ", "m\nfake", &"u".repeat(41)] {
            let e = load(&f, CoordChoice::Auto, bad).unwrap_err();
            assert_eq!(e.kind, InputErrorKind::Option, "{e}");
            assert_eq!(e.file, Path::new("--unit"));
            assert!(e.what.contains("is not a unit name"), "{}", e.what);
        }
        assert_eq!(load(&f, CoordChoice::Auto, "ft").unwrap().unit, "ft");
    }

    /// Decimal commas are read, and the reading says so with the first
    /// value; three digits after the comma also name the thousands reading.
    #[test]
    fn decimal_commas_are_read_and_said() {
        let f = file(".csv", "x;y\n10;20\n1,5;2,5\n512,045;7\n");
        let d = load(&f, CoordChoice::Projected, "m").unwrap();
        assert_eq!(
            d.warnings
                .iter()
                .filter(|w| w.contains("decimal commas"))
                .count(),
            1
        );
        assert!(
            d.warnings.iter().any(|w| w
                .ends_with("decimal commas read as decimal points (line 3: '1,5' read as 1.5)")),
            "{:?}",
            d.warnings
        );
        let f = file(".csv", "x;y\n512,045;20\n3;4\n5;9\n");
        let d = load(&f, CoordChoice::Projected, "m").unwrap();
        assert!(
            d.warnings.iter().any(|w| w.contains(
                "(line 2: '512,045' read as 512.045); if the comma groups thousands (512045 rather than 512.045)"
            )),
            "{:?}",
            d.warnings
        );
        let plain = file(".csv", "x;y\n1.5;2\n3;4\n5;9\n");
        assert!(
            load(&plain, CoordChoice::Projected, "m")
                .unwrap()
                .warnings
                .is_empty()
        );
    }

    /// A boundary that states lon/lat beside projected points is refused;
    /// GeoJSON that is lon/lat only by the RFC 7946 default is read in the
    /// points' plane with a warning (most local-grid exports carry no crs).
    #[test]
    fn stated_lonlat_boundaries_do_not_meet_projected_points() {
        let pts = file(
            ".csv",
            "x,y\n512000,5600000\n512010,5600000\n512000,5600010\n",
        );
        let ring = "[[511990,5599990],[512020,5599990],[512020,5600020],[511990,5600020],[511990,5599990]]";
        let stated = file(
            ".geojson",
            &format!(
                r#"{{"type":"Polygon","crs":{{"type":"name","properties":{{"name":"EPSG:4326"}}}},"coordinates":[{ring}]}}"#
            ),
        );
        let by_default = file(
            ".geojson",
            &format!(r#"{{"type":"Polygon","coordinates":[{ring}]}}"#),
        );
        let load = |b: &tempfile::NamedTempFile| {
            Dataset::load(
                pts.path(),
                &[b.path().to_path_buf()],
                &LoadOptions::default(),
            )
        };
        let e = load(&stated).unwrap_err();
        assert_eq!(e.kind, InputErrorKind::CoordSystem, "{e}");
        assert!(
            e.what
                .contains("declares lon/lat coordinates but the points are projected"),
            "{e}"
        );
        let d = load(&by_default).unwrap();
        assert!(
            d.warnings.iter().any(|w| w.contains("RFC 7946")),
            "{:?}",
            d.warnings
        );
    }

    /// Issue 20, items 1 and 3: lon/lat across ±180° is centred there and
    /// says so; whole-number "degrees" hundreds of km apart get a warning;
    /// points beyond a hemisphere from their centre are refused.
    #[test]
    fn lonlat_readings_are_centred_and_checked() {
        let across = file(
            ".csv",
            "lon,lat\n179.95,-16.0\n-179.95,-16.0\n179.99,-16.05\n",
        );
        let d = load(&across, CoordChoice::Auto, "m").unwrap();
        let p = d.projection.as_ref().unwrap();
        assert!(
            p.lon0.abs() > 179.9 && abs_diff_eq!(p.lat0, -16.0, epsilon = 0.05),
            "{p:?}"
        );
        assert!(
            d.reading.starts_with("lon/lat degrees on WGS84 (the CSV columns are named lon,lat), measured on the equal-area plane centred at lat -16.0"),
            "{}",
            d.reading
        );
        // 0.1° of longitude at 16° S is about 10.7 km: the two points on
        // either side of ±180° are neighbours, not a globe apart.
        // (The points are in canonical order; their places find lines 2, 3.)
        let at = |line: u64| {
            let k = d
                .places
                .iter()
                .position(|p| *p == crate::points::Place::Line(line))
                .unwrap();
            d.points[k]
        };
        let (a, b) = (at(2), at(3));
        let gap = (a[0] - b[0]).hypot(a[1] - b[1]);
        assert!(abs_diff_eq!(gap, 10_700.0, epsilon = 100.0), "{gap}");
        assert!(d.warnings.is_empty(), "{:?}", d.warnings);

        let grid = file(
            ".geojson",
            r#"{"type":"FeatureCollection","features":[
              {"type":"Feature","properties":{},"geometry":{"type":"Point","coordinates":[1,1]}},
              {"type":"Feature","properties":{},"geometry":{"type":"Point","coordinates":[4,2]}},
              {"type":"Feature","properties":{},"geometry":{"type":"Point","coordinates":[2,7]}}]}"#,
        );
        let d = load(&grid, CoordChoice::Auto, "m").unwrap();
        assert!(
            d.reading
                .contains("(GeoJSON without a crs member is lon/lat by RFC 7946)")
        );
        assert!(
            d.warnings
                .iter()
                .any(|w| w.contains("every coordinate is a whole number")),
            "{:?}",
            d.warnings
        );

        let globe = file(".csv", "lon,lat\n0,0\n120,0\n-120,0\n0,60\n");
        let e = load(&globe, CoordChoice::Auto, "m").unwrap_err();
        assert_eq!(e.kind, InputErrorKind::Projection, "{e}");
        assert!(e.what.contains("more than a hemisphere"), "{}", e.what);
        let even = file(".csv", "lon,lat\n0,0\n180,0\n");
        let e = load(&even, CoordChoice::Auto, "m").unwrap_err();
        assert_eq!(e.kind, InputErrorKind::Projection, "{e}");
        assert!(
            e.what.contains("spread evenly around the globe"),
            "{}",
            e.what
        );
    }
}
