//! Pure statistics for patternproof (and the one number formatter
//! beneath every output): no files, no printing, no geometry
//! beyond point coordinates. Every function here is checked against a
//! published formula or an outside reference library in its tests.
//!
//! | module | what it computes |
//! |---|---|
//! | [`nearest`] | exact nearest-neighbour distances behind one interface (grid buckets, Z-order tree, R*-tree from `rstar` as last resort) |
//! | [`grid_nearest`] | the uniform bucket grid behind them, plane and torus |
//! | [`close_pairs`] | every pair closer than a radius (the K function's range search), from a bucket grid |
//! | [`curve_tree`] | the Z-order tree of boxes that takes over where the grid's cells overfill |
//! | [`clark_evans`] | the Clark & Evans (1954) ratio, its standard error, z and p |
//! | [`normal`] | normal tail probabilities and critical values (`statrs`) |
//! | [`call`] | the verdict of one row at a chosen α |
//! | [`flip`] | closed-form window areas at which the uncorrected call changes |
//! | [`donnelly`] | Donnelly's (1978) edge-corrected mean and standard error |
//! | [`guard_zone`] | moments of the guard-zone (border) test |
//! | [`toroidal`] | nearest-neighbour distances on a torus |
//! | [`monte_carlo`] | rank p-values and quantiles for simulation tests |
//! | [`default_sims`] | the one rule for how many simulations a run makes by default |
//! | [`numbers`] | numbers for people: the one formatter of every table, page and sentence |
//! | [`order`] | the canonical point order that makes every sum independent of the input's row order |
//!
//! Points are `[x, y]` pairs in a projected, planar unit; the caller
//! (the `io` crate) is responsible for projecting geographic input.

pub mod call;
pub mod clark_evans;
pub mod close_pairs;
pub mod curve_tree;
pub mod default_sims;
pub mod donnelly;
pub mod flip;
pub mod grid_nearest;
pub mod guard_zone;
pub mod monte_carlo;
pub mod nearest;
pub mod normal;
pub mod numbers;
#[cfg(test)]
mod oracles;
pub mod order;
pub mod toroidal;

pub use call::Call;
pub use clark_evans::{CE_MEAN_FACTOR, CE_SE_FACTOR, NnRatioTest};
pub use flip::FlipThresholds;

/// A point in a projected plane, `[x, y]`.
pub type Xy = [f64; 2];

/// An axis-aligned rectangle `[min_x, min_y]`–`[max_x, max_y]`: a
/// rectangular window, the frame a torus wraps, the extent a bucket grid
/// covers. One type for all of them, so a window's rectangle goes to the
/// torus and the edge weights as it is.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Rectangle {
    /// Lower-left corner.
    pub min: Xy,
    /// Upper-right corner.
    pub max: Xy,
}

impl Rectangle {
    /// Extent along x.
    pub fn width(&self) -> f64 {
        self.max[0] - self.min[0]
    }

    /// Extent along y.
    pub fn height(&self) -> f64 {
        self.max[1] - self.min[1]
    }
}
