//! Coordinate systems and the equal-area projection.
//!
//! Distances and areas are only meaningful in a plane. Lon/lat input is
//! projected with the Lambert azimuthal equal-area projection on the WGS84
//! ellipsoid (Snyder 1987, *Map Projections — A Working Manual*, USGS PP
//! 1395, pp. 182–190), centred on the data: areas are preserved exactly and
//! distances are distorted least near the centre. The projection itself is
//! the `proj4rs` crate (a pure-Rust port of PROJ's formulas), so no C
//! toolchain is needed.
//!
//! The centre is the direction of the mean of the points' unit vectors
//! ([`spherical_centre`]), not the middle of their longitude range: a
//! pattern straddling ±180° has longitudes near both ends of the range,
//! whose middle (0°) lies on the other side of the Earth, and a pattern
//! around a pole has every longitude. The mean direction lies among the
//! points in both cases (at the pole for a ring around it), so the plane
//! touches the globe where the data are.

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

/// Why the coordinates are read as they are, in the words the terminal
/// and the report show ("the CSV columns are named x,y", "GeoJSON without
/// a crs member is lon/lat by RFC 7946").
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct Basis {
    /// The reason, in words.
    pub why: String,
    /// Whether the user (`--coords`) or the file itself (a `crs` member, a
    /// GeoPackage coordinate-system row naming a system) chose the reading.
    /// When not, only column names or a format's default did, and numbers
    /// that look like the other reading deserve a question.
    pub stated: bool,
}

impl Basis {
    /// A reading the file or the user stated.
    pub fn stated(why: impl Into<String>) -> Self {
        Self {
            why: why.into(),
            stated: true,
        }
    }

    /// A reading inferred from names or a format's default.
    pub fn inferred(why: impl Into<String>) -> Self {
        Self {
            why: why.into(),
            stated: false,
        }
    }

    /// The basis of a forced `--coords`, `None` under `auto`.
    pub fn forced(choice: CoordChoice) -> Option<Self> {
        match choice {
            CoordChoice::Auto => None,
            CoordChoice::Projected => Some(Self::stated("--coords projected was given")),
            CoordChoice::LonLat => Some(Self::stated("--coords lonlat was given")),
        }
    }
}

/// Mean radius of the WGS84 ellipsoid, (2a + b)/3 in metres (IUGG), for
/// turning angles on the globe into distances in messages.
pub const MEAN_RADIUS_M: f64 = 6_371_008.8;

/// Where the equal-area plane touches the globe, and how far the points
/// reach from there.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Centre {
    /// Longitude, degrees, rounded to 1e-6° (about 0.1 m).
    pub lon: f64,
    /// Latitude, degrees, rounded to 1e-6°.
    pub lat: f64,
    /// The largest angle between the centre and a point, degrees.
    pub reach: f64,
}

/// The centre of lon/lat points on the sphere: the direction of the mean
/// of their unit vectors (the mean direction of Fisher, Lewis & Embleton
/// 1987, *Statistical Analysis of Spherical Data*, Cambridge UP), with the
/// largest angle from it to any point. It is well defined across ±180°
/// and at the poles; `None` when the mean vector vanishes (points spread
/// evenly around the globe have no centre) or there are no points.
///
/// Summed in file order in one thread, so the centre, and every projected
/// coordinate, is the same for any thread count.
pub fn spherical_centre(coords: &[[f64; 2]]) -> Option<Centre> {
    let unit = |c: &[f64; 2]| {
        let (lon, lat) = (c[0].to_radians(), c[1].to_radians());
        [lat.cos() * lon.cos(), lat.cos() * lon.sin(), lat.sin()]
    };
    let mut sum = [0.0f64; 3];
    for c in coords {
        let u = unit(c);
        for k in 0..3 {
            sum[k] += u[k];
        }
    }
    let norm = (sum[0] * sum[0] + sum[1] * sum[1] + sum[2] * sum[2]).sqrt();
    // Below this the direction is rounding noise: the points balance out.
    if coords.is_empty() || !(norm > 1e-9 * coords.len() as f64) {
        return None;
    }
    let round = |deg: f64| (deg * 1e6).round() / 1e6;
    let lat = round(sum[2].atan2(sum[0].hypot(sum[1])).to_degrees());
    // At a pole every longitude is the centre's; 0 keeps it tidy.
    let lon = if sum[0].hypot(sum[1]) <= 1e-12 * norm {
        0.0
    } else {
        round(sum[1].atan2(sum[0]).to_degrees())
    };
    let c = unit(&[lon, lat]);
    let mut reach = 0.0f64;
    for p in coords {
        let u = unit(p);
        let dot = c[0] * u[0] + c[1] * u[1] + c[2] * u[2];
        let cross = [
            c[1] * u[2] - c[2] * u[1],
            c[2] * u[0] - c[0] * u[2],
            c[0] * u[1] - c[1] * u[0],
        ];
        let sin = (cross[0] * cross[0] + cross[1] * cross[1] + cross[2] * cross[2]).sqrt();
        reach = reach.max(sin.atan2(dot).to_degrees());
    }
    Some(Centre { lon, lat, reach })
}

/// The largest relative error of a distance measured on the Lambert
/// azimuthal equal-area plane between points up to `reach` degrees from
/// its centre. On the sphere of radius R a point at angular distance c
/// from the centre lies ρ = 2R·sin(c/2) from it on the plane (Snyder 1987,
/// ch. 24), so the scale along the radius is dρ/(R·dc) = cos(c/2) and across
/// it ρ/(R·sin c) = 1/cos(c/2): a short distance is off by at most
/// 1/cos(c/2) − 1. The ellipsoidal form differs from the spherical one by
/// far less than that bound.
pub fn plane_distortion(reach: f64) -> f64 {
    1.0 / (reach.to_radians() / 2.0).cos() - 1.0
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
    use approx::{abs_diff_eq, assert_abs_diff_eq};

    /// At the centre the projection is the origin, and it is defined for
    /// points a few degrees away (sanity check; the numeric comparison with
    /// pyproj lives in the reference test of the `tests` crate).
    #[test]
    fn inverse_undoes_forward() {
        let p = Projection::centred_at(10.0, 50.0).unwrap();
        let xy = p.forward(11.5, 49.2).unwrap();
        let back = p.inverse(xy[0], xy[1]).unwrap();
        assert!(
            abs_diff_eq!(back[0], 11.5, epsilon = 1e-9)
                && abs_diff_eq!(back[1], 49.2, epsilon = 1e-9),
            "{back:?}"
        );
    }

    #[test]
    fn centre_maps_to_origin() {
        let p = Projection::centred_at(10.0, 50.0).unwrap();
        let o = p.forward(10.0, 50.0).unwrap();
        assert_abs_diff_eq!(o[0], 0.0, epsilon = 1e-6);
        assert_abs_diff_eq!(o[1], 0.0, epsilon = 1e-6);
        let e = p.forward(11.0, 50.0).unwrap();
        // One degree of longitude at 50° N is about 71.7 km on WGS84
        // (from memory; the pyproj comparison is the real check).
        assert!(abs_diff_eq!(e[0], 71_700.0, epsilon = 500.0), "{e:?}");
        assert!(Projection::centred_at(200.0, 0.0).is_none());
    }

    /// The spherical mean direction by hand: two points on the equator on
    /// either side of ±180° are centred at 180°, not at 0°; four points
    /// around the pole at 89° N are centred at the pole, 1° from each; an
    /// evenly spread pair has no centre.
    #[test]
    fn centre_of_points_across_the_antimeridian_and_the_pole() {
        let c = spherical_centre(&[[179.9, 0.0], [-179.9, 0.0]]).unwrap();
        assert_eq!((c.lon.abs(), c.lat), (180.0, 0.0));
        assert!(abs_diff_eq!(c.reach, 0.1, epsilon = 1e-9), "{c:?}");
        let ring = [[0.0, 89.0], [90.0, 89.0], [180.0, 89.0], [-90.0, 89.0]];
        let c = spherical_centre(&ring).unwrap();
        assert_eq!(c.lat, 90.0);
        assert!(abs_diff_eq!(c.reach, 1.0, epsilon = 1e-9), "{c:?}");
        // The pole is a valid centre for the projection, and the ring
        // keeps its shape: 1° of latitude, about 111.7 km at 89° N on
        // WGS84 (from memory; the pyproj check is in the reference test).
        let p = Projection::centred_at(c.lon, c.lat).unwrap();
        for [lon, lat] in ring {
            let [x, y] = p.forward(lon, lat).unwrap();
            assert!(
                abs_diff_eq!(x.hypot(y), 111_700.0, epsilon = 300.0),
                "{x} {y}"
            );
        }
        assert!(spherical_centre(&[[0.0, 0.0], [180.0, 0.0]]).is_none());
        assert!(spherical_centre(&[]).is_none());
    }

    /// 1/cos(c/2) − 1 by hand: 0 at the centre, 2/√3 − 1 at 60°.
    #[test]
    fn plane_distortion_grows_with_the_reach() {
        assert_eq!(plane_distortion(0.0), 0.0);
        assert_abs_diff_eq!(
            plane_distortion(60.0),
            2.0 / 3f64.sqrt() - 1.0,
            epsilon = 1e-12
        );
    }
}
