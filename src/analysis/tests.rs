//! Engine checks against outside references, each named beside its assertion.

use approx::assert_relative_eq;

use super::*;
use crate::board::parse_board;
use crate::parts::{part_from_record, Library, PartRecord, PartSource};
use crate::quantity::Base;

/// A library with the shipped parts and one flat-gain test part (`flat20`: hFE 20 at every
/// current, VBE(sat) 0.7 .. 0.95 V, VCE(sat) 0.2 V at 50 mA with IB = 5 mA).
fn lib() -> Library {
    let text = r#"{
        "id": "flat20", "description": "flat-gain test part", "polarity": "npn", "package": "TO-92",
        "provenance": "invented for the engine tests", "vceo_max_v": 30, "ic_max_a": 0.5,
        "gain_min": [ {"ic_a": 0.001, "hfe": 20}, {"ic_a": 1.0, "hfe": 20} ],
        "vce_sat_max": [ {"ic_a": 0.05, "ib_a": 0.005, "v": 0.2} ],
        "vbe_sat": [ {"ic_a": 0.05, "ib_a": 0.005, "min_v": 0.7, "max_v": 0.95} ],
        "tj_max_c": 150, "r_th_ja_k_per_w": 250 }"#;
    let rec: PartRecord = serde_json::from_str(text).expect("test part parses");
    let part = part_from_record(&rec, "flat20", PartSource::Builtin("flat20")).expect("valid");
    let mut lib = Library::builtin().expect("shipped parts");
    lib.insert(part);
    lib
}

fn stage(json_stage: &str) -> Stage {
    let text = format!(r#"{{ "stages": [ {json_stage} ] }}"#);
    parse_board("test", &text, &lib())
        .expect("test board is valid")
        .stages
        .remove(0)
}

/// A stage with every tolerance zero, 25 C, no pull-down: the textbook switch. `extra` is a list
/// of JSON members that override or add to it.
fn ideal(extra: &str) -> Stage {
    let mut base: serde_json::Value = serde_json::from_str(
        r#"{ "name": "t", "part": "flat20", "supply_v": 5, "supply_tolerance": 0, "logic_high_v": 5,
             "logic_high_min_v": 5, "pin_limit_a": 0.02, "ambient_c": [25, 25], "resistor_tolerance": 0,
             "pull_down_ohms": null, "overdrive": 2.0 }"#,
    )
    .expect("base stage");
    let over: serde_json::Value =
        serde_json::from_str(&format!("{{ {} }}", extra.trim_start_matches(','))).expect("extra");
    if let (Some(b), Some(o)) = (base.as_object_mut(), over.as_object()) {
        for (k, v) in o {
            b.insert(k.clone(), v.clone());
        }
    }
    stage(&base.to_string())
}

#[test]
fn hand_worked_base_resistor_sizing() {
    // Worked independently for this test: 5 V drive, 50 mA load, gain 20, overdrive 2 ->
    // IB = 2 x 50 mA / 20 = 5 mA; VBE(sat) 0.95 V: RB = (5 - 0.95) / 5 mA = 810 ohm (Ohm's law).
    // E24 (IEC 60063) has 750 and 820 around it; 820 ohm gives 4.94 mA, short of 5 mA, so the
    // largest value that reaches the overdrive is 750 ohm.
    let s = ideal(r#", "load": {"kind": "current", "current_a": 0.05}"#);
    let a = analyse(&s);
    assert_relative_eq!(a.worst.resistors.rb.base(), 750.0);
    assert!(a.sized.base);
    assert_relative_eq!(
        a.worst.base_current_min.base(),
        4.05 / 750.0,
        max_relative = 1e-12
    );
    assert_relative_eq!(
        a.worst.overdrive_min,
        20.0 * 4.05 / 750.0 / 0.05,
        max_relative = 1e-12
    );
    let at_820 = analyse(&ideal(
        r#", "load": {"kind": "current", "current_a": 0.05}, "base_resistor_ohms": 820"#,
    ));
    assert!(at_820.worst.overdrive_min < 2.0);
    let pinned = at_820.findings.iter().find(|f| f.id == CheckId::PinnedLow);
    assert_eq!(pinned.map(|f| f.status), Some(Status::Marginal));
}

#[test]
fn hand_worked_led_resistor_sizing() {
    // Ohm's law, worked here: 12 V supply, three 3.0 V LEDs, 20 mA, VCE(sat) 0.2 V (flat20 at
    // low current) -> RL = (12 - 9 - 0.2) / 0.02 = 140 ohm; the next E24 value up is 150 ohm.
    let s = stage(
        r#"{ "name": "t", "part": "flat20", "supply_v": 12, "logic_high_v": 5,
             "load": {"kind": "led", "count": 3, "forward_v": 3.0, "current_a": 0.02} }"#,
    );
    let a = analyse(&s);
    assert_eq!(a.worst.resistors.rl.map(|r| r.base()), Some(150.0));
    assert!(a.sized.led);
}

#[test]
fn saturation_figures_follow_the_textbook_switch() {
    // Common practice: VBE about 0.7 V when on, VCE(sat) about 0.2 V at IC/IB = 10 for a small
    // signal part. The shipped demo part brackets 0.7 V at 10 mA and gives 0.2 V there.
    let lib = Library::builtin().expect("shipped");
    let p = lib.get("demo-npn-40v").expect("demo");
    let (lo, hi) = p.vbe_sat_at(crate::quantity::amps(0.01));
    assert!(lo.base() <= 0.7 && 0.7 <= hi.base());
    assert_relative_eq!(p.vce_sat_max_at(crate::quantity::amps(0.01)).base(), 0.2);
    // Common practice: the cutoff edge is about 0.5 V at 25 C.
    assert_relative_eq!(
        temperature::turn_on_edge(crate::quantity::celsius(25.0)).base(),
        0.5
    );
}

#[test]
fn shipped_saturation_points_use_forced_beta_ten() {
    // Datasheet convention (common practice): VCE(sat) and VBE(sat) are specified at IC/IB = 10.
    // Parts whose provenance says otherwise (Darlington pairs, families specified at IC/IB = 20)
    // are exempt, and must say so.
    let lib = Library::builtin().expect("shipped");
    for p in lib.iter() {
        let exempt = p.provenance.contains("IC/IB =");
        for v in &p.vce_sat_max {
            let ratio = v.ic.base() / v.ib.base();
            if !exempt {
                assert_relative_eq!(ratio, 10.0, max_relative = 1e-9);
            }
        }
    }
}

#[test]
fn relay_coil_pull_in_uses_hot_copper() {
    // IEC 60028 annealed copper: a coil that must operate at 75 % of 12 V at 20 C needs
    // 9 V x (1 + 0.00393 x 50) = 10.77 V at 70 C.
    let s = stage(
        r#"{ "name": "t", "part": "demo-npn-40v", "supply_v": 12, "logic_high_v": 3.3,
             "ambient_c": [0, 70], "load": {"kind": "relay", "coil_ohms": 400}, "clamp": {"kind": "diode"} }"#,
    );
    let a = analyse(&s);
    let f = a
        .findings
        .iter()
        .find(|f| f.id == CheckId::CoilPullIn)
        .expect("relay has a pull-in check");
    assert_relative_eq!(
        f.limit.unwrap_or(0.0),
        9.0 * (1.0 + 0.00393 * 50.0),
        max_relative = 1e-9
    );
}

#[test]
fn junction_rise_is_power_times_thermal_resistance() {
    // JEDEC JESD51 defines RthJA as (Tj - Ta) / P.
    let s = ideal(r#", "load": {"kind": "current", "current_a": 0.2}, "base_resistor_ohms": 220"#);
    let a = analyse(&s);
    let rise = a.worst.junction_max.base() - 25.0;
    assert_relative_eq!(rise, a.worst.power_max.base() * 250.0, max_relative = 1e-9);
}

#[test]
fn logic_high_below_vbe_is_a_fail_not_an_error() {
    let s = ideal(
        r#", "logic_high_v": 0.9, "logic_high_min_v": 0.8, "load": {"kind": "current", "current_a": 0.05}"#,
    );
    let a = analyse(&s);
    assert_eq!(a.verdict, Status::Fail);
    let f = a
        .findings
        .iter()
        .find(|f| f.id == CheckId::PinnedLow)
        .expect("check");
    assert!(f.detail.contains("cannot turn on"), "{}", f.detail);
}

#[test]
fn no_led_headroom_is_a_fail() {
    let s = stage(
        r#"{ "name": "t", "part": "demo-npn-40v", "supply_v": 5, "logic_high_v": 3.3,
             "load": {"kind": "led", "count": 2, "forward_v": 3.0, "current_a": 0.02} }"#,
    );
    let a = analyse(&s);
    let f = a
        .findings
        .iter()
        .find(|f| f.id == CheckId::LedCurrent)
        .expect("check");
    assert_eq!(f.status, Status::Fail);
    assert!(f.detail.contains("no headroom"), "{}", f.detail);
}

#[test]
fn unreachable_overdrive_is_a_fail() {
    // 1 A through a 20-gain part from a 4 mA-class pin: even 10 ohm cannot reach overdrive 2
    // within the pin's voltage; the sizer falls back to the pin-limited value and fails.
    let s = ideal(
        r#", "logic_high_v": 1.2, "logic_high_min_v": 1.1, "load": {"kind": "current", "current_a": 1.0}, "overdrive": 5"#,
    );
    let a = analyse(&s);
    let f = a
        .findings
        .iter()
        .find(|f| f.id == CheckId::PinnedLow)
        .expect("check");
    assert_eq!(f.status, Status::Fail);
    assert!(f.detail.contains("no E24 value"), "{}", f.detail);
}

#[test]
fn pull_down_steals_base_current() {
    // Kirchhoff's current law at the base: IB = (VOH - VBE)/RB - VBE/RBE.
    let s = ideal(
        r#", "load": {"kind": "current", "current_a": 0.05}, "base_resistor_ohms": 1000, "pull_down_ohms": 10000"#,
    );
    let a = analyse(&s);
    assert_relative_eq!(
        a.worst.base_current_min.base(),
        (5.0 - 0.95) / 1000.0 - 0.95 / 10000.0,
        max_relative = 1e-12
    );
}

#[test]
fn unclamped_relay_fails_collector_voltage() {
    let s = stage(
        r#"{ "name": "t", "part": "demo-npn-40v", "supply_v": 12, "logic_high_v": 3.3,
             "load": {"kind": "relay", "coil_ohms": 400} }"#,
    );
    let a = analyse(&s);
    let f = a
        .findings
        .iter()
        .find(|f| f.id == CheckId::CollectorVoltage)
        .expect("check");
    assert_eq!(f.status, Status::Fail);
    assert!(a.worst.collector_peak.is_none());
}
