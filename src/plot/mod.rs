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
mod panels;
mod tagged;

pub use ebers_moll::{thermal_voltage, vce_sat_ebers_moll, EbersMoll};

use plotters::coord::Shift;
use plotters::prelude::*;

use crate::analysis::{analyse, StageAnalysis};
use crate::load::Load;
use crate::quantity::{celsius, format_engineering as fe, Base};
use crate::stage::{PullDown, Stage};
use panels::{draw_output_panel, draw_overdrive_panel};
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

    let worst = point_at(&model_worst, ib_min, vcc_max, r_load);

    let vcc_nominal = stage.supply.base();
    let vbe_mid = 0.5 * (vbe_min25 + vbe_max25);
    let rb = wc.resistors.rb.base();
    let stolen = wc.resistors.rbe.map(|r| vbe_mid / r.base()).unwrap_or(0.0);
    let ib_nom = (stage.logic_high.base() - vbe_mid) / rb - stolen;
    let nominal = point_at(&model_nominal, ib_nom, vcc_nominal, r_load);

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

/// Where the model settles with base current `ib` on the load line from `vcc` through `r_load`;
/// `None` when no base current flows or the model finds no point.
fn point_at(model: &EbersMoll, ib: f64, vcc: f64, r_load: f64) -> Option<OperatingPoint> {
    if ib <= 0.0 {
        return None;
    }
    model
        .operating_point(ib, vcc, r_load)
        .map(|(vce, ic)| OperatingPoint { ib, vce, ic })
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

#[cfg(test)]
mod tests;
