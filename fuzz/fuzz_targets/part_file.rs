//! Fuzz the part-file reader (either drive kind, picked by `polarity`), then put every part it
//! accepts to work: a relay stage, an LED string and a motor on it, analysed, remedied and
//! reported. An accepted part must never make the engine panic or answer NaN.
#![no_main]

use libfuzzer_sys::fuzz_target;
use pinlow::analysis::{analyse, compose};
use pinlow::board::parse_board;
use pinlow::check::worst;
use pinlow::parts::{read_part, Library, PartSource};
use pinlow::pipeline::build;
use pinlow::quantity::Base;
use pinlow::report::{render, Format, Report};

fuzz_target!(|data: &[u8]| {
    let Ok(text) = std::str::from_utf8(data) else {
        return;
    };
    let part = match read_part("fuzz.json", text, PartSource::Builtin("fuzz.json")) {
        Ok(p) => p,
        Err(e) => {
            assert!(!e.to_string().is_empty());
            return;
        }
    };
    let id = serde_json::to_string(&part.info().id).expect("a string serializes");
    let _ = (
        part.show(),
        part.summary(),
        part.to_json(),
        part.assumptions(),
    );
    let mut lib = Library::default();
    lib.insert(part);
    let board = format!(
        r#"{{"board": "fuzzed part", "defaults": {{"part": {id}, "supply_v": 12, "logic_high_v": 3.3}},
            "stages": [
              {{"name": "coil", "load": {{"kind": "relay", "coil_ohms": 400}},
                "clamp": {{"kind": "diode"}}}},
              {{"name": "leds", "load": {{"kind": "led", "forward_v": 2.0, "count": 2, "current_a": 0.02}}}},
              {{"name": "fan", "load": {{"kind": "motor", "winding_ohms": 20}},
                "clamp": {{"kind": "diode"}}}}
            ]}}"#
    );
    let board = match parse_board("fuzz-board.json", &board, &lib) {
        Ok(b) => b,
        // A stage may refuse this part (a rating below the supply is a finding, not an error;
        // anything refused must say why).
        Err(e) => {
            assert!(!e.to_string().is_empty());
            return;
        }
    };
    let mut reports = Vec::with_capacity(board.stages.len());
    for (i, stage) in board.stages.iter().enumerate() {
        let a = analyse(stage);
        assert_eq!(a.verdict, worst(&a.findings));
        for (name, v) in [
            ("IC,max", a.corner.current_max.base()),
            ("series resistor", a.drive.series.base()),
            ("on-voltage", a.drive.on_voltage_max.base()),
            ("pin current", a.drive.pin_current_max.base()),
        ] {
            assert!(
                v.is_finite() && v >= 0.0,
                "stage {}: {name} {v}",
                stage.name
            );
        }
        let remedy = compose(stage, &a);
        if let Some(after) = remedy.as_ref().and_then(|r| r.after.as_ref()) {
            assert!(
                after.analysis.verdict <= a.verdict,
                "the remedy leaves it worse"
            );
        }
        reports.push(build(i + 1, stage, &a, remedy.as_ref()));
    }
    let report = Report {
        board: board.name.clone(),
        stages: reports,
    };
    let json = render(&report, Format::Json, false);
    let _: serde_json::Value = serde_json::from_str(&json).expect("the JSON report parses back");
    assert!(!render(&report, Format::Table, false).is_empty());
});
