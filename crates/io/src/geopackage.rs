//! GeoPackage input: a point layer for the points, a polygon layer for a
//! boundary, and the coordinate system from the file's own
//! `gpkg_spatial_ref_sys` table.
//!
//! The format itself (blob header, WKB, catalogue queries) lives in
//! `patternproof-gpkg`; this module decides what a layer means for the
//! analysis, in the same terms as the CSV and GeoJSON readers:
//!
//! - which layer: the one named by `--layer` (or `--boundary-layer`); with
//!   no name, the only feature layer of the file, else a stop that lists
//!   every layer with its geometry type and feature count;
//! - which coordinates: a geographic system in degrees (EPSG:4326 and
//!   friends, `srs_id` 0) is lon/lat and goes through the same equal-area
//!   projection as lon/lat CSV; a projected one gives its linear unit
//!   (from the WKT `UNIT`, else the short list of well-known EPSG codes);
//!   `srs_id` −1 (undefined Cartesian) is planar in `--unit`; anything else
//!   stops and asks for `--coords` / `--unit`, as an unknown GeoJSON `crs`
//!   does;
//! - which features: empty and NULL geometries are skipped and counted,
//!   like GeoJSON features without geometry; `--where FIELD=VALUE` keeps
//!   the rows whose column equals the value (bound as a query parameter).

use crate::boundary::{RawBoundary, add_part};
use crate::coords::{Basis, CoordChoice, CoordSystem, Projection};
use crate::error::{InputError, InputErrorKind};
use crate::points::{Place, RawPoints, epsg_is_lonlat};
use geo::MultiPolygon;
use patternproof_gpkg::blob::Shape;
use patternproof_gpkg::crs::{CrsKind, kind_of};
use patternproof_gpkg::{Feature, Filter, GeoPackage, GpkgError, Layer, SpatialRef};
use std::path::Path;

/// GeoPackage choices from the command line.
#[derive(Debug, Clone, Default, PartialEq)]
pub struct GpkgChoice {
    /// `--layer`: the point layer.
    pub layer: Option<String>,
    /// `--boundary-layer`: the polygon layer of every GeoPackage `--boundary`.
    pub boundary_layer: Option<String>,
    /// `--where FIELD=VALUE`, applied to the point layer.
    pub filter: Option<Filter>,
}

impl GpkgChoice {
    /// Whether any GeoPackage-only option was given.
    pub fn any(&self) -> bool {
        self.layer.is_some() || self.boundary_layer.is_some() || self.filter.is_some()
    }
}

/// Parse `--where FIELD=VALUE` (split at the first `=`; the value may be
/// empty, the field may not). The error, of kind
/// [`InputErrorKind::Filter`], names the option as given in place of a file.
pub fn parse_filter(text: &str) -> Result<Filter, InputError> {
    match text.split_once('=') {
        Some((field, value)) if !field.trim().is_empty() => Ok(Filter {
            field: field.trim().to_string(),
            value: value.to_string(),
        }),
        _ => Err(InputError::new(
            InputErrorKind::Filter,
            Path::new(&format!("--where {text}")),
            "expected FIELD=VALUE, e.g. --where year=2024",
            "name a column of the point layer, then '=', then the value to keep",
        )),
    }
}

/// Is this file to be read as a GeoPackage: a `.gpkg` name, or SQLite
/// bytes under any name?
pub fn is_geopackage(path: &Path) -> bool {
    path.extension()
        .and_then(|e| e.to_str())
        .is_some_and(|e| e.eq_ignore_ascii_case("gpkg"))
        || patternproof_gpkg::read::looks_like_sqlite(path)
}

/// Points read from a GeoPackage layer, with what the file says about them.
#[derive(Debug, Clone)]
pub struct GpkgPoints {
    /// The points, as the other readers give them.
    pub raw: RawPoints,
    /// The layer read.
    pub layer: String,
    /// The linear unit the file declares (projected layers).
    pub unit: Option<String>,
    /// The layer's coordinate system row.
    pub srs: Option<SpatialRef>,
    /// Things to tell the user.
    pub warnings: Vec<String>,
}

/// A boundary read from a GeoPackage layer.
#[derive(Debug, Clone)]
pub struct GpkgBoundary {
    /// The boundary, as the other readers give it.
    pub raw: RawBoundary,
    /// The layer read.
    pub layer: String,
    /// The layer's coordinate system row.
    pub srs: Option<SpatialRef>,
}

/// What the layer's system means for the analysis.
struct Decision {
    system: CoordSystem,
    unit: Option<String>,
    warning: Option<String>,
    basis: Basis,
}

fn gpkg_error(path: &Path, e: GpkgError, flag: &str) -> InputError {
    let hint = match &e {
        GpkgError::NotFound(_) | GpkgError::Io(_) => {
            "check the path and that the file is readable".to_string()
        }
        GpkgError::NotSqlite(_) | GpkgError::NotGeoPackage(_) => {
            "give a GeoPackage (.gpkg) file, or export the layer again; CSV, GeoJSON and WKT files need another extension".to_string()
        }
        GpkgError::Sql(_) | GpkgError::BrokenLayer { .. } => {
            "the file may be damaged: open it in a GIS and save the layer again as GeoPackage".to_string()
        }
        GpkgError::NoSuchLayer { layers, .. } if layers.is_empty() => {
            "the file holds no feature layer; export the points (or the boundary) into it first".to_string()
        }
        GpkgError::NoSuchLayer { .. } => format!("choose one of the layers listed with {flag} NAME"),
        GpkgError::NoSuchColumn { .. } => "use one of the columns listed (names are case-sensitive)".to_string(),
        GpkgError::TooManySteps { .. } => {
            "export the layer as a plain table (in a GIS: save it to a new GeoPackage) and read that file; a view is read only while its query ends in time".to_string()
        }
        GpkgError::Geometry { .. } => {
            "repair or delete that feature in a GIS, or export the layer again".to_string()
        }
    };
    let location = match &e {
        GpkgError::Geometry { layer, fid, .. } => {
            Some(format!("layer `{layer}`, feature fid {fid}"))
        }
        _ => None,
    };
    let what = match &e {
        GpkgError::Geometry { problem, .. } => problem.to_string(),
        other => other.to_string(),
    };
    let kind = match &e {
        GpkgError::NotFound(_) => InputErrorKind::NotFound,
        GpkgError::Io(_) => InputErrorKind::Unreadable,
        GpkgError::NotSqlite(_)
        | GpkgError::NotGeoPackage(_)
        | GpkgError::Sql(_)
        | GpkgError::BrokenLayer { .. } => InputErrorKind::Malformed,
        GpkgError::NoSuchLayer { .. } | GpkgError::NoSuchColumn { .. } => InputErrorKind::Layer,
        GpkgError::TooManySteps { .. } => InputErrorKind::TooLarge,
        GpkgError::Geometry { .. } => InputErrorKind::BadGeometry,
    };
    let err = InputError::new(kind, path, what, hint);
    match location {
        Some(l) => err.at(l),
        None => err,
    }
}

/// The layer to read: the named one, or the file's only feature layer.
fn choose_layer(
    path: &Path,
    gpkg: &GeoPackage,
    name: Option<&str>,
    flag: &str,
) -> Result<Layer, InputError> {
    if let Some(name) = name {
        return gpkg.layer(name).map_err(|e| gpkg_error(path, e, flag));
    }
    let mut layers = gpkg.layers().map_err(|e| gpkg_error(path, e, flag))?;
    match layers.len() {
        0 => Err(InputError::new(
            InputErrorKind::Empty,
            path,
            "the GeoPackage holds no feature layer",
            "export the points (or the boundary) into it as a feature layer first",
        )),
        1 => Ok(layers.remove(0)),
        n => Err(InputError::new(
            InputErrorKind::Layer,
            path,
            format!(
                "the GeoPackage holds {n} feature layers: {}",
                patternproof_gpkg::read::list(&layers)
            ),
            format!("say which one to read with {flag} NAME"),
        )),
    }
}

/// Decide the coordinate system of a layer from its `gpkg_spatial_ref_sys` row.
fn decide(
    path: &Path,
    layer: &Layer,
    srs: Option<&SpatialRef>,
    choice: CoordChoice,
) -> Result<Decision, InputError> {
    if let Some(basis) = Basis::forced(choice) {
        let system = match choice {
            CoordChoice::LonLat => CoordSystem::LonLat,
            _ => CoordSystem::Projected,
        };
        return Ok(Decision {
            system,
            unit: None,
            warning: None,
            basis,
        });
    }
    let unknown = |what: String| {
        InputError::new(
            InputErrorKind::CoordSystem,
            path,
            what,
            "say how to read the coordinates: --coords projected (with --unit, e.g. --unit m) or --coords lonlat",
        )
        .at(format!("layer `{}`", layer.name))
    };
    let Some(srs) = srs else {
        return Err(unknown(format!(
            "the layer's srs_id {} has no row in gpkg_spatial_ref_sys, so its coordinate system is unknown",
            layer.srs_id
        )));
    };
    let named = |system| Decision {
        system,
        unit: None,
        warning: None,
        basis: Basis::stated(format!("layer \"{}\" is in {}", layer.name, srs.label())),
    };
    let undefined = srs.definition.trim().eq_ignore_ascii_case("undefined");
    if srs.srs_id == -1
        || (undefined && srs.organization.eq_ignore_ascii_case("NONE") && srs.srs_id != 0)
    {
        return Ok(Decision {
            system: CoordSystem::Projected,
            unit: None,
            warning: Some(format!(
                "{}: layer \"{}\" is in the undefined Cartesian system (srs_id {}); coordinates are read as planar in --unit",
                path.display(),
                layer.name,
                srs.srs_id
            )),
            basis: Basis::inferred(format!(
                "layer \"{}\" is in the undefined Cartesian system (srs_id {})",
                layer.name, srs.srs_id
            )),
        });
    }
    if srs.srs_id == 0 {
        return Ok(Decision {
            basis: Basis::inferred(format!(
                "layer \"{}\" is in the undefined geographic system (srs_id 0)",
                layer.name
            )),
            ..named(CoordSystem::LonLat)
        });
    }
    match kind_of(&srs.definition) {
        Some(CrsKind::Geographic { degrees: true, .. }) => Ok(named(CoordSystem::LonLat)),
        Some(CrsKind::Geographic { degrees: false, unit }) => Err(InputError::new(
            InputErrorKind::CoordSystem,
            path,
            format!(
                "the layer is in {}, a geographic system measured in {} rather than degrees",
                srs.label(),
                unit.as_deref().unwrap_or("an unnamed angular unit")
            ),
            "reproject the layer to lon/lat degrees (e.g. EPSG:4326) or to a projected system in a GIS and export it again",
        )
        .at(format!("layer `{}`", layer.name))),
        Some(CrsKind::Projected { unit: Some(unit) }) => Ok(Decision {
            unit: Some(unit),
            ..named(CoordSystem::Projected)
        }),
        Some(CrsKind::Projected { unit: None }) => Ok(Decision {
            warning: Some(format!(
                "{}: the definition of {} names no linear unit; distances are labelled with --unit",
                path.display(),
                srs.label()
            )),
            ..named(CoordSystem::Projected)
        }),
        Some(CrsKind::Other(keyword)) => Err(unknown(format!(
            "the layer is in {}, a {keyword} system that is neither lon/lat nor projected",
            srs.label()
        ))),
        None => {
            let code = u32::try_from(srs.organization_id).ok();
            match (srs.organization.eq_ignore_ascii_case("EPSG"), code.and_then(epsg_is_lonlat)) {
                (true, Some(true)) => Ok(named(CoordSystem::LonLat)),
                // Every projected code on that list is metre-based.
                (true, Some(false)) => Ok(Decision {
                    unit: Some("m".into()),
                    ..named(CoordSystem::Projected)
                }),
                _ => Err(unknown(format!(
                    "the layer is in {}, which patternproof cannot identify as lon/lat or projected (its definition is `{}`)",
                    srs.label(),
                    shorten(&srs.definition)
                ))),
            }
        }
    }
}

fn shorten(s: &str) -> String {
    let s = s.trim();
    if s.chars().count() > 80 {
        format!("{}…", s.chars().take(80).collect::<String>())
    } else {
        s.to_string()
    }
}

fn srs_of(path: &Path, gpkg: &GeoPackage, layer: &Layer) -> Result<Option<SpatialRef>, InputError> {
    gpkg.spatial_ref(layer.srs_id)
        .map_err(|e| gpkg_error(path, e, "--layer"))
}

/// Read a GeoPackage point layer.
pub fn read_points(
    path: &Path,
    choice: CoordChoice,
    field: Option<&str>,
    gpkg_choice: &GpkgChoice,
) -> Result<GpkgPoints, InputError> {
    let gpkg = GeoPackage::open(path).map_err(|e| gpkg_error(path, e, "--layer"))?;
    let layer = choose_layer(path, &gpkg, gpkg_choice.layer.as_deref(), "--layer")?;
    let srs = srs_of(path, &gpkg, &layer)?;
    let decision = decide(path, &layer, srs.as_ref(), choice)?;
    let features = gpkg
        .features(&layer, field, gpkg_choice.filter.as_ref())
        .map_err(|e| gpkg_error(path, e, "--layer"))?;
    let at = |fid: i64| format!("layer `{}`, feature fid {fid}", layer.name);
    if let Some(f) = &gpkg_choice.filter
        && features.is_empty()
    {
        return Err(InputError::new(
            InputErrorKind::Filter,
            path,
            format!(
                "--where {}={}: no feature of layer `{}` has this value (the layer holds {} features)",
                f.field, f.value, layer.name, layer.count
            ),
            "check the value (text is compared exactly, case included) or leave --where out",
        ));
    }
    let mut coords = Vec::new();
    let mut places = Vec::new();
    let mut values = Vec::new();
    let mut skipped = 0;
    let mut other_srs = 0;
    for f in &features {
        let Some(shape) = &f.shape else {
            skipped += 1;
            continue;
        };
        if f.blob_srs_id.is_some_and(|s| s != layer.srs_id) {
            other_srs += 1;
        }
        let pts = match shape {
            Shape::Points(p) => p,
            other => {
                return Err(InputError::new(
                    InputErrorKind::BadGeometry,
                    path,
                    format!("the feature is a {}, not a point", other.type_name()),
                    "choose a point layer with --layer; give study-area polygons as --boundary FILE.gpkg --boundary-layer NAME",
                )
                .at(at(f.fid)));
            }
        };
        let value = match (field, &f.value) {
            (None, _) => None,
            (Some(_), Some(v)) if !v.trim().is_empty() => Some(crate::points::one_line(v)),
            (Some(name), _) => {
                return Err(InputError::new(
                    InputErrorKind::MissingValue,
                    path,
                    format!("the feature has no value in column `{name}`"),
                    "give every feature a value in that column, or filter it out with --where",
                )
                .at(at(f.fid)));
            }
        };
        for c in pts {
            if !c.x.is_finite() || !c.y.is_finite() {
                return Err(InputError::new(
                    InputErrorKind::BadCoordinate,
                    path,
                    format!("the point ({}, {}) is not finite", c.x, c.y),
                    "fix or delete the feature in a GIS",
                )
                .at(at(f.fid)));
            }
            coords.push([c.x, c.y]);
            places.push(Place::Fid(f.fid));
            if let Some(v) = &value {
                values.push(v.clone());
            }
        }
    }
    let mut warnings: Vec<String> = decision.warning.into_iter().collect();
    if other_srs > 0 {
        warnings.push(format!(
            "{}: {other_srs} feature(s) of layer \"{}\" carry another srs_id in their geometry header than the layer's {}; the layer's system is used",
            path.display(),
            layer.name,
            layer.srs_id
        ));
    }
    Ok(GpkgPoints {
        raw: RawPoints {
            coords,
            places,
            system: decision.system,
            basis: decision.basis,
            field_values: field.map(|_| values),
            skipped_empty: skipped,
            decimal_comma: None,
        },
        layer: layer.name.clone(),
        unit: decision.unit,
        srs,
        warnings,
    })
}

/// What both boundary readers learn before they look at a feature.
struct BoundaryLayer {
    gpkg: GeoPackage,
    layer: Layer,
    srs: Option<SpatialRef>,
    /// `None` under a forced `--coords`: that choice describes the points,
    /// and the boundary follows them.
    declared: Option<CoordSystem>,
    /// Whether the layer's row names a system (not srs_id 0 or −1).
    stated: bool,
    columns: Vec<String>,
}

fn open_boundary_layer(
    path: &Path,
    layer_name: Option<&str>,
    choice: CoordChoice,
) -> Result<BoundaryLayer, InputError> {
    let gpkg = GeoPackage::open(path).map_err(|e| gpkg_error(path, e, "--boundary-layer"))?;
    let layer = choose_layer(path, &gpkg, layer_name, "--boundary-layer")?;
    let srs = srs_of(path, &gpkg, &layer)?;
    let (declared, stated) = match choice {
        CoordChoice::Auto => {
            let d = decide(path, &layer, srs.as_ref(), choice)?;
            (Some(d.system), d.basis.stated)
        }
        _ => (None, false),
    };
    let (columns, _) = gpkg
        .columns(&layer)
        .map_err(|e| gpkg_error(path, e, "--boundary-layer"))?;
    Ok(BoundaryLayer {
        gpkg,
        layer,
        srs,
        declared,
        stated,
        columns,
    })
}

impl BoundaryLayer {
    fn place(&self, fid: i64) -> String {
        format!("layer `{}`, feature fid {fid}", self.layer.name)
    }

    fn features(&self, path: &Path, column: Option<&str>) -> Result<Vec<Feature>, InputError> {
        self.gpkg
            .features(&self.layer, column, None)
            .map_err(|e| gpkg_error(path, e, "--boundary-layer"))
    }

    fn not_polygons(&self, path: &Path, fid: i64, shape: &Shape) -> InputError {
        InputError::new(
            InputErrorKind::BadGeometry,
            path,
            format!(
                "a boundary must be polygons, this feature is a {}",
                shape.type_name()
            ),
            "choose a polygon layer with --boundary-layer NAME",
        )
        .at(self.place(fid))
    }

    fn no_polygon(&self, path: &Path, features: usize) -> InputError {
        InputError::new(
            InputErrorKind::Empty,
            path,
            format!(
                "layer `{}` holds no polygon ({features} feature(s), all empty or without geometry)",
                self.layer.name
            ),
            "choose a polygon layer with --boundary-layer NAME",
        )
    }
}

/// Read a GeoPackage polygon layer as one study area (every polygon of
/// the layer together, holes kept). Its name is the `name` column of a
/// single feature when there is one, else the layer's name.
pub fn read_boundary(
    path: &Path,
    layer_name: Option<&str>,
    choice: CoordChoice,
) -> Result<GpkgBoundary, InputError> {
    let b = open_boundary_layer(path, layer_name, choice)?;
    let name_column = b.columns.iter().any(|c| c == "name").then_some("name");
    let features = b.features(path, name_column)?;
    let mut polygons = Vec::new();
    let mut names = Vec::new();
    for f in &features {
        match &f.shape {
            None => {}
            Some(Shape::Polygons(mp)) => {
                polygons.extend(mp.0.iter().cloned());
                names.extend(f.value.clone());
            }
            Some(other) => return Err(b.not_polygons(path, f.fid, other)),
        }
    }
    if polygons.is_empty() {
        return Err(b.no_polygon(path, features.len()));
    }
    let name = crate::points::one_line(&if names.len() == 1 && features.len() == 1 {
        names.remove(0)
    } else {
        b.layer.name.clone()
    });
    Ok(GpkgBoundary {
        raw: RawBoundary {
            name,
            shape: MultiPolygon(polygons),
            declared: b.declared,
            stated: b.stated,
        },
        layer: b.layer.name,
        srs: b.srs,
    })
}

/// The boundaries of many sites in one GeoPackage polygon layer, one site
/// per value of the column `field` (features sharing a value are parts of
/// one site), in order of first appearance: the GeoPackage form of
/// [`crate::boundary::read_named_boundaries`]. Also returns the layer's
/// name and coordinate system row.
pub fn read_named_boundaries(
    path: &Path,
    layer_name: Option<&str>,
    field: &str,
    choice: CoordChoice,
) -> Result<(Vec<RawBoundary>, String, Option<SpatialRef>), InputError> {
    let b = open_boundary_layer(path, layer_name, choice)?;
    if !b.columns.iter().any(|c| c == field) {
        return Err(InputError::new(
            InputErrorKind::Layer,
            path,
            format!(
                "layer `{}` has no column `{field}` naming the sites (its columns: {})",
                b.layer.name,
                b.columns.join(", ")
            ),
            "choose the column that holds the site names with --boundary-field",
        ));
    }
    let features = b.features(path, Some(field))?;
    let mut out: Vec<RawBoundary> = Vec::new();
    for f in &features {
        let polygons = match &f.shape {
            None => continue,
            Some(Shape::Polygons(mp)) => mp,
            Some(other) => return Err(b.not_polygons(path, f.fid, other)),
        };
        let Some(name) = f.value.clone() else {
            return Err(InputError::new(
                InputErrorKind::MissingValue,
                path,
                format!("the feature has no value in column `{field}` naming its site"),
                "give every boundary feature its site's name, or choose another column with --boundary-field",
            )
            .at(b.place(f.fid)));
        };
        add_part(&mut out, name, polygons.0.clone(), b.declared, b.stated);
    }
    if out.is_empty() {
        return Err(b.no_polygon(path, features.len()));
    }
    Ok((out, b.layer.name, b.srs))
}

/// Do two coordinate-system rows describe the same system? Same
/// organisation and code, or the same definition text.
pub fn same_system(a: &SpatialRef, b: &SpatialRef) -> bool {
    (a.organization.eq_ignore_ascii_case(&b.organization)
        && a.organization_id == b.organization_id
        && !a.organization.eq_ignore_ascii_case("NONE"))
        || a.definition.trim() == b.definition.trim()
            && !a.definition.trim().eq_ignore_ascii_case("undefined")
        || a.srs_id == b.srs_id && a.definition == b.definition
}

/// srs_id of the equal-area projection in written files. The GeoPackage
/// standard reserves only −1 and 0; this one is far from the EPSG range
/// GIS programs pick for their own copies of EPSG rows.
pub const EQUAL_AREA_SRS_ID: i32 = 990_001;

/// The `gpkg_spatial_ref_sys` row of an equal-area projection, WKT 1
/// (OGC 01-009) with the OGC parameter names of the Lambert azimuthal
/// equal-area method.
pub fn equal_area_srs(p: &Projection) -> SpatialRef {
    let (lat0, lon0) = (p.lat0, p.lon0);
    SpatialRef {
        srs_id: EQUAL_AREA_SRS_ID,
        name: format!("Lambert azimuthal equal-area centred at lat {lat0}, lon {lon0} (WGS 84)"),
        organization: "patternproof".into(),
        organization_id: i64::from(EQUAL_AREA_SRS_ID),
        definition: format!(
            r#"PROJCS["Lambert azimuthal equal-area centred at lat {lat0}, lon {lon0}",GEOGCS["WGS 84",DATUM["WGS_1984",SPHEROID["WGS 84",6378137,298.257223563,AUTHORITY["EPSG","7030"]],AUTHORITY["EPSG","6326"]],PRIMEM["Greenwich",0,AUTHORITY["EPSG","8901"]],UNIT["degree",0.0174532925199433,AUTHORITY["EPSG","9122"]]],PROJECTION["Lambert_Azimuthal_Equal_Area"],PARAMETER["latitude_of_center",{lat0}],PARAMETER["longitude_of_center",{lon0}],PARAMETER["false_easting",0],PARAMETER["false_northing",0],UNIT["metre",1,AUTHORITY["EPSG","9001"]],AXIS["Easting",EAST],AXIS["Northing",NORTH]]"#
        ),
        description: Some(format!(
            "the projection patternproof applied to lon/lat input: {}",
            p.describe()
        )),
    }
}

impl crate::dataset::Dataset {
    /// The coordinate-system row for outlines written in this data set's
    /// plane: the equal-area projection for lon/lat input, the file's own
    /// system for projected GeoPackage input, else the standard's
    /// undefined Cartesian system (srs_id −1).
    pub fn plane_srs(&self) -> SpatialRef {
        if let Some(p) = &self.projection {
            return equal_area_srs(p);
        }
        match &self.srs {
            Some(s) if self.system == CoordSystem::Projected => s.clone(),
            _ => patternproof_gpkg::write::required_srs()[1].clone(),
        }
    }
}

#[cfg(test)]
#[allow(clippy::unwrap_used)] // a failed unwrap is a failed test
mod tests {
    use super::*;

    #[test]
    fn where_needs_a_field() {
        let f = parse_filter("year=2024").unwrap();
        assert_eq!((f.field.as_str(), f.value.as_str()), ("year", "2024"));
        let f = parse_filter("note=a=b").unwrap();
        assert_eq!(f.value, "a=b");
        for bad in ["=3", "year"] {
            let e = parse_filter(bad).unwrap_err();
            assert_eq!(e.kind, InputErrorKind::Filter);
            assert_eq!(
                e.to_string(),
                format!(
                    "--where {bad}: expected FIELD=VALUE, e.g. --where year=2024\n  what to do: name a column of the point layer, then '=', then the value to keep"
                )
            );
        }
    }

    /// The written definition reads back as a projected system in metres
    /// (the same WKT reader as for input files).
    #[test]
    fn equal_area_row_reads_back_as_metres() {
        let p = Projection::centred_at(12.5, 47.25).unwrap();
        let s = equal_area_srs(&p);
        assert_eq!(
            kind_of(&s.definition),
            Some(CrsKind::Projected {
                unit: Some("m".into())
            })
        );
        assert!(s.definition.contains("\"latitude_of_center\",47.25"));
    }
}
