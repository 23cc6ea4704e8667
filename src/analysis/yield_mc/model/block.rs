//! A block of builds evaluated together, one array a quantity.
// Indexing reviewed by hand for the no-panic rule (src/lib.rs): every index here runs over a block's fixed-size arrays ([f64; BLOCK]) inside `0..BLOCK`, or over the two-point spans of tables this module builds from the part and checks for length first; no index comes from a user value.
#![allow(clippy::indexing_slicing)]

use super::*;

/// Builds evaluated together by [`BuildModel::evaluate_block`].
pub const BLOCK: usize = 64;

/// 64-bit draws every build takes, whatever its load (LED loads take more, one per two LEDs).
pub(super) const WORDS: usize = 4;

/// A block of builds, one array a quantity: the draws, then the figures.
#[derive(Clone, Debug)]
pub struct Block {
    /// Builds in the block.
    pub len: usize,
    /// The four 64-bit draws every build takes, in stream order (see
    /// [`BuildModel::draw_block`]).
    pub(super) words: [[u64; BLOCK]; WORDS],
    pub(super) supply: [f64; BLOCK],
    pub(super) logic_high: [f64; BLOCK],
    pub(super) ambient: [f64; BLOCK],
    pub(super) rb: [f64; BLOCK],
    pub(super) rbe: [f64; BLOCK],
    pub(super) rl: [f64; BLOCK],
    pub(super) coil_20c: [f64; BLOCK],
    pub(super) led_drop: [f64; BLOCK],
    pub(super) vbe_position: [f64; BLOCK],
    pub(super) gain_position: [f64; BLOCK],
    pub(super) ic: [f64; BLOCK],
    pub(super) vbe: [f64; BLOCK],
    pub(super) vce: [f64; BLOCK],
    pub(super) base_current: [f64; BLOCK],
    /// (VOH - VBE) / RB until the end, then never below 0.
    pub(super) pin_current: [f64; BLOCK],
    /// ln(hFE / IC) until the exponential, then the overdrive.
    pub(super) overdrive: [f64; BLOCK],
    pub(super) junction_c: [f64; BLOCK],
    /// NaN for loads without an LED current.
    pub(super) led_current: [f64; BLOCK],
    /// exp(ln(hFE / IC)) of each build, on the way to the overdrive.
    pub(super) gain_per_ic: [f64; BLOCK],
    /// The exponential's table entry, scale and entry value, on the way to `gain_per_ic`.
    pub(super) exp_entry: [usize; BLOCK],
    pub(super) exp_scale: [i64; BLOCK],
    pub(super) exp_value: [f64; BLOCK],
    /// The IC table's cell of each build and where in it.
    pub(super) ic_cell: [u64; BLOCK],
    pub(super) ic_frac: [f64; BLOCK],
    /// ln(hFE,max / hFE,min) and VBE(sat),max at each build's IC.
    pub(super) gain_spread: [f64; BLOCK],
    pub(super) vbe_high: [f64; BLOCK],
}

impl Default for Block {
    fn default() -> Self {
        let z = [0.0; BLOCK];
        Block {
            len: 0,
            words: [[0; BLOCK]; WORDS],
            supply: z,
            logic_high: z,
            ambient: z,
            rb: z,
            rbe: z,
            rl: z,
            coil_20c: z,
            led_drop: z,
            vbe_position: z,
            gain_position: z,
            ic: z,
            vbe: z,
            vce: z,
            base_current: z,
            pin_current: z,
            overdrive: z,
            junction_c: z,
            led_current: z,
            gain_per_ic: z,
            exp_entry: [0; BLOCK],
            exp_scale: [0; BLOCK],
            exp_value: z,
            ic_cell: [0; BLOCK],
            ic_frac: z,
            gain_spread: z,
            vbe_high: z,
        }
    }
}

impl Block {
    /// Put build `j`'s draw in.
    #[inline(always)]
    pub(super) fn set(&mut self, j: usize, d: &Draw) {
        self.supply[j] = d.supply;
        self.logic_high[j] = d.logic_high;
        self.ambient[j] = d.ambient;
        self.rb[j] = d.rb;
        self.rbe[j] = d.rbe;
        self.rl[j] = d.rl;
        self.coil_20c[j] = d.coil_20c;
        self.led_drop[j] = d.led_drop;
        self.vbe_position[j] = d.vbe_position;
        self.gain_position[j] = d.gain_position;
    }

    /// The draw of build `j`.
    pub fn draw(&self, j: usize) -> Draw {
        Draw {
            supply: self.supply[j],
            logic_high: self.logic_high[j],
            ambient: self.ambient[j],
            rb: self.rb[j],
            rbe: self.rbe[j],
            rl: self.rl[j],
            coil_20c: self.coil_20c[j],
            led_drop: self.led_drop[j],
            vbe_position: self.vbe_position[j],
            gain_position: self.gain_position[j],
        }
    }

    /// The figures of build `j` (after [`BuildModel::evaluate_block`]).
    #[inline(always)]
    pub fn outcome(&self, j: usize) -> Outcome {
        let led = self.led_current[j];
        Outcome {
            collector_current: self.ic[j],
            base_current: self.base_current[j],
            overdrive: self.overdrive[j],
            pin_current: self.pin_current[j],
            junction_c: self.junction_c[j],
            led_current: (!led.is_nan()).then_some(led),
        }
    }

    /// The overdrive of each build (after [`BuildModel::evaluate_block`]).
    pub fn overdrive(&self) -> &[f64] {
        &self.overdrive[..self.len.min(BLOCK)]
    }

    /// The pin current of each build, A.
    pub fn pin_current(&self) -> &[f64] {
        &self.pin_current[..self.len.min(BLOCK)]
    }

    /// The junction temperature of each build, C.
    pub fn junction_c(&self) -> &[f64] {
        &self.junction_c[..self.len.min(BLOCK)]
    }

    /// The LED current of each build, A (NaN for loads without one).
    pub fn led_current(&self) -> &[f64] {
        &self.led_current[..self.len.min(BLOCK)]
    }
}
