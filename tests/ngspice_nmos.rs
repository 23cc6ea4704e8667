//! Cross-check of the nmos drive's worst-case engine (stage-model 8) against ngspice.
//!
//! The stages are generated from board JSON with the shipped parts: six MOSFETs, logic pins of
//! 5 V (VOH,min 4.6 and 4.9 V), 3.3 V (2.9 V) and 2.5 V (2.1 V), the commercial and automotive
//! ranges, three gate networks (RG and RGS sized, RG 100 ohm alone, RG 1 k with RGS 10 k) and
//! current loads from 20 mA to the part's rating, on a 12 V supply.
//!
//! Every netlist is the worst-case corner of the pinned-low check: the pin is a DC source at
//! VOH,min, RG at +tol, RGS at -tol when fitted, so that ngspice itself solves the gate divider.
//! The MOSFET is an INVENTED level-1 (Shichman-Hodges) model, not any real part's model:
//! W = L, LAMBDA = 0, no series resistances, bulk tied to the source, VTO = the engine's
//! VGS(th),max at Ta,min (the threshold the pinned-low check holds the drive to). Its drain
//! current [text: Shichman-Hodges level-1 model, from memory] is
//!
//!   triode (0 <= VDS < VGS - VTO):  ID = KP (VGS - VTO - VDS/2) VDS
//!   saturation (VDS >= VGS - VTO):  ID = KP/2 (VGS - VTO)^2
//!
//! so a channel that must carry ID at VDS = ID x R with overdrive Vov in the triode region has,
//! exactly (no small-VDS approximation),
//!
//!   KP = ID / ((Vov - VDS/2) VDS),   possible only when VDS < Vov.
//!
//! ngspice runs with TNOM = TEMP, so it scales nothing with temperature: the corner's cold
//! threshold and hot resistance are put into the model's values (extreme-value analysis takes
//! each at its own worst, as the engine does).
//!
//! 1. `on_voltage_agrees_with_ngspice` (stages the engine passes pinned-low, junction settled
//!    within Tj,max). The channel is fitted at the engine's worst-case gate voltage VGS,min and
//!    its drain current ID,max to the 25 C RDS(on) the engine reads there; the load is a DC
//!    current source of ID,max (a current load draws its current whatever the drain voltage,
//!    which is how the engine takes it). RDS(on)(Tj) = RDS(on)(25 C) x (1 + a (Tj - 25)) is
//!    modelled as a behavioural source in series with the channel, driven by a thermal node:
//!    the switch's dissipation VDS x ID flows into RthJA to Ta,max. ngspice solves circuit and
//!    heating together by Newton iteration; the engine uses the closed form of stage-model 8.
//!    Asserted: the drain voltage within 3 % of the engine's Von,max, the gate within 0.1 % of
//!    VGS,min, the junction within 1 K, and the hot drain inside the triode region. This checks
//!    the gate divider at its tolerances, the self-consistent junction and the on-voltage. It
//!    does not check whether the datasheet figure holds at that gate drive: the channel is
//!    fitted at the engine's own gate voltage and current, so the level-1 curvature cannot
//!    enter. That is test 2.
//! 2. `spec_point_model_bounds_the_on_voltage` (the same stages). The channel is fitted where
//!    the datasheet states the figure: at the engine's RDS(on) point with the overdrive it has
//!    at 25 C, VGS_point - VGS(th),max(25 C) (in the cold corner both the gate voltage and VTO
//!    move up by the threshold's rise), at the point's test current (or ID,max when it states
//!    none), to the engine's hot RDS(on),max; it is then driven by the stage's real gate
//!    network. A square-law channel's chord resistance VDS/ID falls as the overdrive rises and
//!    rises with the current, so when the engine's point lies at or below the drive (VGS,eff)
//!    and ID,max is within the point's test current, the simulated drain voltage cannot exceed
//!    Von,max: asserted within 3 %. This is a genuine check of the point the engine picks and of
//!    its cold correction VGS,eff; the simulated drain falls below Von,max by as much as the
//!    drive exceeds the point (the engine never interpolates upward). The same is simulated for
//!    the stages whose VGS,min reaches the lowest point's 25 C gate voltage while VGS,eff does
//!    not: read literally, stage-model 8 would pass them; the square-law channel exceeds
//!    Von,max at many of them and saturates at some (counted), so pinlow holds pinned-low to
//!    marginal there and says the figure is not guaranteed (asserted).
//! 3. `below_one_and_a_half_thresholds_the_switch_is_not_pinned` (stages whose VGS,min is below
//!    1.5 x VGS(th),max cold). Channel fitted as in 2 at the part's lowest point, with RDS(on)
//!    at the junction the engine would settle at if the stage were ohmic. The load is a
//!    resistor VCC,max / ID,max from VCC,max (it draws ID,max with the drain at 0 V and less as
//!    the drain rises: a milder demand than the current load itself, so it favours the ohmic
//!    region). Out of the ohmic region means cut off (VGS <= VTO) or saturated
//!    (VDS >= VGS - VTO), the level-1 region boundary above: there the channel, not the load,
//!    sets the current. The 1.5 x rule looks at the gate voltage only; the square-law channel
//!    saturates once the load asks more than KP (VGS - VTO)^2 / 2, so a light load can still
//!    find it ohmic. Asserted, for the stages below the lowest point (the engine must fail
//!    them): a load above the point's test current leaves the channel out of the ohmic region;
//!    a lighter load that finds it ohmic sees a drop above ID x RDS(on) of the point (not the
//!    on-state the figure promises). For the stages at or above the lowest point: with the
//!    point at or below VGS,eff the engine passes and the channel is ohmic; with VGS,min at or
//!    above the point but VGS,eff below it the engine gives marginal and says the figure is
//!    not guaranteed (asserted; counted how often ngspice leaves the ohmic region there).
//!
//! A point that lies at or beyond the saturation edge of a channel at the maximum threshold
//! (BSS123's 4.5 V point: 170 mA x 10 ohm = 1.7 V against 4.5 - 2.8 V, before any heating)
//! cannot be fitted; such stages are counted and left out of tests 2 and 3.

mod support;

use pinlow::analysis::{analyse, Analysis};
use pinlow::board::parse_board;
use pinlow::check::Status;
use pinlow::drive::nmos::corner::{Junction, NmosWorst};
use pinlow::drive::nmos::NmosPart;
use pinlow::drive::PINNED_LOW;
use pinlow::parts::Library;
use pinlow::quantity::Base;
use pinlow::stage::Stage;
use support::ngspice;

/// Reference temperature of datasheet RDS(on) and VGS(th) figures, C [practice: datasheets
/// state them at 25 C].
const T_REF_C: f64 = 25.0;
/// The issue's tolerance on the on-voltage.
const ON_VOLTAGE_TOLERANCE: f64 = 0.03;
/// The gate-drive margin of the pinned-low check [practice] (stage-model 8).
const THRESHOLD_MARGIN: f64 = 1.5;

/// Parts and their load currents (A): from 20 mA to the part's rating, through the test
/// current of its RDS(on) points.
const PARTS: &[(&str, &[f64])] = &[
    ("2N7000", &[0.02, 0.05, 0.075, 0.2]),
    ("2N7002", &[0.02, 0.05, 0.115]),
    ("BSS123", &[0.02, 0.08, 0.17]),
    ("BSS138", &[0.02, 0.08, 0.22]),
    ("demo-nmos-20v", &[0.1, 0.5, 1.5, 3.0]),
    ("demo-nmos-40v", &[0.5, 2.0, 3.0, 6.0]),
];
/// Logic pins: (VOH,max, VOH,min), V.
const LOGIC: &[(f64, f64)] = &[(5.0, 4.6), (5.0, 4.9), (3.3, 2.9), (2.5, 2.1)];
const GRADES: &[&str] = &["commercial", "automotive"];
/// Gate networks as board fields: sized RG and RGS; RG alone; a heavy divider.
const GATES: &[(&str, &str)] = &[
    ("sized", ""),
    (
        "RG 100",
        r#", "gate_resistor_ohms": 100, "pull_down_ohms": null"#,
    ),
    (
        "RG 1k RGS 10k",
        r#", "gate_resistor_ohms": 1000, "pull_down_ohms": 10000"#,
    ),
];

/// The nmos figures of an analysis.
fn worst(a: &Analysis) -> &NmosWorst {
    &pinlow::drive::nmos::detail(&a.drive)
        .expect("an nmos stage")
        .worst
}

fn part(s: &Stage) -> &NmosPart {
    s.switch
        .as_any()
        .downcast_ref::<NmosPart>()
        .expect("an nmos part")
}

/// A stage whose VGS,min reaches the lowest RDS(on) point while VGS,eff does not: the figure
/// is not guaranteed, and pinned-low is marginal and says so (docs/model.md, readings 1).
fn assert_gap_is_marginal(s: &Stage, status: Status, sentence: &str) {
    assert_eq!(status, Status::Marginal, "{}: {sentence}", s.name);
    assert!(
        sentence.contains("not guaranteed"),
        "{}: point above VGS,eff, but pinned-low says: {sentence}",
        s.name
    );
}

fn pinned_low(a: &Analysis) -> (Status, String) {
    let f = a.finding(PINNED_LOW).expect("pinned-low runs");
    (f.status, f.why.sentence())
}

/// KP (W = L) of a level-1 channel carrying `id` at `vds` in the triode region with overdrive
/// `vov` (see the file header); `None` when no triode point exists (`vds` >= `vov`).
fn fit_kp(id: f64, vds: f64, vov: f64) -> Option<f64> {
    (vds > 0.0 && vds < vov).then(|| id / ((vov - vds / 2.0) * vds))
}

fn stage(lib: &Library, id: &str, logic: (f64, f64), grade: &str, gate: usize, i: f64) -> Stage {
    let (gate_name, gate_fields) = GATES[gate];
    let text = format!(
        r#"{{ "stages": [ {{ "name": "{id} {vmax}/{vmin} V {grade} {i} A {gate_name}",
            "part": "{id}", "supply_v": 12, "logic_high_v": {vmax}, "logic_high_min_v": {vmin},
            "grade": "{grade}", "load": {{"kind": "current", "current_a": {i}}} {gate_fields} }} ] }}"#,
        vmax = logic.0,
        vmin = logic.1,
    );
    parse_board("generated.json", &text, lib)
        .unwrap_or_else(|e| panic!("{e}\n{text}"))
        .stages
        .remove(0)
}

fn generated_stages() -> Vec<(Stage, Analysis)> {
    let lib = Library::builtin().expect("shipped parts");
    let mut out = Vec::new();
    for (id, currents) in PARTS {
        for &logic in LOGIC {
            for grade in GRADES {
                for gate in 0..GATES.len() {
                    for &i in *currents {
                        let s = stage(&lib, id, logic, grade, gate, i);
                        let a = analyse(&s);
                        out.push((s, a));
                    }
                }
            }
        }
    }
    out
}

/// The pin and the gate network at the corner: VOH,min, RG+, RGS-.
fn gate_lines(s: &Stage, w: &NmosWorst) -> String {
    let c = &s.conditions;
    let tol = c.resistor_tolerance;
    let mut t = format!(
        "VIN pin 0 DC {:e}\nRG pin g {:e}\n",
        c.logic_high_min.base(),
        w.rg.base() * (1.0 + tol)
    );
    if let Some(r) = w.rgs {
        t += &format!("RGS g 0 {:e}\n", r.base() * (1.0 - tol));
    }
    t
}

fn model_line(vto: f64, kp: f64) -> String {
    format!(
        "* invented level-1 NMOS, not any real part's model\n\
         .model NWC NMOS(LEVEL=1 VTO={vto:e} KP={kp:e} LAMBDA=0)\n"
    )
}

/// The operating point (drain, gate) of the invented channel driven by the stage's gate network
/// with `load` (netlist lines) on its drain.
fn drain_op(title: &str, s: &Stage, w: &NmosWorst, load: &str, vto: f64, kp: f64) -> (f64, f64) {
    let netlist = format!(
        "* pinlow: {title}\n\
         .options TEMP={T_REF_C} TNOM={T_REF_C}\n\
         {gate}\
         {load}\
         M1 d g 0 0 NWC W=1u L=1u\n\
         {model}\
         .control\n\
         op\n\
         print v(d) v(g)\n\
         .endc\n\
         .end\n",
        gate = gate_lines(s, w),
        model = model_line(vto, kp),
    );
    let v = ngspice::run(&netlist, &["v(d)", "v(g)"]);
    (v["v(d)"], v["v(g)"])
}

fn skip() -> bool {
    if ngspice::skip_requested() {
        eprintln!("{} = 1: ngspice cross-check skipped", ngspice::SKIP_VAR);
        return true;
    }
    ngspice::require_ngspice();
    false
}

/// The stages of tests 1 and 2: pinned-low passes whose junction settles within Tj,max.
fn passing(stages: &[(Stage, Analysis)]) -> Vec<&(Stage, Analysis)> {
    stages
        .iter()
        .filter(|(s, a)| {
            let w = worst(a);
            pinned_low(a).0 == Status::Pass
                && matches!(w.junction, Junction::Settled { .. })
                && w.junction_max.is_some_and(|t| t <= part(s).info.tj_max)
        })
        .collect()
}

#[test]
fn on_voltage_agrees_with_ngspice() {
    if skip() {
        return;
    }
    let stages = generated_stages();
    let cases = passing(&stages);
    eprintln!(
        "{:<46} {:>8} {:>9} {:>9} {:>7} {:>8} {:>8} {:>8}",
        "stage", "VGS,min", "Von eng", "VDS spice", "diff %", "Tj eng", "Tj spice", "VDS/Vov"
    );
    let mut worst_diff: f64 = 0.0;
    for (s, a) in &cases {
        let w = worst(a);
        let p = part(s);
        let von = w.von_max.expect("settled: Von,max").base();
        let tj = w.junction_max.expect("settled: Tj").base();
        let id = w.id_max.base();
        let vto = w.th_max_cold.base();
        let r25 = w.point.ohms.base();
        let vov = w.vgs_min.base() - vto;
        let kp = fit_kp(id, id * r25, vov).unwrap_or_else(|| {
            panic!(
                "{}: the engine passes pinned-low, but ID,max x RDS(on)(25 C) = {} V is beyond \
                 the overdrive {vov} V of the worst-case threshold (no ohmic channel can do that)",
                s.name,
                id * r25
            )
        });
        let netlist = format!(
            "* pinlow worst-case on-state of `{name}`\n\
             .options TEMP={T_REF_C} TNOM={T_REF_C}\n\
             {gate}\
             ILOAD 0 d DC {id:e}\n\
             * RDS(on)(Tj) = RDS(on)(25 C) (1 + a (Tj - 25)): the temperature term in series\n\
             BHOT d x V = i(vsense) * {r25:e} * {a:e} * (v(tj) - {T_REF_C})\n\
             VSENSE x ch DC 0\n\
             M1 ch g 0 0 NWC W=1u L=1u\n\
             {model}\
             * thermal network: node voltage = junction temperature in C\n\
             BHEAT 0 tj I = v(d) * i(vsense)\n\
             RTH tj amb {rth:e}\n\
             VAMB amb 0 DC {ta:e}\n\
             .control\n\
             op\n\
             print v(d) v(g) v(tj)\n\
             .endc\n\
             .end\n",
            name = s.name,
            gate = gate_lines(s, w),
            a = p.rds_tempco,
            model = model_line(vto, kp),
            rth = p.info.r_th_ja.base(),
            ta = s.conditions.ambient_max.base(),
        );
        let v = ngspice::run(&netlist, &["v(d)", "v(g)", "v(tj)"]);
        let (vd, vg, tj_spice) = (v["v(d)"], v["v(g)"], v["v(tj)"]);
        let diff = (vd - von) / von;
        worst_diff = worst_diff.max(diff.abs());
        eprintln!(
            "{:<46} {:>8.4} {:>9.5} {:>9.5} {:>7.3} {:>8.2} {:>8.2} {:>8.3}",
            s.name,
            w.vgs_min.base(),
            von,
            vd,
            100.0 * diff,
            tj,
            tj_spice,
            vd / (vg - vto)
        );
        // The gate divider: ngspice's node voltage against the engine's VGS,min [ngspice, the
        // circuit's own solution; RELTOL 1e-3 by default].
        assert!(
            ((vg - w.vgs_min.base()) / w.vgs_min.base()).abs() <= 1e-3,
            "{}: VGS engine {} V, ngspice {vg} V",
            s.name,
            w.vgs_min.base()
        );
        // The on-voltage within 3 % of Von,max [ngspice; the issue's tolerance].
        assert!(
            diff.abs() <= ON_VOLTAGE_TOLERANCE,
            "{}: Von engine {von} V, ngspice {vd} V ({:.2} %)",
            s.name,
            100.0 * diff
        );
        // The junction within 1 K [ngspice solves the thermal node to RELTOL 1e-3: 0.2 K at
        // 200 C].
        assert!(
            (tj_spice - tj).abs() <= 1.0,
            "{}: Tj engine {tj} C, ngspice {tj_spice} C",
            s.name
        );
        // A pinned switch is in the triode region of the worst-case channel, hot [text:
        // Shichman-Hodges region boundary VDS < VGS - VTO].
        assert!(
            vd < vg - vto,
            "{}: pinned-low passes, but the hot on-voltage {vd} V is beyond the overdrive {} V",
            s.name,
            vg - vto
        );
    }
    eprintln!(
        "{} stages, largest on-voltage disagreement {:.3} %",
        cases.len(),
        100.0 * worst_diff
    );
    assert!(cases.len() >= 100, "only {} stages", cases.len());
    for (id, _) in PARTS {
        assert!(
            cases.iter().any(|(s, _)| s.part_id() == *id),
            "no passing stage of {id}"
        );
    }
    assert!(cases.iter().any(|(_, a)| worst(a).rgs.is_some()));
    assert!(cases.iter().any(|(_, a)| worst(a).rgs.is_none()));
    // Self-heating must matter somewhere, or the junction check would be idle: a stage whose
    // junction sits 30 K above the ambient.
    assert!(cases.iter().any(|(s, a)| {
        worst(a).junction_max.expect("settled").base() - s.conditions.ambient_max.base() > 30.0
    }));
}

/// The level-1 KP of the part's RDS(on) point `point` at the corner (test 2 of the header):
/// overdrive VGS_point - VGS(th),max(25 C), current the point's test current or `id`,
/// resistance `r`. `None` when the point lies beyond the triode region of that threshold.
fn point_kp(
    p: &NmosPart,
    point: &pinlow::drive::nmos::part::RdsOnPoint,
    id: f64,
    r: f64,
) -> Option<f64> {
    let vov = point.vgs.base() - p.vgs_th_max.base();
    let i_fit = point.id.map(|i| i.base()).unwrap_or(id);
    fit_kp(i_fit, i_fit * r, vov)
}

#[test]
fn spec_point_model_bounds_the_on_voltage() {
    if skip() {
        return;
    }
    let stages = generated_stages();
    // The passes, then the stages that reach the lowest point at VGS,min but not at VGS,eff
    // (the ones a literal VGS,min reading of stage-model 8 would pass; the engine reads the
    // points at VGS,eff and does not), with the junction settled.
    let gap: Vec<&(Stage, Analysis)> = stages
        .iter()
        .filter(|(_, a)| {
            let w = worst(a);
            w.lowest_vgs <= w.vgs_min
                && !w.point_qualifies
                && matches!(w.junction, Junction::Settled { .. })
        })
        .collect();
    let cases: Vec<&(Stage, Analysis)> = passing(&stages).into_iter().chain(gap).collect();
    eprintln!(
        "{:<46} {:>6} {:>8} {:>8} {:>10} {:>10} {:>9}",
        "stage", "point", "VGS,min", "VGS,eff", "Von eng", "VDS spice", "VDS/Von"
    );
    let (mut bounded, mut flagged, mut exceeded, mut saturated, mut no_fit) = (0, 0, 0, 0, 0);
    let mut largest_bounded: f64 = 0.0;
    for (s, a) in &cases {
        let w = worst(a);
        let p = part(s);
        let von = w.von_max.expect("settled: Von,max").base();
        let id = w.id_max.base();
        let rds = w.rds_max.expect("settled: RDS(on),max").base();
        let Some(kp) = point_kp(p, &w.point, id, rds) else {
            // The datasheet point itself lies at or past the saturation edge of a channel at
            // the maximum threshold (BSS123: 170 mA x 10 ohm hot against 4.5 - 2.8 V).
            no_fit += 1;
            continue;
        };
        let (vd, vg) = drain_op(
            &format!(
                "the RDS(on) point of `{}` driven by its gate network",
                s.name
            ),
            s,
            w,
            &format!("ILOAD 0 d DC {id:e}\n"),
            w.th_max_cold.base(),
            kp,
        );
        let ratio = vd / von;
        eprintln!(
            "{:<46} {:>6} {:>8.4} {:>8.4} {:>10.5} {:>10.4e} {:>9.4}",
            s.name,
            format!(
                "{}{}",
                w.point.vgs.base(),
                if w.point_qualifies { "" } else { "*" }
            ),
            w.vgs_min.base(),
            w.vgs_eff.base(),
            von,
            vd,
            ratio
        );
        let (status, sentence) = pinned_low(a);
        if w.point_qualifies {
            assert_eq!(status, Status::Pass, "{}: {sentence}", s.name);
            // The figure holds at the drive: the square-law channel stays within Von,max
            // [ngspice; text: the level-1 chord resistance falls with the overdrive].
            bounded += 1;
            largest_bounded = largest_bounded.max(ratio);
            assert!(
                ratio <= 1.0 + ON_VOLTAGE_TOLERANCE,
                "{}: the {} V point qualifies at VGS,eff {} V, yet the channel fitted to it drops \
                 {vd} V against Von,max {von} V",
                s.name,
                w.point.vgs.base(),
                w.vgs_eff.base()
            );
        } else {
            // No point at or below VGS,eff: the figure is not guaranteed at this drive, and the
            // engine does not pass the stage (at most marginal, by the 1.5 x threshold rule).
            flagged += 1;
            assert_gap_is_marginal(s, status, &sentence);
            if ratio > 1.0 + ON_VOLTAGE_TOLERANCE {
                exceeded += 1;
            }
            if region(vg, vd, w.th_max_cold.base()) != Region::Ohmic {
                saturated += 1;
            }
        }
    }
    eprintln!(
        "{bounded} stages with the point at or below VGS,eff (largest VDS/Von,max {largest_bounded:.4}); \
         {flagged} stages reaching the lowest point at VGS,min but not at VGS,eff (not passed), \
         {exceeded} of them above Von,max + 3 % in the simulation, {saturated} saturated; \
         {no_fit} left out (point outside the triode region)"
    );
    assert!(
        bounded >= 60,
        "only {bounded} stages with a qualifying point"
    );
    assert!(
        flagged >= 10,
        "only {flagged} stages with a point above VGS,eff"
    );
    // Most points must be fittable or the bound above checks little (BSS123's 4.5 V point and
    // hot, heavy corners of the stages between the two readings cannot be).
    assert!(
        no_fit * 5 <= cases.len(),
        "{no_fit} of {} points could not be fitted",
        cases.len()
    );
}

/// The region of a level-1 channel at an operating point [text: Shichman-Hodges].
#[derive(Clone, Copy, Debug, PartialEq)]
enum Region {
    Cutoff,
    Ohmic,
    Saturation,
}

fn region(vg: f64, vd: f64, vto: f64) -> Region {
    if vg <= vto {
        Region::Cutoff
    } else if vd >= vg - vto {
        Region::Saturation
    } else {
        Region::Ohmic
    }
}

#[test]
fn below_one_and_a_half_thresholds_the_switch_is_not_pinned() {
    if skip() {
        return;
    }
    let stages = generated_stages();
    let mut rows = Vec::new();
    let mut no_fit = 0;
    for (s, a) in &stages {
        let w = worst(a);
        let vto = w.th_max_cold.base();
        if w.vgs_min.base() >= THRESHOLD_MARGIN * vto {
            continue;
        }
        let p = part(s);
        let lowest = p.rds_on[0];
        let id = w.id_max.base();
        // RDS(on) hot at the junction the stage would settle at if it were ohmic at this point
        // (the engine's closed form; the fallback at Tj,max under runaway).
        let r = match p.junction(&s.conditions, w.id_max, lowest.ohms) {
            Junction::Settled { rds, .. } => rds.base(),
            Junction::Runaway => p.rds_at(lowest.ohms, p.info.tj_max).base(),
        };
        let Some(kp) = point_kp(p, &lowest, id, r) else {
            eprintln!("no triode fit of the lowest point: {}", s.name);
            no_fit += 1;
            continue;
        };
        let vcc = s.conditions.supply_max().base();
        let (vd, vg) = drain_op(
            &format!("`{}` below 1.5 x VGS(th),max cold", s.name),
            s,
            w,
            &format!("VCC vcc 0 DC {vcc:e}\nRL vcc d {:e}\n", vcc / id),
            vto,
            kp,
        );
        let i_fit = lowest.id.map(|i| i.base()).unwrap_or(id);
        let i_sim = (vcc - vd) * id / vcc;
        rows.push((s, a, region(vg, vd, vto), vd, i_sim, i_fit, r));
    }

    eprintln!(
        "{:<46} {:>9} {:>8} {:>8} {:>8} {:>9} {:>8} {:>10}",
        "stage", "verdict", "VGS,min", "1.5 VTO", "ID/Ifit", "VDS", "ID/IDmax", "region"
    );
    for (s, a, reg, vd, i_sim, i_fit, _) in &rows {
        let w = worst(a);
        eprintln!(
            "{:<46} {:>9} {:>8.4} {:>8.4} {:>8.3} {:>9.4} {:>8.3} {:>10}",
            s.name,
            format!("{:?}", pinned_low(a).0),
            w.vgs_min.base(),
            THRESHOLD_MARGIN * w.th_max_cold.base(),
            w.id_max.base() / i_fit,
            vd,
            i_sim / w.id_max.base(),
            format!("{reg:?}")
        );
    }

    let (mut fail, mut out, mut heavy, mut light, mut pass_ok, mut pass_flagged, mut pass_sat) =
        (0, 0, 0, 0, 0, 0, 0);
    for (s, a, reg, vd, i_sim, i_fit, r) in &rows {
        let w = worst(a);
        let (status, sentence) = pinned_low(a);
        let below_lowest = w.vgs_min < w.lowest_vgs;
        if below_lowest {
            // Stage-model 8: below the lowest specified gate voltage and below 1.5 x the cold
            // threshold, pinned-low fails.
            assert_eq!(status, Status::Fail, "{}: {sentence}", s.name);
            fail += 1;
            if *reg != Region::Ohmic {
                out += 1;
            }
            if w.id_max.base() > *i_fit {
                // A load beyond the current the datasheet states its on-state at: the channel
                // cannot carry it ohmically [ngspice, level-1 region boundary].
                heavy += 1;
                assert_ne!(
                    *reg,
                    Region::Ohmic,
                    "{}: pinned-low fails, but the channel stays ohmic at {vd} V",
                    s.name
                );
            } else if *reg == Region::Ohmic {
                // A lighter load may still find the channel ohmic: then its drop is above the
                // figure's, the drive does not reach the on-state the datasheet promises
                // [ngspice; text: the chord resistance rises as the overdrive falls].
                light += 1;
                assert!(
                    *vd > i_sim * r,
                    "{}: pinned-low fails, but VDS {vd} V is within ID x RDS(on) {} V",
                    s.name,
                    i_sim * r
                );
            }
        } else if !w.point_qualifies {
            // Reaches the lowest point at VGS,min but not at VGS,eff (the drive less the cold
            // threshold rise): the figure is not guaranteed, and the engine does not pass it.
            pass_flagged += 1;
            assert_gap_is_marginal(s, status, &sentence);
            if *reg != Region::Ohmic {
                pass_sat += 1;
            }
        } else if status == Status::Pass {
            // Below 1.5 x the cold threshold but with a point at or below VGS,eff: the engine
            // passes on the datasheet figure, and the channel is ohmic [ngspice].
            pass_ok += 1;
            assert_eq!(*reg, Region::Ohmic, "{}: VDS {vd} V", s.name);
        }
    }
    eprintln!(
        "{} stages below 1.5 x VGS(th),max cold simulated, {no_fit} left out (lowest point outside \
         the triode region): \
         {fail} fail pinned-low, {out} of them out of the ohmic region in ngspice; {heavy} with \
         the load above the point's test current, all out; {light} lighter loads still ohmic with \
         a drop above the figure's. {pass_flagged} stages reach the lowest point at VGS,min but not \
         at VGS,eff (marginal, flagged), {pass_sat} of these out of the ohmic region in ngspice. \
         Passes: {pass_ok}, with the point at or below VGS,eff (ohmic)",
        rows.len()
    );
    assert!(fail >= 100, "only {fail} failing stages");
    assert!(
        heavy >= 20,
        "only {heavy} failing stages above the test current"
    );
    assert!(
        out * 10 >= fail * 9,
        "{out} of {fail} out of the ohmic region"
    );
    assert!(
        pass_flagged >= 5,
        "only {pass_flagged} stages between the two readings"
    );
}
