//! Tests of the yield Monte Carlo.

use super::model::{BuildModel, Draw};
use super::rng::chunk_rng;
use super::*;
use crate::analysis::analyse;
use crate::board::parse_board;
use crate::drive::npn::corner::NpnWorst;
use crate::parts::Library;
use crate::quantity::Base;
use proptest::prelude::*;
use proptest::strategy::ValueTree;
use proptest::test_runner::TestCaseError;
use serde_json::{json, Value};

/// A stage read from a board file and analysed, kept together so that a [`YieldStage`] can
/// borrow from both.
pub(crate) struct Built {
    pub(crate) stage: Stage,
    pub(crate) analysis: Analysis,
}

impl Built {
    /// The stage of a one-stage board, its members given as a JSON object.
    pub(crate) fn from_value(stage: &Value) -> Result<Built, crate::error::Error> {
        let text = json!({ "stages": [stage] }).to_string();
        let lib = Library::builtin().expect("shipped parts load");
        let stage = parse_board("test", &text, &lib)?.stages.remove(0);
        let analysis = analyse(&stage);
        Ok(Built { stage, analysis })
    }

    /// What the draws take.
    pub(crate) fn y(&self) -> YieldStage<'_> {
        YieldStage::of(&self.stage, &self.analysis).expect("an NPN stage with a current law")
    }

    /// The worst-case corner.
    pub(crate) fn worst(&self) -> NpnWorst {
        crate::drive::npn::detail(&self.analysis.drive)
            .expect("an NPN stage")
            .worst
    }
}

/// `base` with the members of `extra` (a JSON object) put over it.
fn over(mut base: Value, extra: Value) -> Value {
    if let (Some(b), Some(o)) = (base.as_object_mut(), extra.as_object()) {
        for (k, v) in o {
            b.insert(k.clone(), v.clone());
        }
    }
    base
}

/// A 12 V relay stage driven from a 3.3 V pin, commercial grade, the demo 40 V part; `extra`
/// overrides or adds members (`{"base_resistor_ohms": 4700, "pull_down_ohms": null}`).
pub(crate) fn relay_stage(extra: Value) -> Built {
    Built::from_value(&over(relay_base(), extra)).expect("test stage is valid")
}

/// The members of [`relay_stage`].
fn relay_base() -> Value {
    json!({
        "name": "K1 test relay", "part": "demo-npn-40v", "supply_v": 12, "supply_tolerance": 0.05,
        "logic_high_v": 3.3, "logic_high_min_v": 2.9, "pin_limit_a": 0.004, "ambient_c": [0, 70],
        "resistor_tolerance": 0.05, "series": "E24", "overdrive": 2.0,
        "load": { "kind": "relay", "coil_ohms": 400, "coil_tolerance": 0.1, "rated_v": 12,
                  "must_operate_fraction": 0.75 },
        "clamp": { "kind": "diode", "forward_v": 1.0 }
    })
}

/// Three LEDs at 20 mA from 12 V, their resistor and the base resistor sized.
fn led_stage(extra: Value) -> Built {
    let led = json!({
        "name": "D1 test LEDs",
        "load": { "kind": "led", "count": 3, "forward_v": 2.0, "forward_min_v": 1.8,
                  "forward_max_v": 2.2, "current_a": 0.02 },
        "clamp": { "kind": "none" }
    });
    Built::from_value(&over(over(relay_base(), led), extra)).expect("test stage is valid")
}

// ---- 1. no build below the corner; the worst-end draw is the corner ----

/// Every shipped NPN part id, sorted so that a generated index always means the same part.
fn part_ids() -> Vec<String> {
    let lib = Library::builtin().expect("shipped parts load");
    let mut ids: Vec<String> = lib
        .iter()
        .filter(|p| p.kind().name == "npn")
        .map(|p| p.info().id.clone())
        .collect();
    ids.sort();
    ids
}

/// Inputs of a generated stage.
#[derive(Clone, Debug)]
struct Gen {
    part: usize,
    supply: f64,
    supply_tolerance: f64,
    logic_high: f64,
    logic_drop: f64,
    ambient_min: f64,
    ambient_span: f64,
    load_kind: u8,
    load_a: f64,
    load_b: f64,
    led_count: u32,
    led_resistor: Option<f64>,
    rb: Option<f64>,
    pull_down: u8,
    pull_down_given: f64,
    resistor_tolerance: f64,
    overdrive: f64,
}

fn gen_strategy(parts: usize) -> impl Strategy<Value = Gen> {
    let supply = (
        0..parts,
        3.0..30.0f64,
        0.0..0.2f64,
        1.8..5.5f64,
        0.0..0.8f64,
    );
    let ambient = (-55.0..40.0f64, 0.0..100.0f64);
    let load = (
        0u8..5,
        0.0..1.0f64,
        0.0..1.0f64,
        1u32..5,
        proptest::option::of(10.0..2200.0f64),
    );
    let resistors = (
        proptest::option::of(100.0..100_000.0f64),
        0u8..3,
        1_000.0..100_000.0f64,
        0.0..0.1f64,
        1.0..5.0f64,
    );
    (supply, ambient, load, resistors).prop_map(
        |(
            (part, supply, supply_tolerance, logic_high, logic_drop),
            (ambient_min, ambient_span),
            (load_kind, load_a, load_b, led_count, led_resistor),
            (rb, pull_down, pull_down_given, resistor_tolerance, overdrive),
        )| Gen {
            part,
            supply,
            supply_tolerance,
            logic_high,
            logic_drop,
            ambient_min,
            ambient_span,
            load_kind,
            load_a,
            load_b,
            led_count,
            led_resistor,
            rb,
            pull_down,
            pull_down_given,
            resistor_tolerance,
            overdrive,
        },
    )
}

/// The stage's members in a board file.
fn stage_of(g: &Gen, ids: &[String]) -> Value {
    let (load, clamp) = match g.load_kind {
        0 => (
            json!({ "kind": "current", "current_a": 0.001 + 0.5 * g.load_a }),
            json!({ "kind": "none" }),
        ),
        1 => (
            json!({ "kind": "relay", "coil_ohms": 50.0 + 2000.0 * g.load_a,
                    "coil_tolerance": 0.2 * g.load_b, "rated_v": 12 }),
            json!({ "kind": "diode" }),
        ),
        2 => {
            let vf = 1.8 + 1.5 * g.load_a;
            let spread = 0.3 * g.load_b;
            let mut led = json!({ "kind": "led", "count": g.led_count, "forward_v": vf,
                    "forward_min_v": vf - spread, "forward_max_v": vf + spread,
                    "current_a": 0.02 });
            if let (Some(r), Some(o)) = (g.led_resistor, led.as_object_mut()) {
                o.insert("resistor_ohms".into(), json!(r));
            }
            (led, json!({ "kind": "none" }))
        }
        3 => (
            json!({ "kind": "strip", "rated_v": g.supply, "current_per_m_a": 0.01 + g.load_a,
                    "length_m": 0.1 + 3.0 * g.load_b }),
            json!({ "kind": "none" }),
        ),
        _ => (
            json!({ "kind": "motor", "winding_ohms": 5.0 + 200.0 * g.load_a,
                    "winding_tolerance": 0.2 * g.load_b }),
            json!({ "kind": "diode" }),
        ),
    };
    let mut stage = over(
        relay_base(),
        json!({
            "part": ids[g.part], "supply_v": g.supply, "supply_tolerance": g.supply_tolerance,
            "logic_high_v": g.logic_high,
            "logic_high_min_v": (g.logic_high - g.logic_drop).max(0.0),
            "ambient_c": [g.ambient_min, g.ambient_min + g.ambient_span],
            "resistor_tolerance": g.resistor_tolerance, "overdrive": g.overdrive,
            "load": load, "clamp": clamp,
        }),
    );
    if let Some(o) = stage.as_object_mut() {
        if let Some(rb) = g.rb {
            o.insert("base_resistor_ohms".into(), json!(rb));
        }
        match g.pull_down {
            0 => {
                o.insert("pull_down_ohms".into(), Value::Null);
            }
            1 => {}
            _ => {
                o.insert("pull_down_ohms".into(), json!(g.pull_down_given));
            }
        }
    }
    stage
}

proptest! {
    // A fixed seed keeps the cases the same from run to run; no failure file is written.
    #![proptest_config(ProptestConfig {
        cases: 256,
        failure_persistence: None,
        rng_seed: proptest::test_runner::RngSeed::Fixed(0x00C0_FFEE),
        ..ProptestConfig::default()
    })]

    #[test]
    fn no_build_is_below_the_corner_and_the_worst_end_is_the_corner(
        g in gen_strategy(part_ids().len()),
        seed in any::<u64>(),
    ) {
        let ids = part_ids();
        // A generated stage the board reader refuses (a motor winding the part cannot carry is
        // still read; an LED resistor too small to read is not) has no yield to check.
        let Ok(built) = Built::from_value(&stage_of(&g, &ids)) else {
            return Err(TestCaseError::reject("the board reader refuses the stage"));
        };
        let wc = built.worst();
        let model = BuildModel::new(&built.y());

        // Rounding slack only: 1e-9 relative. A corner that cannot turn on is below every
        // build (0 or more); one with no load current only equals infinite builds.
        let ic_max = wc.corner.ic_max.base();
        let ib_min = wc.base_current_min.base();
        let corner = match wc.overdrive {
            Some(od) => od,
            None if ic_max <= 0.0 && ib_min > 0.0 => f64::INFINITY,
            None => 0.0,
        };
        let floor = if corner > 0.0 { corner * (1.0 - 1e-9) } else { corner };
        let mut rng = chunk_rng(seed, 0);
        for _ in 0..2_000 {
            let d = model.draw(&mut rng);
            let o = model.evaluate(&d);
            prop_assert!(o.overdrive >= 0.0, "negative overdrive {}", o.overdrive);
            prop_assert!(
                o.overdrive >= floor,
                "build overdrive {} below the corner {} (draw {:?})", o.overdrive, corner, d
            );
        }

        // The worst-end draw reproduces the corner (where the corner is a finite positive ratio).
        if ic_max > 0.0 && ib_min > 0.0 {
            let o = model.evaluate(&model.worst_end_draw());
            let close = |a: f64, b: f64| (a - b).abs() <= 1e-3 * b.abs();
            prop_assert!(close(o.collector_current, ic_max), "IC {} vs {}", o.collector_current, ic_max);
            prop_assert!(close(o.base_current, ib_min), "IB {} vs {}", o.base_current, ib_min);
            prop_assert!(close(o.overdrive, corner), "overdrive {} vs {}", o.overdrive, corner);
        }
    }
}

#[test]
fn generated_stages_are_mostly_read() {
    // The property above skips stages the board reader refuses; most must be read, or it
    // checks little.
    let ids = part_ids();
    let mut runner = proptest::test_runner::TestRunner::deterministic();
    let strategy = gen_strategy(ids.len());
    let mut read = 0;
    for _ in 0..200 {
        let g = strategy
            .new_tree(&mut runner)
            .expect("a generated stage")
            .current();
        read += usize::from(Built::from_value(&stage_of(&g, &ids)).is_ok());
    }
    assert!(read >= 180, "only {read} of 200 generated stages were read");
}

#[test]
fn draws_stay_inside_their_ranges() {
    let built = led_stage(json!({}));
    let y = built.y();
    let rl = match y.law {
        crate::load::CurrentLaw::Led { rl, .. } => rl,
        other => panic!("an LED law with a resistor, got {other:?}"),
    };
    let rb = y.rb.base();
    let rbe = y.rbe.expect("pull-down sized").base();
    let model = BuildModel::new(&y);
    let mut rng = chunk_rng(3, 0);
    let within = |x: f64, lo: f64, hi: f64| lo <= x && x <= hi;
    for _ in 0..10_000 {
        let d: Draw = model.draw(&mut rng);
        assert!(within(d.supply, 11.4, 12.6), "{d:?}");
        assert!(within(d.logic_high, 2.9, 3.3), "{d:?}");
        assert!(within(d.ambient, 0.0, 70.0), "{d:?}");
        assert!(within(d.rb, 0.95 * rb, 1.05 * rb), "{d:?}");
        assert!(within(d.rbe, 0.95 * rbe, 1.05 * rbe), "{d:?}");
        assert!(within(d.rl, 0.95 * rl, 1.05 * rl), "{d:?}");
        assert!(within(d.led_drop, 3.0 * 1.8, 3.0 * 2.2), "{d:?}");
        assert!(within(d.vbe_position, 0.0, 1.0) && within(d.gain_position, 0.0, 1.0));
    }
}

// ---- 2. pinned-low fraction against the corner ----

#[test]
fn a_stage_whose_corner_saturates_pins_low_in_every_build() {
    let built = relay_stage(json!({}));
    let corner = built.worst().overdrive.expect("the corner turns on");
    assert!(
        corner >= 1.0,
        "precondition: the corner saturates, got {corner}"
    );
    let y = run_yield(
        &built.y(),
        &YieldOptions {
            builds: 100_000,
            seed: 1,
        },
    );
    assert_eq!(y.builds, 100_000);
    assert_eq!(y.pinned_low_fraction, 1.0);
    assert_eq!(y.below_corner_builds, 0);
    // Every build is at least the corner, so when the corner meets k every build does.
    if corner >= built.stage.conditions.overdrive {
        assert_eq!(y.overdrive_met_fraction, 1.0);
    }
    // The lowest overdrive percentile is at or above the corner (less half a histogram bin).
    assert!(
        y.overdrive_percentiles.p0_1 >= corner * (1.0 - 2f64.powi(-13)),
        "{y:?}"
    );
}

#[test]
fn a_stage_failing_only_at_the_corner_pins_low_in_most_builds() {
    // 4.7 k from a 3.3 V pin, no pull-down: the corner (VOH,min 2.9 V, VBE(sat),max cold, RB+,
    // 0 C, coil cold and 10 % low, 12.6 V) is under 1; the middle of every range well above.
    let built = relay_stage(json!({ "base_resistor_ohms": 4700, "pull_down_ohms": null }));
    let corner = built.worst().overdrive.expect("the corner turns on");
    let model = BuildModel::new(&built.y());
    let nominal = model.evaluate(&model.nominal_draw()).overdrive;
    assert!(corner < 1.0, "precondition: the corner fails, got {corner}");
    assert!(
        nominal > 1.5,
        "precondition: nominal well above 1, got {nominal}"
    );

    let y = run_yield(
        &built.y(),
        &YieldOptions {
            builds: 200_000,
            seed: 2,
        },
    );
    assert!(
        y.pinned_low_fraction > 0.0 && y.pinned_low_fraction < 1.0,
        "{}",
        y.pinned_low_fraction
    );
    let [lo, hi] = y.pinned_low_interval;
    assert!(lo <= y.pinned_low_fraction && y.pinned_low_fraction <= hi);
    // Clearly some builds fail: the interval stays below 1.
    assert!(hi < 1.0, "{lo} .. {hi}");
    assert!(y.overdrive_met_fraction <= y.pinned_low_fraction);
    assert_eq!(y.below_corner_builds, 0);
    assert!(y.overdrive_percentiles.p0_1 >= corner * (1.0 - 2f64.powi(-13)));
    assert!(y.overdrive_percentiles.p0_1 <= y.overdrive_percentiles.p1);
    assert!(y.overdrive_percentiles.p1 <= y.overdrive_percentiles.p50);
}

#[test]
fn a_build_out_of_saturation_heats_as_the_linear_region() {
    // A build that does not saturate dissipates the linear region's share of VCC x IC, not
    // VCE(sat) x IC (stage-model 4, v2): its junction runs hotter than the same build
    // saturated. 47 k on a 3.3 V pin cannot saturate the coil's 30 mA at any build.
    let built = relay_stage(json!({ "base_resistor_ohms": 47000, "pull_down_ohms": null }));
    let model = BuildModel::new(&built.y());
    let d = model.nominal_draw();
    let o = model.evaluate(&d);
    assert!(
        o.overdrive < 1.0,
        "precondition: out of saturation, got {}",
        o.overdrive
    );
    let r_th = built.y().part.info.r_th_ja.base();
    // 1/4 VCC x IC for a resistive load [text: the maximum of V I - I^2 R is V^2 / 4R].
    let collector = 0.25 * d.supply * o.collector_current;
    let want =
        d.ambient + (collector + (d.logic_high - o.pin_current * d.rb) * o.pin_current) * r_th;
    assert!(
        (o.junction_c - want).abs() < 1e-9 * want.abs(),
        "{} vs {want}",
        o.junction_c
    );
}

// ---- 3. the same figures whatever the number of threads ----

fn in_pool<T: Send>(threads: usize, f: impl FnOnce() -> T + Send) -> T {
    rayon::ThreadPoolBuilder::new()
        .num_threads(threads)
        .build()
        .expect("thread pool")
        .install(f)
}

#[test]
fn one_thread_and_two_threads_give_identical_figures() {
    for built in [relay_stage(json!({})), led_stage(json!({}))] {
        let y = built.y();
        // Five chunks and a part chunk.
        let opts = YieldOptions {
            builds: 5 * CHUNK_BUILDS + 12_345,
            seed: 0x5EED,
        };
        let one = in_pool(1, || run_yield(&y, &opts));
        let two = in_pool(2, || run_yield(&y, &opts));
        assert_eq!(one, two);
        assert_eq!(one.builds, opts.builds);
        assert_eq!(
            one.led_current_percentiles_a.is_some(),
            built.stage.load_kind() == "led"
        );
        // A different seed draws different builds.
        let other = run_yield(&y, &YieldOptions { seed: 1, ..opts });
        assert_ne!(one.overdrive_percentiles, other.overdrive_percentiles);
    }
}

#[test]
fn every_kernel_gives_identical_figures() {
    let kernels = super::kernel::Kernel::available();
    eprintln!("kernels on this processor: {kernels:?}");
    let five_leds = led_stage(json!({
        "load": { "kind": "led", "count": 5, "forward_v": 1.9, "forward_min_v": 1.7,
                  "forward_max_v": 2.1, "current_a": 0.01 }
    }));
    for built in [relay_stage(json!({})), led_stage(json!({})), five_leds] {
        let y = built.y();
        // Two lane groups of whole chunks, then whole and short chunks one at a time.
        let opts = YieldOptions {
            builds: 10 * CHUNK_BUILDS + 4_321,
            seed: 0xC0DE,
        };
        let results: Vec<YieldResult> = kernels
            .iter()
            .map(|&k| in_pool(1, || super::run_on(k, &y, &opts, &|_, _| {})))
            .collect();
        for pair in results.windows(2) {
            assert_eq!(pair[0], pair[1], "{}", built.stage.name);
        }
    }
}

// ---- percentiles against an exact sort ----

#[test]
fn percentiles_match_an_exact_sort_within_half_a_bin() {
    let built = led_stage(json!({}));
    let y = built.y();
    let model = BuildModel::new(&y);
    let n = 50_000u64; // inside one chunk: the same stream as chunk 0
    let seed = 11;
    let mut rng = chunk_rng(seed, 0);
    let mut od = Vec::new();
    let mut pin = Vec::new();
    let mut tj = Vec::new();
    let mut led = Vec::new();
    for _ in 0..n {
        let o = model.evaluate(&model.draw(&mut rng));
        od.push(o.overdrive);
        pin.push(o.pin_current);
        tj.push(o.junction_c);
        led.push(o.led_current.expect("LED load"));
    }
    for v in [&mut od, &mut pin, &mut tj, &mut led] {
        v.sort_by(f64::total_cmp);
    }
    let result = run_yield(&y, &YieldOptions { builds: n, seed });
    // Nearest rank: 0.1 % of 50 000 is the 50th value, 1 % the 500th, 50 % the 25 000th (from the
    // bottom for a low tail, from the top for a high tail).
    let low = |v: &[f64]| [v[49], v[499], v[24_999]];
    let high = |v: &[f64]| [v[50_000 - 50], v[50_000 - 500], v[50_000 - 25_000]];
    let close = |got: Percentiles, want: [f64; 3], scale: f64| {
        for (g, w) in [got.p0_1, got.p1, got.p50].into_iter().zip(want) {
            assert!(
                (g - w).abs() <= scale * 2f64.powi(-13),
                "{got:?} vs {want:?}"
            );
        }
    };
    close(result.overdrive_percentiles, low(&od), od[n as usize - 1]);
    close(
        result.pin_current_percentiles_a,
        high(&pin),
        pin[n as usize - 1],
    );
    // Junction kept in kelvins: half a bin of ~350 K.
    close(result.junction_percentiles_c, high(&tj), 400.0);
    close(
        result.led_current_percentiles_a.expect("LED load"),
        low(&led),
        led[n as usize - 1],
    );
    assert_eq!(result.overdrive_percentiles.worst_tail, Tail::Low);
    assert_eq!(result.junction_percentiles_c.worst_tail, Tail::High);
}

#[test]
fn ranks_are_exact_in_integers() {
    // 0.1 % of 10 million builds is exactly the 10 000th (float 0.001 x 1e7 is not).
    assert_eq!(rank(10_000_000, 1, Tail::Low), 10_000);
    assert_eq!(rank(10_000_000, 1, Tail::High), 9_990_001);
    assert_eq!(rank(3, 500, Tail::Low), 2);
    assert_eq!(rank(1, 1, Tail::Low), 1);
    assert_eq!(rank(1, 1, Tail::High), 1);
    assert_eq!(rank(0, 1, Tail::Low), 0);
}

#[test]
fn progress_reaches_the_total_in_rising_steps() {
    let built = relay_stage(json!({}));
    let y = built.y();
    let seen = Mutex::new(Vec::new());
    let opts = YieldOptions {
        builds: 3 * CHUNK_BUILDS + 1,
        seed: 9,
    };
    let result = run_yield_with_progress(&y, &opts, &|done, total| {
        seen.lock().expect("lock").push((done, total));
    });
    let seen = seen.into_inner().expect("lock");
    assert_eq!(seen.len(), 4);
    assert!(seen.windows(2).all(|w| w[0].0 < w[1].0));
    assert_eq!(seen.last().copied(), Some((opts.builds, opts.builds)));
    assert_eq!(result, run_yield(&y, &opts));
}

#[test]
fn no_builds_gives_empty_figures() {
    let built = relay_stage(json!({}));
    let y = run_yield(&built.y(), &YieldOptions { builds: 0, seed: 0 });
    assert_eq!(y.builds, 0);
    assert_eq!(y.pinned_low_interval, [0.0, 1.0]);
    assert!(y.overdrive_percentiles.p50.is_nan());
}

// ---- 4. Wilson score interval ----

#[test]
fn wilson_interval_by_hand() {
    // By hand, z = 2, n = 10, so z^2/n = 0.4 and the denominator is 1.4.
    // 0 of 10: centre = (0 + 4/20) / 1.4 = 0.142857; half = (2 / 1.4) x sqrt(0 + 4/400)
    // = 1.428571 x 0.1 = 0.142857; interval (0, 0.285714) = (0, 2/7).
    let (lo, hi) = wilson_interval(0, 10, 2.0);
    assert!(lo.abs() < 1e-12, "{lo}");
    assert!((hi - 2.0 / 7.0).abs() < 1e-12, "{hi}");
    // 5 of 10: centre = (0.5 + 0.2) / 1.4 = 0.5; half = 1.428571 x sqrt(0.25/10 + 0.01)
    // = 1.428571 x sqrt(0.035) = 1.428571 x 0.187083 = 0.267261; interval (0.232739, 0.767261).
    let (lo, hi) = wilson_interval(5, 10, 2.0);
    let half = (2.0 / 1.4) * 0.035f64.sqrt();
    assert!((lo - (0.5 - half)).abs() < 1e-12 && (hi - (0.5 + half)).abs() < 1e-12);
    assert!((lo - 0.232739).abs() < 1e-6 && (hi - 0.767261).abs() < 1e-6);
}

#[test]
fn wilson_interval_matches_newcombe_1998() {
    // R. G. Newcombe, "Two-sided confidence intervals for the single proportion: comparison of
    // seven methods", Statistics in Medicine 17 (1998) 857-872, table of worked examples, the
    // Wilson score method at 95 % (figures from memory, to 4 decimals).
    let cases: [(u64, u64, f64, f64); 4] = [
        (81, 263, 0.2553, 0.3662),
        (15, 148, 0.0624, 0.1605),
        (0, 20, 0.0, 0.1611),
        (1, 29, 0.0061, 0.1718),
    ];
    for (x, n, want_lo, want_hi) in cases {
        let (lo, hi) = wilson_interval(x, n, Z_95);
        assert!((lo - want_lo).abs() < 5e-5, "{x}/{n}: low {lo}");
        assert!((hi - want_hi).abs() < 5e-5, "{x}/{n}: high {hi}");
    }
}

#[test]
fn wilson_interval_edges() {
    assert_eq!(wilson_interval(0, 0, Z_95), (0.0, 1.0));
    let (lo, hi) = wilson_interval(1000, 1000, Z_95);
    assert!(lo > 0.99 && lo < 1.0 && hi == 1.0, "{lo} {hi}");
    // More successes than trials is taken as all.
    assert_eq!(wilson_interval(7, 5, Z_95), wilson_interval(5, 5, Z_95));
}

// ---- the tables against the exact curves ----

#[test]
fn tables_agree_with_the_exact_curves() {
    // A gain exponent that is not a multiple of 1/2 takes the temperature table.
    let wide = relay_stage(json!({ "ambient_c": [-40, 125] }));
    let mut odd_part = wide.y().part.clone();
    odd_part.gain_temp_exponent = 1.3;
    // A 1 A part on a strip: the VBE(sat) and VCE(sat) curves bend inside the table's range.
    let strip = relay_stage(json!({
        "part": "demo-npn-1a", "supply_tolerance": 0.1,
        "load": { "kind": "strip", "rated_v": 12, "current_per_m_a": 0.4, "length_m": 1.5 },
        "clamp": { "kind": "none" }
    }));
    // LEDs with little headroom: IC spans more than the table, so the exact path runs too.
    let tight_led = led_stage(json!({ "supply_v": 7 }));
    let (relay, led) = (relay_stage(json!({})), led_stage(json!({})));
    let stages = [
        relay.y(),
        YieldStage {
            part: &odd_part,
            ..wide.y()
        },
        strip.y(),
        led.y(),
        tight_led.y(),
    ];
    let mut worst: f64 = 0.0;
    for stage in &stages {
        let fast = BuildModel::new(stage);
        let exact = BuildModel::exact(stage);
        let mut rng = chunk_rng(5, 0);
        for _ in 0..20_000 {
            let d = fast.draw(&mut rng);
            let (a, b) = (fast.evaluate(&d), exact.evaluate(&d));
            let pairs = [
                (a.overdrive, b.overdrive),
                (a.pin_current, b.pin_current),
                (a.junction_c, b.junction_c),
                (a.led_current.unwrap_or(0.0), b.led_current.unwrap_or(0.0)),
            ];
            for (x, y) in pairs {
                if x != y {
                    worst = worst.max((x - y).abs() / y.abs());
                }
            }
        }
    }
    // The documented bound (model.rs); about 1.4e-6 is seen here.
    assert!(worst < 1e-5, "tables deviate by {worst:e}");
    assert!(worst > 0.0, "the tables were not exercised");
}

#[test]
fn a_darlington_cools_its_vbe_twice_as_fast() {
    // A Darlington pair's VBE falls about -4 mV/K, two junctions in series (common practice,
    // twice the -2 mV/K of one junction): the build's VBE at 70 C sits 0.18 V under 25 C.
    let built = relay_stage(json!({ "part": "tip120", "pin_limit_a": 0.008 }));
    let y = built.y();
    assert!(y.part.is_darlington(), "precondition: a Darlington pair");
    let model = BuildModel::exact(&y);
    let mut d = model.nominal_draw();
    d.vbe_position = 0.0;
    d.ambient = 25.0;
    let at_25 = model.evaluate(&d);
    d.ambient = 70.0;
    let at_70 = model.evaluate(&d);
    // The pin current is (VOH - VBE) / RB: VBE is 0.18 V lower at 70 C.
    let shift = (at_70.pin_current - at_25.pin_current) * d.rb;
    assert!((shift - 0.18).abs() < 1e-9, "VBE moved by {shift} V");
}
