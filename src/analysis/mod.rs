//! The worst-case engine: a [`Stage`] in, a [`StageAnalysis`] out (stage-model version 1).
//!
//! Order of work: size the LED resistor (if asked), fix the load corner, size the base resistor
//! and pull-down (if asked), evaluate every worst-case figure, run the checks, list assumptions
//! and cautions.

pub mod checks;
pub mod corners;
pub mod finding;
pub mod fixes;
pub mod resistors;
pub mod sizing;
pub mod temperature;
pub mod yield_mc;

pub use corners::{LedCurrents, LoadCorner, Resistors, WorstCase};
pub use finding::{CheckId, Finding, Status};
pub use resistors::{RatingSource, ResistorUse, Role, SizedFlags};
pub use sizing::ClampProposal;

use crate::load::Load;
use crate::parts::PartSource;
use crate::quantity::{format_engineering as fe, Base};
use crate::stage::{PullDown, Stage, DEFAULT_RESISTOR_RATING_W};
use checks::{run_checks, CheckInput};
use sizing::{
    gain_needed_within_pin_limit, propose_clamp, pull_down_for, size_base_resistor,
    size_led_resistor, LedSizing,
};

/// Supply above which the touch-safe extra-low-voltage class ends, V DC
/// [memory: IEC 62368-1 ES1; IEC 61140 sets the ELV band].
pub const ELV_LIMIT_V: f64 = 60.0;

/// Everything the engine found about one stage.
#[derive(Clone, Debug)]
pub struct StageAnalysis {
    /// Worst-case figures with the resistors in use.
    pub worst: WorstCase,
    /// The resistors, their powers and ratings.
    pub resistors: Vec<ResistorUse>,
    /// Which resistors were sized.
    pub sized: SizedFlags,
    /// What the clamp of an inductive load needs.
    pub clamp: Option<ClampProposal>,
    /// The minimum gain at 25 C a part needs to reach the overdrive within the pin limit.
    pub gain_needed_within_pin_limit: Option<f64>,
    /// One finding per check.
    pub findings: Vec<Finding>,
    /// The worst finding.
    pub verdict: Status,
    /// Defaults the engine took beyond those the stage lists (`Stage::assumptions`).
    pub extra_assumptions: Vec<String>,
    /// Cautions that apply.
    pub cautions: Vec<String>,
}

/// Size what the stage leaves open and audit the result.
pub fn analyse(stage: &Stage) -> StageAnalysis {
    let mut sized = SizedFlags::default();
    let mut led_no_headroom = None;
    let rl = match &stage.load {
        Load::Led(led) => match led.resistor {
            Some(r) => Some(r),
            None => match size_led_resistor(stage, led) {
                LedSizing::Sized(r) => {
                    sized.led = true;
                    Some(r)
                }
                LedSizing::NoHeadroom(ideal) => {
                    led_no_headroom = Some(ideal);
                    None
                }
            },
        },
        _ => None,
    };
    let corner = LoadCorner::of(stage, rl);
    let (rb, rbe, overdrive_reached) = match stage.base_resistor {
        Some(rb) => (rb, pull_down_for(stage, rb), true),
        None => {
            let s = size_base_resistor(stage, &corner);
            sized.base = true;
            (s.rb, s.rbe, s.reached)
        }
    };
    sized.pull_down = matches!(stage.pull_down, PullDown::Sized) && rbe.is_some();
    let worst = WorstCase::with_corner(stage, Resistors { rb, rbe, rl }, corner);
    let resistors = resistors::resistor_uses(stage, &worst, sized);
    let gain_needed = gain_needed_within_pin_limit(stage, &corner);
    let findings = run_checks(&CheckInput {
        stage,
        wc: &worst,
        resistors: &resistors,
        overdrive_reached,
        led_no_headroom,
        gain_needed_within_pin_limit: gain_needed,
    });
    let verdict = findings
        .iter()
        .map(|f| f.status)
        .max()
        .unwrap_or(Status::Pass);
    let mut extra_assumptions = Vec::new();
    if stage.resistor_rating.is_none()
        && resistors
            .iter()
            .any(|r| r.rating_source == RatingSource::Assumed)
    {
        extra_assumptions.push(format!(
            "fitted resistors rated {} assumed [practice]",
            fe(DEFAULT_RESISTOR_RATING_W, "W")
        ));
    }
    StageAnalysis {
        clamp: propose_clamp(stage, &corner),
        cautions: cautions(stage, &worst),
        worst,
        resistors,
        sized,
        gain_needed_within_pin_limit: gain_needed,
        findings,
        verdict,
        extra_assumptions,
    }
}

impl StageAnalysis {
    /// Every default taken: the stage's own list, then the engine's.
    pub fn assumptions(&self, stage: &Stage) -> Vec<String> {
        stage
            .assumptions
            .iter()
            .chain(&self.extra_assumptions)
            .cloned()
            .collect()
    }
}

/// The cautions of stage-model 7 that apply to this stage.
fn cautions(stage: &Stage, wc: &WorstCase) -> Vec<String> {
    let mut out = Vec::new();
    let vcc_max = wc.load.vcc_max.base();
    if vcc_max > ELV_LIMIT_V {
        out.push(format!(
            "the highest supply {} is above 60 V DC, beyond the touch-safe extra-low-voltage class (60 V DC is the common limit, e.g. IEC 62368-1 ES1; IEC 61140 sets the ELV band): defer to local codes and licensed practice",
            fe(vcc_max, "V")
        ));
    }
    if stage.load.is_inductive() {
        out.push("only the coil side is checked: contacts that switch mains need rated parts, creepage and clearance, and licensed practice under local codes".to_string());
    }
    if let PartSource::Builtin(_) = stage.part.source {
        out.push(format!(
            "part {} is shipped with pinlow ({}): verify every figure against the supplier's datasheet before building",
            stage.part.id, stage.part.provenance
        ));
    }
    out
}

/// The full report of one stage (with its fixes), numbered `index` in its board.
pub fn stage_report(index: usize, stage: &Stage) -> crate::report::StageReport {
    stage_report_with_yield(index, stage, None, &|_, _| {})
}

/// As [`stage_report`], with a Monte Carlo yield when `opts` asks for one (`progress` hears
/// `(done, total)` builds).
pub fn stage_report_with_yield(
    index: usize,
    stage: &Stage,
    opts: Option<&yield_mc::YieldOptions>,
    progress: &(dyn Fn(u64, u64) + Sync),
) -> crate::report::StageReport {
    let a = analyse(stage);
    let mut r = crate::report::StageReport::from_analysis(stage, &a);
    r.index = index;
    r.fixes = fixes::propose_fixes(stage, &a);
    r.yield_mc =
        opts.map(|o| yield_mc::run_yield_with_progress(stage, a.worst.resistors, o, progress));
    r
}

/// Analyse every stage and gather the report in memory.
pub fn audit(board: Option<String>, stages: &[Stage]) -> crate::report::Report {
    let reports = stages
        .iter()
        .enumerate()
        .map(|(i, s)| stage_report(i + 1, s))
        .collect();
    crate::report::Report::new(board, reports)
}

#[cfg(test)]
mod tests;
