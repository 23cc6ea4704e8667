//! Property tests of the worst-case engine (stage-model 4 to 8) over generated stages built from
//! board-file text: what sizing promises, the monotonic laws of the corners, the LED window, the
//! MOSFET laws, the composed remedy, and that every report renders in every format.
//!
//! The laws follow from the formulas of stage-model 4: IB,min falls as RB grows, as the
//! guaranteed logic high falls and as the tolerances widen; the pin current is
//! (VOH,max - VBE(sat),min) / RB-; the junction is Ta,max + P x RthJA (JEDEC JESD51); the LED
//! current through RL is Ohm's law; a Zener clamp adds its voltage to the peak; RDS(on) is read at
//! the largest specified gate voltage at or below the drive (stage-model 8).

use std::sync::OnceLock;

use pinlow::analysis::{analyse, compose, Analysis};
use pinlow::board::parse_board;
use pinlow::check::Status;
use pinlow::drive::PINNED_LOW;
use pinlow::parts::{read_part, Library, PartSource};
use pinlow::pipeline::{stage_report, Options};
use pinlow::quantity::Base;
use pinlow::report::{render, Format, Report};
use pinlow::stage::Stage;
use proptest::prelude::*;

/// An invented logic-level MOSFET for the nmos laws (not a real part).
const FET: &str = r#"{"id": "prop-fet", "polarity": "nmos", "package": "SOT-23",
    "provenance": "invented for the property tests", "vds_max_v": 30, "id_max_a": 4, "vgs_max_v": 12,
    "vgs_th": {"min_v": 0.7, "max_v": 1.5},
    "rds_on_max": [{"vgs_v": 1.8, "ohms": 0.15}, {"vgs_v": 2.5, "ohms": 0.08}, {"vgs_v": 4.5, "ohms": 0.05}],
    "tj_max_c": 150, "r_th_ja_k_per_w": 200}"#;

fn library() -> &'static Library {
    static LIB: OnceLock<Library> = OnceLock::new();
    LIB.get_or_init(|| {
        let mut lib = Library::builtin().expect("the shipped parts load");
        lib.insert(read_part("prop-fet", FET, PartSource::Builtin("prop-fet")).expect("valid"));
        lib
    })
}

fn npn_ids() -> Vec<String> {
    library()
        .iter()
        .filter(|p| p.kind().name == "npn")
        .map(|p| p.info().id.clone())
        .collect()
}

/// A stage from its JSON fields (without the braces).
fn stage(fields: &str) -> Stage {
    let text = format!(r#"{{"stages": [{{"name": "p", {fields}}}]}}"#);
    parse_board("prop.json", &text, library())
        .unwrap_or_else(|e| panic!("{e}\n{text}"))
        .stages
        .remove(0)
}

fn npn(a: &Analysis) -> &pinlow::drive::npn::corner::NpnWorst {
    &pinlow::drive::npn::detail(&a.drive).expect("npn").worst
}

fn overdrive(a: &Analysis) -> f64 {
    npn(a).overdrive.unwrap_or(0.0)
}

/// A load of any kind with values a designer might write, as JSON.
fn load() -> impl Strategy<Value = String> {
    prop_oneof![
        (1e-3..1.0f64).prop_map(|i| format!(r#"{{"kind": "current", "current_a": {i}}}"#)),
        (50.0..2000.0f64, 0.0..0.2f64, 0.6..0.9f64).prop_map(|(c, t, m)| format!(
            r#"{{"kind": "relay", "coil_ohms": {c}, "coil_tolerance": {t}, "must_operate_fraction": {m}, "inductance_h": 0.1}}"#
        )),
        (1u32..5, 1.8..3.3f64, 0.05..0.3f64, 5e-3..30e-3f64).prop_map(|(n, vf, sp, i)| format!(
            r#"{{"kind": "led", "count": {n}, "forward_v": {vf}, "forward_min_v": {}, "forward_max_v": {}, "current_a": {i}}}"#,
            vf - sp,
            vf + sp
        )),
        (0.05..1.0f64, 0.1..5.0f64).prop_map(|(per_m, l)| format!(
            r#"{{"kind": "strip", "rated_v": 12, "current_per_m_a": {per_m}, "length_m": {l}}}"#
        )),
        (2.0..200.0f64).prop_map(|w| format!(r#"{{"kind": "motor", "winding_ohms": {w}, "inductance_h": 0.01}}"#)),
    ]
}

/// Conditions of a stage: (part, supply, supply tol, logic high, drop, pin limit, ambient,
/// resistor tol), as JSON fields.
#[derive(Clone, Debug)]
struct Cond {
    part: String,
    supply: f64,
    supply_tol: f64,
    logic: f64,
    drop: f64,
    pin: f64,
    t_min: f64,
    t_max: f64,
    tol: f64,
}

impl Cond {
    fn fields(&self) -> String {
        format!(
            r#""part": "{}", "supply_v": {}, "supply_tolerance": {}, "logic_high_v": {}, "logic_high_min_v": {}, "pin_limit_a": {}, "ambient_c": [{}, {}], "resistor_tolerance": {}"#,
            self.part,
            self.supply,
            self.supply_tol,
            self.logic,
            (self.logic - self.drop).max(0.05),
            self.pin,
            self.t_min,
            self.t_max,
            self.tol
        )
    }
}

fn cond() -> impl Strategy<Value = Cond> {
    (
        prop::sample::select(npn_ids()),
        3.0..48.0f64,
        0.0..0.15f64,
        1.8..5.5f64,
        0.0..0.6f64,
        1e-3..40e-3f64,
        (-40.0..25.0f64, 25.0..125.0f64),
        0.0..0.1f64,
    )
        .prop_map(
            |(part, supply, supply_tol, logic, drop, pin, (t_min, t_max), tol)| Cond {
                part,
                supply,
                supply_tol,
                logic,
                drop,
                pin,
                t_min,
                t_max,
                tol,
            },
        )
}

fn clamp_for(load: &str) -> &'static str {
    if load.contains("relay") || load.contains("motor") {
        r#", "clamp": {"kind": "diode"}"#
    } else {
        ""
    }
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(128))]

    /// Stage-model 6.2 (v2): a sized RB never overloads the pin; a sized RB that meets the
    /// target passes pinned-low; a higher target never gives a larger RB; and the RB is the
    /// largest series value that meets the target (the next one up does not) unless the pin
    /// limit set it.
    #[test]
    fn sizing_keeps_its_promises(c in cond(), load in load(), k in 1.0..6.0f64) {
        let f = format!("{}, \"load\": {load}{}", c.fields(), clamp_for(&load));
        let s = stage(&format!("{f}, \"overdrive\": {k}"));
        let a = analyse(&s);
        prop_assert!(a.drive.pin_current_max <= s.conditions.pin_limit || a.drive.series.base() >= 10e6);
        let d = pinlow::drive::npn::detail(&a.drive).expect("npn");
        let sizing = d.sizing.expect("sized");
        if sizing.reached {
            prop_assert_eq!(a.finding(PINNED_LOW).map(|f| f.status), Some(Status::Pass));
            let next = s.conditions.series.at_or_above(sizing.rb * 1.0001);
            if next.base() <= 10e6 && a.corner.current_max.base() > 0.0 {
                let given = stage(&format!("{f}, \"overdrive\": {k}, \"base_resistor_ohms\": {}, \"pull_down_ohms\": {}",
                    next.base(), s.conditions.series.nearest(next * 10.0).base()));
                prop_assert!(overdrive(&analyse(&given)) < k, "next value {} also meets {k}", next.base());
            }
        }
        let higher = stage(&format!("{f}, \"overdrive\": {}", k * 1.5));
        prop_assert!(analyse(&higher).drive.series <= a.drive.series);
    }

    /// The worst-case overdrive never rises as RB grows, as the pull-down shrinks, as the
    /// guaranteed logic high falls, or as the supply or resistor tolerance widens; the pin
    /// current never falls as RB shrinks (stage-model 4).
    #[test]
    fn overdrive_falls_with_every_worse_input(c in cond(), load in load(), rb in 100.0..100_000.0f64, rbe in 1_000.0..1e6f64) {
        // An LED string's resistor is sized from the tolerances, and a wider tolerance may size
        // a larger one that draws less: the property holds with every resistor fixed, so the
        // resistor sized for the base case is written into the load.
        let probe = format!("{}, \"load\": {load}, \"base_resistor_ohms\": {rb}, \"pull_down_ohms\": {rbe}", c.fields());
        let load = match analyse(&stage(&probe)).own_value() {
            Some(rl) => format!("{}, \"resistor_ohms\": {}}}", load.trim_end_matches('}'), rl.base()),
            None => load,
        };
        let base = |c: &Cond, rb: f64, rbe: f64| stage(&format!(
            "{}, \"load\": {load}{}, \"base_resistor_ohms\": {rb}, \"pull_down_ohms\": {rbe}",
            c.fields(), clamp_for(&load)));
        let a = analyse(&base(&c, rb, rbe));
        let od = overdrive(&a);
        let bigger_rb = analyse(&base(&c, rb * 1.3, rbe));
        prop_assert!(overdrive(&bigger_rb) <= od * (1.0 + 1e-12));
        prop_assert!(bigger_rb.drive.pin_current_max <= a.drive.pin_current_max);
        prop_assert!(overdrive(&analyse(&base(&c, rb, rbe * 0.7))) <= od * (1.0 + 1e-12));
        let weaker = Cond { drop: c.drop + 0.1, ..c.clone() };
        prop_assert!(overdrive(&analyse(&base(&weaker, rb, rbe))) <= od * (1.0 + 1e-12));
        let wider = Cond { supply_tol: c.supply_tol + 0.02, tol: c.tol + 0.02, ..c.clone() };
        prop_assert!(overdrive(&analyse(&base(&wider, rb, rbe))) <= od * (1.0 + 1e-12));
    }

    /// A hotter ambient maximum never lowers Tj; verdicts never improve as tolerances widen
    /// (every resistor fitted).
    #[test]
    fn heat_and_tolerance_never_help(c in cond(), load in load(), rb in 100.0..20_000.0f64, rl in 10.0..2000.0f64) {
        let load = load.replace("\"kind\": \"led\"", &format!("\"kind\": \"led\", \"resistor_ohms\": {rl}"));
        let at = |c: &Cond| stage(&format!(
            "{}, \"load\": {load}{}, \"base_resistor_ohms\": {rb}, \"pull_down_ohms\": {}, \"resistor_rating_w\": 0.25",
            c.fields(), clamp_for(&load), rb * 10.0));
        let a = analyse(&at(&c));
        let hot = analyse(&at(&Cond { t_max: c.t_max + 15.0, ..c.clone() }));
        let tj = |a: &Analysis| a.drive.junction_max.map(|t| t.base()).unwrap_or(f64::INFINITY);
        prop_assert!(tj(&hot) >= tj(&a) - 1e-9);
        let wide = analyse(&at(&Cond { supply_tol: c.supply_tol + 0.03, tol: c.tol + 0.03, ..c.clone() }));
        prop_assert!(wide.verdict >= a.verdict, "{:?} then {:?}", a.verdict, wide.verdict);
    }

    /// A larger LED resistor never raises the most LED current; a higher Zener voltage never
    /// lowers the collector peak (Ohm's law; the clamp adds its voltage to the supply).
    #[test]
    fn led_and_clamp_laws(c in cond(), rl in 20.0..2000.0f64, vz in 5.0..40.0f64) {
        let led = |rl: f64| stage(&format!(
            "{}, \"load\": {{\"kind\": \"led\", \"count\": 2, \"forward_v\": 2.0, \"current_a\": 0.01, \"resistor_ohms\": {rl}}}",
            c.fields()));
        let i = |a: &Analysis| a.corner.current_max.base();
        prop_assert!(i(&analyse(&led(rl * 1.2))) <= i(&analyse(&led(rl))));
        let relay = |vz: f64| stage(&format!(
            "{}, \"load\": {{\"kind\": \"relay\", \"coil_ohms\": 400}}, \"clamp\": {{\"kind\": \"zener\", \"zener_v\": {vz}}}",
            c.fields()));
        let peak = |a: &Analysis| a.corner.peak.map(|p| p.base()).unwrap_or(f64::INFINITY);
        prop_assert!(peak(&analyse(&relay(vz + 3.0))) >= peak(&analyse(&relay(vz))));
    }

    /// The composed remedy never leaves a stage worse, and what it re-checks is what a new
    /// audit of the changed stage gives.
    #[test]
    fn the_remedy_never_makes_a_stage_worse(c in cond(), load in load(), rb in prop::option::of(100.0..50_000.0f64)) {
        let rb = rb.map(|r| format!(", \"base_resistor_ohms\": {r}")).unwrap_or_default();
        let s = stage(&format!("{}, \"load\": {load}{}{rb}", c.fields(), clamp_for(&load)));
        let a = analyse(&s);
        if let Some(after) = compose(&s, &a).and_then(|r| r.after) {
            prop_assert!(after.analysis.verdict <= a.verdict);
            let again = analyse(&after.stage);
            prop_assert_eq!(again.verdict, after.analysis.verdict);
        }
    }

    /// MOSFET laws (stage-model 8): a higher gate voltage never raises the RDS(on) read; a
    /// hotter ambient never lowers Tj; a larger RG never raises the pin current.
    #[test]
    fn mosfet_laws(logic in 1.8..5.5f64, rg in 100.0..10_000.0f64, i in 0.05..3.0f64, t_max in 30.0..100.0f64) {
        let at = |logic: f64, rg: f64, t_max: f64| stage(&format!(
            r#""part": "prop-fet", "supply_v": 12, "logic_high_v": {logic}, "ambient_c": [-20, {t_max}],
               "gate_resistor_ohms": {rg}, "load": {{"kind": "current", "current_a": {i}}}"#));
        let rds25 = |a: &Analysis| pinlow::drive::nmos::detail(&a.drive).expect("nmos").worst.point.ohms.base();
        let a = analyse(&at(logic, rg, t_max));
        prop_assert!(rds25(&analyse(&at(logic + 0.7, rg, t_max))) <= rds25(&a));
        let tj = |a: &Analysis| a.drive.junction_max.map(|t| t.base()).unwrap_or(f64::INFINITY);
        prop_assert!(tj(&analyse(&at(logic, rg, t_max + 10.0))) >= tj(&a) - 1e-9);
        prop_assert!(analyse(&at(logic, rg * 1.5, t_max)).drive.pin_current_max <= a.drive.pin_current_max);
    }

    /// Every report of a generated stage renders in every format, and the JSON parses back.
    #[test]
    fn every_report_renders(c in cond(), load in load()) {
        let s = stage(&format!("{}, \"load\": {load}{}", c.fields(), clamp_for(&load)));
        let r = stage_report(1, &s, &Options::default(), &|_, _| {});
        let report = Report { board: Some("generated".into()), stages: vec![r] };
        for format in [Format::Table, Format::Markdown] {
            prop_assert!(!render(&report, format, false).is_empty());
        }
        let json = render(&report, Format::Json, false);
        let v: serde_json::Value = serde_json::from_str(&json).expect("JSON parses back");
        prop_assert_eq!(v["model_version"].as_u64(), Some(2));
    }
}
