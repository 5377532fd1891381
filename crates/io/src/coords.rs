//! Coordinate systems and the equal-area projection.
//!
//! Distances and areas are only meaningful in a plane. Lon/lat input is
//! projected with the Lambert azimuthal equal-area projection on the WGS84
//! ellipsoid (Snyder 1987, *Map Projections — A Working Manual*, USGS PP
//! 1395, pp. 182–190), centred on the data: areas are preserved exactly and
//! distances are distorted least near the centre. The projection itself is
//! the `proj4rs` crate (a pure-Rust port of PROJ's formulas), so no C
//! toolchain is needed.

use serde::Serialize;

/// What the user said with `--coords` (or nothing).
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
pub enum CoordChoice {
    /// Decide from the file: CSV column names, GeoJSON's RFC 7946 default
    /// or its legacy `crs` member. Ambiguity is an error.
    #[default]
    Auto,
    /// Planar coordinates in `--unit`.
    Projected,
    /// Longitude / latitude in degrees on WGS84.
    LonLat,
}

/// The coordinate system a file was read in.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(rename_all = "lowercase")]
pub enum CoordSystem {
    /// Planar, already in a distance unit.
    Projected,
    /// Geographic degrees, to be projected.
    LonLat,
}

impl CoordSystem {
    /// The word used in reports.
    pub fn as_str(self) -> &'static str {
        match self {
            CoordSystem::Projected => "projected",
            CoordSystem::LonLat => "lonlat",
        }
    }
}

/// A Lambert azimuthal equal-area projection centred at (`lon0`, `lat0`).
pub struct Projection {
    /// Centre longitude, degrees.
    pub lon0: f64,
    /// Centre latitude, degrees.
    pub lat0: f64,
    src: proj4rs::Proj,
    dst: proj4rs::Proj,
}

impl std::fmt::Debug for Projection {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        f.debug_struct("Projection")
            .field("lon0", &self.lon0)
            .field("lat0", &self.lat0)
            .finish()
    }
}

impl Projection {
    /// The projection centred at the given point. `None` only if the
    /// centre is not a valid lon/lat.
    pub fn centred_at(lon0: f64, lat0: f64) -> Option<Self> {
        if !(in_lon_range(lon0) && in_lat_range(lat0)) {
            return None;
        }
        let src = proj4rs::Proj::from_proj_string("+proj=longlat +ellps=WGS84 +no_defs").ok()?;
        let dst = proj4rs::Proj::from_proj_string(&format!(
            "+proj=laea +lat_0={lat0} +lon_0={lon0} +x_0=0 +y_0=0 +ellps=WGS84 +units=m +no_defs"
        ))
        .ok()?;
        Some(Self {
            lon0,
            lat0,
            src,
            dst,
        })
    }

    /// Project one lon/lat pair (degrees) to metres east/north of the centre.
    pub fn forward(&self, lon: f64, lat: f64) -> Option<[f64; 2]> {
        let mut p = (lon.to_radians(), lat.to_radians(), 0.0);
        proj4rs::transform::transform(&self.src, &self.dst, &mut p).ok()?;
        (p.0.is_finite() && p.1.is_finite()).then_some([p.0, p.1])
    }

    /// Back from metres to lon/lat degrees (for writing windows in the
    /// input's own system).
    pub fn inverse(&self, x: f64, y: f64) -> Option<[f64; 2]> {
        let mut p = (x, y, 0.0);
        proj4rs::transform::transform(&self.dst, &self.src, &mut p).ok()?;
        let (lon, lat) = (p.0.to_degrees(), p.1.to_degrees());
        (lon.is_finite() && lat.is_finite()).then_some([lon, lat])
    }

    /// A proj-style description for reports.
    pub fn describe(&self) -> String {
        format!(
            "Lambert azimuthal equal-area, WGS84 ellipsoid, centre lat {:.6}, lon {:.6} (+proj=laea +lat_0={} +lon_0={} +ellps=WGS84 +units=m)",
            self.lat0, self.lon0, self.lat0, self.lon0
        )
    }
}

/// Longitude within [−180, 180].
pub fn in_lon_range(lon: f64) -> bool {
    (-180.0..=180.0).contains(&lon)
}

/// Latitude within [−90, 90].
pub fn in_lat_range(lat: f64) -> bool {
    (-90.0..=90.0).contains(&lat)
}

#[cfg(test)]
#[allow(clippy::unwrap_used)] // a failed unwrap is a failed test
mod tests {
    use super::*;

    /// At the centre the projection is the origin, and it is defined for
    /// points a few degrees away (sanity check; the numeric comparison with
    /// pyproj lives in the reference test of the `tests` crate).
    #[test]
    fn inverse_undoes_forward() {
        let p = Projection::centred_at(10.0, 50.0).unwrap();
        let xy = p.forward(11.5, 49.2).unwrap();
        let back = p.inverse(xy[0], xy[1]).unwrap();
        assert!(
            (back[0] - 11.5).abs() < 1e-9 && (back[1] - 49.2).abs() < 1e-9,
            "{back:?}"
        );
    }

    #[test]
    fn centre_maps_to_origin() {
        let p = Projection::centred_at(10.0, 50.0).unwrap();
        let o = p.forward(10.0, 50.0).unwrap();
        assert!(o[0].abs() < 1e-6 && o[1].abs() < 1e-6);
        let e = p.forward(11.0, 50.0).unwrap();
        // One degree of longitude at 50° N is about 71.7 km on WGS84
        // (from memory; the pyproj comparison is the real check).
        assert!((e[0] - 71_700.0).abs() < 500.0, "{e:?}");
        assert!(Projection::centred_at(200.0, 0.0).is_none());
    }
}
