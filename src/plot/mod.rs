//! An SVG picture of one stage, in two panels:
//!
//! 1. output curves IC against VCE of an Ebers-Moll model scaled to the part, the resistive view
//!    of the load as load lines, the nominal and worst-case operating points and the saturation
//!    region;
//! 2. the worst-case overdrive against ambient temperature, with the overdrive target.
//!
//! The plot only draws: every figure of the worst case comes from [`crate::analysis::analyse`].
//! The output-curve model is a picture aid, not part of the stage model: an Ebers-Moll transistor
//! ([`ebers_moll`]) whose forward gain is the part's minimum gain at IC,max and whose IS puts
//! VBE at the part's VBE(sat),max; the reverse gain is [`REVERSE_BETA`].
//!
//! Every element of the SVG carries a class from [`class`], so the parts can be found and styled.

pub mod ebers_moll;
mod tagged;

pub use ebers_moll::{thermal_voltage, vce_sat_ebers_moll, EbersMoll};

use plotters::coord::Shift;
use plotters::prelude::*;

use crate::analysis::{analyse, StageAnalysis};
use crate::load::Load;
use crate::quantity::{celsius, format_engineering as fe, Base};
use crate::stage::{PullDown, Stage};
use tagged::{apply_classes, TaggedSvg, Tags};

/// Reverse common-emitter gain of the picture's model [memory: a few, typically 1 to 5, for a
/// small-signal planar NPN].
pub const REVERSE_BETA: f64 = 2.0;
/// The knee of the output curves: where IC/IB reaches this fraction of beta_F. Below it the
/// transistor is taken as saturated in the picture [practice: a drawing convention].
pub const KNEE_FRACTION: f64 = 0.9;
/// Forced beta of the datasheet VBE(sat) test condition [practice: datasheet convention
/// IC/IB = 10].
pub const DATASHEET_FORCED_BETA: f64 = 10.0;
/// Datasheet reference temperature, C [practice].
pub const NOMINAL_AMBIENT_C: f64 = 25.0;
/// Temperature steps of the overdrive panel.
pub const SWEEP_POINTS: usize = 61;
/// Width and height of the picture, px.
pub const SIZE: (u32, u32) = (1280, 820);

/// The classes written into the SVG elements.
pub mod class {
    /// Output curves at 25 C, one per base current.
    pub const CURVE: &str = "pinlow-curve";
    /// The output curve at the worst-case base current with the cold gain.
    pub const CURVE_WORST: &str = "pinlow-curve-worst";
    /// The load line at nominal supply.
    pub const LOAD_LINE: &str = "pinlow-load-line";
    /// The load line at the worst-case corner (VCC,max).
    pub const LOAD_LINE_WORST: &str = "pinlow-load-line-worst";
    /// The nominal operating point.
    pub const POINT_NOMINAL: &str = "pinlow-point-nominal";
    /// The worst-case operating point.
    pub const POINT_WORST: &str = "pinlow-point-worst";
    /// The shaded saturation region.
    pub const SATURATION: &str = "pinlow-saturation";
    /// Worst-case overdrive against ambient.
    pub const OVERDRIVE: &str = "pinlow-overdrive";
    /// The overdrive target line.
    pub const OVERDRIVE_TARGET: &str = "pinlow-overdrive-target";
    /// The engine's overdrive at Ta,min, marked on the sweep.
    pub const OVERDRIVE_COLD: &str = "pinlow-overdrive-cold";
    /// The overdrive-1 edge line (bare minimum drive).
    pub const OVERDRIVE_EDGE: &str = "pinlow-overdrive-edge";
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
    /// Second class of every element of the zoom on the knee (below the output curves).
    pub const ZOOM: &str = "pinlow-zoom";
}

/// Legend text of the nominal load line.
pub const LABEL_LOAD_LINE: &str = "load line, nominal supply";
/// Legend text of the worst-case load line.
pub const LABEL_LOAD_LINE_WORST: &str = "load line, VCC,max";
/// Legend text of the nominal point.
pub const LABEL_POINT_NOMINAL: &str = "nominal point (25 °C)";
/// Legend text of the worst-case point.
pub const LABEL_POINT_WORST: &str = "worst-case point";
/// Legend text of the overdrive mark at Ta,min.
pub const LABEL_OVERDRIVE_COLD: &str = "at Ta,min (the engine's figure):";
/// Legend text of the saturation region.
pub const LABEL_SATURATION: &str = "saturation (VCE below knee)";

/// An operating point of the picture's model.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct OperatingPoint {
    /// Base current, A.
    pub ib: f64,
    /// Collector-emitter voltage, V.
    pub vce: f64,
    /// Collector current, A.
    pub ic: f64,
}

/// Everything the output-curve panel draws, in volts and amperes.
#[derive(Clone, Debug)]
pub struct OutputView {
    /// The load as a resistor: VCC,max / IC,max, ohm.
    pub r_load: f64,
    /// Nominal supply, V.
    pub vcc_nominal: f64,
    /// Highest supply, V.
    pub vcc_max: f64,
    /// The model at 25 C (beta_F = the part's minimum gain at IC,max).
    pub model_nominal: EbersMoll,
    /// The model at Ta,min (beta_F = the engine's hFE,wc).
    pub model_worst: EbersMoll,
    /// Base currents of the 25 C curves, A.
    pub curve_base_currents: Vec<f64>,
    /// The knee VCE of the 25 C model, V.
    pub knee: f64,
    /// Nominal operating point: nominal supply, logic high and resistors, VBE(sat) midway
    /// between the part's limits at IC,max, 25 C model; `None` when no base current flows.
    pub nominal: Option<OperatingPoint>,
    /// Worst-case point: the engine's IB,min on the Ta,min model against the VCC,max load
    /// line; `None` when the stage cannot turn on.
    pub worst: Option<OperatingPoint>,
}

/// The output-curve view of a stage; `Err` when the load draws no current (nothing to draw).
pub fn output_view(stage: &Stage, analysis: &StageAnalysis) -> Result<OutputView, String> {
    let wc = &analysis.worst;
    let corner = &wc.load;
    let ic_max = corner.ic_max.base();
    let vcc_max = corner.vcc_max.base();
    if !(ic_max.is_finite() && ic_max > 0.0 && vcc_max > 0.0) {
        return Err(format!(
            "stage {}: the load draws no current at the worst-case corner; there is no output curve to draw",
            stage.name
        ));
    }
    let r_load = vcc_max / ic_max;
    let part = &stage.part;
    let (vbe_min25, vbe_max25) = part.vbe_sat_at(corner.ic_max);
    let (vbe_min25, vbe_max25) = (vbe_min25.base(), vbe_max25.base());

    // 25 C model: beta_F = minimum gain at IC,max; IS from VBE(sat),max at the datasheet condition.
    let beta_nom = part.gain_min_at(corner.ic_max);
    let vt25 = thermal_voltage(NOMINAL_AMBIENT_C);
    let forced = DATASHEET_FORCED_BETA.min(0.5 * beta_nom);
    let model_nominal = EbersMoll::with_vbe_at(
        ic_max,
        ic_max / forced,
        vbe_max25,
        beta_nom,
        REVERSE_BETA,
        vt25,
    )
    .ok_or_else(|| {
        format!(
            "stage {}: no Ebers-Moll model fits the part's figures at IC,max",
            stage.name
        )
    })?;

    // Ta,min model: beta_F = hFE,wc; IS so that VBE is VBE(sat),max(Ta,min) at IB,min (the same
    // construction as the ngspice cross-check).
    let ib_min = wc.base_current_min.base();
    let beta_wc = corner.gain_min;
    let t_min = stage.ambient_min.base();
    let vt_cold = thermal_voltage(t_min);
    let model_worst = if ib_min > 0.0 {
        EbersMoll::with_vbe_at(
            ic_max.min(beta_wc * ib_min),
            ib_min,
            corner.vbe_sat_max_cold.base(),
            beta_wc,
            REVERSE_BETA,
            vt_cold,
        )
    } else {
        None
    }
    .unwrap_or(EbersMoll {
        is: model_nominal.is,
        beta_f: beta_wc,
        beta_r: REVERSE_BETA,
        vt: vt_cold,
    });

    let worst = if ib_min > 0.0 {
        model_worst
            .operating_point(ib_min, vcc_max, r_load)
            .map(|(vce, ic)| OperatingPoint {
                ib: ib_min,
                vce,
                ic,
            })
    } else {
        None
    };

    let vcc_nominal = stage.supply.base();
    let vbe_mid = 0.5 * (vbe_min25 + vbe_max25);
    let rb = wc.resistors.rb.base();
    let stolen = wc.resistors.rbe.map(|r| vbe_mid / r.base()).unwrap_or(0.0);
    let ib_nom = (stage.logic_high.base() - vbe_mid) / rb - stolen;
    let nominal = if ib_nom > 0.0 {
        model_nominal
            .operating_point(ib_nom, vcc_nominal, r_load)
            .map(|(vce, ic)| OperatingPoint {
                ib: ib_nom,
                vce,
                ic,
            })
    } else {
        None
    };

    let edge = ic_max / beta_nom;
    let mut curve_base_currents = vec![0.5 * edge, edge, 2.0 * edge];
    if ib_nom > 0.0 {
        curve_base_currents.push(ib_nom);
    }
    curve_base_currents.sort_by(f64::total_cmp);
    curve_base_currents.dedup_by(|a, b| (*a - *b).abs() <= 0.03 * b.abs());

    Ok(OutputView {
        r_load,
        vcc_nominal,
        vcc_max,
        knee: model_nominal.knee(KNEE_FRACTION),
        model_nominal,
        model_worst,
        curve_base_currents,
        nominal,
        worst,
    })
}

/// Worst-case overdrive at `points` ambients from Ta,min to Ta,max: (ambient C, overdrive).
///
/// At each T the stage is cloned with Ta,min = T and its resistors fixed to the ones the analysis
/// used (base resistor given, pull-down given or none, LED resistor given), so nothing is
/// re-sized; then the engine recomputes the worst case. Overdrive below 0 (the stage cannot turn
/// on) is reported as 0.
pub fn overdrive_sweep(stage: &Stage, analysis: &StageAnalysis, points: usize) -> Vec<(f64, f64)> {
    let res = analysis.worst.resistors;
    let mut fixed = stage.clone();
    fixed.base_resistor = Some(res.rb);
    fixed.pull_down = match res.rbe {
        Some(r) => PullDown::Given(r),
        None => PullDown::None,
    };
    if let (Load::Led(led), Some(rl)) = (&mut fixed.load, res.rl) {
        led.resistor = Some(rl);
    }
    let lo = stage.ambient_min.base();
    let hi = stage.ambient_max.base();
    let n = points.max(2);
    (0..n)
        .map(|i| {
            let t = lo + (hi - lo) * i as f64 / (n - 1) as f64;
            let mut s = fixed.clone();
            s.ambient_min = celsius(t);
            (t, analyse(&s).worst.overdrive_min.max(0.0))
        })
        .filter(|(_, od)| od.is_finite())
        .collect()
}

/// The stage as one SVG document of two panels (see the module notes).
pub fn stage_svg(stage: &Stage, analysis: &StageAnalysis) -> Result<String, String> {
    let view = output_view(stage, analysis)?;
    let sweep = overdrive_sweep(stage, analysis, SWEEP_POINTS);
    let tags = Tags::default();
    let mut buf = String::new();
    {
        let backend = TaggedSvg::new(&mut buf, SIZE, tags.clone());
        let root = backend.into_drawing_area();
        tags.set(Some(class::BACKGROUND));
        root.fill(&WHITE).map_err(err)?;
        let (left, right) = root.split_horizontally(SIZE.0 / 2 + 60);
        draw_output_panel(&left, &tags, stage, analysis, &view)?;
        draw_overdrive_panel(&right, &tags, stage, analysis, &sweep)?;
        root.present().map_err(err)?;
    }
    apply_classes(&buf, &tags.recorded())
}

fn err<E: std::fmt::Display>(e: E) -> String {
    format!("plot: {e}")
}

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
fn draw_output_panel<DB: DrawingBackend>(
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
    chart
        .configure_mesh()
        .x_desc("VCE [V]")
        .y_desc("IC [mA]")
        .light_line_style(RGBColor(235, 235, 235))
        .label_style((FONT, 14))
        .axis_desc_style((FONT, 16))
        .draw()
        .map_err(err)?;

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

fn draw_overdrive_panel<DB: DrawingBackend>(
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
    chart
        .configure_mesh()
        .x_desc("Ambient [°C]")
        .y_desc("Overdrive")
        .light_line_style(RGBColor(235, 235, 235))
        .label_style((FONT, 14))
        .axis_desc_style((FONT, 16))
        .draw()
        .map_err(err)?;

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

#[cfg(test)]
mod tests;
