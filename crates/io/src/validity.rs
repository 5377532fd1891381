//! Boundary validity: the rules and error values of geo's `Validation`
//! for (multi)polygons, with every pairwise search pruned by bounding
//! boxes.
//!
//! geo compares every edge of a ring with every other edge (and every
//! pair of holes, and of polygons), so a surveyed outline of 200 000
//! vertices took minutes to check. Two edges can only meet when their
//! boxes overlap; sorting the edges by their left end and stopping at
//! the first that starts right of the current one's right end finds the
//! same answer in about n log n steps for any outline whose edges are
//! short beside its size (a pathological spiral of long edges still costs
//! up to n²). The edge test itself is geo's exact one, so the verdict and
//! the message are the same as geo's.

use geo::algorithm::validation::{
    CoordIndex, GeometryIndex, InvalidMultiPolygon, InvalidPolygon, RingRole,
};
use geo::coordinate_position::CoordPos;
use geo::dimensions::Dimensions;
use geo::{
    BoundingRect, HasDimensions, Intersects, Line, LineString, MultiPolygon, Polygon,
    PreparedGeometry, Rect, Relate, RemoveRepeatedPoints,
};

/// The first rule a boundary breaks, as geo's `check_validation` reports
/// it (same rules, same order).
pub fn check(shape: &MultiPolygon<f64>) -> Result<(), InvalidMultiPolygon> {
    let boxes: Vec<Option<Rect<f64>>> = shape.0.iter().map(|p| p.bounding_rect()).collect();
    let mut pairs = overlapping_pairs(&boxes);
    pairs.sort_unstable();
    let mut next = pairs.iter().peekable();
    for (i, polygon) in shape.0.iter().enumerate() {
        check_polygon(polygon)
            .map_err(|e| InvalidMultiPolygon::InvalidPolygon(GeometryIndex(i), e))?;
        while let Some(&&(a, j)) = next.peek() {
            if a != i {
                break;
            }
            next.next();
            let im = polygon.relate(&shape.0[j]);
            if im.get(CoordPos::Inside, CoordPos::Inside) == Dimensions::TwoDimensional {
                return Err(InvalidMultiPolygon::ElementsOverlaps(
                    GeometryIndex(i),
                    GeometryIndex(j),
                ));
            }
            if im.get(CoordPos::OnBoundary, CoordPos::OnBoundary) == Dimensions::OneDimensional {
                return Err(InvalidMultiPolygon::ElementsTouchOnALine(
                    GeometryIndex(i),
                    GeometryIndex(j),
                ));
            }
        }
    }
    Ok(())
}

/// Index pairs (i < j) whose boxes overlap (closed: touching counts),
/// found by a sweep over the boxes' left edges.
fn overlapping_pairs(boxes: &[Option<Rect<f64>>]) -> Vec<(usize, usize)> {
    let mut order: Vec<usize> = (0..boxes.len()).filter(|&i| boxes[i].is_some()).collect();
    let b = |i: usize| boxes[i].unwrap_or_else(|| Rect::new((0.0, 0.0), (0.0, 0.0)));
    order.sort_by(|&p, &q| b(p).min().x.total_cmp(&b(q).min().x));
    let mut pairs = Vec::new();
    for (k, &i) in order.iter().enumerate() {
        let bi = b(i);
        for &j in &order[k + 1..] {
            let bj = b(j);
            if bj.min().x > bi.max().x {
                break;
            }
            if bj.min().y <= bi.max().y && bi.min().y <= bj.max().y {
                pairs.push((i.min(j), i.max(j)));
            }
        }
    }
    pairs
}

fn check_polygon(polygon: &Polygon<f64>) -> Result<(), InvalidPolygon> {
    if polygon.is_empty() {
        return Ok(());
    }
    let rings = std::iter::once(polygon.exterior()).chain(polygon.interiors());
    for (k, ring) in rings.enumerate() {
        if ring.is_empty() {
            continue;
        }
        let role = if k == 0 {
            RingRole::Exterior
        } else {
            RingRole::Interior(k - 1)
        };
        if ring.remove_repeated_points().0.len() < 4 {
            return Err(InvalidPolygon::TooFewPointsInRing(role));
        }
        if crosses_itself(ring) {
            return Err(InvalidPolygon::SelfIntersection(role));
        }
        if let Some(at) = ring
            .0
            .iter()
            .position(|c| !(c.x.is_finite() && c.y.is_finite()))
        {
            return Err(InvalidPolygon::NonFiniteCoord(role, CoordIndex(at)));
        }
    }
    let holes = polygon.interiors();
    if holes.iter().all(|h| h.is_empty()) {
        return Ok(());
    }
    let shell = Polygon::new(polygon.exterior().clone(), vec![]);
    let prepared_shell = PreparedGeometry::from(&shell);
    let hole_polygons: Vec<Polygon<f64>> = holes
        .iter()
        .map(|h| Polygon::new(h.clone(), vec![]))
        .collect();
    let boxes: Vec<Option<Rect<f64>>> = holes
        .iter()
        .map(|h| {
            if h.is_empty() {
                None
            } else {
                h.bounding_rect()
            }
        })
        .collect();
    let mut pairs = overlapping_pairs(&boxes);
    pairs.sort_unstable();
    let mut next = pairs.iter().peekable();
    for (a, hole) in hole_polygons.iter().enumerate() {
        if holes[a].is_empty() {
            continue;
        }
        let role = RingRole::Interior(a);
        let prepared_hole = PreparedGeometry::from(hole);
        let with_shell = prepared_shell.relate(&prepared_hole);
        if !with_shell.is_contains() {
            return Err(InvalidPolygon::InteriorRingNotContainedInExteriorRing(role));
        }
        if with_shell.get(CoordPos::OnBoundary, CoordPos::OnBoundary) == Dimensions::OneDimensional
        {
            return Err(InvalidPolygon::IntersectingRingsOnALine(
                RingRole::Exterior,
                role,
            ));
        }
        while let Some(&&(first, b)) = next.peek() {
            if first != a {
                break;
            }
            next.next();
            let im = prepared_hole.relate(&hole_polygons[b]);
            let other = RingRole::Interior(b);
            if im.get(CoordPos::Inside, CoordPos::Inside) == Dimensions::TwoDimensional {
                return Err(InvalidPolygon::IntersectingRingsOnAnArea(role, other));
            }
            if im.get(CoordPos::OnBoundary, CoordPos::OnBoundary) == Dimensions::OneDimensional {
                return Err(InvalidPolygon::IntersectingRingsOnALine(role, other));
            }
        }
    }
    Ok(())
}

/// Whether two edges of the ring meet anywhere other than at a vertex
/// the one ends and the other starts at (geo's rule: neighbouring edges
/// share a vertex; anything else, a touch included, is a crossing).
fn crosses_itself(ring: &LineString<f64>) -> bool {
    let lines: Vec<Line<f64>> = ring.lines().collect();
    let left = |l: &Line<f64>| l.start.x.min(l.end.x);
    let mut order: Vec<usize> = (0..lines.len()).collect();
    order.sort_by(|&p, &q| left(&lines[p]).total_cmp(&left(&lines[q])));
    for (k, &i) in order.iter().enumerate() {
        let a = lines[i];
        let right = a.start.x.max(a.end.x);
        let (low, high) = (a.start.y.min(a.end.y), a.start.y.max(a.end.y));
        for &j in &order[k + 1..] {
            let b = lines[j];
            if left(&b) > right {
                break;
            }
            if b.start.y.max(b.end.y) < low || b.start.y.min(b.end.y) > high {
                continue;
            }
            if a.intersects(&b) && a.start != b.end && a.end != b.start {
                return true;
            }
        }
    }
    false
}

#[cfg(test)]
#[allow(clippy::unwrap_used)] // a failed unwrap is a failed test
mod tests {
    use super::*;
    use geo::Validation;
    use std::str::FromStr;

    fn shape(wkt_text: &str) -> MultiPolygon<f64> {
        let g: geo::Geometry<f64> = wkt::Wkt::from_str(wkt_text).unwrap().try_into().unwrap();
        match g {
            geo::Geometry::Polygon(p) => MultiPolygon(vec![p]),
            geo::Geometry::MultiPolygon(m) => m,
            _ => panic!("not polygons"),
        }
    }

    /// geo's own check is the reference: the same first error (or none)
    /// on valid shapes, bow-ties, self-touching rings, spikes, holes that
    /// touch, cross or leave the shell, and parts that overlap or share
    /// an edge.
    #[test]
    fn agrees_with_geo_on_every_kind_of_fault() {
        let cases = [
            "POLYGON((0 0,4 0,4 4,0 4,0 0))",
            "POLYGON((0 0,4 4,4 0,0 4,0 0))",
            "POLYGON((0 0,4 0,2 2,4 4,0 4,2 2,0 0))",
            "POLYGON((0 0,4 0,4 4,2 4,2 6,2 4,0 4,0 0))",
            "POLYGON((0 0,0 0,4 0,4 0,4 4,0 4,0 0))",
            "POLYGON((0 0,1 0,0 0,0 0))",
            "POLYGON((0 0,4 0,4 4,0 4,0 0),(0 0,2 1,1 2,0 0))",
            "POLYGON((0 0,4 0,4 4,0 4,0 0),(0 0,2 0,1 2,0 0))",
            "POLYGON((0 0,4 0,4 4,0 4,0 0),(3 3,5 3,5 5,3 5,3 3))",
            "POLYGON((0 0,4 0,4 4,0 4,0 0),(1 1,2 1,2 2,1 2,1 1),(2 2,3 2,3 3,2 3,2 2))",
            "POLYGON((0 0,4 0,4 4,0 4,0 0),(1 1,2 1,2 2,1 2,1 1),(2 1,3 1,3 2,2 2,2 1))",
            "POLYGON((0 0,4 0,4 4,0 4,0 0),(1 1,3 1,3 3,1 3,1 1),(2 2,3.5 2,3.5 3.5,2 3.5,2 2))",
            "MULTIPOLYGON(((0 0,2 0,2 2,0 2,0 0)),((2 2,4 2,4 4,2 4,2 2)))",
            "MULTIPOLYGON(((0 0,2 0,2 2,0 2,0 0)),((2 0,4 0,4 2,2 2,2 0)))",
            "MULTIPOLYGON(((0 0,3 0,3 2,0 2,0 0)),((2 0,4 0,4 2,2 2,2 0)))",
            "MULTIPOLYGON(((0 0,9 0,9 9,0 9,0 0),(2 2,7 2,7 7,2 7,2 2)),((3 3,6 3,6 6,3 6,3 3)))",
            "MULTIPOLYGON(((0 0,9 0,9 9,0 9,0 0)),((3 3,6 3,6 6,3 6,3 3)))",
            "MULTIPOLYGON(((10 10,12 10,12 12,10 12,10 10)),((0 0,1 0,1 1,0 1,0 0)),((0 0,1 0,1 1,0 1,0 0)))",
        ];
        for text in cases {
            let s = shape(text);
            assert_eq!(check(&s), s.check_validation(), "{text}");
        }
        assert!(check(&shape(cases[0])).is_ok());
        assert!(matches!(
            check(&shape(cases[1])),
            Err(InvalidMultiPolygon::InvalidPolygon(
                _,
                InvalidPolygon::SelfIntersection(RingRole::Exterior)
            ))
        ));
    }

    /// A seeded random walk of rings, valid or not, against geo's check
    /// pair by pair.
    #[test]
    fn agrees_with_geo_on_random_rings() {
        let mut s: u64 = 42;
        let mut next = || {
            s = s
                .wrapping_mul(6364136223846793005)
                .wrapping_add(1442695040888963407);
            ((s >> 33) % 9) as f64
        };
        let mut invalid = 0;
        for _ in 0..300 {
            let n = 3 + (next() as usize) % 5;
            let mut ring: Vec<(f64, f64)> = (0..n).map(|_| (next(), next())).collect();
            ring.push(ring[0]);
            let p = MultiPolygon(vec![Polygon::new(LineString::from(ring), vec![])]);
            let ours = check(&p);
            invalid += usize::from(ours.is_err());
            assert_eq!(ours, p.check_validation(), "{p:?}");
        }
        assert!(invalid > 50 && invalid < 300, "{invalid}");
    }

    /// A 200 000-vertex circle is valid, and a bow-tie hidden in it (two
    /// vertices swapped) is found.
    #[test]
    fn a_dense_outline_is_checked_without_comparing_every_pair() {
        let n = 200_000;
        let mut ring: Vec<(f64, f64)> = (0..n)
            .map(|k| {
                let t = std::f64::consts::TAU * k as f64 / n as f64;
                (100.0 * t.cos(), 100.0 * t.sin())
            })
            .collect();
        ring.push(ring[0]);
        let circle = MultiPolygon(vec![Polygon::new(LineString::from(ring.clone()), vec![])]);
        assert!(check(&circle).is_ok());
        ring.swap(1000, 1001);
        let twisted = MultiPolygon(vec![Polygon::new(LineString::from(ring), vec![])]);
        assert_eq!(
            check(&twisted),
            Err(InvalidMultiPolygon::InvalidPolygon(
                GeometryIndex(0),
                InvalidPolygon::SelfIntersection(RingRole::Exterior)
            ))
        );
    }
}
