//! Tests of the yield Monte Carlo.

use super::model::{BuildModel, Draw};
use super::rng::chunk_rng;
use super::*;
use crate::analysis::analyse;
use crate::eseries::Series;
use crate::load::{Clamp, Led, Load, Relay, Strip};
use crate::parts::{Library, Part};
use crate::quantity::{amps, celsius, ohms, volts, Base};
use crate::stage::PullDown;
use proptest::prelude::*;

pub(super) fn part(id: &str) -> std::sync::Arc<Part> {
    Library::builtin()
        .expect("shipped parts load")
        .require(id, "test")
        .expect("part is shipped")
        .clone()
}

fn relay(coil: f64, tolerance: f64) -> Load {
    Load::Relay(Relay {
        coil_20c: ohms(coil),
        tolerance,
        rated: volts(12.0),
        must_operate_fraction: 0.75,
        inductance: None,
    })
}

/// A 12 V relay stage driven from a 3.3 V pin, commercial grade, the demo 40 V part.
pub(super) fn relay_stage(rb: Option<f64>, pull_down: PullDown) -> Stage {
    Stage {
        name: "K1 test relay".to_string(),
        part: part("demo-npn-40v"),
        supply: volts(12.0),
        supply_tolerance: 0.05,
        logic_high: volts(3.3),
        logic_high_min: volts(2.9),
        pin_limit: amps(0.004),
        ambient_min: celsius(0.0),
        ambient_max: celsius(70.0),
        load: relay(400.0, 0.1),
        clamp: Clamp::Diode {
            forward: volts(1.0),
            reverse: None,
            current: None,
        },
        base_resistor: rb.map(ohms),
        pull_down,
        resistor_tolerance: 0.05,
        series: Series::E24,
        resistor_rating: None,
        overdrive: 2.0,
        assumptions: Vec::new(),
    }
}

fn led_stage() -> Stage {
    Stage {
        name: "D1 test LEDs".to_string(),
        load: Load::Led(Led {
            count: 3,
            forward: volts(2.0),
            forward_min: volts(1.8),
            forward_max: volts(2.2),
            current: amps(0.02),
            max_current: None,
            resistor: None,
        }),
        clamp: Clamp::None,
        ..relay_stage(None, PullDown::Sized)
    }
}

fn resistors_of(stage: &Stage) -> Resistors {
    analyse(stage).worst.resistors
}

// ---- 1. no build below the corner; the worst-end draw is the corner ----

/// Every shipped part id, sorted so that a generated index always means the same part.
fn part_ids() -> Vec<String> {
    let lib = Library::builtin().expect("shipped parts load");
    let mut ids: Vec<String> = lib.iter().map(|p| p.id.clone()).collect();
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
        0u8..4,
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

fn stage_of(g: &Gen, ids: &[String]) -> Stage {
    let load = match g.load_kind {
        0 => Load::Current {
            current: amps(0.001 + 0.5 * g.load_a),
        },
        1 => relay(50.0 + 2000.0 * g.load_a, 0.2 * g.load_b),
        2 => {
            let vf = 1.8 + 1.5 * g.load_a;
            let spread = 0.3 * g.load_b;
            Load::Led(Led {
                count: g.led_count,
                forward: volts(vf),
                forward_min: volts(vf - spread),
                forward_max: volts(vf + spread),
                current: amps(0.02),
                max_current: None,
                resistor: g.led_resistor.map(ohms),
            })
        }
        _ => Load::Strip(Strip {
            rated: volts(g.supply),
            current_per_metre: amps(0.01 + g.load_a),
            length_m: 0.1 + 3.0 * g.load_b,
        }),
    };
    let pull_down = match g.pull_down {
        0 => PullDown::None,
        1 => PullDown::Sized,
        _ => PullDown::Given(ohms(g.pull_down_given)),
    };
    Stage {
        part: part(&ids[g.part]),
        supply: volts(g.supply),
        supply_tolerance: g.supply_tolerance,
        logic_high: volts(g.logic_high),
        logic_high_min: volts((g.logic_high - g.logic_drop).max(0.0)),
        ambient_min: celsius(g.ambient_min),
        ambient_max: celsius(g.ambient_min + g.ambient_span),
        load,
        base_resistor: g.rb.map(ohms),
        pull_down,
        resistor_tolerance: g.resistor_tolerance,
        overdrive: g.overdrive,
        ..relay_stage(None, PullDown::None)
    }
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
        let stage = stage_of(&g, &ids);
        let analysis = analyse(&stage);
        let wc = &analysis.worst;
        let corner = wc.overdrive_min;
        let model = BuildModel::new(&stage, wc.resistors);

        // Rounding slack only: 1e-9 relative. A corner <= 0 (cannot turn on) is below every
        // build (0 or more); an infinite one (no load current) only equals infinite builds.
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
        let ic_max = wc.load.ic_max.base();
        let ib_min = wc.base_current_min.base();
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
fn draws_stay_inside_their_ranges() {
    let stage = led_stage();
    let r = resistors_of(&stage);
    let rl = r.rl.expect("LED resistor sized").base();
    let rbe = r.rbe.expect("pull-down sized").base();
    let model = BuildModel::new(&stage, r);
    let mut rng = chunk_rng(3, 0);
    let within = |x: f64, lo: f64, hi: f64| lo <= x && x <= hi;
    for _ in 0..10_000 {
        let d: Draw = model.draw(&mut rng);
        assert!(within(d.supply, 11.4, 12.6), "{d:?}");
        assert!(within(d.logic_high, 2.9, 3.3), "{d:?}");
        assert!(within(d.ambient, 0.0, 70.0), "{d:?}");
        assert!(
            within(d.rb, 0.95 * r.rb.base(), 1.05 * r.rb.base()),
            "{d:?}"
        );
        assert!(within(d.rbe, 0.95 * rbe, 1.05 * rbe), "{d:?}");
        assert!(within(d.rl, 0.95 * rl, 1.05 * rl), "{d:?}");
        assert!(within(d.led_drop, 3.0 * 1.8, 3.0 * 2.2), "{d:?}");
        assert!(within(d.vbe_position, 0.0, 1.0) && within(d.gain_position, 0.0, 1.0));
    }
}

// ---- 2. pinned-low fraction against the corner ----

#[test]
fn a_stage_whose_corner_saturates_pins_low_in_every_build() {
    let stage = relay_stage(None, PullDown::Sized);
    let analysis = analyse(&stage);
    assert!(
        analysis.worst.overdrive_min >= 1.0,
        "precondition: the corner saturates"
    );
    let y = run_yield(
        &stage,
        analysis.worst.resistors,
        &YieldOptions {
            builds: 100_000,
            seed: 1,
        },
    );
    assert_eq!(y.builds, 100_000);
    assert_eq!(y.pinned_low_fraction, 1.0);
    assert_eq!(y.below_corner_builds, 0);
    // Sized for k = 2, so every build meets k as well.
    assert_eq!(y.overdrive_met_fraction, 1.0);
    // The lowest overdrive percentile is at or above the corner (less half a histogram bin).
    assert!(
        y.overdrive_percentiles.p0_1 >= analysis.worst.overdrive_min * (1.0 - 2f64.powi(-13)),
        "{y:?}"
    );
}

#[test]
fn a_stage_failing_only_at_the_corner_pins_low_in_most_builds() {
    // 4.7 k from a 3.3 V pin: the corner (VOH,min 2.9 V, VBE(sat),max cold, RB+, 0 C, coil cold
    // and 10 % low, 12.6 V) gives overdrive about 0.6; the middle of every range about 2.3.
    let stage = relay_stage(Some(4700.0), PullDown::None);
    let analysis = analyse(&stage);
    let corner = analysis.worst.overdrive_min;
    let model = BuildModel::new(&stage, analysis.worst.resistors);
    let nominal = model.evaluate(&model.nominal_draw()).overdrive;
    assert!(corner < 1.0, "precondition: the corner fails, got {corner}");
    assert!(
        nominal > 2.0,
        "precondition: nominal well above 1, got {nominal}"
    );

    let y = run_yield(
        &stage,
        analysis.worst.resistors,
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
    for stage in [relay_stage(None, PullDown::Sized), led_stage()] {
        let r = resistors_of(&stage);
        // Five chunks and a part chunk.
        let opts = YieldOptions {
            builds: 5 * CHUNK_BUILDS + 12_345,
            seed: 0x5EED,
        };
        let one = in_pool(1, || run_yield(&stage, r, &opts));
        let two = in_pool(2, || run_yield(&stage, r, &opts));
        assert_eq!(one, two);
        assert_eq!(one.builds, opts.builds);
        assert_eq!(
            one.led_current_percentiles_a.is_some(),
            matches!(stage.load, Load::Led(_))
        );
        // A different seed draws different builds.
        let other = run_yield(&stage, r, &YieldOptions { seed: 1, ..opts });
        assert_ne!(one.overdrive_percentiles, other.overdrive_percentiles);
    }
}

#[test]
fn every_kernel_gives_identical_figures() {
    let kernels = super::kernel::Kernel::available();
    eprintln!("kernels on this processor: {kernels:?}");
    let five_leds = Stage {
        load: Load::Led(Led {
            count: 5,
            forward: volts(1.9),
            forward_min: volts(1.7),
            forward_max: volts(2.1),
            current: amps(0.01),
            max_current: None,
            resistor: None,
        }),
        ..led_stage()
    };
    for stage in [relay_stage(None, PullDown::Sized), led_stage(), five_leds] {
        let r = resistors_of(&stage);
        // Two lane groups of whole chunks, then whole and short chunks one at a time.
        let opts = YieldOptions {
            builds: 10 * CHUNK_BUILDS + 4_321,
            seed: 0xC0DE,
        };
        let results: Vec<YieldResult> = kernels
            .iter()
            .map(|&k| in_pool(1, || super::run_on(k, &stage, r, &opts, &|_, _| {})))
            .collect();
        for pair in results.windows(2) {
            assert_eq!(pair[0], pair[1], "{}", stage.name);
        }
    }
}

// ---- percentiles against an exact sort ----

#[test]
fn percentiles_match_an_exact_sort_within_half_a_bin() {
    let stage = led_stage();
    let r = resistors_of(&stage);
    let model = BuildModel::new(&stage, r);
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
    let y = run_yield(&stage, r, &YieldOptions { builds: n, seed });
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
    close(y.overdrive_percentiles, low(&od), od[n as usize - 1]);
    close(y.pin_current_percentiles_a, high(&pin), pin[n as usize - 1]);
    // Junction kept in kelvins: half a bin of ~350 K.
    close(y.junction_percentiles_c, high(&tj), 400.0);
    close(
        y.led_current_percentiles_a.expect("LED load"),
        low(&led),
        led[n as usize - 1],
    );
    assert_eq!(y.overdrive_percentiles.worst_tail, Tail::Low);
    assert_eq!(y.junction_percentiles_c.worst_tail, Tail::High);
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
    let stage = relay_stage(None, PullDown::Sized);
    let r = resistors_of(&stage);
    let seen = Mutex::new(Vec::new());
    let opts = YieldOptions {
        builds: 3 * CHUNK_BUILDS + 1,
        seed: 9,
    };
    let y = run_yield_with_progress(&stage, r, &opts, &|done, total| {
        seen.lock().expect("lock").push((done, total));
    });
    let seen = seen.into_inner().expect("lock");
    assert_eq!(seen.len(), 4);
    assert!(seen.windows(2).all(|w| w[0].0 < w[1].0));
    assert_eq!(seen.last().copied(), Some((opts.builds, opts.builds)));
    assert_eq!(y, run_yield(&stage, r, &opts));
}

#[test]
fn no_builds_gives_empty_figures() {
    let stage = relay_stage(None, PullDown::Sized);
    let y = run_yield(
        &stage,
        resistors_of(&stage),
        &YieldOptions { builds: 0, seed: 0 },
    );
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
    let mut odd_exponent = relay_stage(None, PullDown::Sized);
    std::sync::Arc::make_mut(&mut odd_exponent.part).gain_temp_exponent = 1.3;
    odd_exponent.ambient_min = celsius(-40.0);
    odd_exponent.ambient_max = celsius(125.0);
    // A 1 A part on a strip: the VBE(sat) and VCE(sat) curves bend inside the table's range.
    let strip = Stage {
        part: part("demo-npn-1a"),
        load: Load::Strip(Strip {
            rated: volts(12.0),
            current_per_metre: amps(0.4),
            length_m: 1.5,
        }),
        supply_tolerance: 0.1,
        clamp: Clamp::None,
        ..relay_stage(None, PullDown::Sized)
    };
    // LEDs with little headroom: IC spans more than the table, so the exact path runs too.
    let tight_led = Stage {
        supply: volts(7.0),
        ..led_stage()
    };
    let mut worst: f64 = 0.0;
    for stage in [
        relay_stage(None, PullDown::Sized),
        odd_exponent,
        strip,
        led_stage(),
        tight_led,
    ] {
        let r = resistors_of(&stage);
        let fast = BuildModel::new(&stage, r);
        let exact = BuildModel::exact(&stage, r);
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
