//! Drawing a stage's [`Picture`] as SVG (plotters). The plot only draws: every curve, point and
//! level comes from the drive kind's picture data, which comes from the analysis. Every element
//! of the SVG carries a class (the picture's own, or one of [`class`]), so the parts can be found
//! and styled.

mod tagged;

use plotters::coord::types::RangedCoordf64;
use plotters::coord::Shift;
use plotters::prelude::*;

use crate::picture::{Layout, Panel, Picture, Style};
use tagged::{apply_classes, TaggedSvg, Tags};

/// Width and height of the picture, px.
pub const SIZE: (u32, u32) = (1280, 820);

/// The classes of the picture's frame.
pub mod class {
    /// Axes, grid, tick labels and axis titles.
    pub const AXIS: &str = "pinlow-axis";
    /// Panel captions.
    pub const CAPTION: &str = "pinlow-caption";
    /// Legend boxes, swatches and texts.
    pub const LEGEND: &str = "pinlow-legend";
    /// Notes written on a panel.
    pub const NOTE: &str = "pinlow-note";
    /// The background.
    pub const BACKGROUND: &str = "pinlow-background";
}

const FONT: &str = "sans-serif";

/// The colour of a style (colours of our own choosing).
fn colour(style: Style) -> RGBColor {
    match style {
        Style::Nominal => RGBColor(70, 110, 170),
        Style::Worst => RGBColor(200, 100, 20),
        Style::Load => RGBColor(60, 60, 60),
        Style::LoadWorst => RGBColor(150, 40, 120),
        Style::PointNominal => RGBColor(20, 150, 70),
        Style::PointWorst => RGBColor(210, 30, 30),
        Style::Target => RGBColor(20, 150, 70),
        Style::Edge => RGBColor(210, 30, 30),
        Style::Region => RGBColor(250, 220, 120),
        Style::Data => RGBColor(40, 90, 180),
    }
}

/// The picture as one SVG document.
pub fn picture_svg(picture: &Picture) -> Result<String, String> {
    let tags = Tags::default();
    let mut buf = String::new();
    {
        let backend = TaggedSvg::new(&mut buf, SIZE, tags.clone());
        let root = backend.into_drawing_area();
        tags.set(Some(class::BACKGROUND));
        root.fill(&WHITE).map_err(err)?;
        let areas: Vec<DrawingArea<_, Shift>> = match picture.layout {
            Layout::Single => vec![root.clone()],
            Layout::SideBySide => {
                let (l, r) = root.split_horizontally(SIZE.0 / 2);
                vec![l, r]
            }
            Layout::LeftStackRight => {
                let (left, right) = root.split_horizontally(SIZE.0 / 2 + 60);
                let (upper, lower) = left.split_vertically(SIZE.1 * 64 / 100);
                vec![upper, lower, right]
            }
        };
        for (i, (panel, area)) in picture.panels.iter().zip(areas.iter()).enumerate() {
            tags.scope(panel.extra_class);
            let big = i == 0 || picture.layout != Layout::LeftStackRight || i == 2;
            draw_panel(area, &tags, panel, big)?;
            tags.scope(None);
        }
        root.present().map_err(err)?;
    }
    apply_classes(&buf, &tags.recorded())
}

fn draw_panel<DB: DrawingBackend>(
    area: &DrawingArea<DB, Shift>,
    tags: &Tags,
    p: &Panel,
    legend: bool,
) -> Result<(), String> {
    let (x0, x1) = range(p.x.min, p.x.max);
    let (y0, y1) = range(p.y.min, p.y.max);
    tags.set(Some(class::CAPTION));
    let mut chart = ChartBuilder::on(area)
        .caption(&p.caption, (FONT, if legend { 20 } else { 15 }))
        .margin(12)
        .x_label_area_size(45)
        .y_label_area_size(60)
        .build_cartesian_2d(x0..x1, y0..y1)
        .map_err(err)?;
    tags.set(Some(class::AXIS));
    draw_mesh(&mut chart, &p.x.title, &p.y.title)?;
    for b in &p.bands {
        tags.set(Some(b.class));
        let c = colour(b.style).mix(0.45);
        chart
            .draw_series(std::iter::once(Rectangle::new(
                [(b.x0.max(x0), y0), (b.x1.min(x1), y1)],
                c.filled(),
            )))
            .map_err(err)?
            .label(b.label.clone())
            .legend(move |(x, y)| Rectangle::new([(x, y - 6), (x + 18, y + 6)], c.filled()));
    }
    for l in &p.levels {
        tags.set(Some(l.class));
        let c = colour(l.style);
        let width = if l.style == Style::Edge { 1 } else { 2 };
        chart
            .draw_series(DashedLineSeries::new(
                [(x0, l.y), (x1, l.y)],
                if l.style == Style::Edge { 4 } else { 10 },
                if l.style == Style::Edge { 4 } else { 6 },
                c.stroke_width(width),
            ))
            .map_err(err)?
            .label(l.label.clone())
            .legend(move |(x, y)| PathElement::new([(x, y), (x + 18, y)], c.stroke_width(width)));
    }
    let n = p
        .curves
        .iter()
        .filter(|c| c.style == Style::Nominal)
        .count()
        .max(1);
    let mut nominal_seen = 0;
    for curve in &p.curves {
        tags.set(Some(curve.class));
        let mut c = colour(curve.style);
        if curve.style == Style::Nominal {
            nominal_seen += 1;
            let shade = 0.45 + 0.55 * nominal_seen as f64 / n as f64;
            c = mix_white(c, shade);
        }
        let series = if curve.style == Style::LoadWorst {
            chart.draw_series(DashedLineSeries::new(
                curve.points.iter().copied(),
                8,
                6,
                c.stroke_width(2),
            ))
        } else {
            chart.draw_series(LineSeries::new(
                curve.points.iter().copied(),
                c.stroke_width(2),
            ))
        }
        .map_err(err)?;
        if let Some(label) = &curve.label {
            series
                .label(label.clone())
                .legend(move |(x, y)| PathElement::new([(x, y), (x + 18, y)], c.stroke_width(2)));
        }
    }
    for m in &p.markers {
        tags.set(Some(m.class));
        let c = colour(m.style);
        if m.style == Style::PointWorst {
            chart
                .draw_series(std::iter::once(TriangleMarker::new(
                    (m.x, m.y),
                    9,
                    c.filled(),
                )))
                .map_err(err)?
                .label(m.label.clone())
                .legend(move |(x, y)| TriangleMarker::new((x + 9, y), 7, c.filled()));
        } else {
            chart
                .draw_series(std::iter::once(Circle::new((m.x, m.y), 7, c.filled())))
                .map_err(err)?
                .label(m.label.clone())
                .legend(move |(x, y)| Circle::new((x + 9, y), 6, c.filled()));
        }
    }
    for (i, note) in p.notes.iter().enumerate() {
        tags.set(Some(class::NOTE));
        chart
            .draw_series(std::iter::once(Text::new(
                note.clone(),
                (
                    x0 + 0.05 * (x1 - x0),
                    y0 + (0.55 - 0.07 * i as f64) * (y1 - y0),
                ),
                (FONT, 15).into_font().color(&colour(Style::PointWorst)),
            )))
            .map_err(err)?;
    }
    if legend {
        tags.set(Some(class::LEGEND));
        chart
            .configure_series_labels()
            .position(SeriesLabelPosition::UpperRight)
            .background_style(WHITE.mix(0.85))
            .border_style(RGBColor(160, 160, 160))
            .label_font((FONT, 13))
            .draw()
            .map_err(err)?;
    }
    Ok(())
}

/// A colour moved towards white: `shade` 1 keeps it, 0 is white.
fn mix_white(c: RGBColor, shade: f64) -> RGBColor {
    let m = |v: u8| {
        (255.0 - (255.0 - f64::from(v)) * shade)
            .round()
            .clamp(0.0, 255.0) as u8
    };
    RGBColor(m(c.0), m(c.1), m(c.2))
}

/// A non-empty, finite range.
fn range(lo: f64, hi: f64) -> (f64, f64) {
    let (lo, hi) = if lo.is_finite() && hi.is_finite() {
        (lo, hi)
    } else {
        (0.0, 1.0)
    };
    if hi > lo {
        (lo, hi)
    } else {
        (lo - 0.5, lo + 0.5)
    }
}

/// Grid, tick labels and axis titles of a chart, the same on every panel.
fn draw_mesh<DB: DrawingBackend>(
    chart: &mut ChartContext<'_, DB, Cartesian2d<RangedCoordf64, RangedCoordf64>>,
    x_desc: &str,
    y_desc: &str,
) -> Result<(), String> {
    chart
        .configure_mesh()
        .x_desc(x_desc)
        .y_desc(y_desc)
        .light_line_style(RGBColor(235, 235, 235))
        .label_style((FONT, 14))
        .axis_desc_style((FONT, 16))
        .draw()
        .map_err(err)
}

fn err<E: std::fmt::Display>(e: E) -> String {
    format!("plot: {e}")
}

#[cfg(test)]
mod tests;
