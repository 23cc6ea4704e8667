//! Fuzz the board-file loader with the shipped parts, then the whole engine: audit (which runs
//! the fixes) and every renderer, the SVG plot included. The JSON report must parse back.
//!
//! Beyond "no panic", every accepted board must give a sane answer: figures finite, a pass on
//! pinned-low only at the overdrive asked, a stage verdict that is its worst check. An infinite
//! or NaN figure would turn into `null` or a silent pass, so it counts as a finding.
#![no_main]

use std::sync::OnceLock;

use libfuzzer_sys::fuzz_target;
use pinlow::analysis::{analyse, audit, CheckId, Status};
use pinlow::board::parse_board;
use pinlow::load::Load;
use pinlow::parts::Library;
use pinlow::quantity::Base;
use pinlow::report::{render, Format};
use pinlow::stage::Stage;

fn library() -> &'static Library {
    static LIB: OnceLock<Library> = OnceLock::new();
    LIB.get_or_init(|| Library::builtin().expect("the shipped parts load"))
}

fuzz_target!(|data: &[u8]| {
    let Ok(text) = std::str::from_utf8(data) else {
        return;
    };
    let board = match parse_board("fuzz.json", text, library()) {
        Ok(b) => b,
        Err(e) => {
            let _ = e.to_string();
            return;
        }
    };
    for stage in &board.stages {
        sane(stage);
        // The SVG plot is the fourth renderer (`pinlow plot`); an error is fine, a panic is not.
        if let Err(e) = pinlow::plot::stage_svg(stage, &analyse(stage)) {
            assert!(!e.is_empty());
        }
    }
    let report = audit(board.name.clone(), &board.stages);
    for s in &report.stages {
        let w = &s.worst_case;
        for (name, v) in [
            ("collector_current_max_a", w.collector_current_max_a),
            ("base_current_min_a", w.base_current_min_a),
            ("gain_min", w.gain_min),
            ("pin_current_max_a", w.pin_current_max_a),
            ("power_max_w", w.power_max_w),
            ("junction_max_c", w.junction_max_c),
            ("base_resistor_ohms", s.base_resistor_ohms),
        ] {
            assert!(v.is_finite(), "stage {}: {name} = {v}", s.name);
        }
    }
    for (format, color) in [
        (Format::Table, false),
        (Format::Table, true),
        (Format::Markdown, false),
        (Format::Json, false),
    ] {
        let out = render(&report, format, color);
        assert!(!out.is_empty());
        if format == Format::Json {
            let v: serde_json::Value = serde_json::from_str(&out)
                .unwrap_or_else(|e| panic!("JSON report does not parse back: {e}\n{out}"));
            assert!(v.get("verdict").is_some());
        }
    }
    let _ = render(&report.only_problems(), Format::Table, false);
});

/// The engine's figures for one accepted stage are finite and agree with its verdicts.
fn sane(stage: &Stage) {
    let a = analyse(stage);
    let w = &a.worst;
    let ic = w.load.ic_max.base();
    assert!(ic.is_finite() && ic >= 0.0, "IC,max {ic}");
    if !matches!(stage.load, Load::Led(_)) {
        assert!(ic > 0.0, "a {} load draws nothing", stage.load.kind_name());
    }
    assert!(
        w.load.gain_min.is_finite() && w.load.gain_min > 0.0,
        "gain {}",
        w.load.gain_min
    );
    assert!(
        w.base_current_min.base().is_finite(),
        "IB,min {:?}",
        w.base_current_min
    );
    assert!(!w.overdrive_min.is_nan(), "overdrive NaN");
    if w.overdrive_min.is_infinite() {
        assert_eq!(ic, 0.0, "infinite overdrive with a load current");
    }
    for (name, v) in [
        ("pin current", w.pin_current_max.base()),
        ("power", w.power_max.base()),
        ("RB power", w.rb_power.base()),
    ] {
        assert!(v.is_finite() && v >= 0.0, "{name} {v}");
    }
    assert!(w.junction_max.base().is_finite(), "Tj {:?}", w.junction_max);
    if let Some(led) = w.led {
        assert!(led.min.base() <= led.max.base(), "LED min above max");
    }
    let worst = a
        .findings
        .iter()
        .map(|f| f.status)
        .max()
        .unwrap_or(Status::Pass);
    assert_eq!(a.verdict, worst, "verdict is not the worst check");
    if let Some(f) = a.findings.iter().find(|f| f.id == CheckId::PinnedLow) {
        if f.status == Status::Pass {
            assert!(
                w.overdrive_min >= stage.overdrive,
                "pinned-low passes at overdrive {} < {}",
                w.overdrive_min,
                stage.overdrive
            );
        }
    }
}
