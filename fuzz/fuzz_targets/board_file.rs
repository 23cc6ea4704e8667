//! Fuzz the board-file reader with the shipped parts, then the whole engine for every drive and
//! load kind: the analysis, the composed remedy and its re-check, the picture and its SVG, and
//! every renderer. The JSON report must parse back; the SVG must be well-formed XML.
//!
//! Beyond "no panic", every accepted board must give a sane answer: corner and drive figures
//! finite, a pass on pinned-low of an npn stage only at the overdrive asked, a stage verdict that
//! is its worst check, a remedy that never leaves the stage worse, and no raw control byte in
//! the text reports. An infinite or NaN figure would turn into `null` or a silent pass, so it
//! counts as a finding.
#![no_main]

use std::sync::OnceLock;

use libfuzzer_sys::fuzz_target;
use pinlow::analysis::{analyse, compose, Analysis};
use pinlow::board::parse_board;
use pinlow::check::{worst, Status};
use pinlow::drive::PINNED_LOW;
use pinlow::parts::Library;
use pinlow::pipeline::{build, picture};
use pinlow::quantity::Base;
use pinlow::report::{render, Format, Report};
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
            assert!(!e.to_string().is_empty());
            return;
        }
    };
    let mut reports = Vec::with_capacity(board.stages.len());
    for (i, stage) in board.stages.iter().enumerate() {
        let a = analyse(stage);
        sane(stage, &a);
        let remedy = compose(stage, &a);
        if let Some(after) = remedy.as_ref().and_then(|r| r.after.as_ref()) {
            assert!(
                after.analysis.verdict <= a.verdict,
                "the remedy leaves stage `{}` worse",
                stage.name
            );
            sane(&after.stage, &after.analysis);
        }
        // The report value from this one analysis, as the pipeline builds it.
        reports.push(build(i + 1, stage, &a, remedy.as_ref()));
        // The picture is the fourth renderer (`pinlow plot`): a stage may have none (an error
        // with a reason), but a picture must draw as well-formed SVG.
        match picture(stage, &a) {
            Ok(p) => match pinlow::plot::picture_svg(&p) {
                Ok(svg) => {
                    if let Err(e) = roxmltree::Document::parse(&svg) {
                        panic!("SVG of stage `{}` is not well-formed: {e}", stage.name);
                    }
                }
                Err(e) => assert!(!e.is_empty()),
            },
            Err(e) => assert!(!e.is_empty()),
        }
    }
    let report = Report {
        board: board.name.clone(),
        stages: reports,
    };
    for (format, color) in [
        (Format::Table, false),
        (Format::Table, true),
        (Format::Markdown, false),
        (Format::Json, false),
    ] {
        let out = render(&report, format, color);
        assert!(!out.is_empty());
        // Text reports carry no control byte but newlines (and, in colour, the ESC of the
        // colour codes); JSON escapes every control character.
        let allowed = |c: char| c == '\n' || (color && c == '\u{1b}');
        if let Some(c) = out.chars().find(|&c| c.is_control() && !allowed(c)) {
            panic!("raw control character {c:?} in the {format:?} report");
        }
        if format == Format::Json {
            let v: serde_json::Value = serde_json::from_str(&out)
                .unwrap_or_else(|e| panic!("JSON report does not parse back: {e}\n{out}"));
            assert_eq!(v["model_version"].as_u64(), Some(2));
        }
    }
});

/// The engine's figures for one accepted stage are finite and agree with its verdicts.
fn sane(stage: &Stage, a: &Analysis) {
    let c = &a.corner;
    for (name, v) in [
        ("VCC,max", c.vcc_max.base()),
        ("VCC,min", c.vcc_min.base()),
        ("IC,max", c.current_max.base()),
        ("linear fraction", c.linear_fraction),
    ] {
        assert!(v.is_finite() && v >= 0.0, "{name} {v}");
    }
    if let Some(peak) = c.peak {
        assert!(peak.base().is_finite(), "peak {peak:?}");
    }
    let d = &a.drive;
    for (name, v) in [
        ("series resistor", d.series.base()),
        ("series power", d.series_power.base()),
        ("on-voltage", d.on_voltage_max.base()),
        ("pin current", d.pin_current_max.base()),
    ] {
        assert!(v.is_finite() && v >= 0.0, "{name} {v}");
    }
    assert!(d.series.base() > 0.0, "no series resistor");
    if let Some(p) = d.power_max {
        assert!(p.base().is_finite() && p.base() >= 0.0, "power {p:?}");
    }
    if let Some(t) = d.junction_max {
        assert!(t.base().is_finite(), "Tj {t:?}");
    }
    assert_eq!(
        a.verdict,
        worst(&a.findings),
        "verdict is not the worst check"
    );
    if let Some(n) = pinlow::drive::npn::detail(d) {
        let od = n.worst.overdrive;
        assert!(od.is_none_or(|k| !k.is_nan()), "overdrive NaN");
        if a.finding(PINNED_LOW).map(|f| f.status) == Some(Status::Pass) {
            let k = od.expect("a pass on pinned-low has an overdrive");
            assert!(
                k >= stage.conditions.overdrive * (1.0 - 1e-9),
                "pinned-low passes at overdrive {k} < {}",
                stage.conditions.overdrive
            );
        }
    }
}
