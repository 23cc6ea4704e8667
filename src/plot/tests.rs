use super::*;
use crate::analysis::analyse;
use crate::board::parse_board;
use crate::drive::npn::picture_class as pc;
use crate::parts::Library;
use crate::pipeline::picture;
use crate::stage::Stage;

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
    let svg = picture_svg(&picture(stage, &analysis).expect("a picture")).expect("renders");
    if let Ok(path) = std::env::var("PINLOW_PLOT_DEMO") {
        std::fs::write(path, &svg).expect("write demo svg");
    }
    assert!(svg.starts_with("<svg"));
    assert!(svg.trim_end().ends_with("</svg>"));
    // Well-formed XML (an XML parser reads it whole).
    roxmltree::Document::parse(&svg).expect("the SVG is well-formed XML");

    // Axis titles carry units; text renders with no system font (plotters' naive layout).
    for label in ["VCE [V]", "IC [mA]", "Ambient [°C]", "Overdrive"] {
        assert!(
            svg.contains(&format!(">\n{label}\n</text>")),
            "axis title {label} missing"
        );
    }
    for label in [
        "load line, nominal supply",
        "load line, highest supply",
        "nominal point (25 °C)",
        "worst-case point",
    ] {
        assert!(svg.contains(label), "legend text {label} missing");
    }

    let load = elements_with_class(&svg, pc::LOAD_LINE);
    assert_eq!(load.len(), 1, "one nominal load line");
    assert!(load[0].starts_with("<polyline"));
    let curves = elements_with_class(&svg, pc::CURVE);
    assert!(
        curves.len() >= 3,
        "several output curves, got {}",
        curves.len()
    );
    assert!(curves.iter().all(|c| c.starts_with("<polyline")));
    assert_eq!(elements_with_class(&svg, pc::CURVE_WORST).len(), 1);
    assert!(!elements_with_class(&svg, pc::LOAD_LINE_WORST).is_empty());
    let nominal = elements_with_class(&svg, pc::POINT_NOMINAL);
    assert_eq!(nominal.len(), 1);
    assert!(nominal[0].starts_with("<circle"));
    let worst = elements_with_class(&svg, pc::POINT_WORST);
    assert_eq!(worst.len(), 1);
    assert!(worst[0].starts_with("<polygon"));
    assert_eq!(elements_with_class(&svg, pc::SATURATION).len(), 1);
    assert_eq!(elements_with_class(&svg, pc::OVERDRIVE).len(), 1);
    assert!(!elements_with_class(&svg, pc::OVERDRIVE_TARGET).is_empty());
    assert_eq!(elements_with_class(&svg, pc::OVERDRIVE_COLD).len(), 1);
    // The zoom on the knee repeats the curves and the load line with a second class.
    let zoomed = |c: &str| elements_with_class(&svg, &format!("{c} {}", pc::ZOOM)).len();
    assert_eq!(zoomed(pc::LOAD_LINE), 1);
    assert!(zoomed(pc::CURVE) >= 3);
    assert_eq!(zoomed(pc::SATURATION), 1);

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
fn a_load_that_draws_nothing_has_no_picture_not_a_panic() {
    let lib = Library::builtin().expect("shipped parts");
    let text = r#"{ "stages": [ { "name": "dark", "part": "demo-npn-40v", "supply_v": 5,
        "logic_high_v": 3.3, "load": { "kind": "led", "count": 3, "forward_v": 3.0,
        "current_a": 0.01, "resistor_ohms": 100 } } ] }"#;
    let s = &parse_board("dark.json", text, &lib).expect("parses").stages[0];
    let a = analyse(s);
    assert_eq!(crate::quantity::Base::base(&a.corner.current_max), 0.0);
    let why = picture(s, &a).expect_err("nothing to draw");
    assert!(why.contains("draws no current"), "{why}");
}
