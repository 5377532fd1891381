//! Study-area windows: building them, and asking them geometric questions.
//!
//! Every analysis of patternproof divides by a window's area and corrects
//! for its edges, so the audit, the K function and the density surfaces
//! all need the same few answers about a window. They get them here, from
//! one implementation each.
//!
//! | module | job |
//! |---|---|
//! | [`build`] | the study-area variants of a data set (`bbox`, `hull`, `hull+D`, `concave`, `boundary`, `area`) |
//! | [`prepared`] | [`PreparedWindow`]: one window prepared once for point-in-window, distance to the outline, edges near a circle, raster cells, uniform points, area and perimeter |
//! | [`cover`] | point-in-window: `geo`'s answer from edges bucketed by height |
//! | [`outline`] | distance to the outline, exact for buffered hulls, and the guard zone's cell grid |
//! | [`sampling`] | exact uniform points in a polygon with holes |
//!
//! ```
//! use geo::{MultiPolygon, Rect, coord};
//! use patternproof_window::PreparedWindow;
//! let square = MultiPolygon::new(vec![
//!     Rect::new(coord! { x: 0.0, y: 0.0 }, coord! { x: 10.0, y: 10.0 }).to_polygon(),
//! ]);
//! let w = PreparedWindow::new(square, None);
//! assert_eq!(w.area(), 100.0);
//! assert!(w.contains([10.0, 3.0])); // the outline belongs to the window
//! assert_eq!(w.distance_to_outline([2.0, 5.0]), 2.0);
//! ```

pub mod build;
pub mod cover;
pub mod outline;
pub mod prepared;
pub mod sampling;
#[cfg(test)]
mod test_shapes;

pub use build::{BufferRule, NamedShape, Window, WindowKind, WindowOptions, build_windows};
pub use outline::Outline;
pub use patternproof_core::Rectangle;
pub use prepared::PreparedWindow;
pub use sampling::Sampler;
