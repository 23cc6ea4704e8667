//! Production yield by Monte Carlo (npn stages): the result types. The engine of the draws is being reworked for speed and merged back.

use serde::Serialize;

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

/// The yield of an analysed stage, or `None` when its drive kind has no yield model.
pub fn run(
    stage: &crate::stage::Stage,
    _analysis: &super::Analysis,
    _opts: &YieldOptions,
    _progress: &(dyn Fn(u64, u64) + Sync),
) -> Option<YieldResult> {
    let _ = stage;
    None
}
