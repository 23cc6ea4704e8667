//! Engine checks against outside references, each named beside its assertion.

use approx::assert_relative_eq;

use super::*;
use crate::board::parse_board;
use crate::check::{CheckId, Status};
use crate::drive::npn::{NpnDetail, COLLECTOR_VOLTAGE};
use crate::drive::{PINNED_LOW, STAYS_OFF};
use crate::parts::{read_part, Library, PartSource};

/// A library with the shipped parts and test parts of invented figures: `flat20` (hFE 20 at
/// every current, VBE(sat) 0.7 .. 0.95 V, VCE(sat) 0.2 V at 50 mA with IB = 5 mA), a
/// Darlington pair `pair1k`, and a logic-level MOSFET `fet20`.
fn lib() -> Library {
    let parts = [
        r#"{
        "id": "flat20", "description": "flat-gain test part", "polarity": "npn", "package": "TO-92",
        "provenance": "invented for the engine tests", "vceo_max_v": 30, "ic_max_a": 0.5,
        "gain_min": [ {"ic_a": 0.001, "hfe": 20}, {"ic_a": 1.0, "hfe": 20} ],
        "vce_sat_max": [ {"ic_a": 0.05, "ib_a": 0.005, "v": 0.2} ],
        "vbe_sat": [ {"ic_a": 0.05, "ib_a": 0.005, "min_v": 0.7, "max_v": 0.95} ],
        "tj_max_c": 150, "r_th_ja_k_per_w": 250 }"#,
        r#"{
        "id": "pair1k", "description": "Darlington test pair", "polarity": "npn", "structure": "darlington",
        "package": "TO-220", "provenance": "invented for the engine tests", "vceo_max_v": 60, "ic_max_a": 4,
        "gain_min": [ {"ic_a": 0.5, "hfe": 1000}, {"ic_a": 3, "hfe": 1000} ],
        "vce_sat_max": [ {"ic_a": 3, "ib_a": 0.012, "v": 2.0} ],
        "vbe_sat": [ {"ic_a": 3, "ib_a": 0.012, "min_v": 1.3, "max_v": 2.5} ],
        "icbo_max_a": 2e-4, "internal_base_emitter_ohms": 8000,
        "tj_max_c": 150, "r_th_ja_k_per_w": 62.5 }"#,
        r#"{
        "id": "fet20", "description": "logic-level test MOSFET", "polarity": "nmos", "package": "SOT-23",
        "provenance": "invented for the engine tests", "vds_max_v": 20, "id_max_a": 3, "vgs_max_v": 12,
        "vgs_th": {"min_v": 0.6, "max_v": 1.4},
        "rds_on_max": [ {"vgs_v": 1.8, "ohms": 0.12}, {"vgs_v": 2.5, "ohms": 0.07}, {"vgs_v": 4.5, "ohms": 0.05} ],
        "tj_max_c": 150, "r_th_ja_k_per_w": 250 }"#,
    ];
    let mut lib = Library::builtin().expect("shipped parts");
    for text in parts {
        lib.insert(
            read_part("test", text, PartSource::Builtin("test")).expect("test part is valid"),
        );
    }
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

fn finding(a: &Analysis, id: CheckId) -> &Finding {
    a.finding(id).expect("the check runs")
}

fn npn(a: &Analysis) -> &NpnDetail {
    crate::drive::npn::detail(&a.drive).expect("an npn stage")
}

#[test]
fn hand_worked_base_resistor_sizing() {
    // Worked independently for this test: 5 V drive, 50 mA load, gain 20, overdrive 2 ->
    // IB = 2 x 50 mA / 20 = 5 mA; VBE(sat) 0.95 V: RB = (5 - 0.95) / 5 mA = 810 ohm (Ohm's law).
    // E24 (IEC 60063) has 750 and 820 around it; 820 ohm gives 4.94 mA, short of 5 mA, so the
    // largest value that reaches the overdrive is 750 ohm.
    let s = ideal(r#", "load": {"kind": "current", "current_a": 0.05}"#);
    let a = analyse(&s);
    assert_eq!(a.drive.series.base(), 750.0);
    assert!(a.drive.series_sized);
    assert_eq!(finding(&a, PINNED_LOW).status, Status::Pass);
}

#[test]
fn the_pin_limit_comes_first_and_a_higher_target_never_gives_a_larger_rb() {
    // Stage-model 6.2 (v2): a 1.8 V pin that may source 4 mA, 30 mA drawn. The pin alone sets
    // RB >= (1.8 - 0.7 V(sat),min) / 4 mA = 275 ohm -> E24 300 ohm; no RB reaches overdrive 2
    // from there, so RB = 300 ohm and the pin stays within its limit (Ohm's law).
    let s = ideal(
        r#", "logic_high_v": 1.8, "logic_high_min_v": 1.8, "pin_limit_a": 0.004, "load": {"kind": "current", "current_a": 0.03}"#,
    );
    let a = analyse(&s);
    assert_eq!(a.drive.series.base(), 300.0);
    assert!(a.drive.pin_current_max.base() <= 0.004);
    assert_eq!(finding(&a, crate::check::PIN_CURRENT).status, Status::Pass);
    // IB = (1.8 - 0.95) / 300 = 2.83 mA: overdrive 20 x 2.83 mA / 30 mA = 1.89, short of 2.
    let f = finding(&a, PINNED_LOW);
    assert_eq!(f.status, Status::Marginal);
    assert_relative_eq!(
        f.value.unwrap_or(0.0),
        20.0 * 0.85 / 300.0 / 0.03,
        max_relative = 1e-9
    );
    assert!(
        f.detail()
            .contains("the pin's limit allows RB down to 300R only"),
        "{}",
        f.detail()
    );
    for k in ["3", "5", "10"] {
        let higher = ideal(&format!(
            r#", "logic_high_v": 1.8, "logic_high_min_v": 1.8, "pin_limit_a": 0.004, "overdrive": {k}, "load": {{"kind": "current", "current_a": 0.03}}"#
        ));
        assert!(analyse(&higher).drive.series <= a.drive.series);
    }
}

#[test]
fn led_resistor_is_sized_over_the_worst_case_window() {
    // Stage-model 6.1 (v2), Ohm's law worked here: 12 V +/-5 %, two LEDs 2.0 V +/-0.1 V, 10 mA,
    // VCE(sat) 0.2 V. RL,hi = (11.4 - 4.2 - 0.2) / (0.8 x 10 mA x 1.05) = 833 ohm -> E24 820 ohm:
    // I,min = 7.0 V / 861 ohm = 8.13 mA >= 8 mA; I,max = (12.6 - 3.8) / 779 ohm = 11.3 mA, under
    // the 15 mA ceiling.
    let s = stage(
        r#"{ "name": "t", "part": "flat20", "supply_v": 12, "logic_high_v": 5,
             "load": {"kind": "led", "count": 2, "forward_v": 2.0, "forward_min_v": 1.9,
                      "forward_max_v": 2.1, "current_a": 0.01} }"#,
    );
    let a = analyse(&s);
    assert_eq!(a.own_value().map(|r| r.base()), Some(820.0));
    let f = finding(&a, crate::load::led::LED_CURRENT);
    assert_eq!(f.status, Status::Pass);
    assert_relative_eq!(f.value.unwrap_or(0.0), 7.0 / 861.0, max_relative = 1e-9);
}

#[test]
fn an_led_far_over_its_target_fails_against_the_assumed_ceiling() {
    // Three 3.0 V +/-0.2 V LEDs at 20 mA from 12 V +/-5 %: the resistor that keeps 80 % at the low
    // corner is 91 ohm (RL,hi = 1.6 V / 16.8 mA = 95.2 ohm), which lets (12.6 - 8.4) / 86.45 ohm
    // = 48.6 mA through at the high corner: far above 1.5 x 20 mA (v2's ceiling when none is
    // given; common practice). The window is empty.
    let s = stage(
        r#"{ "name": "t", "part": "flat20", "supply_v": 12, "logic_high_v": 5,
             "load": {"kind": "led", "count": 3, "forward_v": 3.0, "current_a": 0.02} }"#,
    );
    let a = analyse(&s);
    assert_eq!(a.own_value().map(|r| r.base()), Some(91.0));
    let f = finding(&a, crate::load::led::LED_CURRENT);
    assert_eq!(f.status, Status::Fail);
    assert_relative_eq!(f.value.unwrap_or(0.0), 4.2 / 86.45, max_relative = 1e-9);
    assert!(f.detail().contains("window is empty"), "{}", f.detail());
    assert!(s
        .assumptions
        .iter()
        .any(|t| t.contains("LED ceiling 30 mA assumed")));
}

#[test]
fn saturation_figures_follow_the_textbook_switch() {
    // Common practice: VBE about 0.7 V when on, VCE(sat) about 0.2 V at IC/IB = 10 for a small
    // signal part. The shipped demo part brackets 0.7 V at 10 mA and gives 0.2 V there.
    let lib = Library::builtin().expect("shipped");
    let part = lib.get("demo-npn-40v").expect("demo");
    let p = part
        .as_any()
        .downcast_ref::<crate::drive::npn::NpnPart>()
        .expect("npn");
    let (lo, hi) = p.vbe_sat_at(crate::quantity::amps(0.01));
    assert!(lo.base() <= 0.7 && 0.7 <= hi.base());
    assert_relative_eq!(p.vce_sat_max_at(crate::quantity::amps(0.01)).base(), 0.2);
    // Common practice: the cutoff edge is about 0.5 V at 25 C.
    assert_relative_eq!(
        crate::drive::npn::corner::turn_on_edge(crate::quantity::celsius(25.0)).base(),
        0.5
    );
}

#[test]
fn shipped_saturation_points_use_forced_beta_ten() {
    // Datasheet convention (common practice): VCE(sat) and VBE(sat) are specified at IC/IB = 10.
    // Parts whose provenance says otherwise (Darlington pairs, families specified at IC/IB = 20)
    // are exempt, and must say so.
    let lib = Library::builtin().expect("shipped");
    for part in lib.iter() {
        let Some(p) = part.as_any().downcast_ref::<crate::drive::npn::NpnPart>() else {
            continue;
        };
        let exempt = p.info.provenance.contains("IC/IB =");
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
    let f = finding(&a, crate::load::relay::COIL_PULL_IN);
    assert_relative_eq!(
        f.limit.unwrap_or(0.0),
        9.0 * (1.0 + 0.00393 * 50.0),
        max_relative = 1e-9
    );
}

#[test]
fn a_low_voltage_coil_on_a_high_supply_fails_coil_voltage() {
    // Common practice (from memory): a coil bears about 110 % of its rating continuously. A 1 V
    // coil on 12 V is 1260 % of it at the highest supply.
    let s = stage(
        r#"{ "name": "t", "part": "demo-npn-1a", "supply_v": 12, "logic_high_v": 3.3,
             "load": {"kind": "relay", "coil_ohms": 5, "rated_v": 1}, "clamp": {"kind": "diode"} }"#,
    );
    let a = analyse(&s);
    assert_eq!(
        finding(&a, crate::load::relay::COIL_VOLTAGE).status,
        Status::Fail
    );
}

#[test]
fn a_five_volt_strip_on_twelve_volts_fails_strip_voltage() {
    // Stage-model 2 and 5 (v2), common practice: a 5 V strip on 12.6 V is 252 % of its rating,
    // and its current rises four times faster than the voltage above the rating.
    let s = stage(
        r#"{ "name": "t", "part": "demo-npn-1a", "supply_v": 12, "logic_high_v": 3.3,
             "load": {"kind": "strip", "rated_v": 5, "current_per_m_a": 0.1, "length_m": 1} }"#,
    );
    let a = analyse(&s);
    assert_eq!(
        finding(&a, crate::load::strip::STRIP_VOLTAGE).status,
        Status::Fail
    );
    // 0.1 A x (1 + 7.6 / 1.25) = 0.708 A.
    assert_relative_eq!(a.corner.current_max.base(), 0.708, max_relative = 1e-9);
}

#[test]
fn junction_rise_is_power_times_thermal_resistance() {
    // JEDEC JESD51 defines RthJA as (Tj - Ta) / P.
    let s = ideal(r#", "load": {"kind": "current", "current_a": 0.2}, "base_resistor_ohms": 220"#);
    let a = analyse(&s);
    let tj = a.drive.junction_max.map(|t| t.base()).unwrap_or(0.0);
    let p = a.drive.power_max.map(|p| p.base()).unwrap_or(0.0);
    assert_relative_eq!(tj - 25.0, p * 250.0, max_relative = 1e-9);
}

#[test]
fn a_stage_not_pinned_low_dissipates_as_in_the_linear_region() {
    // Stage-model 4 (v2), textbook: a switch in its linear region in series with a resistive
    // load dissipates at most VCC^2 / (4 R) = VCC x IC,max / 4; with a current load, VCC x I.
    // 47 kohm gives far too little base current for 40 mA: not pinned low.
    let s =
        ideal(r#", "load": {"kind": "current", "current_a": 0.04}, "base_resistor_ohms": 47000"#);
    let a = analyse(&s);
    assert_eq!(finding(&a, PINNED_LOW).status, Status::Fail);
    let pin = a.drive.pin_current_max.base();
    let p = a.drive.power_max.map(|p| p.base()).unwrap_or(0.0);
    assert_relative_eq!(p, 5.0 * 0.04 + 0.95 * pin, max_relative = 1e-9);
}

#[test]
fn logic_high_below_vbe_is_a_fail_not_an_error_and_has_no_overdrive() {
    let s = ideal(
        r#", "logic_high_v": 0.9, "logic_high_min_v": 0.8, "load": {"kind": "current", "current_a": 0.05}"#,
    );
    let a = analyse(&s);
    assert_eq!(a.verdict, Status::Fail);
    let f = finding(&a, PINNED_LOW);
    assert!(f.detail().contains("cannot turn on"), "{}", f.detail());
    // v2: the overdrive and the forced beta are null, never a negative number.
    assert!(npn(&a).worst.overdrive.is_none() && npn(&a).worst.forced_beta.is_none());
    assert!(f.value.is_none());
}

#[test]
fn no_led_headroom_is_a_fail() {
    let s = stage(
        r#"{ "name": "t", "part": "demo-npn-40v", "supply_v": 5, "logic_high_v": 3.3,
             "load": {"kind": "led", "count": 2, "forward_v": 3.0, "current_a": 0.02} }"#,
    );
    let a = analyse(&s);
    let f = finding(&a, crate::load::led::LED_CURRENT);
    assert_eq!(f.status, Status::Fail);
    assert!(f.detail().contains("no headroom"), "{}", f.detail());
}

#[test]
fn pull_down_steals_base_current() {
    // Kirchhoff's current law at the base: IB = (VOH - VBE)/RB - VBE/RBE.
    let s = ideal(
        r#", "load": {"kind": "current", "current_a": 0.05}, "base_resistor_ohms": 1000, "pull_down_ohms": 10000"#,
    );
    let a = analyse(&s);
    assert_relative_eq!(
        npn(&a).worst.base_current_min.base(),
        (5.0 - 0.95) / 1000.0 - 0.95 / 10000.0,
        max_relative = 1e-12
    );
}

#[test]
fn unclamped_inductive_loads_fail_the_voltage_rating() {
    for load in [
        r#"{"kind": "relay", "coil_ohms": 400}"#,
        r#"{"kind": "motor", "winding_ohms": 40}"#,
    ] {
        let s = stage(&format!(
            r#"{{ "name": "t", "part": "demo-npn-40v", "supply_v": 12, "logic_high_v": 3.3, "load": {load} }}"#
        ));
        let a = analyse(&s);
        assert_eq!(
            finding(&a, COLLECTOR_VOLTAGE).status,
            Status::Fail,
            "{load}"
        );
        assert!(a.corner.peak.is_none());
        assert!(a.clamp.is_some(), "an inductive load gets a clamp proposal");
    }
}

#[test]
fn darlington_stays_off_through_its_internal_resistor_and_moves_four_millivolts_per_kelvin() {
    // Stage-model 6b: leakage flows through the internal resistor (nominal) in parallel with RBE+;
    // with it the base never floats. ICBO 200 uA at 25 C doubles every 10 K (common practice):
    // 800 uA at 45 C; through 8 kohm alone that is 6.4 V, far above the 0.46 V threshold.
    let s = stage(
        r#"{ "name": "t", "part": "pair1k", "supply_v": 12, "logic_high_v": 5, "ambient_c": [0, 45],
             "load": {"kind": "current", "current_a": 1.0}, "base_resistor_ohms": 1000 }"#,
    );
    let a = analyse(&s);
    let w = &npn(&a).worst;
    assert_relative_eq!(
        w.leakage_voltage.map(|v| v.base()).unwrap_or(0.0),
        8e-4 * 8000.0,
        max_relative = 1e-9
    );
    assert_eq!(finding(&a, STAYS_OFF).status, Status::Fail);
    // Two junctions in series: -4 mV/K (text); VBE(sat),max 2.5 V at 25 C is 2.6 V at 0 C.
    assert_relative_eq!(w.corner.vbe_max_cold.base(), 2.6, max_relative = 1e-12);
    // No remedy proposes a Darlington pair for a part that is one.
    let r = crate::analysis::compose(&s, &a).expect("a remedy");
    for p in &r.proposals {
        assert!(
            !p.why.sentence().contains("Darlington"),
            "{}",
            p.why.sentence()
        );
    }
}

#[test]
fn mosfet_gate_drive_against_its_rds_on_points() {
    // Stage-model 8: a 3.3 V pin (2.9 V guaranteed) drives fet20 through RG with no pull-down:
    // VGS,min = 2.9 V; at -20 C the threshold rises 0.225 V (-5 mV/K, from memory), VGS,eff =
    // 2.675 V picks the 2.5 V point (0.07 ohm). RG = 3.3 V / (8 mA x 0.95) -> 470 ohm (Ohm's law).
    let s = stage(
        r#"{ "name": "t", "part": "fet20", "supply_v": 12, "logic_high_v": 3.3, "logic_high_min_v": 2.9,
             "pin_limit_a": 0.008, "ambient_c": [-20, 60], "pull_down_ohms": null,
             "load": {"kind": "current", "current_a": 1.0} }"#,
    );
    let a = analyse(&s);
    assert_eq!(a.drive.series.base(), 470.0);
    assert_eq!(finding(&a, PINNED_LOW).status, Status::Pass);
    let d = crate::drive::nmos::detail(&a.drive).expect("nmos");
    assert_relative_eq!(d.worst.point.ohms.base(), 0.07);
    // Tj settles where Ta + ID^2 RDS(Tj) RthJA = Tj (the junction's heat balance, JESD51).
    let tj = a.drive.junction_max.map(|t| t.base()).unwrap_or(0.0);
    let rds = d.worst.rds_max.map(|r| r.base()).unwrap_or(0.0);
    assert_relative_eq!(tj, 60.0 + rds * 250.0, max_relative = 1e-9);
}

#[test]
fn a_mosfet_specified_only_at_high_gate_voltage_fails_from_a_three_volt_pin() {
    // A part whose RDS(on) is given only at 10 V and whose threshold reaches 4 V is not
    // logic-level for a 3.3 V pin: VGS,min 2.9 V < 1.5 x the cold maximum threshold.
    let text = r#"{
        "id": "fet10v", "polarity": "nmos", "package": "TO-220", "provenance": "invented for the engine tests",
        "vds_max_v": 60, "id_max_a": 10, "vgs_max_v": 20, "vgs_th": {"min_v": 2.0, "max_v": 4.0},
        "rds_on_max": [ {"vgs_v": 10, "ohms": 0.05} ], "tj_max_c": 175, "r_th_ja_k_per_w": 62 }"#;
    let mut l = lib();
    l.insert(read_part("t", text, PartSource::Builtin("t")).expect("valid"));
    let board = r#"{"stages": [{ "name": "t", "part": "fet10v", "supply_v": 12, "logic_high_v": 3.3,
        "load": {"kind": "current", "current_a": 1.0} }]}"#;
    let s = parse_board("t", board, &l).expect("valid").stages.remove(0);
    let a = analyse(&s);
    assert_eq!(finding(&a, PINNED_LOW).status, Status::Fail);
    assert!(finding(&a, PINNED_LOW).detail().contains("not logic-level"));
}

#[test]
fn motor_stall_current_is_the_worst_case_and_the_clamp_stores_its_energy() {
    // Stage-model 2 (v2), Ohm's law at standstill: 12.6 V over a 6 ohm winding cold at 0 C
    // (6 x (1 - 0.00393 x 20) = 5.5284 ohm, IEC 60028) at -10 % = 4.97556 ohm: 2.532 A;
    // L I^2 / 2 with 2 mH: 6.41 mJ (textbook).
    let s = stage(
        r#"{ "name": "t", "part": "demo-npn-1a", "supply_v": 12, "logic_high_v": 3.3,
             "load": {"kind": "motor", "winding_ohms": 6, "inductance_h": 0.002}, "clamp": {"kind": "diode"} }"#,
    );
    let a = analyse(&s);
    let i = 12.6 / (6.0 * (1.0 - 0.00393 * 20.0) * 0.9);
    assert_relative_eq!(a.corner.current_max.base(), i, max_relative = 1e-9);
    let e = a
        .clamp
        .and_then(|c| c.stored_energy)
        .map(|e| e.base())
        .unwrap_or(0.0);
    assert_relative_eq!(e, 0.002 * i * i / 2.0, max_relative = 1e-9);
}
