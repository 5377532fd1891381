//! Turning what a Python caller hands over into the facade's [`Input`]:
//! a points file read exactly as the command line reads it, or points in
//! memory read as the caller says; boundaries as files, WKT text or
//! GeoJSON text (the Python side turns mappings and `__geo_interface__`
//! objects into GeoJSON text).

use crate::errors::setting;
use geo::{Geometry, MultiPolygon, Polygon};
use patternproof::memory::{add_boundary, add_boundary_file, points_in_memory};
use patternproof::options::GpkgChoice;
use patternproof::{CoordChoice, Dataset, Error, Input, LoadOptions};
use std::path::PathBuf;
use std::str::FromStr;

/// Where the points are.
pub enum Points {
    /// A file, read with the facade's `load`.
    File(PathBuf),
    /// x, y pairs in memory.
    Memory(Vec<[f64; 2]>),
}

/// One boundary as given.
pub enum Boundary {
    /// A file, read as `--boundary FILE`.
    File(PathBuf),
    /// A geometry in memory: its name and its polygons.
    Memory(String, MultiPolygon<f64>),
}

/// How to read the coordinates.
pub struct Reading {
    /// `coords=`.
    pub coords: CoordChoice,
    /// `unit=`.
    pub unit: String,
    /// `drop_duplicates=`.
    pub drop_duplicates: bool,
    /// `layer=`, `boundary_layer=` and `where=` (GeoPackage files).
    pub gpkg: GpkgChoice,
}

/// `layer=`, `boundary_layer=` and `where="FIELD=VALUE"`, as the command
/// line reads `--layer`, `--boundary-layer` and `--where`.
pub fn gpkg_choice(
    layer: Option<String>,
    boundary_layer: Option<String>,
    filter: Option<&str>,
) -> Result<GpkgChoice, Error> {
    let filter = filter
        .map(|text| {
            // An option, so a SettingError, in the reader's words.
            patternproof::options::parse_filter(text).map_err(|e| {
                let subject = match &e.location {
                    Some(place) => format!("{}, {place}", e.file.display()),
                    None => e.file.display().to_string(),
                };
                setting(subject, e.what, e.hint)
            })
        })
        .transpose()?;
    Ok(GpkgChoice {
        layer,
        boundary_layer,
        filter,
    })
}

/// `coords="auto" | "projected" | "lonlat"`.
pub fn coord_choice(word: &str) -> Result<CoordChoice, Error> {
    match word {
        "auto" => Ok(CoordChoice::Auto),
        "projected" => Ok(CoordChoice::Projected),
        "lonlat" => Ok(CoordChoice::LonLat),
        other => Err(setting(
            format!("--coords {other}"),
            "not a way to read coordinates",
            "choose auto, projected or lonlat",
        )),
    }
}

/// The x, y pairs of `bytes`: native-endian f64 values, x and y in turn
/// (what `array.array("d").tobytes()` and numpy's `tobytes()` give).
pub fn pairs(bytes: &[u8]) -> Result<Vec<[f64; 2]>, Error> {
    if !bytes.len().is_multiple_of(16) {
        return Err(setting(
            "points",
            "the coordinates do not come in x, y pairs",
            "give an (n, 2) array or two sequences of the same length",
        ));
    }
    Ok(bytes
        .chunks_exact(16)
        .map(|c| {
            let mut x = [0u8; 8];
            let mut y = [0u8; 8];
            x.copy_from_slice(&c[..8]);
            y.copy_from_slice(&c[8..]);
            [f64::from_ne_bytes(x), f64::from_ne_bytes(y)]
        })
        .collect())
}

/// A boundary given as text: GeoJSON (a geometry, a feature or a feature
/// collection, all of whose polygons form the one window) or WKT.
pub fn boundary_text(text: &str, name: Option<String>, index: usize) -> Result<Boundary, Error> {
    let subject = format!("boundaries[{index}]");
    let hint = "give a Polygon or MultiPolygon as WKT text, a GeoJSON mapping or an object with __geo_interface__";
    let trimmed = text.trim_start();
    let (geometries, found_name): (Vec<Geometry<f64>>, Option<String>) = if trimmed.starts_with('{')
    {
        let gj = geojson::GeoJson::from_str(text).map_err(|e| {
            setting(
                subject.clone(),
                format!("cannot read the GeoJSON ({e})"),
                hint,
            )
        })?;
        let mut name = None;
        let raw: Vec<geojson::Geometry> = match gj {
            geojson::GeoJson::Geometry(g) => vec![g],
            geojson::GeoJson::Feature(f) => {
                name = feature_name(&f);
                f.geometry.into_iter().collect()
            }
            geojson::GeoJson::FeatureCollection(fc) => {
                if let [only] = fc.features.as_slice() {
                    name = feature_name(only);
                }
                fc.features.into_iter().filter_map(|f| f.geometry).collect()
            }
        };
        let mut out = Vec::new();
        for g in raw {
            out.push(Geometry::try_from(g).map_err(|e| {
                setting(
                    subject.clone(),
                    format!("cannot read the geometry ({e})"),
                    hint,
                )
            })?);
        }
        (out, name)
    } else {
        let g: Geometry<f64> = wkt::TryFromWkt::try_from_wkt_str(text)
            .map_err(|e| setting(subject.clone(), format!("cannot read the WKT ({e})"), hint))?;
        (vec![g], None)
    };
    let mut polygons: Vec<Polygon<f64>> = Vec::new();
    for g in geometries {
        match g {
            Geometry::Polygon(p) => polygons.push(p),
            Geometry::MultiPolygon(mp) => polygons.extend(mp.0),
            Geometry::Rect(r) => polygons.push(r.to_polygon()),
            _ => {
                return Err(setting(subject, "a boundary must be polygons", hint));
            }
        }
    }
    if polygons.is_empty() {
        return Err(setting(subject, "the boundary holds no polygon", hint));
    }
    let name = name
        .or(found_name)
        .unwrap_or_else(|| format!("outline{}", index + 1));
    Ok(Boundary::Memory(name, MultiPolygon(polygons)))
}

/// A boundary given as WKB bytes (as shapely's `to_wkb` writes them),
/// read by the GeoPackage crate's checked decoder behind a minimal
/// GeoPackage header (magic, version 0, little-endian, no envelope,
/// system 0).
pub fn boundary_wkb(wkb: &[u8], name: Option<String>, index: usize) -> Result<Boundary, Error> {
    let subject = format!("boundaries[{index}]");
    let hint = "give a Polygon or MultiPolygon as WKB bytes";
    let mut blob = Vec::with_capacity(8 + wkb.len());
    blob.extend_from_slice(b"GP\x00\x01");
    blob.extend_from_slice(&0i32.to_le_bytes());
    blob.extend_from_slice(wkb);
    let decoded = patternproof_gpkg::blob::decode(&blob)
        .map_err(|e| setting(subject.clone(), format!("cannot read the WKB ({e})"), hint))?;
    match decoded.shape {
        Some(patternproof_gpkg::blob::Shape::Polygons(mp)) if !mp.0.is_empty() => Ok(
            Boundary::Memory(name.unwrap_or_else(|| format!("outline{}", index + 1)), mp),
        ),
        _ => Err(setting(subject, "a boundary must be polygons", hint)),
    }
}

fn feature_name(f: &geojson::Feature) -> Option<String> {
    f.property("name")
        .and_then(|v| v.as_str())
        .map(str::to_string)
}

/// The input of a job. A points file with boundary files only is read
/// exactly as the command line reads it (`load`, then
/// `Input::checksummed`); anything given in memory joins through the
/// facade's `memory` module. Boundaries keep the order given.
pub fn input(
    points: Points,
    boundaries: Vec<Boundary>,
    reading: &Reading,
) -> Result<(Input, Dataset), Error> {
    let options = LoadOptions {
        coords: reading.coords,
        unit: reading.unit.clone(),
        drop_duplicates: reading.drop_duplicates,
        field: None,
        gpkg: reading.gpkg.clone(),
    };
    match points {
        Points::File(file) => {
            let all_files = boundaries.iter().all(|b| matches!(b, Boundary::File(_)));
            let files: Vec<PathBuf> = boundaries
                .iter()
                .filter_map(|b| match b {
                    Boundary::File(f) => Some(f.clone()),
                    Boundary::Memory(..) => None,
                })
                .collect();
            let mut data = patternproof::load(&file, &files, &options)?;
            if all_files {
                let input = Input::checksummed(&data)?;
                return Ok((input, data));
            }
            // Files came first from `load`; put every boundary back in its
            // place among those given in memory.
            let mut from_files = std::mem::take(&mut data.boundaries).into_iter();
            for b in boundaries {
                match b {
                    Boundary::File(_) => {
                        if let Some(read) = from_files.next() {
                            data.boundaries.push(read);
                        }
                    }
                    Boundary::Memory(name, shape) => {
                        add_boundary(&mut data, &name, shape, reading.coords)?
                    }
                }
            }
            let input = Input::checksummed(&data)?;
            Ok((input, data))
        }
        Points::Memory(xy) => {
            if reading.drop_duplicates {
                return Err(setting(
                    "drop_duplicates",
                    "applies to points read from a file",
                    "remove the repeated rows from the array before the call",
                ));
            }
            if reading.gpkg.layer.is_some() || reading.gpkg.filter.is_some() {
                return Err(setting(
                    "layer, where",
                    "apply to points read from a GeoPackage file",
                    "select the rows before the call, or leave them out",
                ));
            }
            let mut data = points_in_memory(xy, reading.coords, &reading.unit)?;
            for b in boundaries {
                match b {
                    Boundary::File(f) => add_boundary_file(
                        &mut data,
                        &f,
                        reading.gpkg.boundary_layer.as_deref(),
                        reading.coords,
                    )?,
                    Boundary::Memory(name, shape) => {
                        add_boundary(&mut data, &name, shape, reading.coords)?
                    }
                }
            }
            let input = Input::checksummed(&data)?;
            Ok((input, data))
        }
    }
}
