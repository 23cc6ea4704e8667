//! Property tests of the worst-case engine (stage-model 4 to 6) over generated stages built from
//! the shipped parts: what sizing promises, the monotonic laws of the corners, the LED window,
//! and that every report renders in every format.
//!
//! The laws follow from the formulas of stage-model 4: IB,min falls as RB grows; hFE,min and
//! VBE(sat) make the overdrive fall as IC grows (every shipped part's gain rises slower than IC,
//! log-log slope below 1) and as the cold corner gets colder; the pin current is (VOH,max -
//! VBE(sat),min) / RB-.

use std::sync::OnceLock;

use pinlow::analysis::corners::{LoadCorner, Resistors, WorstCase};
use pinlow::analysis::sizing::size_base_resistor;
use pinlow::analysis::{analyse, audit, CheckId, Status};
use pinlow::board::{resolve_stage, Origin, RawClamp, RawLoad, RawStage};
use pinlow::load::Load;
use pinlow::parts::Library;
use pinlow::quantity::{celsius, ohms, Base};
use pinlow::report::{render, Format};
use pinlow::stage::{PullDown, Stage};
use proptest::prelude::*;

fn library() -> &'static Library {
    static LIB: OnceLock<Library> = OnceLock::new();
    LIB.get_or_init(|| Library::builtin().expect("the shipped parts load"))
}

fn part_ids() -> Vec<String> {
    library().iter().map(|p| p.id.clone()).collect()
}

/// A load of any kind with values a designer might write.
fn load() -> impl Strategy<Value = RawLoad> {
    prop_oneof![
        (1e-3..1.0f64).prop_map(|current_a| RawLoad::Current { current_a }),
        (50.0..2000.0f64, 0.0..0.2f64, 0.6..0.9f64).prop_map(|(coil, tol, must)| {
            RawLoad::Relay {
                coil_ohms: coil,
                coil_tolerance: Some(tol),
                rated_v: None,
                must_operate_fraction: Some(must),
                inductance_h: Some(0.1),
            }
        }),
        (
            1u32..5,
            1.8..3.3f64,
            0.05..0.3f64,
            5e-3..30e-3f64,
            prop::option::of(10.0..1000.0f64)
        )
            .prop_map(|(count, vf, spread, current, rl)| RawLoad::Led {
                count,
                forward_v: vf,
                forward_min_v: Some(vf - spread),
                forward_max_v: Some(vf + spread),
                current_a: current,
                max_current_a: None,
                resistor_ohms: rl,
            }),
        (0.05..1.0f64, 0.1..5.0f64).prop_map(|(per_m, length)| RawLoad::Strip {
            rated_v: 12.0,
            current_per_m_a: per_m,
            length_m: length,
        }),
    ]
}

/// A raw stage: every field in range, the base resistor and pull-down given or left to sizing.
fn raw_stage() -> impl Strategy<Value = RawStage> {
    let conditions = (
        prop::sample::select(part_ids()),
        3.0..48.0f64,
        0.0..0.15f64,
        1.8..5.5f64,
        0.0..0.6f64,
        1e-3..40e-3f64,
        (-40.0..25.0f64, 25.0..125.0f64),
    );
    let resistors = (
        prop::option::of(100.0..100e3f64),
        prop::option::of(prop::option::of(1e3..1e6f64)),
        0.001..0.1f64,
        1.0..5.0f64,
    );
    (conditions, load(), resistors).prop_map(
        |(
            (part, supply, supply_tol, high, drop, pin, (lo, hi)),
            load,
            (rb, rbe, rtol, overdrive),
        )| RawStage {
            name: Some("S".to_string()),
            part: Some(part),
            supply_v: Some(supply),
            supply_tolerance: Some(supply_tol),
            logic_high_v: Some(high),
            logic_high_min_v: Some((high - drop).max(0.1)),
            pin_limit_a: Some(pin),
            ambient_c: Some([lo, hi]),
            clamp: matches!(load, RawLoad::Relay { .. }).then_some(RawClamp::Diode {
                forward_v: None,
                reverse_v: None,
                current_a: None,
            }),
            load: Some(load),
            base_resistor_ohms: rb,
            pull_down_ohms: rbe,
            resistor_tolerance: Some(rtol),
            overdrive: Some(overdrive),
            ..RawStage::default()
        },
    )
}

fn stage() -> impl Strategy<Value = Stage> {
    raw_stage().prop_map(|raw| {
        resolve_stage(&raw, &RawStage::default(), &Origin::Flags, library())
            .unwrap_or_else(|e| panic!("generated stage refused: {e}"))
    })
}

/// The overdrive with the pull-down and LED resistor the engine chose, at another RB.
fn overdrive_at(stage: &Stage, rb: f64) -> f64 {
    let a = analyse(stage);
    let r = Resistors {
        rb: ohms(rb),
        ..a.worst.resistors
    };
    WorstCase::of(stage, r).overdrive_min
}

fn status(stage: &Stage, id: CheckId) -> Option<Status> {
    analyse(stage)
        .findings
        .iter()
        .find(|f| f.id == id)
        .map(|f| f.status)
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(512))]

    /// Sizing keeps its promise: when it reached the overdrive, the sized stage passes its own
    /// pinned-low check, and so does the same stage audited with the sized values fitted.
    #[test]
    fn a_sized_stage_passes_its_own_pinned_low_check(mut s in stage()) {
        s.base_resistor = None;
        let a = analyse(&s);
        let corner = LoadCorner::of(&s, a.worst.resistors.rl);
        let sizing = size_base_resistor(&s, &corner);
        prop_assert_eq!(sizing.rb, a.worst.resistors.rb);
        if sizing.reached {
            prop_assert!(a.worst.overdrive_min >= s.overdrive,
                "sized overdrive {} below {}", a.worst.overdrive_min, s.overdrive);
            prop_assert_eq!(status(&s, CheckId::PinnedLow), Some(Status::Pass));
            let mut fitted = s.clone();
            fitted.base_resistor = Some(sizing.rb);
            fitted.pull_down = sizing.rbe.map(PullDown::Given).unwrap_or(PullDown::None);
            if let (Load::Led(led), Some(rl)) = (&mut fitted.load, a.worst.resistors.rl) {
                led.resistor = Some(rl);
            }
            prop_assert_eq!(status(&fitted, CheckId::PinnedLow), Some(Status::Pass));
        }
    }

    /// A larger base resistor never raises the worst-case overdrive (below zero the stage cannot
    /// turn on at all, so negative figures count as zero).
    #[test]
    fn overdrive_never_rises_as_rb_grows(s in stage(), rb in 10.0..1e6f64, factor in 1.0..10.0f64) {
        let small = overdrive_at(&s, rb).max(0.0);
        let large = overdrive_at(&s, rb * factor).max(0.0);
        prop_assert!(large <= small * (1.0 + 1e-12), "RB {rb}: {small}; x{factor}: {large}");
    }

    /// A load that draws more never raises the worst-case overdrive.
    #[test]
    fn overdrive_never_rises_as_load_current_grows(
        mut s in stage(), i in 1e-3..1.0f64, factor in 1.0..5.0f64, rb in 100.0..100e3f64,
    ) {
        s.base_resistor = Some(ohms(rb));
        s.load = Load::Current { current: pinlow::quantity::amps(i) };
        let small = overdrive_at(&s, rb).max(0.0);
        s.load = Load::Current { current: pinlow::quantity::amps(i * factor) };
        let large = overdrive_at(&s, rb).max(0.0);
        prop_assert!(large <= small * (1.0 + 1e-12), "I {i}: {small}; x{factor}: {large}");
    }

    /// A wider ambient range (colder low end, hotter high end) never raises the overdrive.
    #[test]
    fn overdrive_never_rises_as_the_ambient_range_widens(
        mut s in stage(), colder in 0.0..60.0f64, hotter in 0.0..60.0f64, rb in 100.0..100e3f64,
    ) {
        s.base_resistor = Some(ohms(rb));
        let narrow = overdrive_at(&s, rb).max(0.0);
        s.ambient_min = celsius(s.ambient_min.base() - colder);
        s.ambient_max = celsius(s.ambient_max.base() + hotter);
        let wide = overdrive_at(&s, rb).max(0.0);
        prop_assert!(wide <= narrow * (1.0 + 1e-12), "narrow {narrow}, wide {wide}");
    }

    /// A smaller base resistor never lowers the worst-case pin current.
    #[test]
    fn pin_current_never_falls_as_rb_shrinks(s in stage(), rb in 10.0..1e6f64, factor in 1.0..10.0f64) {
        let a = analyse(&s);
        let at = |r: f64| {
            WorstCase::of(&s, Resistors { rb: ohms(r), ..a.worst.resistors })
                .pin_current_max
                .base()
        };
        let (large_rb, small_rb) = (at(rb), at(rb / factor));
        prop_assert!(small_rb >= large_rb * (1.0 - 1e-12), "{large_rb} then {small_rb}");
    }

    /// The LED current at any supply, forward voltages, resistor and VCE(sat) inside their
    /// tolerances lies within the reported minimum and maximum.
    #[test]
    fn led_current_stays_in_its_reported_window(
        s in stage(), t in prop::collection::vec(0.0..=1.0f64, 8),
    ) {
        let Load::Led(led) = &s.load else { return Ok(()) };
        let a = analyse(&s);
        let (Some(window), Some(rl)) = (a.worst.led, a.worst.resistors.rl) else { return Ok(()) };
        let mix = |lo: f64, hi: f64, t: f64| lo + (hi - lo) * t;
        let tol = s.resistor_tolerance;
        let vcc = mix(s.supply_min().base(), s.supply_max().base(), t[0]);
        let r = mix(rl.base() * (1.0 - tol), rl.base() * (1.0 + tol), t[1]);
        let vce = mix(0.0, a.worst.load.vce_sat_max.base(), t[2]);
        // Each LED of the string at its own forward voltage.
        let drop: f64 = (0..led.count as usize)
            .map(|k| mix(led.forward_min.base(), led.forward_max.base(), t[3 + k % 5]))
            .sum();
        let i = ((vcc - drop - vce) / r).max(0.0);
        let (min, max) = (window.min.base(), window.max.base());
        prop_assert!(min <= i * (1.0 + 1e-9) + 1e-15, "{i} A below the reported minimum {min} A");
        prop_assert!(i <= max * (1.0 + 1e-9) + 1e-15, "{i} A above the reported maximum {max} A");
    }

    /// The base and pin currents at any logic level, VBE(sat) and resistor values inside their
    /// tolerances lie within the worst-case figures: IB,min below, the pin current max above.
    #[test]
    fn base_and_pin_currents_stay_within_their_corners(
        s in stage(), t in prop::collection::vec(0.0..=1.0f64, 4),
    ) {
        let a = analyse(&s);
        let w = &a.worst;
        let mix = |lo: f64, hi: f64, t: f64| lo + (hi - lo) * t;
        let tol = s.resistor_tolerance;
        let voh = mix(s.logic_high_min.base(), s.logic_high.base(), t[0]);
        let vbe = mix(w.load.vbe_sat_min_hot.base(), w.load.vbe_sat_max_cold.base(), t[1]);
        let rb = w.resistors.rb.base();
        let rb = mix(rb * (1.0 - tol), rb * (1.0 + tol), t[2]);
        let pin = ((voh - vbe) / rb).max(0.0);
        let max = w.pin_current_max.base();
        prop_assert!(pin <= max * (1.0 + 1e-9) + 1e-15, "pin {pin} A above the maximum {max} A");
        let stolen = w.resistors.rbe.map_or(0.0, |r| {
            vbe / mix(r.base() * (1.0 - tol), r.base() * (1.0 + tol), t[3])
        });
        let ib = (voh - vbe) / rb - stolen;
        let min = w.base_current_min.base();
        prop_assert!(ib >= min - 1e-9 * min.abs() - 1e-15, "IB {ib} A below the minimum {min} A");
    }

    /// Every output format renders every report, and the JSON parses back to the same verdicts.
    #[test]
    fn every_format_renders_and_json_parses_back(stages in prop::collection::vec(stage(), 1..4)) {
        let report = audit(Some("generated".to_string()), &stages);
        for format in [Format::Table, Format::Markdown, Format::Json] {
            let text = render(&report, format, false);
            prop_assert!(text.contains("generated"), "{format:?} lacks the board name");
        }
        let text = render(&report, Format::Table, true);
        prop_assert!(text.contains("\u{1b}["), "colour asked for but none drawn");
        let json: serde_json::Value = serde_json::from_str(&render(&report, Format::Json, false))
            .map_err(|e| TestCaseError::fail(format!("JSON does not parse: {e}")))?;
        prop_assert_eq!(json["verdict"].as_str(), Some(report.verdict.as_str()));
        let back = json["stages"].as_array().map(Vec::len);
        prop_assert_eq!(back, Some(stages.len()));
        for (s, j) in report.stages.iter().zip(json["stages"].as_array().into_iter().flatten()) {
            prop_assert_eq!(j["verdict"].as_str(), Some(s.verdict.as_str()));
            prop_assert_eq!(j["checks"].as_array().map(Vec::len), Some(s.checks.len()));
        }
    }
}
