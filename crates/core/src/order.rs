//! The canonical order of a pattern: points sorted by x, then y.
//!
//! Floating-point sums depend on the order of their terms, so a mean
//! nearest-neighbour distance summed in file order changes in its last bits
//! when the rows of the file are shuffled. Every analysis therefore works
//! on the points in one order that depends on the coordinates alone; then
//! any permutation of the input gives byte-identical results.

use crate::Xy;
use rayon::prelude::*;
use std::cmp::Ordering;

/// x first, then y, by IEEE total order with −0.0 taken as +0.0 (the two
/// are the same place).
pub fn compare(a: &Xy, b: &Xy) -> Ordering {
    (a[0] + 0.0)
        .total_cmp(&(b[0] + 0.0))
        .then((a[1] + 0.0).total_cmp(&(b[1] + 0.0)))
}

/// Whether the points are already in canonical order.
pub fn is_canonical(points: &[Xy]) -> bool {
    points
        .windows(2)
        .all(|w| compare(&w[0], &w[1]) != Ordering::Greater)
}

/// The permutation that puts `points` in canonical order (`order[k]` is
/// the index of the k-th point), or `None` when they already are. Ties
/// (exact repeats) keep their input order, so the permutation itself is
/// unique; the sorted coordinates would be unique anyway.
pub fn canonical_permutation(points: &[Xy]) -> Option<Vec<usize>> {
    if is_canonical(points) {
        return None;
    }
    let mut order: Vec<usize> = (0..points.len()).collect();
    order.par_sort_unstable_by(|&i, &j| compare(&points[i], &points[j]).then(i.cmp(&j)));
    Some(order)
}

/// `values` rearranged by `order` (from [`canonical_permutation`]).
pub fn permute<T: Clone>(values: &[T], order: &[usize]) -> Vec<T> {
    order.iter().map(|&i| values[i].clone()).collect()
}

#[cfg(test)]
#[allow(clippy::unwrap_used)] // a failed unwrap is a failed test
mod tests {
    use super::*;

    /// Against the plain definition: std's stable sort by (x, y) gives the
    /// same sequence, and a shuffled copy sorts to the same bytes.
    #[test]
    fn sorts_like_a_stable_sort_and_forgets_the_input_order() {
        let mut s: u64 = 11;
        let mut pts = Vec::new();
        for _ in 0..5_000 {
            s = s
                .wrapping_mul(6364136223846793005)
                .wrapping_add(1442695040888963407);
            pts.push([((s >> 45) % 40) as f64 * 0.25, ((s >> 20) % 997) as f64]);
        }
        pts.push([-0.0, 2.75]);
        pts.push([0.0, 2.25]);
        let order = canonical_permutation(&pts).unwrap();
        let sorted = permute(&pts, &order);
        let mut want = pts.clone();
        want.sort_by(compare);
        assert_eq!(sorted, want);
        assert!(is_canonical(&sorted));
        assert!(canonical_permutation(&sorted).is_none());
        // −0.0 and +0.0 are one place: (0, 2.25) comes before (−0, 2.75).
        let k = sorted.iter().position(|p| p[1] == 2.25).unwrap();
        assert_eq!(sorted[k + 1][1], 2.75);

        let mut shuffled = pts.clone();
        shuffled.reverse();
        shuffled.rotate_left(1234);
        let again = permute(&shuffled, &canonical_permutation(&shuffled).unwrap());
        let bits = |v: &[Xy]| -> Vec<[u64; 2]> {
            v.iter()
                .map(|p| [(p[0] + 0.0).to_bits(), p[1].to_bits()])
                .collect()
        };
        assert_eq!(bits(&again), bits(&sorted));
    }
}
