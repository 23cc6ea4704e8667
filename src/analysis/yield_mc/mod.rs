//! Production yield by Monte Carlo: how many built boards pin the load low, drawn input by input
//! within the tolerances the worst-case engine takes the corners of.
//!
//! Each build draws every toleranced input independently ([`model::BuildModel::draw`] says how)
//! and is evaluated with the worst-case engine's formulas ([`model::BuildModel::evaluate`]); no
//! build can have a lower overdrive than the corner of stage-model 4 (the `model` module says
//! why and under which part-data conditions).
//!
//! Determinism: the builds are split into chunks of [`CHUNK_BUILDS`]; chunk `i` draws from its own
//! generator seeded from (seed, i), chunks run in parallel with rayon, and every tally is an
//! integer count, so the merged figures are the same whatever the number of threads and whatever
//! order the chunks finish in. A run steps the generators of several whole chunks together, one
//! a lane ([`rng::Streams`]); a lane draws exactly its chunk's stream, so a chunk's builds are
//! the same however it is drawn ([`kernel`] says how the loop is compiled).
//!
//! Percentiles come from fixed log-spaced histograms ([`histogram`]) rather than from stored
//! values: memory stays bounded (about 4 MB of histograms per run of chunks, two runs a worker
//! thread) for any number of builds, and each percentile is within 0.0122 % of the exact order
//! statistic. There is no upper limit on the number of builds.

pub mod fastexp;
pub mod histogram;
mod kernel;
pub mod model;
pub mod rng;

use std::sync::{Mutex, PoisonError};

use rayon::prelude::*;
use serde::Serialize;

use crate::analysis::Analysis;
use crate::conditions::Conditions;
use crate::drive::npn::{detail, NpnPart};
use crate::load::CurrentLaw;
use crate::quantity::{Base, Resistance};
use crate::stage::Stage;
use histogram::LogHistogram;
use kernel::{Kernel, Work};
use model::{Block, BuildModel, BLOCK};

/// Builds a chunk: the unit of seeding, of parallel work and of progress reports.
pub const CHUNK_BUILDS: u64 = 65_536;

/// Runs of chunks a worker thread gets, at most (each run keeps one tally of about 4 MB).
const RUNS_PER_THREAD: u64 = 2;

/// Chunks drawn side by side, one a lane of [`rng::Streams`].
const LANES: usize = 4;
const LANES_U64: u64 = LANES as u64;
const _: () = assert!(BLOCK % LANES == 0 && CHUNK_BUILDS % (BLOCK / LANES) as u64 == 0);

/// z for a two-sided 95 % interval: the 0.975 quantile of the standard normal distribution
/// [text: any statistics table, 1.959964].
pub const Z_95: f64 = 1.959_963_984_540_054;

/// A build counts as below the corner when its overdrive is under the corner's by more than this
/// fraction (rounding aside).
const BELOW_CORNER_SLACK: f64 = 1e-9;

/// 0 C in kelvins, for the junction histogram (kept in kelvins so that it is positive).
const ZERO_C_IN_K: f64 = crate::drive::npn::corner::ZERO_C_IN_K;

/// How many builds to draw, and from which seed.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub struct YieldOptions {
    /// Builds to draw.
    pub builds: u64,
    /// Seed of the random streams; the same seed gives the same figures.
    pub seed: u64,
}

/// Which end of a figure hurts.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Serialize)]
#[serde(rename_all = "lowercase")]
pub enum Tail {
    /// Low values hurt (overdrive, LED current): `p0_1` is the 0.1th percentile.
    Low,
    /// High values hurt (pin current, junction temperature): `p0_1` is the 99.9th percentile.
    High,
}

/// Percentiles taken from the end of the distribution that hurts: `p0_1` is the value that only
/// 0.1 % of builds are worse than, `p1` only 1 %, `p50` the median. For a [`Tail::Low`] figure
/// these are the 0.1th, 1st and 50th percentiles; for a [`Tail::High`] figure the 99.9th, 99th and
/// 50th. Nearest-rank definition, read from a histogram: within 0.0122 % of the exact value.
/// The histograms span overdrive 2^-20 .. 2^20 (about 1e-6 .. 1e6), currents 2^-30 .. 16 A and
/// junction temperatures 32 .. 4096 K: a rank that falls below that (including builds that
/// cannot turn on, overdrive 0, and LEDs with no headroom, current 0) reads 0 (-273.15 C for
/// the junction); above it
/// (including loads that draw nothing, overdrive infinite) it reads infinite (JSON `null`). NaN
/// (JSON `null`) when there are no builds.
#[derive(Clone, Copy, Debug, PartialEq, Serialize)]
pub struct Percentiles {
    /// Only 0.1 % of builds are worse.
    pub p0_1: f64,
    /// Only 1 % of builds are worse.
    pub p1: f64,
    /// The median.
    pub p50: f64,
    /// The end that hurts.
    pub worst_tail: Tail,
}

/// The yield of a stage over many drawn builds. Fractions run 0 .. 1; intervals are 95 % Wilson
/// score intervals `[low, high]`.
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct YieldResult {
    /// Builds drawn.
    pub builds: u64,
    /// Seed used.
    pub seed: u64,
    /// Fraction of builds with overdrive >= 1 (the transistor saturates).
    pub pinned_low_fraction: f64,
    /// 95 % interval of that fraction.
    pub pinned_low_interval: [f64; 2],
    /// Fraction of builds with overdrive >= the stage's wanted overdrive k.
    pub overdrive_met_fraction: f64,
    /// 95 % interval of that fraction.
    pub overdrive_met_interval: [f64; 2],
    /// Overdrive percentiles (low tail).
    pub overdrive_percentiles: Percentiles,
    /// Pin current percentiles, A (high tail).
    pub pin_current_percentiles_a: Percentiles,
    /// Junction temperature percentiles, C (high tail).
    pub junction_percentiles_c: Percentiles,
    /// LED current percentiles, A (low tail); LED loads with a series resistor only.
    pub led_current_percentiles_a: Option<Percentiles>,
    /// Builds whose overdrive fell below the worst-case corner's. 0 unless the part's curves break
    /// the conditions the corner rests on (see the `model` module); then the corner is not a true
    /// worst case for this part.
    pub below_corner_builds: u64,
}

/// What the draws need of an analysed NPN stage: its conditions and part, the resistors the
/// analysis settled on, the load's current law and the worst-case corner's figures.
#[derive(Clone, Copy, Debug)]
pub struct YieldStage<'a> {
    /// Supply, pin, ambient, tolerances and the wanted overdrive k.
    pub conditions: &'a Conditions,
    /// The transistor.
    pub part: &'a NpnPart,
    /// RB in use.
    pub rb: Resistance,
    /// RBE in use, if fitted.
    pub rbe: Option<Resistance>,
    /// How the load's current follows the drawn inputs.
    pub law: CurrentLaw,
    /// The most of VCC x IC the transistor takes out of saturation (stage-model 4, v2).
    pub linear_fraction: f64,
    /// IC,max of the corner, A.
    pub ic_max: f64,
    /// The corner's overdrive (`None`: it cannot turn on, or carries nothing).
    pub corner_overdrive: Option<f64>,
}

impl<'a> YieldStage<'a> {
    /// The yield inputs of an analysed stage; `None` unless its drive is an NPN transistor and
    /// its load has a current law.
    pub fn of(stage: &'a Stage, analysis: &'a Analysis) -> Option<YieldStage<'a>> {
        let part = stage.switch.yield_terms()?.downcast_ref::<NpnPart>()?;
        let worst = detail(&analysis.drive)?.worst;
        Some(YieldStage {
            conditions: &stage.conditions,
            part,
            rb: worst.rb,
            rbe: worst.rbe,
            law: stage.load.current_law(analysis.own_value())?,
            linear_fraction: analysis.corner.linear_fraction,
            ic_max: analysis.corner.current_max.base(),
            corner_overdrive: worst.overdrive,
        })
    }
}

/// The yield of an analysed stage, or `None` when its drive kind has no yield model (only the
/// NPN drive has one so far).
pub fn run(
    stage: &Stage,
    analysis: &Analysis,
    opts: &YieldOptions,
    progress: &(dyn Fn(u64, u64) + Sync),
) -> Option<YieldResult> {
    let y = YieldStage::of(stage, analysis)?;
    Some(run_yield_with_progress(&y, opts, progress))
}

/// Draw `opts.builds` builds of a stage with its final resistors and tally the yield.
pub fn run_yield(stage: &YieldStage<'_>, opts: &YieldOptions) -> YieldResult {
    run_yield_with_progress(stage, opts, &|_, _| {})
}

/// As [`run_yield`], calling `progress(done, total)` after each chunk of builds. Calls come from
/// the worker threads one at a time, with `done` rising.
pub fn run_yield_with_progress(
    stage: &YieldStage<'_>,
    opts: &YieldOptions,
    progress: &(dyn Fn(u64, u64) + Sync),
) -> YieldResult {
    run_on(Kernel::detect(), stage, opts, progress)
}

/// As [`run_yield_with_progress`], on a given kernel.
fn run_on(
    kernel: Kernel,
    stage: &YieldStage<'_>,
    opts: &YieldOptions,
    progress: &(dyn Fn(u64, u64) + Sync),
) -> YieldResult {
    let model = BuildModel::new(stage);
    let limits = Limits {
        target: stage.conditions.overdrive,
        below_corner: match stage.corner_overdrive {
            Some(corner) if corner > 0.0 => corner * (1.0 - BELOW_CORNER_SLACK),
            _ => f64::NEG_INFINITY,
        },
    };
    let total = opts.builds;
    let chunks = total.div_ceil(CHUNK_BUILDS);
    // Contiguous runs of lane groups (LANES chunks), a few per thread for balance; each run
    // keeps one tally (a few MB of histograms), so memory does not grow with the number of
    // builds.
    let groups = chunks.div_ceil(LANES_U64);
    let threads = u64::try_from(rayon::current_num_threads())
        .unwrap_or(1)
        .max(1);
    let runs = groups.min(RUNS_PER_THREAD * threads);
    let done = Mutex::new(0u64);
    let report = |len: u64| {
        let mut d = done.lock().unwrap_or_else(PoisonError::into_inner);
        *d += len;
        progress(*d, total);
    };
    let work = Work {
        model: &model,
        limits: &limits,
        seed: opts.seed,
        total,
        report: &report,
    };
    let tally = (0..runs)
        .into_par_iter()
        .map(|run| {
            let mut tally = Tally::new(&model);
            // Run `run` takes the groups [first, end): an even split of `groups` into `runs`.
            let first = run * groups / runs * LANES_U64;
            let end = ((run + 1) * groups / runs * LANES_U64).min(chunks);
            tally.run(kernel, &work, first..end);
            tally
        })
        .reduce_with(|mut a, b| {
            a.merge(&b);
            a
        })
        .unwrap_or_else(|| Tally::new(&model));
    tally.result(opts.seed)
}

/// The thresholds a build is counted against.
struct Limits {
    /// The stage's wanted overdrive k.
    target: f64,
    /// Overdrive under which a build is below the corner.
    below_corner: f64,
}

/// Counts over some chunks of builds.
struct Tally {
    builds: u64,
    pinned: u64,
    met: u64,
    below_corner: u64,
    overdrive: LogHistogram,
    pin_current: LogHistogram,
    junction_k: LogHistogram,
    led_current: Option<LogHistogram>,
}

impl Tally {
    fn new(model: &BuildModel) -> Tally {
        Tally {
            builds: 0,
            pinned: 0,
            met: 0,
            below_corner: 0,
            // Overdrive 2^-20 .. 2^20 (1e-6 .. 1e6); currents 2^-30 .. 2^4 (1 nA .. 16 A);
            // junction 2^5 .. 2^12 K (32 K .. 4096 K). Outside: the bins below and above.
            overdrive: LogHistogram::new(-20, 20),
            pin_current: LogHistogram::new(-30, 4),
            junction_k: LogHistogram::new(5, 12),
            led_current: model.has_led_current().then(|| LogHistogram::new(-30, 4)),
        }
    }

    /// Count the builds of an evaluated block, figure by figure.
    #[inline(always)]
    fn add_block(&mut self, block: &Block, limits: &Limits) {
        self.builds += block.overdrive().len() as u64;
        // The counts apart from the histograms: this loop has no memory traffic but its input.
        let (mut pinned, mut met, mut below) = (0u64, 0u64, 0u64);
        for &overdrive in block.overdrive() {
            pinned += u64::from(overdrive >= 1.0);
            met += u64::from(overdrive >= limits.target);
            below += u64::from(overdrive < limits.below_corner);
        }
        self.pinned += pinned;
        self.met += met;
        self.below_corner += below;
        self.overdrive.add_mapped(block.overdrive(), |x| x);
        self.pin_current.add_mapped(block.pin_current(), |x| x);
        self.junction_k
            .add_mapped(block.junction_c(), |t| t + ZERO_C_IN_K);
        if let Some(h) = self.led_current.as_mut() {
            h.add_mapped(block.led_current(), |x| x);
        }
    }

    fn merge(&mut self, other: &Tally) {
        self.builds += other.builds;
        self.pinned += other.pinned;
        self.met += other.met;
        self.below_corner += other.below_corner;
        self.overdrive.merge(&other.overdrive);
        self.pin_current.merge(&other.pin_current);
        self.junction_k.merge(&other.junction_k);
        if let (Some(a), Some(b)) = (self.led_current.as_mut(), other.led_current.as_ref()) {
            a.merge(b);
        }
    }

    fn result(&self, seed: u64) -> YieldResult {
        let n = self.builds;
        let fraction = |k: u64| if n == 0 { 0.0 } else { k as f64 / n as f64 };
        let interval = |k: u64| {
            let (lo, hi) = wilson_interval(k, n, Z_95);
            [lo, hi]
        };
        let junction = percentiles(&self.junction_k, n, Tail::High);
        YieldResult {
            builds: n,
            seed,
            pinned_low_fraction: fraction(self.pinned),
            pinned_low_interval: interval(self.pinned),
            overdrive_met_fraction: fraction(self.met),
            overdrive_met_interval: interval(self.met),
            overdrive_percentiles: percentiles(&self.overdrive, n, Tail::Low),
            pin_current_percentiles_a: percentiles(&self.pin_current, n, Tail::High),
            junction_percentiles_c: Percentiles {
                p0_1: junction.p0_1 - ZERO_C_IN_K,
                p1: junction.p1 - ZERO_C_IN_K,
                p50: junction.p50 - ZERO_C_IN_K,
                ..junction
            },
            led_current_percentiles_a: self
                .led_current
                .as_ref()
                .map(|h| percentiles(h, n, Tail::Low)),
            below_corner_builds: self.below_corner,
        }
    }
}

/// The 0.1 %, 1 % and 50 % points from the tail that hurts.
fn percentiles(h: &LogHistogram, n: u64, tail: Tail) -> Percentiles {
    let at = |per_mille: u64| h.value_at_rank(rank(n, per_mille, tail));
    Percentiles {
        p0_1: at(1),
        p1: at(10),
        p50: at(500),
        worst_tail: tail,
    }
}

/// Nearest rank (1-based, from the smallest) of the point that `per_mille` / 1000 of `n` builds
/// are worse than: ceil(n q) from the bottom for a low tail, from the top for a high tail. Integer
/// arithmetic, so 0.1 % of 10 million is exactly rank 10 000. 0 when `n` is 0.
fn rank(n: u64, per_mille: u64, tail: Tail) -> u64 {
    if n == 0 {
        return 0;
    }
    let from_bottom = (u128::from(n) * u128::from(per_mille))
        .div_ceil(1000)
        .max(1);
    // from_bottom <= n, so it fits a u64 again.
    let from_bottom = u64::try_from(from_bottom).unwrap_or(n).min(n);
    match tail {
        Tail::Low => from_bottom,
        Tail::High => n + 1 - from_bottom,
    }
}

/// The Wilson score interval of a binomial proportion: `successes` out of `n`, at `z` standard
/// normal deviates (1.96 for 95 %) [text: E. B. Wilson, "Probable inference, the law of
/// succession, and statistical inference", JASA 22 (1927)]:
/// (p + z^2/2n +- z sqrt(p(1-p)/n + z^2/4n^2)) / (1 + z^2/n), with p = successes / n.
/// Clamped to [0, 1]; (0, 1) when `n` is 0; `successes` above `n` is taken as `n`.
pub fn wilson_interval(successes: u64, n: u64, z: f64) -> (f64, f64) {
    if n == 0 {
        return (0.0, 1.0);
    }
    let nf = n as f64;
    let p = successes.min(n) as f64 / nf;
    let z2 = z * z;
    let denominator = 1.0 + z2 / nf;
    let centre = (p + z2 / (2.0 * nf)) / denominator;
    let half = z / denominator * (p * (1.0 - p) / nf + z2 / (4.0 * nf * nf)).sqrt();
    (
        (centre - half).clamp(0.0, 1.0),
        (centre + half).clamp(0.0, 1.0),
    )
}

#[cfg(test)]
mod tests;
