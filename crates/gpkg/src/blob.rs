//! The GeoPackage geometry blob: a short header, then ISO WKB.
//!
//! OGC GeoPackage 1.3 (OGC 12-128r17) §2.1.3.1.1 lays the blob out as
//!
//! ```text
//! byte 0..2  magic "GP" (0x47 0x50)
//! byte 2     version, 0 for version 1
//! byte 3     flags, bit 7 → 0:  R R X Y E E E B
//!              B    byte order of srs_id and envelope (0 big, 1 little endian)
//!              EEE  envelope code: 0 none, 1 xy (4 doubles), 2 xyz (6),
//!                   3 xym (6), 4 xyzm (8); 5–7 are invalid
//!              Y    1 = empty geometry
//!              X    1 = an extension's own binary format follows
//! byte 4..8  srs_id, int32 in the B byte order
//! then       the envelope (0, 4, 6 or 8 doubles), then the WKB
//! ```
//!
//! The header is eight bytes of fixed layout, so it is decoded here; the
//! WKB after it goes to the georust `wkb` crate, whose reader checks every
//! length against the buffer. Empty geometries come in two spellings: the
//! Y flag, and (for points, which WKB cannot leave out) NaN coordinates.
//! Both read as "no geometry" rather than as a point at NaN.

use geo::{Coord, MultiPolygon, Polygon};
use geo_traits::to_geo::{ToGeoMultiPolygon, ToGeoPolygon};
use geo_traits::{
    CoordTrait, GeometryTrait, GeometryType, LineStringTrait, MultiPointTrait, MultiPolygonTrait,
    PointTrait, PolygonTrait,
};

/// The two magic bytes, "GP".
pub const MAGIC: [u8; 2] = *b"GP";

/// What the header of one blob says.
#[derive(Debug, Clone, PartialEq)]
pub struct Header {
    /// The spatial reference system id written in the blob.
    pub srs_id: i32,
    /// The Y flag.
    pub empty: bool,
    /// The envelope code (0–4).
    pub envelope_code: u8,
    /// The envelope values in file order (minx, maxx, miny, maxy, …).
    pub envelope: Vec<f64>,
    /// Where the WKB starts.
    pub wkb_offset: usize,
}

/// Why a blob could not be read. Each variant is one kind of problem,
/// with the bytes or numbers involved.
#[derive(Debug, Clone, PartialEq, thiserror::Error)]
pub enum BlobError {
    /// Fewer bytes than the header needs.
    #[error("the geometry blob has {len} bytes, its header alone needs {need}")]
    TooShort {
        /// Bytes present.
        len: usize,
        /// Bytes the header (with its envelope) needs.
        need: usize,
    },
    /// The first two bytes are not "GP".
    #[error(
        "the geometry blob starts with bytes {:#04x} {:#04x}, not the GeoPackage magic \"GP\"",
        .0[0],
        .0[1]
    )]
    Magic([u8; 2]),
    /// A version other than 0 (version 1).
    #[error(
        "the geometry blob has header version {0}; only version 0 (GeoPackage binary version 1) is defined"
    )]
    Version(u8),
    /// Envelope code 5, 6 or 7.
    #[error("the geometry blob's envelope code is {0}; the GeoPackage standard defines 0 to 4")]
    EnvelopeCode(u8),
    /// The X flag: an extension's binary format, not WKB.
    #[error("the geometry blob uses an extension's own binary format (flag X set), not WKB")]
    Extended,
    /// The WKB after the header is malformed.
    #[error("the WKB geometry is malformed ({0})")]
    Wkb(String),
    /// Bytes left over after the WKB geometry.
    #[error("{0} byte(s) follow the end of the WKB geometry")]
    Trailing(usize),
}

/// Decode the header (not the WKB).
pub fn header(bytes: &[u8]) -> Result<Header, BlobError> {
    if bytes.len() < 8 {
        return Err(BlobError::TooShort {
            len: bytes.len(),
            need: 8,
        });
    }
    if bytes[0..2] != MAGIC {
        return Err(BlobError::Magic([bytes[0], bytes[1]]));
    }
    if bytes[2] != 0 {
        return Err(BlobError::Version(bytes[2]));
    }
    let flags = bytes[3];
    if flags & 0b0010_0000 != 0 {
        return Err(BlobError::Extended);
    }
    let little = flags & 1 == 1;
    let envelope_code = (flags >> 1) & 0b111;
    let doubles = match envelope_code {
        0 => 0,
        1 => 4,
        2 | 3 => 6,
        4 => 8,
        c => return Err(BlobError::EnvelopeCode(c)),
    };
    let need = 8 + 8 * doubles;
    if bytes.len() < need {
        return Err(BlobError::TooShort {
            len: bytes.len(),
            need,
        });
    }
    let word = [bytes[4], bytes[5], bytes[6], bytes[7]];
    let srs_id = if little {
        i32::from_le_bytes(word)
    } else {
        i32::from_be_bytes(word)
    };
    let envelope = (0..doubles)
        .map(|k| {
            let mut b = [0u8; 8];
            b.copy_from_slice(&bytes[8 + 8 * k..16 + 8 * k]);
            if little {
                f64::from_le_bytes(b)
            } else {
                f64::from_be_bytes(b)
            }
        })
        .collect();
    Ok(Header {
        srs_id,
        empty: flags & 0b0001_0000 != 0,
        envelope_code,
        envelope,
        wkb_offset: need,
    })
}

/// What a blob holds, reduced to what patternproof reads.
#[derive(Debug, Clone, PartialEq)]
pub enum Shape {
    /// A Point or MultiPoint: its non-empty members, x/y only.
    Points(Vec<Coord<f64>>),
    /// A Polygon or MultiPolygon (holes kept), x/y only.
    Polygons(MultiPolygon<f64>),
    /// Any other type, by its WKB name (lines, collections…).
    Other(&'static str),
}

/// A decoded blob: its header and its content (`None` when empty).
#[derive(Debug, Clone, PartialEq)]
pub struct Decoded {
    /// The header.
    pub header: Header,
    /// The geometry in x/y (z and m dropped); `None` for an empty one.
    pub shape: Option<Shape>,
}

/// Decode a whole blob. Z and M values are dropped: the analysis is planar.
/// A MultiPoint keeps its non-empty members.
pub fn decode(bytes: &[u8]) -> Result<Decoded, BlobError> {
    let header = header(bytes)?;
    if header.empty {
        return Ok(Decoded {
            header,
            shape: None,
        });
    }
    let body = &bytes[header.wkb_offset..];
    let wkb = wkb::reader::read_wkb(body).map_err(|e| BlobError::Wkb(e.to_string()))?;
    let used = wkb.buf().len();
    if used < body.len() {
        return Err(BlobError::Trailing(body.len() - used));
    }
    match wkb.as_type() {
        GeometryType::Point(p) => {
            if let Some(c) = p.coord() {
                check_not_half_empty(&c, None)?;
            }
        }
        GeometryType::MultiPoint(mp) => {
            check_members(mp)?;
            let n = mp.num_points();
            for (i, p) in mp.points().enumerate() {
                if let Some(c) = p.coord() {
                    check_not_half_empty(&c, Some((i + 1, n)))?;
                }
            }
        }
        GeometryType::Polygon(p) => check_rings(0, p)?,
        GeometryType::MultiPolygon(mp) => {
            for (k, p) in mp.polygons().enumerate() {
                check_rings(k, &p)?;
            }
        }
        _ => {}
    }
    Ok(Decoded {
        header,
        shape: shape_of(&wkb),
    })
}

/// Read every member of a MultiPoint as a point of its own before the
/// members are iterated. The `wkb` reader (0.9.3) checks only the
/// MultiPoint's total length and then unwraps each member's header as it
/// goes, so a member flagged with an EWKB SRID (found by `cargo fuzz`,
/// target `gpkg_geometry`) panicked there. A member in the other byte
/// order is refused as well: that reader would take its coordinates in
/// the MultiPoint's order and give wrong points without a word.
fn check_members(mp: &wkb::reader::MultiPoint<'_>) -> Result<(), BlobError> {
    let buf = mp.buf();
    let n = mp.num_points();
    for i in 0..n {
        let problem =
            |what: String| BlobError::Wkb(format!("MultiPoint member {} of {n}: {what}", i + 1));
        let (start, end) = (mp.point_offset(i as u64), mp.point_offset(i as u64 + 1));
        let member = usize::try_from(start)
            .ok()
            .zip(usize::try_from(end).ok())
            .and_then(|(s, e)| buf.get(s..e))
            .ok_or_else(|| problem("it lies beyond the end of the geometry".into()))?;
        if member.first() != buf.first() {
            return Err(problem(
                "written in a different byte order from its MultiPoint, which patternproof does not read".into(),
            ));
        }
        let point = wkb::reader::read_wkb(member).map_err(|e| problem(e.to_string()))?;
        if !matches!(point.as_type(), GeometryType::Point(_))
            || point.dim() != mp.dim()
            || point.buf().len() != member.len()
        {
            return Err(problem(
                "not a plain point with the MultiPoint's own coordinate dimensions".into(),
            ));
        }
    }
    Ok(())
}

/// Every ring of a non-empty polygon must be closed, with at least four
/// positions (OGC 06-103r4, Simple Features §6.1.11.1: a ring is a closed
/// curve, and WKB writes the closing point). The conversion to `geo` would
/// close an open ring silently, as it would for GeoJSON and WKT, where
/// such a ring is refused too. `polygon` is the 0-based member index.
fn check_rings(polygon: usize, p: &impl PolygonTrait<T = f64>) -> Result<(), BlobError> {
    let Some(exterior) = p.exterior() else {
        return Ok(());
    };
    if exterior.num_coords() == 0 {
        return Ok(());
    }
    let rings = std::iter::once(exterior).chain(p.interiors());
    for (r, ring) in rings.enumerate() {
        let n = ring.num_coords();
        let at = |i: usize| ring.coord(i).map(|c| (c.x(), c.y()));
        if n < 4 || at(0) != at(n - 1) {
            let which = if r == 0 {
                "the outer ring".to_string()
            } else {
                format!("hole {r}")
            };
            return Err(BlobError::Wkb(format!(
                "polygon {}, ring {} ({which}) is not closed ({n} positions; the first must equal the last, and a ring needs at least four)",
                polygon + 1,
                r + 1
            )));
        }
    }
    Ok(())
}

/// An empty point is written with both coordinates NaN; one NaN beside a
/// number is a broken point, not an empty one, and is refused rather than
/// skipped (a MultiPoint would otherwise lose that member without a word).
fn check_not_half_empty(
    c: &impl CoordTrait<T = f64>,
    member: Option<(usize, usize)>,
) -> Result<(), BlobError> {
    let (x, y) = (c.x(), c.y());
    if x.is_nan() == y.is_nan() {
        return Ok(());
    }
    let at = member.map_or(String::new(), |(i, n)| {
        format!("MultiPoint member {i} of {n}: ")
    });
    Err(BlobError::Wkb(format!(
        "{at}the point has x = {x} and y = {y}; only an empty point (both NaN) may hold NaN"
    )))
}

fn xy(c: &impl CoordTrait<T = f64>) -> Option<Coord<f64>> {
    let (x, y) = (c.x(), c.y());
    (!x.is_nan() && !y.is_nan()).then_some(Coord { x, y })
}

fn shape_of(g: &wkb::reader::Wkb<'_>) -> Option<Shape> {
    match g.as_type() {
        GeometryType::Point(p) => p
            .coord()
            .and_then(|c| xy(&c))
            .map(|c| Shape::Points(vec![c])),
        GeometryType::MultiPoint(mp) => {
            let pts: Vec<Coord<f64>> = mp
                .points()
                .filter_map(|p| p.coord().and_then(|c| xy(&c)))
                .collect();
            (!pts.is_empty()).then_some(Shape::Points(pts))
        }
        GeometryType::Polygon(p) => {
            let p: Polygon<f64> = p.to_polygon();
            (!p.exterior().0.is_empty()).then(|| Shape::Polygons(MultiPolygon(vec![p])))
        }
        GeometryType::MultiPolygon(mp) => {
            let mp: MultiPolygon<f64> = mp.to_multi_polygon();
            let kept: Vec<Polygon<f64>> =
                mp.0.into_iter()
                    .filter(|p| !p.exterior().0.is_empty())
                    .collect();
            (!kept.is_empty()).then_some(Shape::Polygons(MultiPolygon(kept)))
        }
        GeometryType::LineString(_) | GeometryType::Line(_) => Some(Shape::Other("LineString")),
        GeometryType::MultiLineString(_) => Some(Shape::Other("MultiLineString")),
        GeometryType::GeometryCollection(_) => Some(Shape::Other("GeometryCollection")),
        GeometryType::Rect(_) => Some(Shape::Other("Rect")),
        GeometryType::Triangle(_) => Some(Shape::Other("Triangle")),
    }
}

impl Shape {
    /// The type name for messages.
    pub fn type_name(&self) -> &'static str {
        match self {
            Shape::Points(p) if p.len() == 1 => "Point",
            Shape::Points(_) => "MultiPoint",
            Shape::Polygons(mp) if mp.0.len() == 1 => "Polygon",
            Shape::Polygons(_) => "MultiPolygon",
            Shape::Other(name) => name,
        }
    }
}

/// Encode a multipolygon as a little-endian blob with an xy envelope (an
/// empty one gets the Y flag and no envelope).
pub fn encode_multi_polygon(shape: &MultiPolygon<f64>, srs_id: i32) -> Vec<u8> {
    let bounds = geo::BoundingRect::bounding_rect(shape);
    let empty = bounds.is_none() || shape.0.iter().all(|p| p.exterior().0.is_empty());
    let mut out = Vec::with_capacity(64 + 16 * shape.0.len());
    out.extend_from_slice(&MAGIC);
    out.push(0);
    let flags: u8 = if empty { 0b0001_0001 } else { 0b0000_0011 };
    out.push(flags);
    out.extend_from_slice(&srs_id.to_le_bytes());
    if let (false, Some(r)) = (empty, bounds) {
        for v in [r.min().x, r.max().x, r.min().y, r.max().y] {
            out.extend_from_slice(&v.to_le_bytes());
        }
    }
    let options = wkb::writer::WriteOptions {
        endianness: wkb::Endianness::LittleEndian,
    };
    // Writing into a Vec cannot fail; a failure would mean a bug in the
    // writer, and an empty multipolygon is still a valid geometry.
    if wkb::writer::write_geometry(&mut out, shape, &options).is_err() {
        out.truncate(8);
        out[3] = 0b0001_0001;
        let _ = wkb::writer::write_geometry(&mut out, &MultiPolygon::<f64>(Vec::new()), &options);
    }
    out
}

/// Is this a type name of points?
pub fn is_point_type(name: &str) -> bool {
    matches!(name.to_ascii_uppercase().as_str(), "POINT" | "MULTIPOINT")
}

/// Is this a type name of polygons?
pub fn is_polygon_type(name: &str) -> bool {
    matches!(
        name.to_ascii_uppercase().as_str(),
        "POLYGON" | "MULTIPOLYGON" | "CURVEPOLYGON" | "MULTISURFACE" | "SURFACE"
    )
}

#[cfg(test)]
#[allow(clippy::unwrap_used)] // a failed unwrap is a failed test
mod tests {
    use super::*;
    use geo::LineString;

    /// A hand-assembled blob: big-endian header, srs 32633, xy envelope,
    /// then a little-endian WKB point (ISO WKB: type 1, x, y). Layout from
    /// OGC GeoPackage 1.3 §2.1.3.1.1 and OGC 06-103r4 §8.2.
    fn point_blob(flags: u8, env: usize) -> Vec<u8> {
        let mut b = vec![b'G', b'P', 0, flags];
        b.extend_from_slice(&32633i32.to_be_bytes());
        for k in 0..env {
            b.extend_from_slice(&(k as f64).to_be_bytes());
        }
        b.push(1);
        b.extend_from_slice(&1u32.to_le_bytes());
        b.extend_from_slice(&500_000.5f64.to_le_bytes());
        b.extend_from_slice(&5_600_000.25f64.to_le_bytes());
        b
    }

    #[test]
    fn every_envelope_code_is_skipped_to_the_wkb() {
        // Envelope lengths 0/4/6/6/8 doubles: GeoPackage 1.3 §2.1.3.1.1 table.
        for (code, n) in [(0u8, 0usize), (1, 4), (2, 6), (3, 6), (4, 8)] {
            let d = decode(&point_blob(code << 1, n)).unwrap();
            assert_eq!(d.header.srs_id, 32633, "code {code}");
            assert_eq!(d.header.envelope.len(), n);
            assert_eq!(
                d.shape,
                Some(Shape::Points(vec![Coord {
                    x: 500_000.5,
                    y: 5_600_000.25
                }]))
            );
        }
        assert_eq!(
            decode(&point_blob(5 << 1, 0)).unwrap_err(),
            BlobError::EnvelopeCode(5)
        );
    }

    #[test]
    fn little_endian_header_and_empty_flag() {
        let mut b = point_blob(0b0000_0001, 0);
        b[4..8].copy_from_slice(&4326i32.to_le_bytes());
        assert_eq!(header(&b).unwrap().srs_id, 4326);
        b[3] |= 0b0001_0000;
        assert_eq!(decode(&b).unwrap().shape, None);
    }

    /// Issue 20: one NaN beside a number is a broken point, refused with
    /// its member, not skipped as empty (a MultiPoint lost such a member
    /// without a word).
    #[test]
    fn half_nan_point_is_refused() {
        let mut b = vec![b'G', b'P', 0, 1, 0, 0, 0, 0, 1];
        b.extend_from_slice(&1u32.to_le_bytes());
        b.extend_from_slice(&f64::NAN.to_le_bytes());
        b.extend_from_slice(&5.0f64.to_le_bytes());
        let e = decode(&b).unwrap_err();
        assert_eq!(
            e,
            BlobError::Wkb(
                "the point has x = NaN and y = 5; only an empty point (both NaN) may hold NaN"
                    .into()
            )
        );
        // MULTIPOINT ((1 2), (3 NaN)).
        let mut m = vec![b'G', b'P', 0, 1, 0, 0, 0, 0, 1];
        m.extend_from_slice(&4u32.to_le_bytes());
        m.extend_from_slice(&2u32.to_le_bytes());
        for (x, y) in [(1.0, 2.0), (3.0, f64::NAN)] {
            m.push(1);
            m.extend_from_slice(&1u32.to_le_bytes());
            m.extend_from_slice(&f64::to_le_bytes(x));
            m.extend_from_slice(&f64::to_le_bytes(y));
        }
        let e = decode(&m).unwrap_err().to_string();
        assert!(
            e.contains("MultiPoint member 2 of 2: the point has x = 3 and y = NaN"),
            "{e}"
        );
    }

    #[test]
    fn nan_point_is_empty() {
        // POINT EMPTY is written as NaN coordinates (GeoPackage 1.3 §2.1.3.1.1, note on empty points).
        let mut b = vec![b'G', b'P', 0, 1, 0, 0, 0, 0, 1];
        b.extend_from_slice(&1u32.to_le_bytes());
        b.extend_from_slice(&f64::NAN.to_le_bytes());
        b.extend_from_slice(&f64::NAN.to_le_bytes());
        assert_eq!(decode(&b).unwrap().shape, None);
    }

    #[test]
    fn refuses_what_is_not_a_blob() {
        assert!(matches!(decode(b"GP"), Err(BlobError::TooShort { .. })));
        assert!(matches!(decode(b"XXXXXXXXXXXX"), Err(BlobError::Magic(_))));
        let mut b = point_blob(0, 0);
        b[2] = 1;
        assert_eq!(decode(&b).unwrap_err(), BlobError::Version(1));
        let mut b = point_blob(0, 0);
        b[3] = 0b0010_0000;
        assert_eq!(decode(&b).unwrap_err(), BlobError::Extended);
        let mut b = point_blob(0, 0);
        b.push(0);
        assert_eq!(decode(&b).unwrap_err(), BlobError::Trailing(1));
    }

    /// A MultiPoint whose second member carries the EWKB SRID flag
    /// (0x20000000 in its type word): the `gpkg_geometry` fuzz crash,
    /// reduced by hand. The `wkb` reader unwrapped that member's header.
    #[test]
    fn multipoint_member_with_an_srid_flag_is_an_error() {
        let mut b = vec![b'G', b'P', 0, 1, 0, 0, 0, 0, 1];
        b.extend_from_slice(&4u32.to_le_bytes());
        b.extend_from_slice(&2u32.to_le_bytes());
        for (ty, x) in [(1u32, 1.0f64), (0x2000_0001, 2.0)] {
            b.push(1);
            b.extend_from_slice(&ty.to_le_bytes());
            b.extend_from_slice(&x.to_le_bytes());
            b.extend_from_slice(&x.to_le_bytes());
        }
        let e = decode(&b).unwrap_err();
        assert!(
            matches!(&e, BlobError::Wkb(m) if m.starts_with("MultiPoint member 2 of 2")),
            "{e}"
        );
        // The same member as a plain point reads.
        b[39..43].copy_from_slice(&1u32.to_le_bytes());
        assert!(matches!(decode(&b).unwrap().shape, Some(Shape::Points(p)) if p.len() == 2));
        // A member in big-endian order inside a little-endian MultiPoint.
        b[38] = 0;
        assert!(matches!(decode(&b), Err(BlobError::Wkb(_))));
    }

    #[test]
    fn encode_then_decode_keeps_holes() {
        let shell = LineString::from(vec![(0.0, 0.0), (10.0, 0.0), (10.0, 10.0), (0.0, 10.0)]);
        let hole = LineString::from(vec![(4.0, 4.0), (6.0, 4.0), (6.0, 6.0), (4.0, 6.0)]);
        let mp = MultiPolygon(vec![Polygon::new(shell, vec![hole])]);
        let blob = encode_multi_polygon(&mp, 990_001);
        let d = decode(&blob).unwrap();
        assert_eq!(d.header.srs_id, 990_001);
        assert_eq!(d.header.envelope, vec![0.0, 10.0, 0.0, 10.0]);
        assert_eq!(d.shape, Some(Shape::Polygons(mp)));
        let empty = encode_multi_polygon(&MultiPolygon(Vec::new()), 0);
        assert!(header(&empty).unwrap().empty);
    }

    /// Truncated and bit-flipped blobs are errors or geometries, never a
    /// panic (the WKB reader bounds every read by the buffer).
    #[test]
    fn damaged_blobs_never_panic() {
        let shell = LineString::from(vec![(0.0, 0.0), (3.0, 0.0), (3.0, 2.0), (0.0, 2.0)]);
        let hole = LineString::from(vec![(1.0, 0.5), (2.0, 0.5), (2.0, 1.5), (1.0, 1.5)]);
        let blob = encode_multi_polygon(&MultiPolygon(vec![Polygon::new(shell, vec![hole])]), 1);
        for cut in 0..blob.len() {
            let _ = decode(&blob[..cut]);
        }
        let mut state = 0x2545_f491_4f6c_dd1du64;
        for _ in 0..4000 {
            let mut b = blob.clone();
            for _ in 0..3 {
                state ^= state << 13;
                state ^= state >> 7;
                state ^= state << 17;
                let at = (state % b.len() as u64) as usize;
                b[at] = (state >> 32) as u8;
            }
            let _ = decode(&b);
        }
    }

    /// Issue 20: a WKB polygon with an open ring is refused, naming the
    /// polygon and the ring, as GeoJSON and WKT boundaries are; before, the
    /// conversion closed it without a word. WKB polygon layout: OGC
    /// 06-103r4 §8.2 (type 3, ring count, per ring a point count and the
    /// points; type 6 wraps polygons with their own byte order and type).
    #[test]
    fn open_polygon_rings_are_refused() {
        let ring = |pts: &[(f64, f64)]| {
            let mut b = (pts.len() as u32).to_le_bytes().to_vec();
            for (x, y) in pts {
                b.extend_from_slice(&x.to_le_bytes());
                b.extend_from_slice(&y.to_le_bytes());
            }
            b
        };
        let polygon = |rings: &[Vec<u8>]| {
            let mut b = vec![1u8];
            b.extend_from_slice(&3u32.to_le_bytes());
            b.extend_from_slice(&(rings.len() as u32).to_le_bytes());
            for r in rings {
                b.extend_from_slice(r);
            }
            b
        };
        let closed = ring(&[(0.0, 0.0), (4.0, 0.0), (4.0, 4.0), (0.0, 4.0), (0.0, 0.0)]);
        let open_hole = ring(&[(1.0, 1.0), (2.0, 1.0), (2.0, 2.0), (1.0, 2.0)]);
        let mut blob = vec![b'G', b'P', 0, 1, 0, 0, 0, 0];
        blob.extend_from_slice(&polygon(std::slice::from_ref(&closed)));
        assert!(matches!(
            decode(&blob).unwrap().shape,
            Some(Shape::Polygons(_))
        ));
        let mut multi = vec![b'G', b'P', 0, 1, 0, 0, 0, 0, 1];
        multi.extend_from_slice(&6u32.to_le_bytes());
        multi.extend_from_slice(&2u32.to_le_bytes());
        multi.extend_from_slice(&polygon(std::slice::from_ref(&closed)));
        multi.extend_from_slice(&polygon(&[closed, open_hole]));
        assert_eq!(
            decode(&multi).unwrap_err(),
            BlobError::Wkb(
                "polygon 2, ring 2 (hole 1) is not closed (4 positions; the first must equal the last, and a ring needs at least four)".into()
            )
        );
    }
}
