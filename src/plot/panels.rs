//! Drawing the two panels of a stage's SVG: the output curves with load lines and operating
//! points, and the worst-case overdrive against ambient.

use plotters::coord::types::RangedCoordf64;

use super::*;

// Colours of our own choosing.
const C_CURVE: RGBColor = RGBColor(70, 110, 170);
const C_CURVE_WORST: RGBColor = RGBColor(200, 100, 20);
const C_LOAD: RGBColor = RGBColor(60, 60, 60);
const C_LOAD_WORST: RGBColor = RGBColor(150, 40, 120);
const C_NOMINAL: RGBColor = RGBColor(20, 150, 70);
const C_WORST: RGBColor = RGBColor(210, 30, 30);
const C_SATURATION: RGBColor = RGBColor(250, 220, 120);
const C_OVERDRIVE: RGBColor = RGBColor(40, 90, 180);
const C_TARGET: RGBColor = RGBColor(20, 150, 70);
const C_EDGE: RGBColor = RGBColor(210, 30, 30);
const FONT: &str = "sans-serif";

/// Points of the curve at `ib` inside 0 <= IC <= `y_max` (A) for 0 <= VCE <= `x_max`, denser
/// near the knee. IC rises with VCE at a fixed IB in this model, so the visible part is one piece.
fn curve_points(m: &EbersMoll, ib: f64, x_max: f64, y_max: f64) -> Vec<(f64, f64)> {
    let ic = |v: f64| m.collector_current(ib, v);
    let lo = if ic(0.0) >= 0.0 {
        0.0
    } else {
        ebers_moll::bisect(ic, 0.0, x_max).unwrap_or(0.0)
    };
    let hi = if ic(x_max) <= y_max {
        x_max
    } else {
        ebers_moll::bisect(|v| ic(v) - y_max, lo, x_max).unwrap_or(x_max)
    };
    const N: usize = 160;
    (0..=N)
        .map(|i| {
            let s = i as f64 / N as f64;
            let v = lo + (hi - lo) * s * s;
            (v, ic(v).clamp(0.0, y_max) * 1e3)
        })
        .collect()
}

/// The output-curve panel: the full VCE range above, a zoom on the knee below.
pub(super) fn draw_output_panel<DB: DrawingBackend>(
    area: &DrawingArea<DB, Shift>,
    tags: &Tags,
    stage: &Stage,
    analysis: &StageAnalysis,
    view: &OutputView,
) -> Result<(), String> {
    let ic_max = analysis.worst.load.ic_max.base();
    let x_max = view.vcc_max * 1.05;
    let nominal_ic = view.nominal.map(|p| p.ic).unwrap_or(0.0);
    // Room above the data for the legend.
    let y_max = 1.9 * ic_max.max(nominal_ic).max(view.vcc_nominal / view.r_load);
    let (upper, lower) = area.split_vertically(area.dim_in_pixel().1 * 64 / 100);
    draw_output_chart(
        &upper,
        tags,
        stage,
        view,
        ic_max,
        (x_max, y_max),
        &format!("{}: output curves ({})", stage.name, stage.part.id),
        true,
    )?;
    let x_zoom = (ZOOM_KNEES * view.knee).max(ZOOM_MIN_V).min(x_max);
    tags.scope(Some(class::ZOOM));
    let drawn = draw_output_chart(
        &lower,
        tags,
        stage,
        view,
        ic_max,
        (x_zoom, y_max),
        "zoom on the saturation knee",
        false,
    );
    tags.scope(None);
    drawn
}

/// Zoom panel width in knees.
const ZOOM_KNEES: f64 = 4.0;
/// Narrowest zoom panel, V.
const ZOOM_MIN_V: f64 = 0.4;

/// The part of the line from (`v0`, 0) to (0, `i0`) with 0 <= VCE <= `x_max`, IC in mA.
fn load_line_points(v0: f64, i0: f64, x_max: f64) -> [(f64, f64); 2] {
    let x_end = v0.min(x_max);
    [(0.0, i0 * 1e3), (x_end, i0 * (1.0 - x_end / v0) * 1e3)]
}

#[allow(clippy::too_many_arguments)]
fn draw_output_chart<DB: DrawingBackend>(
    area: &DrawingArea<DB, Shift>,
    tags: &Tags,
    stage: &Stage,
    view: &OutputView,
    ic_max: f64,
    (x_max, y_max): (f64, f64),
    caption: &str,
    legend: bool,
) -> Result<(), String> {
    let y_max_ma = y_max * 1e3;
    tags.set(Some(class::CAPTION));
    let mut chart = ChartBuilder::on(area)
        .caption(caption, (FONT, if legend { 20 } else { 15 }))
        .margin(12)
        .x_label_area_size(45)
        .y_label_area_size(60)
        .build_cartesian_2d(0.0..x_max, 0.0..y_max_ma)
        .map_err(err)?;
    tags.set(Some(class::AXIS));
    draw_mesh(&mut chart, "VCE [V]", "IC [mA]")?;

    tags.set(Some(class::SATURATION));
    chart
        .draw_series(std::iter::once(Rectangle::new(
            [(0.0, 0.0), (view.knee.min(x_max), y_max_ma)],
            C_SATURATION.mix(0.45).filled(),
        )))
        .map_err(err)?
        .label(format!("{LABEL_SATURATION}, {}", fe(view.knee, "V")))
        .legend(|(x, y)| {
            Rectangle::new(
                [(x, y - 6), (x + 18, y + 6)],
                C_SATURATION.mix(0.45).filled(),
            )
        });

    tags.set(Some(class::CURVE));
    let n = view.curve_base_currents.len();
    for (i, ib) in view.curve_base_currents.iter().enumerate() {
        let pts = curve_points(&view.model_nominal, *ib, x_max, y_max);
        let shade = 0.45 + 0.55 * (i + 1) as f64 / n as f64;
        let colour = C_CURVE.mix(shade);
        chart
            .draw_series(LineSeries::new(pts, colour.stroke_width(2)))
            .map_err(err)?
            .label(format!(
                "IB = {}, 25 °C, hFE {:.0}",
                fe(*ib, "A"),
                view.model_nominal.beta_f
            ))
            .legend(move |(x, y)| PathElement::new([(x, y), (x + 18, y)], colour.stroke_width(2)));
    }
    if let Some(p) = view.worst {
        tags.set(Some(class::CURVE_WORST));
        let pts = curve_points(&view.model_worst, p.ib, x_max, y_max);
        chart
            .draw_series(LineSeries::new(pts, C_CURVE_WORST.stroke_width(2)))
            .map_err(err)?
            .label(format!(
                "IB,min = {}, {} °C, hFE,wc {:.0}",
                fe(p.ib, "A"),
                stage.ambient_min.base(),
                view.model_worst.beta_f
            ))
            .legend(|(x, y)| {
                PathElement::new([(x, y), (x + 18, y)], C_CURVE_WORST.stroke_width(2))
            });
    }

    tags.set(Some(class::LOAD_LINE));
    chart
        .draw_series(LineSeries::new(
            load_line_points(view.vcc_nominal, view.vcc_nominal / view.r_load, x_max),
            C_LOAD.stroke_width(2),
        ))
        .map_err(err)?
        .label(format!("{LABEL_LOAD_LINE} {}", fe(view.vcc_nominal, "V")))
        .legend(|(x, y)| PathElement::new([(x, y), (x + 18, y)], C_LOAD.stroke_width(2)));
    tags.set(Some(class::LOAD_LINE_WORST));
    chart
        .draw_series(DashedLineSeries::new(
            load_line_points(view.vcc_max, ic_max, x_max),
            8,
            6,
            C_LOAD_WORST.stroke_width(2),
        ))
        .map_err(err)?
        .label(format!("{LABEL_LOAD_LINE_WORST} {}", fe(view.vcc_max, "V")))
        .legend(|(x, y)| PathElement::new([(x, y), (x + 18, y)], C_LOAD_WORST.stroke_width(2)));

    let inside = |p: &OperatingPoint| p.vce <= x_max && p.ic <= y_max;
    if let Some(p) = view.nominal.filter(inside) {
        tags.set(Some(class::POINT_NOMINAL));
        chart
            .draw_series(std::iter::once(Circle::new(
                (p.vce, p.ic * 1e3),
                7,
                C_NOMINAL.filled(),
            )))
            .map_err(err)?
            .label(LABEL_POINT_NOMINAL)
            .legend(|(x, y)| Circle::new((x + 9, y), 6, C_NOMINAL.filled()));
    }
    if let Some(p) = view.worst.filter(inside) {
        tags.set(Some(class::POINT_WORST));
        chart
            .draw_series(std::iter::once(TriangleMarker::new(
                (p.vce, p.ic * 1e3),
                9,
                C_WORST.filled(),
            )))
            .map_err(err)?
            .label(LABEL_POINT_WORST)
            .legend(|(x, y)| TriangleMarker::new((x + 9, y), 7, C_WORST.filled()));
    }
    if view.worst.is_none() && legend {
        tags.set(Some(class::NOTE));
        chart
            .draw_series(std::iter::once(Text::new(
                "worst case: the stage cannot turn on (IB,min <= 0)",
                (0.25 * x_max, 0.72 * y_max_ma),
                (FONT, 15).into_font().color(&C_WORST),
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

pub(super) fn draw_overdrive_panel<DB: DrawingBackend>(
    area: &DrawingArea<DB, Shift>,
    tags: &Tags,
    stage: &Stage,
    analysis: &StageAnalysis,
    sweep: &[(f64, f64)],
) -> Result<(), String> {
    let mut lo = stage.ambient_min.base();
    let mut hi = stage.ambient_max.base();
    if hi - lo < 1.0 {
        lo -= 5.0;
        hi += 5.0;
    }
    let od_top = sweep.iter().map(|p| p.1).fold(stage.overdrive, f64::max);
    let y_max = 1.2 * od_top.max(1.0);

    tags.set(Some(class::CAPTION));
    let mut chart = ChartBuilder::on(area)
        .caption("worst-case overdrive against ambient", (FONT, 20))
        .margin(12)
        .x_label_area_size(45)
        .y_label_area_size(55)
        .build_cartesian_2d(lo..hi, 0.0..y_max)
        .map_err(err)?;
    tags.set(Some(class::AXIS));
    draw_mesh(&mut chart, "Ambient [°C]", "Overdrive")?;

    tags.set(Some(class::OVERDRIVE_TARGET));
    chart
        .draw_series(DashedLineSeries::new(
            [(lo, stage.overdrive), (hi, stage.overdrive)],
            10,
            6,
            C_TARGET.stroke_width(2),
        ))
        .map_err(err)?
        .label(format!("target k = {}", stage.overdrive))
        .legend(|(x, y)| PathElement::new([(x, y), (x + 18, y)], C_TARGET.stroke_width(2)));
    tags.set(Some(class::OVERDRIVE_EDGE));
    chart
        .draw_series(DashedLineSeries::new(
            [(lo, 1.0), (hi, 1.0)],
            4,
            4,
            C_EDGE.stroke_width(1),
        ))
        .map_err(err)?
        .label("edge: overdrive 1")
        .legend(|(x, y)| PathElement::new([(x, y), (x + 18, y)], C_EDGE.stroke_width(1)));

    tags.set(Some(class::OVERDRIVE));
    chart
        .draw_series(LineSeries::new(
            sweep.iter().copied(),
            C_OVERDRIVE.stroke_width(2),
        ))
        .map_err(err)?
        .label(format!(
            "worst-case overdrive (RB {}{})",
            fe(analysis.worst.resistors.rb.base(), "Ω"),
            match analysis.worst.resistors.rbe {
                Some(r) => format!(", RBE {}", fe(r.base(), "Ω")),
                None => String::new(),
            }
        ))
        .legend(|(x, y)| PathElement::new([(x, y), (x + 18, y)], C_OVERDRIVE.stroke_width(2)));
    // The engine's own figure, at Ta,min (also what shows when the range is one temperature).
    tags.set(Some(class::OVERDRIVE_COLD));
    let cold = (
        stage.ambient_min.base(),
        analysis.worst.overdrive_min.max(0.0),
    );
    if cold.1.is_finite() {
        chart
            .draw_series(std::iter::once(Circle::new(cold, 6, C_OVERDRIVE.filled())))
            .map_err(err)?
            .label(format!("{LABEL_OVERDRIVE_COLD} {:.2}", cold.1))
            .legend(|(x, y)| Circle::new((x + 9, y), 5, C_OVERDRIVE.filled()));
    }
    if sweep.iter().any(|p| p.1 <= 0.0) {
        tags.set(Some(class::NOTE));
        chart
            .draw_series(std::iter::once(Text::new(
                "overdrive 0: the stage cannot turn on there",
                (lo + 0.05 * (hi - lo), 0.5 * y_max),
                (FONT, 15).into_font().color(&C_WORST),
            )))
            .map_err(err)?;
    }

    tags.set(Some(class::LEGEND));
    let lines = [stage.overdrive, 1.0];
    chart
        .configure_series_labels()
        .position(legend_position(sweep, &lines, (lo, hi), y_max))
        .background_style(WHITE.mix(0.85))
        .border_style(RGBColor(160, 160, 160))
        .label_font((FONT, 13))
        .draw()
        .map_err(err)?;
    Ok(())
}

/// A legend corner on the right that covers neither the right half of the sweep nor a
/// horizontal line: the legend takes about the top, middle or bottom sixth of the height.
fn legend_position(
    sweep: &[(f64, f64)],
    lines: &[f64],
    (lo, hi): (f64, f64),
    y_max: f64,
) -> SeriesLabelPosition {
    let right: Vec<f64> = sweep
        .iter()
        .filter(|p| p.0 >= 0.5 * (lo + hi))
        .map(|p| p.1 / y_max)
        .chain(lines.iter().map(|l| l / y_max))
        .collect();
    let free = |a: f64, b: f64| right.iter().all(|y| *y < a || *y > b);
    if free(0.0, 0.2) {
        SeriesLabelPosition::LowerRight
    } else if free(0.8, 1.0) {
        SeriesLabelPosition::UpperRight
    } else if free(0.35, 0.65) {
        SeriesLabelPosition::MiddleRight
    } else {
        SeriesLabelPosition::UpperLeft
    }
}

/// Grid, tick labels and axis titles of a chart, the same on both panels.
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
