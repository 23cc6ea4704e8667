//! One build of a stage: the inputs drawn for it and the figures they give.
//!
//! The formulas are those of the worst-case engine (stage-model 4), evaluated at drawn values
//! instead of at the corner. Every input is drawn inside the range the corner takes its end of,
//! and the overdrive is monotone in every input, so no build can have a lower overdrive than the
//! corner (up to rounding). Input by input, with the corner's end in brackets:
//!
//! - IC = VCC / Rc(Ta) (relay coil, motor winding), (VCC - sum Vf) / RL (LED),
//!   I_rated x max(1, 1 + (VCC - Vrated) / (0.25 Vrated)) (strip), I (current, and LEDs without a
//!   resistor at their target); VCE(sat) taken as 0 as in the corner. IC rises with VCC and falls
//!   with Rc, RL, sum Vf and Ta (copper warms), so IC <= IC,max [VCC,max; Rc-, RL-, n Vf,min,
//!   Ta,min].
//! - IB = (VOH - VBE) / RB - VBE / RBE, with the same drawn VBE in both terms. IB rises with VOH and
//!   falls with VBE; while VOH - VBE > 0 it falls with RB, and the pull-down term falls with RBE.
//!   So IB >= IB,min [VOH,min; VBE(sat),max at Ta,min; RB+; RBE-]. A build whose IB <= 0 cannot
//!   turn on: its overdrive is 0 (never below a corner that is itself <= 0).
//! - VBE = VBE(sat) between the part's min and max at the build's IC, at 25 C, moved by -2 mV/K
//!   (-4 mV/K for a Darlington pair) to the build's Ta. It is <= VBE(sat),max(IC,max) at Ta,min when the part's VBE(sat),max does not
//!   fall as IC rises (true of every shipped part).
//! - hFE = gain between the part's min and max at the build's IC (log-uniform), times the
//!   Gummel-Poon factor at Ta. The factor rises with Ta (XTB >= 0, enforced by the parts
//!   validator), and hFE,min(IC) / IC falls as IC rises when the minimum-gain curve rises slower
//!   than IC itself (log-log slope < 1, true of every shipped part; flat below the first point and
//!   1/IC above the last by stage-model 3). So hFE x IB / IC >= hFE,wc x IB,min / IC,max.
//!
//! Where a user's part breaks one of these two conditions on its curves, a build can fall below
//! the corner: [`super::YieldResult::below_corner_builds`] counts such builds.
//!
//! The pin current and the junction temperature are not bounded by the corner in the same way:
//! the corner reads VBE(sat),min at IC,max, while a build reads VBE(sat) at its own (lower) IC,
//! where most parts give a lower minimum, so a build can draw slightly more pin current than the
//! corner says (a few millivolts of VBE: well under 1 % of the pin current). The junction takes
//! the saturated figure VCE(sat),max x IC in a build that saturates and the linear region's
//! share of VCC x IC in one that does not, as the corner does (stage-model 4, v2).
//!
//! Speed: builds go through in blocks of [`BLOCK`], one array a quantity ([`Block`]), step by
//! step; what depends on IC alone comes from a table sampled from the exact curves, and the
//! exponential of the gain from [`FastExp`]. [`BuildModel::new`] says how close the tables are;
//! [`BuildModel::exact`] skips them.
// Indexing reviewed by hand for the no-panic rule (src/lib.rs): every index here runs over a block's fixed-size arrays ([f64; BLOCK]) inside `0..BLOCK`, or over the two-point spans of tables this module builds from the part and checks for length first; no index comes from a user value.
#![allow(clippy::indexing_slicing)]

mod block;
mod inputs;

pub use block::{Block, BLOCK};
use inputs::*;
use rand_xoshiro::rand_core::RngCore;

use super::fastexp::FastExp;
use super::rng::Lanes;
use super::YieldStage;
use crate::drive::npn::corner::{T_REF_C, ZERO_C_IN_K};
use crate::load::strip::RESISTOR_SHARE as STRIP_RESISTOR_SHARE;
use crate::load::{CurrentLaw, COPPER_ALPHA_PER_K, COPPER_REF_C};
use crate::quantity::Base;

/// Gain spread assumed when a part gives no maximum gain: the maximum is this many times the
/// minimum [practice: the rule set for the yield model; a gain group of a general-purpose part
/// spans about 3:1, from memory].
pub const GAIN_MAX_OVER_MIN_WHEN_UNKNOWN: f64 = 3.0;

/// The inputs of one build. Resistances in ohms, voltages in volts, temperatures in C.
#[derive(Clone, Copy, Debug, Default, PartialEq)]
pub struct Draw {
    /// Supply VCC.
    pub supply: f64,
    /// The pin's high level VOH.
    pub logic_high: f64,
    /// Ambient Ta.
    pub ambient: f64,
    /// Base resistor RB.
    pub rb: f64,
    /// Pull-down RBE; infinite when none is fitted.
    pub rbe: f64,
    /// LED series resistor RL (LED loads with a resistor; unused otherwise).
    pub rl: f64,
    /// Relay coil resistance at 20 C (relay loads; unused otherwise).
    pub coil_20c: f64,
    /// Sum of the LEDs' forward voltages (LED loads; unused otherwise).
    pub led_drop: f64,
    /// Where VBE(sat) sits between the part's minimum (0) and maximum (1) at the build's IC.
    pub vbe_position: f64,
    /// Where the gain sits between the part's minimum (0) and maximum (1) at the build's IC, on a
    /// log scale.
    pub gain_position: f64,
}

/// What one build gives.
#[derive(Clone, Copy, Debug, Default, PartialEq)]
pub struct Outcome {
    /// Collector current with VCE(sat) taken as 0, A.
    pub collector_current: f64,
    /// Base current IB, A (may be <= 0: the build cannot turn on).
    pub base_current: f64,
    /// hFE x IB / IC; 0 when IB <= 0; infinite when IC is 0 and IB > 0.
    pub overdrive: f64,
    /// Current the pin sources, (VOH - VBE) / RB, never below 0, A.
    pub pin_current: f64,
    /// Junction temperature, C.
    pub junction_c: f64,
    /// LED current (VCC - sum Vf - VCE(sat),max(IC)) / RL, never below 0, A; LED loads with a
    /// resistor only.
    pub led_current: Option<f64>,
}

/// Everything about a stage that does not change from build to build, in plain SI numbers.
#[derive(Clone, Debug)]
pub struct BuildModel {
    supply: f64,
    supply_tolerance: f64,
    logic_high: f64,
    logic_high_min: f64,
    ambient_min: f64,
    ambient_max: f64,
    rb: f64,
    rbe: Option<f64>,
    resistor_tolerance: f64,
    load: LoadModel,
    gain_min: GainCurve,
    gain_max: Option<GainCurve>,
    xtb: f64,
    /// VBE(sat) [min, max] against IC: linear between points, held at the end values outside
    /// (stage-model 5).
    vbe: Curve<2>,
    /// VCE(sat),max against IC: the first value below the first point, linear between points,
    /// through the origin above the last (stage-model 3).
    vce: Curve<1>,
    r_th_ja: f64,
    /// VBE's temperature coefficient, V/K (-2 mV/K; -4 mV/K for a Darlington pair).
    vbe_tempco: f64,
    /// The most of VCC x IC the transistor takes out of saturation.
    linear_fraction: f64,
    /// [ln hFE,min - ln IC, ln(hFE,max / hFE,min), VBE(sat),min, VBE(sat),max, VCE(sat),max]
    /// over the builds' IC range (see [`Self::new`]).
    ic_table: Option<Table<5>>,
    /// The gain's temperature factor.
    temperature_gain: TemperatureGain,
    /// The ranges the draws are uniform over.
    ranges: Ranges,
    /// The exponential of the inner loop.
    exp: FastExp,
}

impl BuildModel {
    /// The model of a stage with its final resistors.
    ///
    /// What depends on IC alone (the gain limits over IC in logs, VBE(sat) limits, VCE(sat),max)
    /// is read from a table sampled from the exact curves: 1024 cells over the builds'
    /// collector-current range, at most IC,max / 4 .. IC,max. So is the gain's temperature factor
    /// when XTB is not a multiple of 1/2 (256 cells over the ambient range). This saves two
    /// logarithms, a division and three curve searches a build. The tables are exact at their
    /// nodes and keep the direction of the curves they sample, so the corner stays the lowest
    /// overdrive; between nodes the figures differ from the exact curves by less than 1e-5
    /// relative (tested against [`Self::exact`]), far inside the spread of any part's data.
    /// Builds outside a table's range take the exact path.
    pub fn new(stage: &YieldStage<'_>) -> BuildModel {
        let mut model = Self::exact(stage);
        let ic_max = stage.ic_max;
        let ic_min = model.collector_current_min();
        if ic_max > 0.0 && ic_max.is_finite() {
            let lo = ic_min.clamp(ic_max / IC_TABLE_SPAN, ic_max);
            let table = Table::new(lo, ic_max, IC_TABLE_CELLS, |ic| model.ic_terms_exact(ic));
            model.ic_table = Some(table);
        }
        model.temperature_gain =
            TemperatureGain::fast(model.xtb, model.ambient_min, model.ambient_max);
        model
    }

    /// The model without tables: every build through the exact curves (the gain's temperature
    /// factor by `powf` unless XTB is a multiple of 1/2).
    pub fn exact(stage: &YieldStage<'_>) -> BuildModel {
        let part = stage.part;
        let c = stage.conditions;
        let load = LoadModel::of(stage.law);
        BuildModel {
            supply: c.supply.base(),
            supply_tolerance: c.supply_tolerance,
            logic_high: c.logic_high.base(),
            logic_high_min: c.logic_high_min.base(),
            ambient_min: c.ambient_min.base(),
            ambient_max: c.ambient_max.base(),
            rb: stage.rb.base(),
            rbe: stage.rbe.map(|r| r.base()),
            resistor_tolerance: c.resistor_tolerance,
            load,
            gain_min: GainCurve::new(&part.gain_min),
            gain_max: part.gain_max.as_deref().map(GainCurve::new),
            xtb: part.gain_temp_exponent,
            vbe: Curve::new(
                part.vbe_sat.iter().map(|p| p.ic.base()).collect(),
                part.vbe_sat
                    .iter()
                    .map(|p| [p.min.base(), p.max.base()])
                    .collect(),
            ),
            vce: Curve::new(
                part.vce_sat_max.iter().map(|p| p.ic.base()).collect(),
                part.vce_sat_max.iter().map(|p| [p.v.base()]).collect(),
            ),
            r_th_ja: part.info.r_th_ja.base(),
            vbe_tempco: part.vbe_tempco(),
            linear_fraction: stage.linear_fraction,
            ic_table: None,
            temperature_gain: TemperatureGain::exact(part.gain_temp_exponent),
            ranges: Ranges::new(stage, &load),
            exp: FastExp::new(),
        }
    }

    /// True for an LED load with a series resistor (the builds then have an LED current).
    pub fn has_led_current(&self) -> bool {
        matches!(self.load, LoadModel::Led { .. })
    }

    /// The lowest collector current any build can have (the opposite corner of IC,max).
    fn collector_current_min(&self) -> f64 {
        let tol = self.resistor_tolerance;
        let vcc_min = self.supply * (1.0 - self.supply_tolerance);
        let ic = match self.load {
            LoadModel::Current(i) => i,
            LoadModel::Relay {
                coil_20c,
                tolerance,
            } => vcc_min / (copper(coil_20c, self.ambient_max) * (1.0 + tolerance)),
            LoadModel::Led {
                count,
                forward_min,
                forward_span,
                rl,
            } => (vcc_min - (forward_min + forward_span) * f64::from(count)) / (rl * (1.0 + tol)),
            LoadModel::Strip {
                rated_current,
                rated_v,
            } => strip_current(rated_current, rated_v, vcc_min),
        };
        ic.max(0.0)
    }

    /// Draw one build: every toleranced input independently, uniform over its range (the gain
    /// log-uniform). LED forward voltages are drawn one per LED. A block of one, so that a build
    /// draws the same alone as in a block.
    pub fn draw<R: RngCore>(&self, rng: &mut R) -> Draw {
        let mut block = Block::default();
        self.draw_block(rng, &mut block, 1);
        block.draw(0)
    }

    /// Draw `n` (at most [`BLOCK`]) builds into a block: every toleranced input independently,
    /// uniform over its range (the gain log-uniform between its limits), LED forward voltages
    /// one per LED. Each 64-bit output gives two uniforms of 32 bits (steps of 2^-32 of a
    /// range, far finer than any tolerance matters). Inputs a load does not have are 0.
    ///
    /// A build takes four outputs: (VCC, VOH), (Ta, RB), (RBE, VBE position), (gain position,
    /// the load's own input: coil or RL, drawn for every load so that the layout is the same),
    /// high half first; then one output per two LEDs (the high half for an odd last one).
    #[inline]
    pub fn draw_block<R: RngCore>(&self, rng: &mut R, b: &mut Block, n: usize) {
        self.draw_words(&mut OneStream(rng), b, n);
    }

    /// Draw `n` builds (at most [`BLOCK`], a multiple of `L`) from `L` generators stepped
    /// together: builds `L s .. L s + L` of the block are the `s`-th builds of lanes `0 .. L`,
    /// each drawn from its lane's stream exactly as [`Self::draw_block`] draws from one, so a
    /// build is the same whichever way its chunk is drawn.
    #[inline(always)]
    pub fn draw_block_lanes<const L: usize>(
        &self,
        streams: &mut impl Lanes<L>,
        b: &mut Block,
        n: usize,
    ) {
        self.draw_words(streams, b, n);
    }

    /// The stream outputs of `n` builds, lane by lane, then their inputs.
    #[inline(always)]
    fn draw_words<const L: usize>(&self, source: &mut impl Lanes<L>, b: &mut Block, n: usize) {
        let steps = n.min(BLOCK) / L.max(1);
        let n = steps * L;
        b.len = n;
        let LoadModel::Led {
            count,
            forward_min,
            forward_span,
            ..
        } = self.load
        else {
            source.fill(&mut b.words, steps);
            self.inputs_from_words(b, n);
            return;
        };
        // LEDs: each build's four outputs, then its LEDs' (one per two), lane by lane.
        let forward_step = forward_span * UNIT_STEP;
        for step in 0..steps {
            let at = step * L;
            for word in b.words.iter_mut() {
                word[at..at + L].copy_from_slice(&source.next());
            }
            let mut drop = [0.0; L];
            let mut left = count;
            while left >= 2 {
                let w = source.next();
                for l in 0..L {
                    let (k1, k2) = halves(w[l]);
                    drop[l] += 2.0 * forward_min + forward_step * (k1 + k2);
                }
                left -= 2;
            }
            if left == 1 {
                let w = source.next();
                for l in 0..L {
                    drop[l] += forward_min + forward_step * halves(w[l]).0;
                }
            }
            b.led_drop[at..at + L].copy_from_slice(&drop);
        }
        self.inputs_from_words(b, n);
    }

    /// The inputs of builds `0 .. n` from their stream outputs, quantity by quantity.
    // Indexed loops over `0..n`, as in `evaluate_block`: one build index across several arrays.
    #[allow(clippy::needless_range_loop)]
    #[inline(always)]
    fn inputs_from_words(&self, b: &mut Block, n: usize) {
        let r = &self.ranges;
        let [w0, w1, w2, w3] = &b.words;
        for j in 0..n {
            let (k_supply, k_high) = halves(w0[j]);
            b.supply[j] = r.supply.at(k_supply);
            b.logic_high[j] = r.logic_high.at(k_high);
        }
        for j in 0..n {
            let (k_ambient, k_rb) = halves(w1[j]);
            b.ambient[j] = r.ambient.at(k_ambient);
            b.rb[j] = r.rb.at(k_rb);
        }
        for j in 0..n {
            let (k_rbe, k_vbe) = halves(w2[j]);
            b.rbe[j] = r.rbe.at(k_rbe);
            b.vbe_position[j] = k_vbe * UNIT_STEP;
        }
        let load = match self.load {
            LoadModel::Relay { .. } => {
                b.rl[..n].fill(0.0);
                b.led_drop[..n].fill(0.0);
                &mut b.coil_20c
            }
            LoadModel::Led { .. } => {
                b.coil_20c[..n].fill(0.0);
                &mut b.rl
            }
            LoadModel::Current(_) | LoadModel::Strip { .. } => {
                b.rl[..n].fill(0.0);
                b.led_drop[..n].fill(0.0);
                b.coil_20c[..n].fill(0.0);
                // Drawn all the same; nothing reads it.
                &mut b.led_current
            }
        };
        for j in 0..n {
            let (k_gain, k_load) = halves(w3[j]);
            b.gain_position[j] = k_gain * UNIT_STEP;
            load[j] = r.load.at(k_load);
        }
    }

    /// The build with every input at the end the worst-case corner takes for the overdrive
    /// (stage-model 4): VCC,max, VOH,min, Ta,min, RB+, RBE-, RL-, coil -tol, every LED at Vf,min,
    /// VBE(sat) at its maximum, gain at its minimum.
    pub fn worst_end_draw(&self) -> Draw {
        let tol = self.resistor_tolerance;
        let (rl, coil_20c, led_drop) = match self.load {
            LoadModel::Relay {
                coil_20c,
                tolerance,
            } => (0.0, coil_20c * (1.0 - tolerance), 0.0),
            LoadModel::Led {
                count,
                forward_min,
                rl,
                ..
            } => (rl * (1.0 - tol), 0.0, forward_min * f64::from(count)),
            _ => (0.0, 0.0, 0.0),
        };
        Draw {
            supply: self.supply * (1.0 + self.supply_tolerance),
            logic_high: self.logic_high_min,
            ambient: self.ambient_min,
            rb: self.rb * (1.0 + tol),
            rbe: self.rbe.map_or(f64::INFINITY, |r| r * (1.0 - tol)),
            rl,
            coil_20c,
            led_drop,
            vbe_position: 1.0,
            gain_position: 0.0,
        }
    }

    /// The build with every input at its nominal value (the middle of each range; the gain at
    /// the geometric middle of min and max).
    pub fn nominal_draw(&self) -> Draw {
        let (rl, coil_20c, led_drop) = match self.load {
            LoadModel::Relay { coil_20c, .. } => (0.0, coil_20c, 0.0),
            LoadModel::Led {
                count,
                forward_min,
                forward_span,
                rl,
            } => (
                rl,
                0.0,
                (forward_min + 0.5 * forward_span) * f64::from(count),
            ),
            _ => (0.0, 0.0, 0.0),
        };
        Draw {
            supply: self.supply,
            logic_high: 0.5 * (self.logic_high_min + self.logic_high),
            ambient: 0.5 * (self.ambient_min + self.ambient_max),
            rb: self.rb,
            rbe: self.rbe.unwrap_or(f64::INFINITY),
            rl,
            coil_20c,
            led_drop,
            vbe_position: 0.5,
            gain_position: 0.5,
        }
    }

    /// The figures of one build (stage-model 4 formulas at the drawn values): a block of one,
    /// so that a build gives the same figures alone as in any block.
    pub fn evaluate(&self, d: &Draw) -> Outcome {
        let mut block = Block::default();
        block.set(0, d);
        block.len = 1;
        self.evaluate_block(&mut block);
        block.outcome(0)
    }

    /// The figures of the builds of a block. The work goes step by step over the whole block,
    /// column by column, so that the processor overlaps (and the compiler pairs) the divisions,
    /// look-ups and exponentials of different builds instead of waiting on one build's chain of
    /// them; each build's arithmetic is the same as alone. The rare builds outside the tables
    /// (or the fast exponential's range) are redone afterwards on the exact path, so the common
    /// steps have no branch.
    #[inline(always)]
    pub fn evaluate_block(&self, b: &mut Block) {
        let n = b.len.min(BLOCK);
        // Collector current, VCE(sat) taken as 0 (stage-model 4). `max` also turns NaN into 0.
        match self.load {
            LoadModel::Current(i) => b.ic[..n].fill(i.max(0.0)),
            LoadModel::Relay { .. } => {
                for j in 0..n {
                    b.ic[j] = (b.supply[j] / copper(b.coil_20c[j], b.ambient[j])).max(0.0);
                }
            }
            LoadModel::Led { .. } => {
                for j in 0..n {
                    b.ic[j] = ((b.supply[j] - b.led_drop[j]) / b.rl[j]).max(0.0);
                }
            }
            LoadModel::Strip {
                rated_current,
                rated_v,
            } => {
                for j in 0..n {
                    b.ic[j] = strip_current(rated_current, rated_v, b.supply[j]).max(0.0);
                }
            }
        }
        // The IC terms: which table cell, in vector registers; the look-ups, build by build;
        // the rare builds outside the table on the exact path; then the terms' arithmetic in
        // vector registers again.
        match &self.ic_table {
            Some(table) => {
                let mut outside = false;
                for j in 0..n {
                    outside |= !table.covers(b.ic[j]);
                    (b.ic_cell[j], b.ic_frac[j]) = table.cell_of(b.ic[j]);
                }
                for j in 0..n {
                    Self::store_ic_terms(b, j, table.interpolate(b.ic_cell[j], b.ic_frac[j]));
                }
                if outside {
                    for j in 0..n {
                        if !table.covers(b.ic[j]) {
                            Self::store_ic_terms(b, j, self.ic_terms_exact(b.ic[j]));
                        }
                    }
                }
            }
            None => {
                for j in 0..n {
                    Self::store_ic_terms(b, j, self.ic_terms_exact(b.ic[j]));
                }
            }
        }
        for j in 0..n {
            // VBE(sat) between the part's limits at the build's IC, at 25 C (moved to the
            // build's ambient below).
            b.vbe[j] += (b.vbe_high[j] - b.vbe[j]) * b.vbe_position[j];
            // ln(hFE,25C / IC): log-uniform between the limits.
            b.overdrive[j] += b.gain_spread[j] * b.gain_position[j];
        }
        for j in 0..n {
            // -2 mV/K (-4 mV/K for a Darlington pair) from the 25 C figures [text], as
            // `NpnPart::vbe_at`.
            b.vbe[j] += self.vbe_tempco * (b.ambient[j] - T_REF_C);
            // IB = (VOH - VBE) / RB - VBE / RBE, one VBE in both terms.
            b.pin_current[j] = (b.logic_high[j] - b.vbe[j]) / b.rb[j];
            b.base_current[j] = b.pin_current[j] - b.vbe[j] / b.rbe[j];
        }
        // hFE / IC = exp(ln(hFE,25C / IC)), in three loops: the arithmetic before and after
        // the exponential's table look-up runs in vector registers, the look-ups between.
        let mut outside = false;
        for j in 0..n {
            let x = b.overdrive[j];
            outside |= !FastExp::covers(x);
            let (entry, scale, poly) = FastExp::reduce(x);
            b.exp_entry[j] = entry;
            b.exp_scale[j] = scale;
            b.gain_per_ic[j] = poly;
        }
        for j in 0..n {
            b.exp_value[j] = self.exp.entry(b.exp_entry[j]);
        }
        for j in 0..n {
            b.gain_per_ic[j] = FastExp::finish(b.exp_value[j], b.gain_per_ic[j], b.exp_scale[j]);
        }
        if outside {
            for j in 0..n {
                let x = b.overdrive[j];
                if !FastExp::covers(x) {
                    b.gain_per_ic[j] = x.exp();
                }
            }
        }
        // hFE x IB / IC = IB x hFE,25C / IC x (T/Tref)^XTB; 0 when the build cannot turn on;
        // infinite when the load draws nothing.
        for j in 0..n {
            let (c, ib) = (b.ic[j], b.base_current[j]);
            let on = if c > 0.0 {
                ib * b.gain_per_ic[j]
            } else {
                f64::INFINITY
            };
            b.overdrive[j] = if ib > 0.0 { on } else { 0.0 };
        }
        // The gain's temperature factor; for the usual XTB = 1.5, ratio x sqrt(ratio).
        match self.temperature_gain {
            TemperatureGain::Halves(3) => {
                for j in 0..n {
                    let ratio = temperature_ratio(b.ambient[j]);
                    b.overdrive[j] *= ratio * ratio.sqrt();
                }
            }
            _ => {
                for j in 0..n {
                    b.overdrive[j] *= self.temperature_gain.at(self.xtb, b.ambient[j]);
                }
            }
        }
        // Junction: VCE(sat),max x IC when the build saturates (overdrive >= 1), the linear
        // region's share of VCC x IC otherwise (stage-model 4, v2), plus the base's VBE x IB.
        for j in 0..n {
            let pin = b.pin_current[j].max(0.0);
            b.pin_current[j] = pin;
            let saturated = b.vce[j] * b.ic[j];
            let linear = self.linear_fraction * b.supply[j] * b.ic[j];
            let collector = if b.overdrive[j] >= 1.0 {
                saturated
            } else {
                linear
            };
            b.junction_c[j] = b.ambient[j] + (collector + b.vbe[j] * pin) * self.r_th_ja;
        }
        if matches!(self.load, LoadModel::Led { .. }) {
            for j in 0..n {
                b.led_current[j] = ((b.supply[j] - b.led_drop[j] - b.vce[j]) / b.rl[j]).max(0.0);
            }
        } else {
            b.led_current[..n].fill(f64::NAN);
        }
    }

    /// Put build `j`'s IC terms where the block keeps them: ln(hFE,min / IC) in `overdrive`,
    /// VBE(sat),min in `vbe`, VCE(sat),max in `vce`.
    #[inline(always)]
    fn store_ic_terms(b: &mut Block, j: usize, terms: [f64; 5]) {
        let [per_ic, spread, vbe_lo, vbe_hi, vce_max] = terms;
        b.overdrive[j] = per_ic;
        b.gain_spread[j] = spread;
        b.vbe[j] = vbe_lo;
        b.vbe_high[j] = vbe_hi;
        b.vce[j] = vce_max;
    }

    /// At IC: [ln hFE,min - ln IC, ln hFE,max - ln hFE,min, VBE(sat),min, VBE(sat),max (25 C),
    /// VCE(sat),max] from the part's curves. Kept out of line: the inner loop takes it only for
    /// builds outside the table.
    #[inline(never)]
    fn ic_terms_exact(&self, ic: f64) -> [f64; 5] {
        let (per_ic, spread) = self.gain_terms(ic);
        let [vbe_lo, vbe_hi] = self.vbe.at(ic, |_, held, _| held);
        let [vce] = self.vce.at(ic, |xn, [yn], x| [yn * x / xn]);
        [per_ic, spread, vbe_lo, vbe_hi, vce]
    }

    /// At IC > 0: (ln hFE,min(IC) - ln IC, ln hFE,max(IC) - ln hFE,min(IC)), the gain curves of
    /// stage-model 3 at 25 C. The maximum is the part's maximum curve when it gives one, else 3 x
    /// the minimum; a maximum curve that dips under the minimum one (they interpolate separately)
    /// is held at the minimum.
    fn gain_terms(&self, ic: f64) -> (f64, f64) {
        let ln_ic = ic.ln();
        let lo = self.gain_min.at(ln_ic);
        let hi = match &self.gain_max {
            Some(c) => c.at(ln_ic),
            None => lo + GAIN_MAX_OVER_MIN_WHEN_UNKNOWN.ln(),
        };
        (lo - ln_ic, (hi - lo).max(0.0))
    }
}

/// (Ta + 273.15) / 298.15 (times the reciprocal: one rounding more than a division, no
/// divider).
#[inline(always)]
fn temperature_ratio(ambient_c: f64) -> f64 {
    (ambient_c + ZERO_C_IN_K) * (1.0 / (T_REF_C + ZERO_C_IN_K))
}

/// ((Ta + 273.15) / 298.15)^XTB: the gain's temperature factor [text: Gummel-Poon], as
/// `drive::npn::corner::gain_factor`.
fn temperature_factor(xtb: f64, ambient_c: f64) -> f64 {
    ((ambient_c + ZERO_C_IN_K) / (T_REF_C + ZERO_C_IN_K)).powf(xtb)
}

/// Copper resistance at `t` C from its 20 C value [std IEC 60028], as `load::copper_at`.
#[inline]
fn copper(r20: f64, t: f64) -> f64 {
    r20 * (1.0 + COPPER_ALPHA_PER_K * (t - COPPER_REF_C))
}

/// Any generator as a source of one lane.
struct OneStream<'a, R>(&'a mut R);

impl<R: RngCore> Lanes<1> for OneStream<'_, R> {
    #[inline(always)]
    fn next(&mut self) -> [u64; 1] {
        [self.0.next_u64()]
    }
}

/// 2^-32: one step of a uniform draw.
const UNIT_STEP: f64 = 1.0 / 4_294_967_296.0;

/// Two uniform whole numbers in 0 .. 2^32 (as doubles) from one 64-bit output: its high and
/// low halves (xoshiro256++ has no weak low bits, per its authors, from memory). Times
/// [`UNIT_STEP`] they are uniform in [0, 1).
#[inline(always)]
fn halves(x: u64) -> (f64, f64) {
    (whole(x >> 32), whole(x & 0xFFFF_FFFF))
}

/// 2^52 as a double.
const TWO_TO_52: f64 = 4_503_599_627_370_496.0;

/// A whole number below 2^52 as a double, exactly: placed in the mantissa of 2^52, which is
/// then taken away [common practice; IEEE 754 binary64 layout, std IEEE 754-2008]. The same
/// value as a conversion instruction gives, and it vectorises on every x86-64 (which has no
/// packed conversion from unsigned integers before AVX-512).
#[inline(always)]
fn whole(k: u64) -> f64 {
    f64::from_bits(k | TWO_TO_52.to_bits()) - TWO_TO_52
}

#[cfg(test)]
mod tests;
