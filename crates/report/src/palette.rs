//! The one palette of patternproof's pictures.
//!
//! Colours from the colour-blind-safe set of Okabe & Ito (2008, "Color
//! Universal Design"), each paired with its own dash pattern so that a grey
//! print still separates the lines. Written down once and used everywhere.

use plotters::style::RGBColor;

/// A line style: colour, stroke width, dash (`None` = solid; `Some((on, off))`).
#[derive(Debug, Clone, Copy)]
pub struct Ink {
    /// Stroke colour.
    pub colour: RGBColor,
    /// Stroke width in pixels.
    pub width: u32,
    /// Dash pattern in pixels.
    pub dash: Option<(u32, u32)>,
}

/// Styles in order of use.
pub const INKS: [Ink; 8] = [
    Ink {
        colour: RGBColor(0, 0, 0),
        width: 2,
        dash: None,
    },
    Ink {
        colour: RGBColor(0, 114, 178),
        width: 2,
        dash: Some((8, 4)),
    },
    Ink {
        colour: RGBColor(230, 159, 0),
        width: 2,
        dash: Some((2, 3)),
    },
    Ink {
        colour: RGBColor(0, 158, 115),
        width: 2,
        dash: Some((12, 3)),
    },
    Ink {
        colour: RGBColor(204, 121, 167),
        width: 2,
        dash: Some((6, 2)),
    },
    Ink {
        colour: RGBColor(86, 180, 233),
        width: 3,
        dash: Some((3, 6)),
    },
    Ink {
        colour: RGBColor(213, 94, 0),
        width: 1,
        dash: None,
    },
    Ink {
        colour: RGBColor(120, 120, 120),
        width: 3,
        dash: Some((10, 6)),
    },
];

/// The style of the k-th series (cycles).
pub fn ink(k: usize) -> Ink {
    INKS[k % INKS.len()]
}

/// The style of an edge handling, the same in every picture.
pub fn edge_ink(edge: patternproof_audit::Edge) -> Ink {
    use patternproof_audit::Edge;
    match edge {
        Edge::None => INKS[0],
        Edge::Donnelly => INKS[1],
        Edge::Border => INKS[2],
        Edge::Toroidal => INKS[3],
        Edge::Simulation => INKS[4],
    }
}
