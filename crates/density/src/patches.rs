//! Patches: the separate pieces of an isopleth region, as 8-connected
//! components of its cells (cells touching at a corner belong together, as
//! a traced outline would join them).

/// Component label of each cell (`usize::MAX` outside the region) and the
/// number of components. Labels follow the first cell of each component
/// in row order.
pub fn label(cells: &[bool], nx: usize, ny: usize) -> (Vec<usize>, usize) {
    let mut lab = vec![usize::MAX; cells.len()];
    let mut count = 0;
    let mut stack = Vec::new();
    for start in 0..cells.len() {
        if !cells[start] || lab[start] != usize::MAX {
            continue;
        }
        lab[start] = count;
        stack.push(start);
        while let Some(k) = stack.pop() {
            let (i, j) = ((k % nx) as i64, (k / nx) as i64);
            for dj in -1..=1 {
                for di in -1..=1 {
                    let (a, b) = (i + di, j + dj);
                    if a < 0 || b < 0 || a >= nx as i64 || b >= ny as i64 {
                        continue;
                    }
                    let q = (b as usize) * nx + a as usize;
                    if cells[q] && lab[q] == usize::MAX {
                        lab[q] = count;
                        stack.push(q);
                    }
                }
            }
        }
        count += 1;
    }
    (lab, count)
}

#[cfg(test)]
mod tests {
    /// Corner contact joins (8-connectivity); a gap separates.
    #[test]
    fn counts_components() {
        let c = [
            true, false, false, true, //
            false, true, false, true, //
            false, false, false, false,
        ];
        let (_, n) = super::label(&c, 4, 3);
        assert_eq!(n, 2);
    }
}
