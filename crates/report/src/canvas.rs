//! The frame and the strokes the plotted pictures share, so that the
//! audit's, the density's and the multi-scale pictures look alike and a
//! change of house style is made once.

use crate::palette::Ink;
use plotters::chart::SeriesLabelStyle;
use plotters::coord::{CoordTranslate, Shift};
use plotters::prelude::*;

/// A drawing area of an SVG picture: the whole canvas or one panel of it.
pub type Canvas<'a> = DrawingArea<SVGBackend<'a>, Shift>;

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

/// A polyline in `ink`, solid or dashed as the ink says. With a label it
/// gets a legend entry: a short stroke of the same ink.
pub fn line<DB: DrawingBackend, CT: CoordTranslate<From = (f64, f64)>>(
    chart: &mut ChartContext<'_, DB, CT>,
    coords: Vec<(f64, f64)>,
    ink: Ink,
    label: Option<String>,
) -> Option<()> {
    let stroke = ShapeStyle::from(&ink.colour).stroke_width(ink.width);
    let series = match ink.dash {
        None => chart.draw_series(LineSeries::new(coords, stroke)).ok()?,
        Some((on, off)) => chart
            .draw_series(DashedLineSeries::new(coords, on, off, stroke))
            .ok()?,
    };
    if let Some(l) = label {
        series
            .label(l)
            .legend(move |(x, y)| PathElement::new(vec![(x, y), (x + 20, y)], stroke));
    }
    Some(())
}

/// The legend box of the charts: white at 90 % opacity, black border. The
/// caller sets the corner (and the font, if not the default) and draws it.
pub fn legend<'a, 'b, DB: DrawingBackend + 'a, CT: CoordTranslate>(
    chart: &'b mut ChartContext<'a, DB, CT>,
) -> SeriesLabelStyle<'a, 'b, DB, CT> {
    let mut style = chart.configure_series_labels();
    style.background_style(WHITE.mix(0.9)).border_style(BLACK);
    style
}
