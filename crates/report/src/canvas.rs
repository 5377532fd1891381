//! The frame and the strokes the plotted pictures share, so that the
//! audit's, the density's and the multi-scale pictures look alike and a
//! change of house style is made once.
//!
//! Legends are drawn in a band of their own beside or below the plots
//! ([`legend_band`]), never over the data, and each swatch is drawn with
//! the same stroke, dash pattern and marker as what it stands for. The
//! frames of plotting areas and of legends have colours of their own
//! ([`PLOT_FRAME`], [`LEGEND_FRAME`]) that nothing else uses, so a test
//! can find both in the SVG and check that they do not overlap.

use crate::palette::Ink;
use plotters::coord::{CoordTranslate, Shift};
use plotters::element::DashedPathElement;
use plotters::prelude::*;
use plotters::style::text_anchor::{HPos, Pos, VPos};

/// A drawing area of an SVG picture: the whole canvas or one panel of it.
pub type Canvas<'a> = DrawingArea<SVGBackend<'a>, Shift>;

/// Stroke of the rectangle round every plotting area.
pub const PLOT_FRAME: RGBColor = RGBColor(0x99, 0x99, 0x99);

/// Stroke of the rectangle round every legend.
pub const LEGEND_FRAME: RGBColor = RGBColor(0x55, 0x55, 0x55);

/// Font size (plotters units; the SVG says 1/1.24 of it in pixels) of
/// legend labels.
pub const LEGEND_FONT: u32 = 14;

/// An SVG picture of `size` pixels on white, drawn by `draw`. `None` when
/// `draw` or the backend fails.
pub fn svg(size: (u32, u32), draw: impl FnOnce(&Canvas<'_>) -> Option<()>) -> Option<String> {
    let mut svg = String::new();
    {
        let root = SVGBackend::with_string(&mut svg, size).into_drawing_area();
        root.fill(&WHITE).ok()?;
        draw(&root)?;
        root.present().ok()?;
    }
    Some(svg)
}

/// Text for a picture, without the backticks the tool's sentences use to
/// mark names (`layer \`plots\``): a marked span gets typographic quotes
/// and a stray backtick becomes an apostrophe, so no raw backtick reaches
/// an SVG.
pub fn plain(s: &str) -> String {
    let parts: Vec<&str> = s.split('`').collect();
    let last = parts.len() - 1;
    let mut out = String::with_capacity(s.len());
    for (k, part) in parts.iter().enumerate() {
        if k % 2 == 1 && k < last {
            out.push('‘');
            out.push_str(part);
            out.push('’');
        } else if k % 2 == 1 {
            out.push('\'');
            out.push_str(part);
        } else {
            out.push_str(part);
        }
    }
    out
}

/// A polyline in `ink`, solid or dashed as the ink says.
pub fn line<DB: DrawingBackend, CT: CoordTranslate<From = (f64, f64)>>(
    chart: &mut ChartContext<'_, DB, CT>,
    coords: Vec<(f64, f64)>,
    ink: Ink,
) -> Option<()> {
    let stroke = ShapeStyle::from(&ink.colour).stroke_width(ink.width);
    match ink.dash {
        None => chart.draw_series(LineSeries::new(coords, stroke)).ok()?,
        Some((on, off)) => chart
            .draw_series(DashedLineSeries::new(coords, on, off, stroke))
            .ok()?,
    };
    Some(())
}

/// The light frame round a chart's plotting area.
pub fn frame<DB: DrawingBackend, CT: CoordTranslate>(
    chart: &ChartContext<'_, DB, CT>,
) -> Option<()> {
    let area = chart.plotting_area().strip_coord_spec();
    let (w, h) = area.dim_in_pixel();
    area.draw(&Rectangle::new(
        [(0, 0), (w as i32 - 1, h as i32 - 1)],
        ShapeStyle::from(&PLOT_FRAME).stroke_width(1),
    ))
    .ok()
}

/// Marker shapes. Each analysis keeps its own meaning for them; the legend
/// draws the same shape as the plot.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Shape {
    /// Open or filled circle.
    Circle,
    /// Triangle, point up.
    Triangle,
    /// Diagonal cross.
    Cross,
    /// Square.
    Square,
    /// Diamond.
    Diamond,
}

/// A marker: shape, colour, filled or open, half-size in pixels.
#[derive(Debug, Clone, Copy)]
pub struct Mark {
    /// Shape.
    pub shape: Shape,
    /// Colour of stroke (and fill, when filled).
    pub colour: RGBColor,
    /// Filled or open.
    pub filled: bool,
    /// Half the marker's size in pixels.
    pub size: i32,
}

impl Mark {
    /// An open marker of 2-pixel stroke.
    pub fn open(shape: Shape, colour: RGBColor, size: i32) -> Mark {
        Mark {
            shape,
            colour,
            filled: false,
            size,
        }
    }
}

/// Draw `mark` at each of `at` on `area` (a chart's plotting area or a
/// plain canvas): the one drawing of each shape, used by plots and legends.
pub fn marks<DB: DrawingBackend, CT: CoordTranslate>(
    area: &DrawingArea<DB, CT>,
    mark: Mark,
    at: impl IntoIterator<Item = CT::From>,
) -> Option<()>
where
    CT::From: Clone,
{
    let mut style = ShapeStyle::from(&mark.colour).stroke_width(2);
    if mark.filled {
        style = style.filled();
    }
    let s = mark.size;
    for c in at {
        let e = EmptyElement::at(c);
        let drawn = match mark.shape {
            Shape::Circle => area.draw(&(e + Circle::new((0, 0), s, style))),
            Shape::Triangle => {
                let corners = vec![(0, -s - 1), (s + 1, s - 1), (-s - 1, s - 1), (0, -s - 1)];
                if mark.filled {
                    area.draw(&(e + Polygon::new(corners, style)))
                } else {
                    area.draw(&(e + PathElement::new(corners, style)))
                }
            }
            Shape::Cross => area.draw(
                &(e + PathElement::new(vec![(-s, -s), (s, s)], style)
                    + PathElement::new(vec![(-s, s), (s, -s)], style)),
            ),
            Shape::Square => area.draw(&(e + Rectangle::new([(-s, -s), (s, s)], style))),
            Shape::Diamond => {
                let corners = vec![
                    (0, -s - 1),
                    (s + 1, 0),
                    (0, s + 1),
                    (-s - 1, 0),
                    (0, -s - 1),
                ];
                if mark.filled {
                    area.draw(&(e + Polygon::new(corners, style)))
                } else {
                    area.draw(&(e + PathElement::new(corners, style)))
                }
            }
        };
        drawn.ok()?;
    }
    Some(())
}

/// What a legend entry shows in front of its label.
#[derive(Debug, Clone, Copy)]
pub enum Swatch {
    /// A stroke of the line's ink, dashed as the line is.
    Line(Ink),
    /// A marker.
    Mark(Mark),
    /// A stroke of the ink with the marker on it.
    LineMark(Ink, Mark),
    /// A filled box (a shaded band or a histogram).
    Fill(RGBColor),
    /// A filled box with a frame (a shaded band with an outline).
    FramedFill(RGBColor, RGBColor),
    /// A vertical range bar with end caps, of 2-pixel stroke.
    Range(RGBColor),
    /// A vertical stroke of the ink (a guide line drawn upright).
    Vertical(Ink),
}

/// One legend entry.
#[derive(Debug, Clone)]
pub struct Entry {
    /// The swatch.
    pub swatch: Swatch,
    /// The words.
    pub label: String,
}

impl Entry {
    /// An entry.
    pub fn new(swatch: Swatch, label: impl Into<String>) -> Entry {
        Entry {
            swatch,
            label: label.into(),
        }
    }
}

const SWATCH_W: i32 = 34;
const PAD: i32 = 8;

/// Pixel height of one legend row at `font`.
fn row_height(font: u32) -> i32 {
    (font as f64 / 1.24 * 1.6).ceil() as i32
}

/// Pixel height a [`legend_band`] of `entries` entries in `columns`
/// columns needs at `font`, frame and margins included.
pub fn legend_height(entries: usize, columns: usize, font: u32) -> u32 {
    let rows = entries.div_ceil(columns.max(1)) as i32;
    (2 * PAD + 4 + rows * row_height(font)).max(0) as u32
}

/// Draw `entries` in `columns` columns inside `area`, which is a band of
/// the picture beside or below the plots (never a plotting area), framed
/// in [`LEGEND_FRAME`]. Entries fill the columns top to bottom, so that
/// entries given together stay together.
pub fn legend_band(area: &Canvas<'_>, entries: &[Entry], columns: usize, font: u32) -> Option<()> {
    if entries.is_empty() {
        return Some(());
    }
    let columns = columns.max(1);
    let (w, _) = area.dim_in_pixel();
    let rows = entries.len().div_ceil(columns) as i32;
    let rh = row_height(font);
    let h = 2 * PAD + rows * rh;
    area.draw(&Rectangle::new(
        [(2, 2), (w as i32 - 3, h + 1)],
        ShapeStyle::from(&LEGEND_FRAME).stroke_width(1),
    ))
    .ok()?;
    let col_w = (w as i32 - 2 * PAD - 4) / columns as i32;
    let text = ("sans-serif", font)
        .into_font()
        .color(&BLACK)
        .pos(Pos::new(HPos::Left, VPos::Center));
    for (k, e) in entries.iter().enumerate() {
        let (r, c) = ((k % rows as usize) as i32, (k / rows as usize) as i32);
        let x = 2 + PAD + c * col_w;
        let y = 2 + PAD + r * rh + rh / 2;
        swatch(area, e.swatch, x, y)?;
        area.draw(&Text::new(
            e.label.clone(),
            (x + SWATCH_W + 8, y),
            text.clone(),
        ))
        .ok()?;
    }
    Some(())
}

/// One swatch, `SWATCH_W` wide, its left end at `x`, centred on `y`.
fn swatch(area: &Canvas<'_>, s: Swatch, x: i32, y: i32) -> Option<()> {
    let stroke = |ink: Ink| -> Option<()> {
        let style = ShapeStyle::from(&ink.colour).stroke_width(ink.width);
        let pts = vec![(x, y), (x + SWATCH_W, y)];
        match ink.dash {
            None => area.draw(&PathElement::new(pts, style)).ok(),
            Some((on, off)) => area
                .draw(&DashedPathElement::new(pts, on as i32, off as i32, style))
                .ok(),
        }
    };
    let mid = (x + SWATCH_W / 2, y);
    match s {
        Swatch::Line(ink) => stroke(ink),
        Swatch::Mark(m) => marks(area, m, [mid]),
        Swatch::LineMark(ink, m) => {
            stroke(ink)?;
            marks(area, m, [mid])
        }
        Swatch::Fill(colour) => area
            .draw(&Rectangle::new(
                [(x, y - 6), (x + SWATCH_W, y + 6)],
                colour.filled(),
            ))
            .ok(),
        Swatch::FramedFill(fill, edge) => {
            area.draw(&Rectangle::new(
                [(x, y - 6), (x + SWATCH_W, y + 6)],
                fill.filled(),
            ))
            .ok()?;
            area.draw(&Rectangle::new(
                [(x, y - 6), (x + SWATCH_W, y + 6)],
                ShapeStyle::from(&edge).stroke_width(1),
            ))
            .ok()
        }
        Swatch::Range(colour) => {
            let style = ShapeStyle::from(&colour).stroke_width(2);
            let cx = mid.0;
            area.draw(&PathElement::new(vec![(cx, y - 7), (cx, y + 7)], style))
                .ok()?;
            for yy in [y - 7, y + 7] {
                area.draw(&PathElement::new(vec![(cx - 5, yy), (cx + 5, yy)], style))
                    .ok()?;
            }
            Some(())
        }
        Swatch::Vertical(ink) => {
            let style = ShapeStyle::from(&ink.colour).stroke_width(ink.width);
            let pts = vec![(mid.0, y - 8), (mid.0, y + 8)];
            match ink.dash {
                None => area.draw(&PathElement::new(pts, style)).ok(),
                Some((on, off)) => area
                    .draw(&DashedPathElement::new(pts, on as i32, off as i32, style))
                    .ok(),
            }
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn plain_quotes_marked_names_and_keeps_no_backtick() {
        assert_eq!(
            plain("survey.gpkg (layer `plots_utm`)"),
            "survey.gpkg (layer ‘plots_utm’)"
        );
        assert_eq!(plain("it`s"), "it's");
        assert_eq!(plain("none"), "none");
    }

    /// A dashed ink's swatch is drawn in dashes of the ink's own length
    /// (8 on, 4 off over 34 pixels: 8, 8, 6 → three polylines), a solid
    /// one in one stroke.
    #[test]
    fn swatches_repeat_the_dash_pattern() {
        let dashed = Ink {
            colour: RGBColor(0, 114, 178),
            width: 2,
            dash: Some((8, 4)),
        };
        let solid = Ink {
            dash: None,
            ..dashed
        };
        let count = |ink: Ink| {
            let s = svg((300, 60), |root| {
                legend_band(root, &[Entry::new(Swatch::Line(ink), "x")], 1, 14)
            })
            .expect("drawn");
            s.matches("<polyline").count() + s.matches("<line").count()
        };
        assert_eq!(count(solid), 1);
        assert_eq!(count(dashed), 3);
    }

    #[test]
    fn legend_height_counts_rows() {
        assert_eq!(
            legend_height(5, 2, 14) as i32,
            2 * PAD + 4 + 3 * row_height(14)
        );
    }
}
