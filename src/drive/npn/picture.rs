//! The NPN's picture, as data: output curves IC against VCE of an Ebers-Moll model scaled to the
//! part, the load lines, the nominal and worst-case operating points and the saturation region,
//! a zoom on the knee, and the worst-case overdrive against ambient with its target.
//!
//! The output-curve model is a picture aid, not part of the stage model: an Ebers-Moll
//! transistor ([`super::ebers_moll`]) whose forward gain is the part's minimum gain at IC,max
//! and whose IS puts VBE at the part's VBE(sat),max; the reverse gain is [`REVERSE_BETA`]. A
//! Darlington pair's output transistor is driven from the first one's emitter, so its VCE cannot
//! fall below one base-emitter drop (stage-model 6b): its curves are those of one transistor
//! moved right by half its VBE(sat),max.

use super::corner::{NpnCorner, NpnWorst};
use super::ebers_moll::{bisect, thermal_voltage, EbersMoll};
use super::{detail, NpnPart};
use crate::conditions::Conditions;
use crate::drive::{Corner, DriveAnalysis};
use crate::picture::{Axis, Band, Curve, Layout, Level, Marker, Panel, Picture, Style};
use crate::quantity::{celsius, format_engineering as fe, Base};

/// Reverse common-emitter gain of the picture's model [memory: a few, typically 1 to 5, for a
/// small-signal planar NPN].
pub const REVERSE_BETA: f64 = 2.0;
/// The knee of the output curves: where IC/IB reaches this fraction of beta_F [practice: a
/// drawing convention].
pub const KNEE_FRACTION: f64 = 0.9;
/// Forced beta of the datasheet VBE(sat) test condition [practice: datasheet convention
/// IC/IB = 10].
pub const DATASHEET_FORCED_BETA: f64 = 10.0;
/// Datasheet reference temperature, C [practice].
pub const NOMINAL_AMBIENT_C: f64 = 25.0;
/// Zoom panel width in knees.
const ZOOM_KNEES: f64 = 4.0;
/// Narrowest zoom panel, V.
const ZOOM_MIN_V: f64 = 0.4;
/// Points along a curve.
const CURVE_POINTS: usize = 160;

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
    /// Second class of every element of the zoom on the knee.
    pub const ZOOM: &str = "pinlow-zoom";
}

/// An operating point of the picture's model: (IB, VCE, IC) in A, V, A.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct OperatingPoint {
    /// Base current, A.
    pub ib: f64,
    /// Collector-emitter voltage, V.
    pub vce: f64,
    /// Collector current, A.
    pub ic: f64,
}

/// Everything the output panels show, in volts and amperes.
#[derive(Clone, Debug)]
pub struct OutputView {
    /// The load as a resistor: VCC,max / IC,max, ohm.
    pub r_load: f64,
    /// Nominal supply, V.
    pub vcc_nominal: f64,
    /// Highest supply, V.
    pub vcc_max: f64,
    /// The model at 25 C.
    pub model_nominal: EbersMoll,
    /// The model at Ta,min (beta_F = the worst-case gain).
    pub model_worst: EbersMoll,
    /// Base currents of the 25 C curves, A.
    pub curve_base_currents: Vec<f64>,
    /// The knee VCE, V (with the Darlington offset).
    pub knee: f64,
    /// VCE added to the model for a Darlington pair (0 for one transistor), V.
    pub offset: f64,
    /// Nominal operating point; `None` when no base current flows.
    pub nominal: Option<OperatingPoint>,
    /// Worst-case point; `None` when the stage cannot turn on.
    pub worst: Option<OperatingPoint>,
}

/// The output view of a stage; `Err` when the load draws no current (nothing to draw).
pub fn output_view(
    part: &NpnPart,
    c: &Conditions,
    load: &Corner,
    w: &NpnWorst,
) -> Result<OutputView, String> {
    let corner = &w.corner;
    let ic_max = corner.ic_max.base();
    let vcc_max = load.vcc_max.base();
    if !(ic_max.is_finite() && ic_max > 0.0 && vcc_max > 0.0) {
        return Err(
            "the load draws no current at the worst-case corner; there is no output curve to draw"
                .into(),
        );
    }
    let r_load = vcc_max / ic_max;
    let (vbe_min25, vbe_max25) = part.vbe_sat_at(corner.ic_max);
    let (vbe_min25, vbe_max25) = (vbe_min25.base(), vbe_max25.base());
    let offset = if part.is_darlington() {
        0.5 * vbe_max25
    } else {
        0.0
    };
    let beta_nom = part.gain_min_at(corner.ic_max);
    let forced = DATASHEET_FORCED_BETA.min(0.5 * beta_nom);
    let model_nominal = EbersMoll::with_vbe_at(
        ic_max,
        ic_max / forced,
        vbe_max25 - offset,
        beta_nom,
        REVERSE_BETA,
        thermal_voltage(NOMINAL_AMBIENT_C),
    )
    .ok_or("no Ebers-Moll model fits the part's figures at IC,max")?;
    let ib_min = w.base_current_min.base();
    let beta_wc = corner.gain_wc;
    let vt_cold = thermal_voltage(c.ambient_min.base());
    let model_worst = if ib_min > 0.0 {
        EbersMoll::with_vbe_at(
            ic_max.min(beta_wc * ib_min),
            ib_min,
            corner.vbe_max_cold.base() - offset,
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
    let worst = point_at(&model_worst, ib_min, vcc_max, r_load, offset);
    let vcc_nominal = c.supply.base();
    let vbe_mid = 0.5 * (vbe_min25 + vbe_max25);
    let rb = w.rb.base();
    let stolen = w.rbe.map(|r| vbe_mid / r.base()).unwrap_or(0.0);
    let ib_nom = (c.logic_high.base() - vbe_mid) / rb - stolen;
    let nominal = point_at(&model_nominal, ib_nom, vcc_nominal, r_load, offset);
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
        knee: model_nominal.knee(KNEE_FRACTION) + offset,
        offset,
        model_nominal,
        model_worst,
        curve_base_currents,
        nominal,
        worst,
    })
}

/// Where the model settles with base current `ib` on the load line from `vcc` through `r_load`.
fn point_at(
    model: &EbersMoll,
    ib: f64,
    vcc: f64,
    r_load: f64,
    offset: f64,
) -> Option<OperatingPoint> {
    if ib <= 0.0 {
        return None;
    }
    if offset <= 0.0 {
        return model
            .operating_point(ib, vcc, r_load)
            .map(|(vce, ic)| OperatingPoint { ib, vce, ic });
    }
    // The model's VCE plus the offset on the load line: VCE + IC R = VCC (rises with VCE).
    let f = |v: f64| {
        let ic = model.collector_current(ib, (v - offset).max(0.0));
        v + ic * r_load - vcc
    };
    let vce = bisect(f, offset, vcc.max(offset))?;
    Some(OperatingPoint {
        ib,
        vce,
        ic: (vcc - vce) / r_load,
    })
}

/// Points of the curve at `ib` for 0 <= VCE <= `x_max`, IC in mA, denser near the knee.
fn curve_points(
    view: &OutputView,
    m: &EbersMoll,
    ib: f64,
    x_max: f64,
    y_max: f64,
) -> Vec<(f64, f64)> {
    let ic = |v: f64| m.collector_current(ib, (v - view.offset).max(0.0));
    let lo = if ic(view.offset) >= 0.0 {
        view.offset
    } else {
        bisect(ic, view.offset, x_max).unwrap_or(view.offset)
    };
    let hi = if ic(x_max) <= y_max {
        x_max
    } else {
        bisect(|v| ic(v) - y_max, lo, x_max).unwrap_or(x_max)
    };
    (0..=CURVE_POINTS)
        .map(|i| {
            let s = i as f64 / CURVE_POINTS as f64;
            let v = lo + (hi - lo) * s * s;
            (v, ic(v).clamp(0.0, y_max) * 1e3)
        })
        .collect()
}

/// The line from (`v0`, 0) to (0, `i0`) within 0 <= VCE <= `x_max`, IC in mA.
fn load_line(v0: f64, i0: f64, x_max: f64) -> Vec<(f64, f64)> {
    let x_end = v0.min(x_max);
    vec![(0.0, i0 * 1e3), (x_end, i0 * (1.0 - x_end / v0) * 1e3)]
}

fn output_panel(
    part: &NpnPart,
    c: &Conditions,
    view: &OutputView,
    ic_max: f64,
    (x_max, y_max): (f64, f64),
    caption: String,
) -> Panel {
    let mut p = Panel::new(
        caption,
        Axis {
            title: "VCE [V]".into(),
            min: 0.0,
            max: x_max,
        },
        Axis {
            title: "IC [mA]".into(),
            min: 0.0,
            max: y_max * 1e3,
        },
    );
    p.bands.push(Band {
        class: class::SATURATION,
        label: format!("saturation (VCE below the knee), {}", fe(view.knee, "V")),
        x0: 0.0,
        x1: view.knee.min(x_max),
        style: Style::Region,
    });
    for ib in &view.curve_base_currents {
        p.curves.push(Curve {
            class: class::CURVE,
            label: Some(format!(
                "IB = {}, 25 °C, hFE {:.0}",
                fe(*ib, "A"),
                view.model_nominal.beta_f
            )),
            points: curve_points(view, &view.model_nominal, *ib, x_max, y_max),
            style: Style::Nominal,
        });
    }
    if let Some(w) = view.worst {
        p.curves.push(Curve {
            class: class::CURVE_WORST,
            label: Some(format!(
                "least IB {}, {} °C, minimum gain {:.0}",
                fe(w.ib, "A"),
                crate::quantity::limits::show_number(c.ambient_min.base()),
                view.model_worst.beta_f
            )),
            points: curve_points(view, &view.model_worst, w.ib, x_max, y_max),
            style: Style::Worst,
        });
    }
    p.curves.push(Curve {
        class: class::LOAD_LINE,
        label: Some(format!(
            "load line, nominal supply {}",
            fe(view.vcc_nominal, "V")
        )),
        points: load_line(view.vcc_nominal, view.vcc_nominal / view.r_load, x_max),
        style: Style::Load,
    });
    p.curves.push(Curve {
        class: class::LOAD_LINE_WORST,
        label: Some(format!(
            "load line, highest supply {}",
            fe(view.vcc_max, "V")
        )),
        points: load_line(view.vcc_max, ic_max, x_max),
        style: Style::LoadWorst,
    });
    let inside = |q: &OperatingPoint| q.vce <= x_max && q.ic <= y_max;
    if let Some(q) = view.nominal.filter(inside) {
        p.markers.push(Marker {
            class: class::POINT_NOMINAL,
            label: "nominal point (25 °C)".into(),
            x: q.vce,
            y: q.ic * 1e3,
            style: Style::PointNominal,
        });
    }
    if let Some(q) = view.worst.filter(inside) {
        p.markers.push(Marker {
            class: class::POINT_WORST,
            label: "worst-case point".into(),
            x: q.vce,
            y: q.ic * 1e3,
            style: Style::PointWorst,
        });
    }
    if view.worst.is_none() {
        p.notes
            .push("worst case: the stage cannot turn on (no base current)".into());
    }
    if part.is_darlington() {
        p.notes.push(format!(
            "a Darlington pair: VCE stays above about one base-emitter drop ({})",
            fe(view.offset, "V")
        ));
    }
    p
}

/// Worst-case overdrive at each (ambient C, IC,max there) of `currents`, RB and RBE fixed:
/// stage-model 4's formulas with Ta,min moved to each temperature. Below 0 (cannot turn on) is 0.
fn overdrive_sweep(
    part: &NpnPart,
    c: &Conditions,
    w: &NpnWorst,
    currents: &[(f64, f64)],
) -> Vec<(f64, f64)> {
    currents
        .iter()
        .filter_map(|&(t, ic)| {
            let mut ct = c.clone();
            ct.ambient_min = celsius(t);
            let corner = NpnCorner::of(part, &ct, crate::quantity::amps(ic));
            let ib = corner.base_current_min(&ct, w.rb, w.rbe);
            let od = if ic <= 0.0 {
                return None;
            } else {
                corner.overdrive(ib).unwrap_or(0.0)
            };
            od.is_finite().then_some((t, od.max(0.0)))
        })
        .collect()
}

fn overdrive_panel(c: &Conditions, w: &NpnWorst, sweep: &[(f64, f64)]) -> Panel {
    let mut lo = c.ambient_min.base();
    let mut hi = c.ambient_max.base();
    if hi - lo < 1.0 {
        lo -= 5.0;
        hi += 5.0;
    }
    let top = sweep.iter().map(|p| p.1).fold(c.overdrive, f64::max);
    let mut p = Panel::new(
        "worst-case overdrive against ambient",
        Axis {
            title: "Ambient [°C]".into(),
            min: lo,
            max: hi,
        },
        Axis {
            title: "Overdrive".into(),
            min: 0.0,
            max: 1.2 * top.max(1.0),
        },
    );
    p.levels.push(Level {
        class: class::OVERDRIVE_TARGET,
        label: format!("overdrive asked: {}", c.overdrive),
        y: c.overdrive,
        style: Style::Target,
    });
    p.levels.push(Level {
        class: class::OVERDRIVE_EDGE,
        label: "edge: overdrive 1 (bare saturation)".into(),
        y: 1.0,
        style: Style::Edge,
    });
    p.curves.push(Curve {
        class: class::OVERDRIVE,
        label: Some(format!(
            "worst-case overdrive (RB {}{})",
            fe(w.rb.base(), "Ω"),
            match w.rbe {
                Some(r) => format!(", RBE {}", fe(r.base(), "Ω")),
                None => String::new(),
            }
        )),
        points: sweep.to_vec(),
        style: Style::Data,
    });
    if let Some(od) = w.overdrive {
        p.markers.push(Marker {
            class: class::OVERDRIVE_COLD,
            label: format!("at the coldest ambient (the report's figure): {od:.2}"),
            x: c.ambient_min.base(),
            y: od.max(0.0),
            style: Style::Data,
        });
    }
    if sweep.iter().any(|q| q.1 <= 0.0) {
        p.notes
            .push("overdrive 0: the stage cannot turn on there".into());
    }
    p
}

/// The NPN's picture from its analysis; `currents` gives IC,max with the cold corner at each
/// ambient of the sweep (ambient C, A).
pub fn picture(
    part: &NpnPart,
    c: &Conditions,
    load: &Corner,
    a: &DriveAnalysis,
    currents: &[(f64, f64)],
) -> Result<Picture, String> {
    let d = detail(a).ok_or("not an NPN analysis")?;
    let w = &d.worst;
    let view = output_view(part, c, load, w)?;
    let ic_max = w.corner.ic_max.base();
    let x_max = view.vcc_max * 1.05;
    let nominal_ic = view.nominal.map(|p| p.ic).unwrap_or(0.0);
    let y_max = 1.9 * ic_max.max(nominal_ic).max(view.vcc_nominal / view.r_load);
    let full = output_panel(
        part,
        c,
        &view,
        ic_max,
        (x_max, y_max),
        format!("output curves ({})", part.info.id),
    );
    let x_zoom = (ZOOM_KNEES * view.knee).max(ZOOM_MIN_V).min(x_max);
    let mut zoom = output_panel(
        part,
        c,
        &view,
        ic_max,
        (x_zoom, y_max),
        "zoom on the saturation knee".into(),
    );
    zoom.extra_class = Some(class::ZOOM);
    zoom.notes.clear();
    let sweep = overdrive_sweep(part, c, w, currents);
    Ok(Picture {
        layout: Layout::LeftStackRight,
        panels: vec![full, zoom, overdrive_panel(c, w, &sweep)],
    })
}

#[cfg(test)]
mod tests {
    use super::super::ebers_moll::vce_sat_ebers_moll;
    use super::*;
    use crate::analysis::analyse;
    use crate::board::parse_board;
    use crate::parts::Library;
    use crate::stage::Stage;
    use approx::assert_relative_eq;

    /// A 12 V relay on a 3.3 V pin, RB sized (demo part, invented data), and a weak stage.
    const BOARD: &str = r#"{ "stages": [
        { "name": "K1 demo relay", "part": "demo-npn-40v", "supply_v": 12, "logic_high_v": 3.3,
          "grade": "industrial", "load": { "kind": "relay", "coil_ohms": 400 },
          "clamp": { "kind": "diode" } },
        { "name": "weak drive", "part": "demo-npn-40v", "supply_v": 12, "logic_high_v": 3.3,
          "ambient_c": [-20, 60], "load": { "kind": "current", "current_a": 0.04 },
          "base_resistor_ohms": 47000, "pull_down_ohms": null } ] }"#;

    fn stages() -> Vec<Stage> {
        let lib = Library::builtin().expect("shipped parts");
        parse_board("demo.json", BOARD, &lib)
            .expect("parses")
            .stages
    }

    fn view_of(s: &Stage) -> (OutputView, crate::analysis::Analysis) {
        let a = analyse(s);
        let part = s.switch.as_any().downcast_ref::<NpnPart>().expect("npn");
        let w = detail(&a.drive).expect("npn detail").worst;
        (
            output_view(part, &s.conditions, &a.corner, &w).expect("view"),
            a,
        )
    }

    #[test]
    fn operating_points_agree_with_the_engine() {
        let stages = stages();
        // Sized stage: overdrive >= target, so the worst point is saturated at about IC,max.
        let (v, a) = view_of(&stages[0]);
        let w = detail(&a.drive).expect("npn").worst;
        assert!(w.overdrive.unwrap_or(0.0) >= 2.0);
        let p = v.worst.expect("worst point");
        assert_relative_eq!(p.ib, w.base_current_min.base(), max_relative = 1e-12);
        assert!(
            p.vce < v.knee,
            "saturated: VCE {} below knee {}",
            p.vce,
            v.knee
        );
        assert_relative_eq!(p.ic, w.corner.ic_max.base(), max_relative = 0.03);
        // The worst-case model was fitted so VBE there is the engine's VBE(sat),max at Ta,min.
        assert_relative_eq!(
            v.model_worst.vbe(p.ib, p.vce),
            w.corner.vbe_max_cold.base(),
            max_relative = 2e-3
        );
        // Weak stage: overdrive < 1, so the model sits in the active region at IC = gain x
        // IB,min = overdrive x IC,max.
        let (v, a) = view_of(&stages[1]);
        let w = detail(&a.drive).expect("npn").worst;
        let od = w.overdrive.unwrap_or(0.0);
        assert!(od > 0.0 && od < 0.9, "weak stage overdrive {od}");
        let p = v.worst.expect("worst point");
        assert_relative_eq!(p.ic, od * w.corner.ic_max.base(), max_relative = 1e-3);
        assert!(p.vce > v.knee);
    }

    #[test]
    fn overdrive_sweep_starts_at_the_engine_figure_and_rises_when_warm() {
        for s in stages() {
            let a = analyse(&s);
            let pic = crate::pipeline::picture(&s, &a).expect("a picture");
            let sweep = &pic.panels[2].curves[0].points;
            assert_eq!(sweep.len(), crate::pipeline::SWEEP_POINTS);
            assert_relative_eq!(sweep[0].0, s.conditions.ambient_min.base());
            // At Ta,min the sweep is the engine's own worst case with the same resistors.
            let od = detail(&a.drive)
                .and_then(|d| d.worst.overdrive)
                .unwrap_or(0.0);
            assert_relative_eq!(sweep[0].1, od, max_relative = 1e-12);
            // Gain rises and VBE falls with temperature (stage-model 3); coil current falls:
            // the worst-case overdrive can only rise with the cold end of the range.
            assert!(sweep.windows(2).all(|w| w[1].1 > w[0].1));
        }
    }

    #[test]
    fn knee_is_the_ebers_moll_saturation_voltage() {
        let s = &stages()[0];
        let (v, a) = view_of(s);
        let m = v.model_nominal;
        // Ebers-Moll saturation voltage (Sedra & Smith, edition from memory) at 0.9 beta_F.
        assert_relative_eq!(
            v.knee,
            vce_sat_ebers_moll(
                KNEE_FRACTION * m.beta_f,
                m.beta_f,
                REVERSE_BETA,
                thermal_voltage(25.0)
            ),
            max_relative = 1e-12
        );
        let part = s.switch.as_any().downcast_ref::<NpnPart>().expect("npn");
        assert_relative_eq!(
            m.beta_f,
            part.gain_min_at(a.corner.current_max),
            max_relative = 1e-12
        );
    }

    #[test]
    fn a_darlington_picture_never_shows_vce_below_one_base_emitter_drop() {
        // Stage-model 6b: a Darlington pair's output transistor is driven from the first one's
        // emitter, so VCE stays above about one VBE (textbook).
        let lib = Library::builtin().expect("shipped parts");
        let text = r#"{ "stages": [ { "name": "pair", "part": "TIP120", "supply_v": 24,
            "logic_high_v": 5, "load": { "kind": "current", "current_a": 1.0 } } ] }"#;
        let s = parse_board("d.json", text, &lib)
            .expect("parses")
            .stages
            .remove(0);
        let (v, _) = view_of(&s);
        let p = v.worst.expect("worst point");
        assert!(p.vce >= 0.5, "VCE {} below one junction", p.vce);
        assert!(v.knee >= 0.5);
    }
}
