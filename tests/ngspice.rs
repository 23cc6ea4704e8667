//! Cross-check of the worst-case engine against ngspice.
//!
//! Each generated stage is simulated at its worst-case corner for the pinned-low check
//! (stage-model 4): the pin at VOH,min (a DC source), RB at +tol, RBE at -tol when fitted, the
//! supply at VCC,max and the load as a resistor R = VCC,max / IC,max from VCC to the collector,
//! so that IC,max flows when the collector is pinned to ground.
//!
//! The transistor is an INVENTED Gummel-Poon model, not any real part's model: BF is the
//! engine's hFE,wc (gain at IC,max and Ta,min); IS is chosen so that the model's VBE at the
//! corner's base and collector currents equals the engine's VBE(sat),max(Ta,min) (the engine
//! computes IB,min with exactly that VBE, which is why the base currents can agree); BR = 2;
//! IKF and VAF are left at 0 (= infinite in SPICE: no high-injection roll-off, so the gain is
//! flat; no Early effect); ISE = 0; no RB, RC, RE. ngspice runs with TNOM = TEMP = Ta,min, so it
//! applies no temperature scaling: the model's values are the cold-corner values.

mod support;

use pinlow::analysis::{analyse, Analysis};
use pinlow::board::parse_board;
use pinlow::conditions::PullDown;
use pinlow::drive::npn::corner::NpnWorst;
use pinlow::drive::npn::ebers_moll::vce_sat_ebers_moll;
use pinlow::parts::Library;
use pinlow::quantity::Base;
use pinlow::stage::Stage;

type StageAnalysis = Analysis;

/// The NPN figures of an analysis.
fn npn(a: &Analysis) -> &NpnWorst {
    &pinlow::drive::npn::detail(&a.drive)
        .expect("an npn stage")
        .worst
}

/// Worst-case overdrive, 0 when the stage cannot turn on.
fn od_of(a: &Analysis) -> f64 {
    npn(a).overdrive.unwrap_or(0.0)
}
use support::ngspice;

/// Boltzmann constant, J/K [std: SI 2019, exact].
const K_B: f64 = 1.380_649e-23;
/// Elementary charge, C [std: SI 2019, exact].
const Q_E: f64 = 1.602_176_634e-19;
/// Reverse gain of the invented model [memory: 1 to 5 is typical of small-signal NPNs].
const BR: f64 = 2.0;

fn vt(t_c: f64) -> f64 {
    K_B * (t_c + 273.15) / Q_E
}

/// IS of an Ebers-Moll / Gummel-Poon transistor (no series resistances, no roll-off) whose VBE
/// is `vbe` while it carries `ic` and `ib`. From the transport equations
/// IC = IS(x - y) - IS/BR (y - 1), IB = IS/BF (x - 1) + IS/BR (y - 1), x = e^(VBE/VT),
/// y = e^(VBC/VT) [text: Ebers-Moll transport model, e.g. Sedra & Smith, Microelectronic
/// Circuits; edition not checked, from memory], eliminating y:
/// IS = (IC + (1 + BR) IB) / ((x - 1)(1 + (1 + BR)/BF)).
fn fit_is(ic: f64, ib: f64, vbe: f64, bf: f64, br: f64, vt: f64) -> f64 {
    let x = (vbe / vt).exp();
    (ic + (1.0 + br) * ib) / ((x - 1.0) * (1.0 + (1.0 + br) / bf))
}

/// E12 values from 10 ohm to 10 Mohm [std IEC 60063].
fn e12() -> Vec<f64> {
    const MANTISSA: [f64; 12] = [1.0, 1.2, 1.5, 1.8, 2.2, 2.7, 3.3, 3.9, 4.7, 5.6, 6.8, 8.2];
    let mut v = Vec::new();
    for decade in 1..=6 {
        for m in MANTISSA {
            // Every value here is a whole number of ohms; round away 2.2 x 100 = 220.00000000000003.
            v.push((m * 10f64.powi(decade)).round());
        }
    }
    v.push(1e7);
    v
}

/// Stage scenarios: everything but the base resistor, as board-file fields. They vary the part,
/// the load kind, the supply and logic level, the ambient range and the pull-down.
const SCENARIOS: &[(&str, &str)] = &[
    (
        "demo current, no pull-down",
        r#""part": "demo-npn-40v", "supply_v": 5, "logic_high_v": 3.3, "grade": "industrial",
           "load": {"kind": "current", "current_a": 0.03}"#,
    ),
    (
        "2N3904 relay, pull-down",
        r#""part": "2N3904", "supply_v": 12, "logic_high_v": 3.3, "grade": "industrial",
           "load": {"kind": "relay", "coil_ohms": 400}, "clamp": {"kind": "diode"},
           "pull_down_ohms": 10000"#,
    ),
    (
        "BC547B LEDs, pull-down",
        r#""part": "BC547B", "supply_v": 5, "logic_high_v": 5, "ambient_c": [0, 70],
           "load": {"kind": "led", "count": 2, "forward_v": 2.0, "current_a": 0.015,
                    "resistor_ohms": 68}, "pull_down_ohms": 47000"#,
    ),
    (
        "2N2222A strip, no pull-down",
        r#""part": "2N2222A", "supply_v": 12, "logic_high_v": 3.3, "grade": "automotive",
           "load": {"kind": "strip", "rated_v": 12, "current_per_m_a": 0.25, "length_m": 0.5}"#,
    ),
    (
        "BD139 current, pull-down",
        r#""part": "BD139", "supply_v": 24, "logic_high_v": 5, "ambient_c": [-10, 50],
           "load": {"kind": "current", "current_a": 0.3}, "pull_down_ohms": 2200"#,
    ),
    (
        "demo 1 A relay, pull-down",
        r#""part": "demo-npn-1a", "supply_v": 12, "logic_high_v": 3.3, "grade": "industrial",
           "load": {"kind": "relay", "coil_ohms": 60, "coil_tolerance": 0.15},
           "clamp": {"kind": "diode"}, "pull_down_ohms": 4700"#,
    ),
    (
        "BC817-40 current, 1.8 V logic",
        r#""part": "BC817-40", "supply_v": 5, "logic_high_v": 1.8, "logic_high_min_v": 1.5,
           "ambient_c": [0, 70], "load": {"kind": "current", "current_a": 0.1}"#,
    ),
    (
        "2N4401 LED, pull-down, automotive",
        r#""part": "2N4401", "supply_v": 5, "logic_high_v": 3.3, "grade": "automotive",
           "load": {"kind": "led", "count": 1, "forward_v": 2.0, "current_a": 0.02,
                    "resistor_ohms": 150}, "pull_down_ohms": 22000"#,
    ),
];

fn stage_with_rb(lib: &Library, name: &str, fields: &str, rb: f64) -> Stage {
    let text = format!(
        r#"{{ "stages": [ {{ "name": "{name} RB {rb}", "base_resistor_ohms": {rb}, {fields} }} ] }}"#
    );
    parse_board("generated.json", &text, lib)
        .unwrap_or_else(|e| panic!("scenario {name}: {e}\n{text}"))
        .stages
        .remove(0)
}

/// Per scenario, up to three base resistors from E12: the largest RB that still passes the
/// pinned-low check (overdrive >= k), the largest that is marginal with overdrive >= 1.1, and the
/// smallest that fails with 0 < overdrive <= 0.9.
fn generated_stages(lib: &Library) -> Vec<(Stage, StageAnalysis)> {
    let mut out = Vec::new();
    for (name, fields) in SCENARIOS {
        let all: Vec<(Stage, StageAnalysis)> = e12()
            .into_iter()
            .map(|rb| {
                let s = stage_with_rb(lib, name, fields, rb);
                let a = analyse(&s);
                (s, a)
            })
            .collect();
        let od = od_of;
        let pass = all
            .iter()
            .rev()
            .find(|(s, a)| od(a) >= s.conditions.overdrive);
        let marginal = all
            .iter()
            .rev()
            .find(|(s, a)| od(a) >= 1.1 && od(a) < s.conditions.overdrive);
        let fail = all.iter().find(|(_, a)| od(a) > 0.0 && od(a) <= 0.9);
        for pick in [pass, marginal, fail].into_iter().flatten() {
            out.push(pick.clone());
        }
    }
    out
}

/// The corner netlist of a stage (see the file header).
fn corner_netlist(stage: &Stage, a: &StageAnalysis) -> String {
    let wc = npn(a);
    let c = &wc.corner;
    let tol = stage.conditions.resistor_tolerance;
    let t = stage.conditions.ambient_min.base();
    let ic_max = c.ic_max.base();
    let ib = wc.base_current_min.base();
    let bf = c.gain_wc;
    let vt = vt(t);
    // Collector current of the corner: the saturated load current, or BF x IB when the drive is
    // short of it (active region).
    let ic_corner = ic_max.min(bf * ib);
    let is = fit_is(ic_corner, ib, c.vbe_max_cold.base(), bf, BR, vt);
    let rb_plus = wc.rb.base() * (1.0 + tol);
    let rbe = match wc.rbe {
        Some(r) => format!("RBE nb 0 {:e}\n", r.base() * (1.0 - tol)),
        None => String::new(),
    };
    let vcc_max = a.corner.vcc_max.base();
    let r_load = vcc_max / ic_max;
    format!(
        "* pinlow worst-case corner of `{name}`\n\
         * invented Gummel-Poon NPN: BF = engine hFE,wc, IS fitted to VBE(sat),max(Ta,min),\n\
         * IKF = VAF = 0 (infinite), ISE = 0, no series resistances; TNOM = TEMP = Ta,min\n\
         .options TEMP={t} TNOM={t}\n\
         VIN pin 0 DC {voh:e}\n\
         RB pin nb {rb_plus:e}\n\
         {rbe}\
         VIB nb b DC 0\n\
         VCC vcc 0 DC {vcc_max:e}\n\
         RL vcc nc {r_load:e}\n\
         VIC nc c DC 0\n\
         Q1 c b 0 QPIN\n\
         .model QPIN NPN(IS={is:e} BF={bf:e} BR={BR} NF=1 NR=1 TNOM={t})\n\
         .control\n\
         op\n\
         print i(vib) i(vic) v(c) v(b)\n\
         .endc\n\
         .end\n",
        name = stage.name,
        voh = stage.conditions.logic_high_min.base(),
    )
}

struct Row {
    name: String,
    overdrive: f64,
    ib_engine: f64,
    ib_spice: f64,
    ic_spice: f64,
    ic_max: f64,
    vce: f64,
    vbc: f64,
    vce_sat_part: f64,
    vt: f64,
}

#[test]
fn engine_corner_agrees_with_ngspice() {
    if ngspice::skip_requested() {
        eprintln!("{} = 1: ngspice cross-check skipped", ngspice::SKIP_VAR);
        return;
    }
    ngspice::require_ngspice();
    let lib = Library::builtin().expect("shipped parts");
    let stages = generated_stages(&lib);

    let mut rows = Vec::new();
    for (s, a) in &stages {
        let v = ngspice::run(&corner_netlist(s, a), &["i(vib)", "i(vic)", "v(c)", "v(b)"]);
        let (vc, vb) = (v["v(c)"], v["v(b)"]);
        rows.push(Row {
            name: s.name.clone(),
            overdrive: od_of(a),
            ib_engine: npn(a).base_current_min.base(),
            ib_spice: v["i(vib)"],
            ic_spice: v["i(vic)"],
            ic_max: npn(a).corner.ic_max.base(),
            vce: vc,
            vbc: vb - vc,
            vce_sat_part: npn(a).corner.vce_sat_max.base(),
            vt: vt(s.conditions.ambient_min.base()),
        });
    }

    eprintln!(
        "{:<48} {:>9} {:>11} {:>11} {:>7} {:>9} {:>9} {:>8}",
        "stage", "overdrive", "IB engine", "IB ngspice", "diff %", "IC/ICmax", "VCE", "VBC"
    );
    let mut worst_diff: f64 = 0.0;
    for r in &rows {
        let diff = (r.ib_spice - r.ib_engine) / r.ib_engine;
        worst_diff = worst_diff.max(diff.abs());
        eprintln!(
            "{:<48} {:>9.3} {:>11.4e} {:>11.4e} {:>7.3} {:>9.4} {:>9.4} {:>8.4}",
            r.name,
            r.overdrive,
            r.ib_engine,
            r.ib_spice,
            100.0 * diff,
            r.ic_spice / r.ic_max,
            r.vce,
            r.vbc
        );
    }
    eprintln!("largest IB disagreement: {:.3} %", 100.0 * worst_diff);

    // The generated set must span the pinned-low verdicts (stage-model 5).
    let pass = stages
        .iter()
        .filter(|(s, a)| od_of(a) >= s.conditions.overdrive)
        .count();
    let marginal = stages
        .iter()
        .filter(|(s, a)| (1.0..s.conditions.overdrive).contains(&od_of(a)))
        .count();
    let fail = stages.iter().filter(|(_, a)| od_of(a) < 1.0).count();
    assert!(stages.len() >= 20, "only {} stages generated", stages.len());
    assert!(
        pass >= 5 && marginal >= 5 && fail >= 5,
        "pass {pass} marginal {marginal} fail {fail}"
    );
    assert!(stages
        .iter()
        .any(|(s, _)| matches!(s.conditions.inputs.pull_down, PullDown::Given(_))));
    assert!(stages
        .iter()
        .any(|(s, _)| matches!(s.conditions.inputs.pull_down, PullDown::None)));

    for r in &rows {
        // Base current within 3 % of the engine's IB,min.
        let diff = (r.ib_spice - r.ib_engine) / r.ib_engine;
        assert!(
            diff.abs() <= 0.03,
            "{}: IB engine {:e} A, ngspice {:e} A ({:.2} %)",
            r.name,
            r.ib_engine,
            r.ib_spice,
            100.0 * diff
        );
        if r.overdrive >= 1.1 {
            // Saturated: base-collector junction forward biased and the collector pinned low
            // [practice: VCE < 0.3 V as the saturation criterion of a small-signal switch].
            assert!(
                r.vbc > 0.0,
                "{}: overdrive {:.2} but VBC {} V",
                r.name,
                r.overdrive,
                r.vbc
            );
            assert!(
                r.vce < 0.3,
                "{}: overdrive {:.2} but VCE {} V",
                r.name,
                r.overdrive,
                r.vce
            );
            assert!(
                r.ic_spice > 0.95 * r.ic_max,
                "{}: IC {} of {}",
                r.name,
                r.ic_spice,
                r.ic_max
            );
        } else if r.overdrive <= 0.9 {
            // Out of saturation: the load short of its saturated current and VCE well above the
            // part's VCE(sat). VBC itself may still be positive here: the model's VBE was fitted
            // to the datasheet's VBE(sat),max (about 0.9 to 1.1 V cold), so VBC = VBE - VCE stays
            // above 0 until VCE passes VBE. What matters is that the base-collector junction
            // carries next to nothing: with one IS for both junctions its current is
            // e^(-VCE/VT) of the base-emitter one [text: Ebers-Moll transport model]; require
            // below 0.1 %, i.e. VCE > ln(1000) VT.
            assert!(
                r.ic_spice < 0.95 * r.ic_max,
                "{}: IC {} of {}",
                r.name,
                r.ic_spice,
                r.ic_max
            );
            assert!(
                r.vce > 0.3_f64.max(r.vce_sat_part),
                "{}: overdrive {:.2} but VCE {} V",
                r.name,
                r.overdrive,
                r.vce
            );
            assert!(
                r.vbc < 0.0 || (-r.vce / r.vt).exp() < 1e-3,
                "{}: overdrive {:.2} but the base-collector junction conducts (VBC {} V, VCE {} V)",
                r.name,
                r.overdrive,
                r.vbc,
                r.vce
            );
        }
    }
}

#[test]
fn ebers_moll_saturation_voltage_agrees_with_ngspice() {
    if ngspice::skip_requested() {
        eprintln!("{} = 1: ngspice cross-check skipped", ngspice::SKIP_VAR);
        return;
    }
    ngspice::require_ngspice();
    // Invented model without series resistances; forced beta set by two current sources.
    let t = 27.0;
    let ib = 1e-3;
    let mut checked = 0;
    for (bf, br) in [(100.0, 2.0), (50.0, 4.0), (250.0, 1.0)] {
        for fraction in [0.05, 0.1, 0.3, 0.6, 0.9] {
            let forced: f64 = fraction * bf;
            let netlist = format!(
                "* Ebers-Moll VCE(sat) at forced beta {forced}\n\
                 .options TEMP={t} TNOM={t}\n\
                 IB 0 b DC {ib:e}\n\
                 IC 0 c DC {ic:e}\n\
                 Q1 c b 0 QEM\n\
                 .model QEM NPN(IS=1e-14 BF={bf} BR={br} NF=1 NR=1 TNOM={t})\n\
                 .control\n\
                 op\n\
                 print v(c) v(b)\n\
                 .endc\n\
                 .end\n",
                ic = forced * ib,
            );
            let v = ngspice::run(&netlist, &["v(c)"]);
            let spice = v["v(c)"];
            let formula = vce_sat_ebers_moll(forced, bf, br, vt(t));
            eprintln!(
                "BF {bf} BR {br} forced {forced}: ngspice {spice:.6} V, formula {formula:.6} V"
            );
            assert!(
                ((spice - formula) / formula).abs() <= 0.01,
                "BF {bf} BR {br} forced beta {forced}: ngspice {spice} V, formula {formula} V"
            );
            checked += 1;
        }
    }
    assert_eq!(checked, 15);
}
