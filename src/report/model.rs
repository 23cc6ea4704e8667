//! The report value: plain numbers in base SI units with the unit in each key (files.md). Built
//! once from the engine's typed results; every renderer reads it.

use serde::Serialize;

use crate::analysis::fixes::Fix;
use crate::analysis::yield_mc::YieldResult;
use crate::analysis::{Finding, RatingSource, Role, StageAnalysis, Status};
use crate::quantity::{format_rkm, Base};
use crate::stage::Stage;

/// Version of the stage model the figures follow.
pub const MODEL_VERSION: u32 = 1;

/// The caution every report carries.
pub const GENERAL_CAUTION: &str = "pinlow checks the driver stage against its model only and does not replace a design review; follow local codes and licensed practice, above all where anything touches mains";

/// A whole report held in memory: one board (or one stage from flags). Renderers draw it through
/// [`super::stream`], which adds the verdict line, the assumptions and the cautions.
#[derive(Clone, Debug)]
pub struct Report {
    /// Worst stage verdict.
    pub verdict: Status,
    /// Every stage, in input order.
    pub stages: Vec<StageReport>,
    /// The board's name, when given.
    pub board: Option<String>,
}

/// One stage's results.
#[derive(Clone, Debug, Serialize)]
pub struct StageReport {
    /// Position in the board, from 1.
    pub index: usize,
    /// Name.
    pub name: String,
    /// Worst check.
    pub verdict: Status,
    /// Part id.
    pub part: String,
    /// `current`, `relay`, `led` or `strip`.
    pub load_kind: &'static str,
    /// RB.
    pub base_resistor_ohms: f64,
    /// RB was sized.
    pub base_resistor_sized: bool,
    /// RBE, if any.
    pub pull_down_ohms: Option<f64>,
    /// RBE was sized.
    pub pull_down_sized: bool,
    /// RL, for LED loads that have one.
    pub led_resistor_ohms: Option<f64>,
    /// RL was sized.
    pub led_resistor_sized: bool,
    /// The conditions the stage was judged under.
    pub conditions: Conditions,
    /// Each resistor with its power and rating.
    pub resistors: Vec<ResistorReport>,
    /// What the clamp of an inductive load needs, and what is fitted.
    pub clamp: Option<ClampReport>,
    /// Worst-case figures.
    pub worst_case: WorstCaseReport,
    /// One entry per check.
    pub checks: Vec<Finding>,
    /// Defaults taken.
    pub assumptions: Vec<String>,
    /// Cautions that apply.
    pub cautions: Vec<String>,
    /// Remedies for every check that is not a pass, each re-checked.
    pub fixes: Vec<Fix>,
    /// The SVG drawn for this stage (`--plots DIR`), when one was.
    pub plot_svg: Option<String>,
    /// Monte Carlo yield (`--yield N`), when asked for.
    #[serde(rename = "yield", skip_serializing_if = "Option::is_none")]
    pub yield_mc: Option<YieldResult>,
}

/// The inputs that shape the corners.
#[derive(Clone, Debug, Serialize)]
pub struct Conditions {
    /// Nominal supply.
    pub supply_v: f64,
    /// Supply tolerance.
    pub supply_tolerance: f64,
    /// Nominal logic high.
    pub logic_high_v: f64,
    /// Guaranteed logic high.
    pub logic_high_min_v: f64,
    /// Pin limit.
    pub pin_limit_a: f64,
    /// Ambient [min, max].
    pub ambient_c: [f64; 2],
    /// Wanted overdrive.
    pub overdrive: f64,
    /// Resistor tolerance.
    pub resistor_tolerance: f64,
    /// Series used for sizing.
    pub series: String,
}

/// A resistor of the stage.
#[derive(Clone, Debug, Serialize)]
pub struct ResistorReport {
    /// `base`, `pull-down` or `led`.
    pub role: Role,
    /// Value.
    pub ohms: f64,
    /// IEC 60062 RKM code.
    pub code: String,
    /// Sized by the engine.
    pub sized: bool,
    /// Worst dissipation.
    pub worst_power_w: f64,
    /// The rating it is held to.
    pub rating_w: f64,
    /// `given`, `assumed` or `proposed`.
    pub rating_source: RatingSource,
    /// Smallest standard rating at least twice the worst power (null above 5 W).
    pub recommended_rating_w: Option<f64>,
}

/// The clamp: what is fitted and what it needs.
#[derive(Clone, Debug, Serialize)]
pub struct ClampReport {
    /// `none`, `diode` or `zener`.
    pub fitted: &'static str,
    /// Clamp voltage above the supply, when fitted.
    pub clamp_v: Option<f64>,
    /// Reverse rating needed.
    pub reverse_min_v: f64,
    /// Current rating needed.
    pub current_min_a: f64,
    /// Energy in the coil at IC,max.
    pub stored_energy_j: Option<f64>,
    /// L/R with the lowest coil resistance.
    pub decay_time_constant_s: Option<f64>,
}

/// Worst-case figures (stage-model 4).
#[derive(Clone, Debug, Serialize)]
pub struct WorstCaseReport {
    /// IC,max.
    pub collector_current_max_a: f64,
    /// IB,min at Ta,min.
    pub base_current_min_a: f64,
    /// hFE,min at IC,max and Ta,min.
    pub gain_min: f64,
    /// Worst-case overdrive (null when the load draws nothing).
    pub overdrive_min: Option<f64>,
    /// IC,max / IB,min (null when no base current flows).
    pub forced_beta_max: Option<f64>,
    /// Largest pin current.
    pub pin_current_max_a: f64,
    /// Largest transistor dissipation.
    pub power_max_w: f64,
    /// Highest junction temperature.
    pub junction_max_c: f64,
    /// Highest collector voltage (null: an inductive load with no clamp, unbounded).
    pub collector_peak_v: Option<f64>,
    /// Highest supply.
    pub supply_max_v: f64,
    /// Lowest supply.
    pub supply_min_v: f64,
    /// VBE(sat),max at the cold corner.
    pub vbe_sat_max_v: f64,
    /// VBE(sat),min at the hot corner.
    pub vbe_sat_min_v: f64,
    /// VCE(sat),max at IC,max.
    pub vce_sat_max_v: f64,
    /// Leakage voltage across the pull-down, hot.
    pub leakage_voltage_v: Option<f64>,
    /// Turn-on edge, hot.
    pub turn_on_edge_v: f64,
    /// Lowest LED current.
    pub led_current_min_a: Option<f64>,
    /// Highest LED current.
    pub led_current_max_a: Option<f64>,
}

/// Round to six significant digits so reports read cleanly; non-finite becomes `None`.
pub fn sig(x: f64) -> Option<f64> {
    if !x.is_finite() {
        return None;
    }
    if x == 0.0 {
        return Some(0.0);
    }
    let digits = 6 - 1 - x.abs().log10().floor() as i32;
    let scale = 10f64.powi(digits.clamp(-300, 300));
    let r = (x * scale).round() / scale;
    Some(if r.is_finite() { r } else { x })
}

fn num(x: f64) -> f64 {
    sig(x).unwrap_or(x)
}

impl StageReport {
    /// Build the report of one analysed stage.
    pub fn from_analysis(stage: &Stage, a: &StageAnalysis) -> StageReport {
        let wc = &a.worst;
        let load = &wc.load;
        let clamp = a.clamp.map(|c| ClampReport {
            fitted: stage.clamp.kind_name(),
            clamp_v: stage.clamp.voltage().map(|v| num(v.base())),
            reverse_min_v: num(c.reverse_min.base()),
            current_min_a: num(c.current_min.base()),
            stored_energy_j: c.stored_energy.map(|e| num(e.base())),
            decay_time_constant_s: c.decay_time_constant.map(|t| num(t.base())),
        });
        let checks = a
            .findings
            .iter()
            .map(|f| Finding {
                value: f.value.and_then(sig),
                limit: f.limit.and_then(sig),
                ..f.clone()
            })
            .collect();
        StageReport {
            index: 0,
            name: stage.name.clone(),
            verdict: a.verdict,
            part: stage.part.id.clone(),
            load_kind: stage.load.kind_name(),
            base_resistor_ohms: num(wc.resistors.rb.base()),
            base_resistor_sized: a.sized.base,
            pull_down_ohms: wc.resistors.rbe.map(|r| num(r.base())),
            pull_down_sized: a.sized.pull_down,
            led_resistor_ohms: wc.resistors.rl.map(|r| num(r.base())),
            led_resistor_sized: a.sized.led,
            conditions: Conditions {
                supply_v: num(stage.supply.base()),
                supply_tolerance: stage.supply_tolerance,
                logic_high_v: num(stage.logic_high.base()),
                logic_high_min_v: num(stage.logic_high_min.base()),
                pin_limit_a: num(stage.pin_limit.base()),
                ambient_c: [num(stage.ambient_min.base()), num(stage.ambient_max.base())],
                overdrive: stage.overdrive,
                resistor_tolerance: stage.resistor_tolerance,
                series: stage.series.to_string(),
            },
            resistors: a
                .resistors
                .iter()
                .map(|r| ResistorReport {
                    role: r.role,
                    ohms: num(r.value.base()),
                    code: format_rkm(r.value.base()),
                    sized: r.sized,
                    worst_power_w: num(r.worst_power.base()),
                    rating_w: num(r.rating.base()),
                    rating_source: r.rating_source,
                    recommended_rating_w: r.recommended_rating.map(|p| num(p.base())),
                })
                .collect(),
            clamp,
            worst_case: WorstCaseReport {
                collector_current_max_a: num(load.ic_max.base()),
                base_current_min_a: num(wc.base_current_min.base()),
                gain_min: num(load.gain_min),
                overdrive_min: sig(wc.overdrive_min),
                forced_beta_max: wc.forced_beta_max.and_then(sig),
                pin_current_max_a: num(wc.pin_current_max.base()),
                power_max_w: num(wc.power_max.base()),
                junction_max_c: num(wc.junction_max.base()),
                collector_peak_v: wc.collector_peak.map(|v| num(v.base())),
                supply_max_v: num(load.vcc_max.base()),
                supply_min_v: num(load.vcc_min.base()),
                vbe_sat_max_v: num(load.vbe_sat_max_cold.base()),
                vbe_sat_min_v: num(load.vbe_sat_min_hot.base()),
                vce_sat_max_v: num(load.vce_sat_max.base()),
                leakage_voltage_v: wc.leakage_voltage.map(|v| num(v.base())),
                turn_on_edge_v: num(wc.turn_on_edge_hot.base()),
                led_current_min_a: wc.led.map(|l| num(l.min.base())),
                led_current_max_a: wc.led.map(|l| num(l.max.base())),
            },
            checks,
            assumptions: a.assumptions(stage),
            cautions: a.cautions.clone(),
            fixes: Vec::new(),
            plot_svg: None,
            yield_mc: None,
        }
    }

    /// The first check that is not a pass, for summaries.
    pub fn first_problem(&self) -> Option<&Finding> {
        self.checks.iter().find(|f| f.status != Status::Pass)
    }
}

impl Report {
    /// Gather stage reports under one verdict.
    pub fn new(board: Option<String>, mut stages: Vec<StageReport>) -> Report {
        for (i, s) in stages.iter_mut().enumerate() {
            s.index = i + 1;
        }
        let verdict = stages
            .iter()
            .map(|s| s.verdict)
            .max()
            .unwrap_or(Status::Pass);
        Report {
            verdict,
            stages,
            board,
        }
    }

    /// The same report keeping only the stages that are not a pass (the verdict stays that of
    /// the whole board).
    pub fn only_problems(&self) -> Report {
        Report {
            stages: self
                .stages
                .iter()
                .filter(|s| s.verdict != Status::Pass)
                .cloned()
                .collect(),
            ..self.clone()
        }
    }
}
