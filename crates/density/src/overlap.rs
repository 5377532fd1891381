//! Overlap of two regions on the same raster: the Jaccard index
//! `|A ∩ B| / |A ∪ B|` of their cells (1 = identical, 0 = disjoint).

/// Jaccard index (1 when both are empty).
pub fn jaccard(a: &[bool], b: &[bool]) -> f64 {
    let (mut inter, mut union) = (0usize, 0usize);
    for (x, y) in a.iter().zip(b) {
        inter += usize::from(*x && *y);
        union += usize::from(*x || *y);
    }
    if union == 0 {
        1.0
    } else {
        inter as f64 / union as f64
    }
}

#[cfg(test)]
mod tests {
    use approx::assert_abs_diff_eq;
    #[test]
    fn half_overlap() {
        let a = [true, true, false, false];
        let b = [false, true, true, false];
        assert_abs_diff_eq!(super::jaccard(&a, &b), 1.0 / 3.0, epsilon = 1e-15);
    }
}
