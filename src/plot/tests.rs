use super::*;
use crate::board::parse_board;
use crate::parts::Library;
use approx::assert_relative_eq;

/// A 12 V relay on a 3.3 V pin, RB sized by the engine (demo part, invented data).
const DEMO_BOARD: &str = r#"{
  "board": "plot demo",
  "stages": [
    { "name": "K1 demo relay", "part": "demo-npn-40v", "supply_v": 12, "logic_high_v": 3.3,
      "grade": "industrial", "load": { "kind": "relay", "coil_ohms": 400 },
      "clamp": { "kind": "diode" } },
    { "name": "weak drive", "part": "demo-npn-40v", "supply_v": 12, "logic_high_v": 3.3,
      "ambient_c": [-20, 60], "load": { "kind": "current", "current_a": 0.04 },
      "base_resistor_ohms": 47000, "pull_down_ohms": null }
  ]
}"#;

fn demo_stages() -> Vec<Stage> {
    let lib = Library::builtin().expect("shipped parts");
    parse_board("demo.json", DEMO_BOARD, &lib)
        .expect("demo board parses")
        .stages
}

/// The start tags of `svg` that carry `class`.
fn elements_with_class<'a>(svg: &'a str, class: &str) -> Vec<&'a str> {
    let needle = format!("class=\"{class}\"");
    svg.lines()
        .filter(|l| l.starts_with('<') && l.contains(&needle))
        .collect()
}

fn attr(tag: &str, name: &str) -> Option<f64> {
    let key = format!(" {name}=\"");
    let start = tag.find(&key)? + key.len();
    let end = tag[start..].find('"')? + start;
    tag[start..end].parse().ok()
}

fn polyline_points(tag: &str) -> Vec<(f64, f64)> {
    let key = " points=\"";
    let Some(start) = tag.find(key).map(|i| i + key.len()) else {
        return Vec::new();
    };
    let end = tag[start..]
        .find('"')
        .map(|e| e + start)
        .unwrap_or(tag.len());
    tag[start..end]
        .split_whitespace()
        .filter_map(|p| {
            let (x, y) = p.split_once(',')?;
            Some((x.parse().ok()?, y.parse().ok()?))
        })
        .collect()
}

/// Distance in px from `p` to the line through `a` and `b`.
fn distance_to_line(p: (f64, f64), a: (f64, f64), b: (f64, f64)) -> f64 {
    let (dx, dy) = (b.0 - a.0, b.1 - a.1);
    ((p.0 - a.0) * dy - (p.1 - a.1) * dx).abs() / (dx * dx + dy * dy).sqrt()
}

#[test]
fn demo_svg_has_every_part_findable() {
    let stage = &demo_stages()[0];
    let analysis = analyse(stage);
    let svg = stage_svg(stage, &analysis).expect("renders");
    if let Ok(path) = std::env::var("PINLOW_PLOT_DEMO") {
        std::fs::write(path, &svg).expect("write demo svg");
    }
    assert!(svg.starts_with("<svg"));
    assert!(svg.trim_end().ends_with("</svg>"));

    // Axis titles carry units; text renders with no system font (plotters' naive layout).
    for label in ["VCE [V]", "IC [mA]", "Ambient [°C]", "Overdrive"] {
        assert!(
            svg.contains(&format!(">\n{label}\n</text>")),
            "axis title {label} missing"
        );
    }
    for label in [
        LABEL_LOAD_LINE,
        LABEL_LOAD_LINE_WORST,
        LABEL_POINT_NOMINAL,
        LABEL_POINT_WORST,
    ] {
        assert!(svg.contains(label), "legend text {label} missing");
    }

    let load = elements_with_class(&svg, class::LOAD_LINE);
    assert_eq!(load.len(), 1, "one nominal load line");
    assert!(load[0].starts_with("<polyline"));
    let curves = elements_with_class(&svg, class::CURVE);
    assert!(
        curves.len() >= 3,
        "several output curves, got {}",
        curves.len()
    );
    assert!(curves.iter().all(|c| c.starts_with("<polyline")));
    assert_eq!(elements_with_class(&svg, class::CURVE_WORST).len(), 1);
    assert!(!elements_with_class(&svg, class::LOAD_LINE_WORST).is_empty());
    let nominal = elements_with_class(&svg, class::POINT_NOMINAL);
    assert_eq!(nominal.len(), 1);
    assert!(nominal[0].starts_with("<circle"));
    let worst = elements_with_class(&svg, class::POINT_WORST);
    assert_eq!(worst.len(), 1);
    assert!(worst[0].starts_with("<polygon"));
    assert_eq!(elements_with_class(&svg, class::SATURATION).len(), 1);
    assert_eq!(elements_with_class(&svg, class::OVERDRIVE).len(), 1);
    assert!(!elements_with_class(&svg, class::OVERDRIVE_TARGET).is_empty());
    assert_eq!(elements_with_class(&svg, class::OVERDRIVE_COLD).len(), 1);
    // The zoom on the knee repeats the curves and the load line with a second class.
    let zoomed = |c: &str| elements_with_class(&svg, &format!("{c} {}", class::ZOOM)).len();
    assert_eq!(zoomed(class::LOAD_LINE), 1);
    assert!(zoomed(class::CURVE) >= 3);
    assert_eq!(zoomed(class::SATURATION), 1);

    // The nominal point is drawn on the nominal load line (pixel geometry of the SVG itself).
    let line = polyline_points(load[0]);
    assert_eq!(line.len(), 2);
    let p = (
        attr(nominal[0], "cx").expect("cx"),
        attr(nominal[0], "cy").expect("cy"),
    );
    assert!(
        distance_to_line(p, line[0], line[1]) <= 2.0,
        "nominal point off its load line"
    );
    // The load line falls from left to right: its right end is the lower one (SVG y grows down).
    let (left, right) = if line[0].0 < line[1].0 {
        (line[0], line[1])
    } else {
        (line[1], line[0])
    };
    assert!(right.1 > left.1, "load line does not fall: {line:?}");
}

#[test]
fn operating_points_agree_with_the_engine() {
    let stages = demo_stages();
    // Sized stage: overdrive >= target, so the worst point is saturated at about IC,max.
    let s = &stages[0];
    let a = analyse(s);
    assert!(a.worst.overdrive_min >= s.overdrive);
    let v = output_view(s, &a).expect("view");
    let w = v.worst.expect("worst point");
    assert_relative_eq!(w.ib, a.worst.base_current_min.base(), max_relative = 1e-12);
    assert!(
        w.vce < v.knee,
        "saturated: VCE {} below knee {}",
        w.vce,
        v.knee
    );
    assert_relative_eq!(w.ic, a.worst.load.ic_max.base(), max_relative = 0.03);
    // The worst-case model was fitted so VBE there is the engine's VBE(sat),max at Ta,min.
    assert_relative_eq!(
        v.model_worst.vbe(w.ib, w.vce),
        a.worst.load.vbe_sat_max_cold.base(),
        max_relative = 2e-3
    );

    // Weak stage: overdrive < 1, so the model sits in the active region at IC = hFE,wc x IB,min
    // = overdrive x IC,max.
    let s = &stages[1];
    let a = analyse(s);
    let od = a.worst.overdrive_min;
    assert!(od > 0.0 && od < 0.9, "weak stage overdrive {od}");
    let v = output_view(s, &a).expect("view");
    let w = v.worst.expect("worst point");
    assert_relative_eq!(w.ic, od * a.worst.load.ic_max.base(), max_relative = 1e-3);
    assert!(w.vce > v.knee);
}

#[test]
fn overdrive_sweep_starts_at_the_engine_figure_and_rises_when_warm() {
    for s in demo_stages() {
        let a = analyse(&s);
        let sweep = overdrive_sweep(&s, &a, 11);
        assert_eq!(sweep.len(), 11);
        assert_relative_eq!(sweep[0].0, s.ambient_min.base());
        assert_relative_eq!(sweep[10].0, s.ambient_max.base());
        // At Ta,min the sweep is the engine's own worst case with the same resistors.
        assert_relative_eq!(sweep[0].1, a.worst.overdrive_min, max_relative = 1e-12);
        // Gain rises and VBE falls with temperature (stage-model 3); coil current falls: the
        // worst-case overdrive can only rise with the cold end of the range.
        assert!(sweep.windows(2).all(|w| w[1].1 > w[0].1));
    }
}

#[test]
fn knee_is_the_ebers_moll_saturation_voltage() {
    let s = &demo_stages()[0];
    let a = analyse(s);
    let v = output_view(s, &a).expect("view");
    let m = v.model_nominal;
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
    // beta_F of the 25 C model is the part's minimum gain at IC,max.
    assert_relative_eq!(
        m.beta_f,
        s.part.gain_min_at(a.worst.load.ic_max),
        max_relative = 1e-12
    );
}

#[test]
fn a_load_that_draws_nothing_is_an_error_not_a_panic() {
    let lib = Library::builtin().expect("shipped parts");
    let text = r#"{ "stages": [ { "name": "dark", "part": "demo-npn-40v", "supply_v": 5,
        "logic_high_v": 3.3, "load": { "kind": "led", "count": 3, "forward_v": 3.0,
        "current_a": 0.01, "resistor_ohms": 100 } } ] }"#;
    let s = &parse_board("dark.json", text, &lib).expect("parses").stages[0];
    let a = analyse(s);
    assert_eq!(a.worst.load.ic_max.base(), 0.0);
    assert!(stage_svg(s, &a).is_err());
}
