//! The stage's toleranced inputs as the yield model draws them, and the curves and tables it
//! reads per build.
// Indexing reviewed by hand for the no-panic rule (src/lib.rs): every index here runs over a block's fixed-size arrays ([f64; BLOCK]) inside `0..BLOCK`, or over the two-point spans of tables this module builds from the part and checks for length first; no index comes from a user value.
#![allow(clippy::indexing_slicing)]

use super::*;

/// A range a draw is uniform over, cut in 2^32 steps.
#[derive(Clone, Copy, Debug)]
pub(super) struct Span {
    pub(super) lo: f64,
    /// (hi - lo) / 2^32 (exact: a power of two).
    pub(super) step: f64,
}

impl Span {
    /// From `lo` to `hi`.
    pub(super) fn between(lo: f64, hi: f64) -> Span {
        Span {
            lo,
            step: (hi - lo) * UNIT_STEP,
        }
    }

    /// `nominal` +/- `tolerance` (a fraction).
    pub(super) fn tolerance(nominal: f64, tolerance: f64) -> Span {
        Self::between(nominal * (1.0 - tolerance), nominal * (1.0 + tolerance))
    }

    /// The point `k` steps up (`k` a whole number below 2^32): the same as lo + (hi - lo) x u
    /// with u = k / 2^32, to the last bit.
    #[inline(always)]
    pub(super) fn at(&self, k: f64) -> f64 {
        self.lo + self.step * k
    }
}

/// The ranges of a stage's toleranced inputs.
#[derive(Clone, Copy, Debug)]
pub(super) struct Ranges {
    pub(super) supply: Span,
    pub(super) logic_high: Span,
    pub(super) ambient: Span,
    pub(super) rb: Span,
    /// Infinite (no pull-down) or RBE +/- tol.
    pub(super) rbe: Span,
    /// The relay coil at 20 C or the LED resistor, +/- their tolerances.
    pub(super) load: Span,
}

impl Ranges {
    pub(super) fn new(stage: &YieldStage<'_>, load: &LoadModel) -> Ranges {
        let c = stage.conditions;
        let tol = c.resistor_tolerance;
        let load = match *load {
            LoadModel::Relay {
                coil_20c,
                tolerance,
            } => Span::tolerance(coil_20c, tolerance),
            LoadModel::Led { rl, .. } => Span::tolerance(rl, tol),
            LoadModel::Current(_) | LoadModel::Strip { .. } => Span::between(0.0, 0.0),
        };
        Ranges {
            supply: Span::tolerance(c.supply.base(), c.supply_tolerance),
            logic_high: Span::between(c.logic_high_min.base(), c.logic_high.base()),
            ambient: Span::between(c.ambient_min.base(), c.ambient_max.base()),
            rb: Span::tolerance(stage.rb.base(), tol),
            rbe: match stage.rbe {
                Some(r) => Span::tolerance(r.base(), tol),
                None => Span {
                    lo: f64::INFINITY,
                    step: 0.0,
                },
            },
            load,
        }
    }
}

/// The load as the model sees it.
#[derive(Clone, Copy, Debug)]
pub(super) enum LoadModel {
    /// A fixed current, A (LEDs without a resistor take their target current, as the corner).
    Current(f64),
    /// A copper winding (relay coil, motor): resistance at 20 C and its tolerance.
    Relay { coil_20c: f64, tolerance: f64 },
    /// LEDs with a series resistor.
    Led {
        count: u32,
        forward_min: f64,
        forward_span: f64,
        rl: f64,
    },
    /// A strip: I_rated x max(1, 1 + (VCC - Vrated) / (0.25 Vrated)) (stage-model 2, v2).
    Strip { rated_current: f64, rated_v: f64 },
}

impl LoadModel {
    pub(super) fn of(law: CurrentLaw) -> LoadModel {
        match law {
            CurrentLaw::Fixed(i) => LoadModel::Current(i),
            CurrentLaw::Copper { r20, tolerance } => LoadModel::Relay {
                coil_20c: r20,
                tolerance,
            },
            CurrentLaw::Led {
                count,
                forward_min,
                forward_span,
                rl,
            } => LoadModel::Led {
                count,
                forward_min,
                forward_span,
                rl,
            },
            CurrentLaw::Strip {
                rated_current,
                rated_v,
            } => LoadModel::Strip {
                rated_current,
                rated_v,
            },
        }
    }
}

/// A strip's current at `v` (stage-model 2, v2), as `Strip::current_at`.
#[inline(always)]
pub(super) fn strip_current(rated_current: f64, rated_v: f64, v: f64) -> f64 {
    rated_current * (1.0 + (v - rated_v) / (STRIP_RESISTOR_SHARE * rated_v)).max(1.0)
}

/// A piecewise-linear curve through sorted points, `K` values a point (sharing the x), with
/// its slopes precomputed.
#[derive(Clone, Debug)]
pub(super) struct Curve<const K: usize> {
    pub(super) x: Vec<f64>,
    pub(super) y: Vec<[f64; K]>,
    pub(super) dydx: Vec<[f64; K]>,
}

impl<const K: usize> Curve<K> {
    pub(super) fn new(x: Vec<f64>, y: Vec<[f64; K]>) -> Curve<K> {
        // Slopes between consecutive points; 0 where two points share an x (the later value is
        // taken from there on, as the part's interpolation does).
        let dydx = x
            .windows(2)
            .zip(y.windows(2))
            .map(|(x, y)| {
                let mut d = [0.0; K];
                if x[1] > x[0] {
                    for k in 0..K {
                        d[k] = (y[1][k] - y[0][k]) / (x[1] - x[0]);
                    }
                }
                d
            })
            .collect();
        Curve { x, y, dydx }
    }

    /// The values at `x`: held at the first point's below it, `above(last x, last values, x)`
    /// above the last point, linear between.
    #[inline(always)]
    pub(super) fn at(&self, x: f64, above: impl Fn(f64, [f64; K], f64) -> [f64; K]) -> [f64; K] {
        let xs = &self.x;
        let n = xs.len();
        if n == 0 || self.y.len() != n {
            return [f64::NAN; K];
        }
        if x <= xs[0] {
            return self.y[0];
        }
        if x >= xs[n - 1] {
            return above(xs[n - 1], self.y[n - 1], x);
        }
        let mut i = 1;
        while i < n - 1 && x > xs[i] {
            i += 1;
        }
        if xs[i] == xs[i - 1] {
            return self.y[i];
        }
        let (y0, d) = (self.y[i - 1], self.dydx[i - 1]);
        let mut out = [0.0; K];
        for k in 0..K {
            out[k] = y0[k] + d[k] * (x - xs[i - 1]);
        }
        out
    }
}

/// ln hFE against ln IC: log-log between points, flat below the first, 1/IC above the last
/// (the curve of `NpnPart::gain_min_at`, stage-model 3, kept in logs).
#[derive(Clone, Debug)]
pub(super) struct GainCurve(pub(super) Curve<1>);

impl GainCurve {
    /// From (IC in A, hFE) points.
    pub(super) fn new(points: &[(f64, f64)]) -> GainCurve {
        GainCurve(Curve::new(
            points.iter().map(|&(ic, _)| ic.ln()).collect(),
            points.iter().map(|&(_, hfe)| [hfe.ln()]).collect(),
        ))
    }

    pub(super) fn at(&self, ln_ic: f64) -> f64 {
        // hFE x IC constant above the last point.
        self.0.at(ln_ic, |xn, [yn], x| [yn + xn - x])[0]
    }
}

/// Cells of the table of IC-dependent terms over the builds' collector-current range.
pub(super) const IC_TABLE_CELLS: usize = 1024;
/// Cells of the temperature table over the ambient range.
pub(super) const TEMPERATURE_TABLE_CELLS: usize = 256;
/// The IC table covers at most IC,max / this .. IC,max; builds below use the exact path.
pub(super) const IC_TABLE_SPAN: f64 = 4.0;

/// A function of one variable sampled at evenly spaced nodes over [lo, hi] and interpolated
/// linearly between them. Exact at the nodes (up to one rounding at the right end of a cell);
/// between them it stays between its two node values, so it keeps the direction (rising or
/// falling) of the function it samples. The last node sits exactly at `hi`.
#[derive(Clone, Debug)]
pub(super) struct Table<const K: usize> {
    pub(super) lo: f64,
    pub(super) hi: f64,
    /// Cells per unit of x (0 for a single point).
    pub(super) scale: f64,
    /// Index of the last cell (a whole number, as a double).
    pub(super) last: f64,
    /// Per cell: the values at its left node and the rise to its right node.
    pub(super) cells: Vec<([f64; K], [f64; K])>,
}

impl<const K: usize> Table<K> {
    pub(super) fn new(lo: f64, hi: f64, cells: usize, f: impl Fn(f64) -> [f64; K]) -> Table<K> {
        let n = if hi > lo { cells.max(1) } else { 1 };
        let step = (hi - lo) / n as f64;
        let nodes: Vec<[f64; K]> = (0..=n)
            .map(|i| f(if i == n { hi } else { lo + step * i as f64 }))
            .collect();
        let cells = nodes
            .windows(2)
            .map(|w| {
                let mut rise = [0.0; K];
                for k in 0..K {
                    rise[k] = w[1][k] - w[0][k];
                }
                (w[0], rise)
            })
            .collect();
        Table {
            lo,
            hi,
            scale: if hi > lo { n as f64 / (hi - lo) } else { 0.0 },
            last: (n - 1) as f64,
            cells,
        }
    }

    /// The interpolated values at `x`; `None` outside [lo, hi].
    #[inline(always)]
    pub(super) fn at(&self, x: f64) -> Option<[f64; K]> {
        self.covers(x).then(|| self.at_clamped(x))
    }

    /// True when `x` is inside [lo, hi] (false for NaN).
    #[inline(always)]
    pub(super) fn covers(&self, x: f64) -> bool {
        x >= self.lo && x <= self.hi
    }

    /// The interpolated values at `x` when [`Self::covers`] it; some value of the table's
    /// otherwise (the caller takes another path there).
    #[inline(always)]
    pub(super) fn at_clamped(&self, x: f64) -> [f64; K] {
        let (cell, frac) = self.cell_of(x);
        self.interpolate(cell, frac)
    }

    /// The cell `x` falls in and where in it (0 .. 1), when [`Self::covers`] `x`; some cell
    /// otherwise. Arithmetic only (no branch, no conversion that checks its range), so that a
    /// loop of them runs in vector registers.
    #[inline(always)]
    pub(super) fn cell_of(&self, x: f64) -> (u64, f64) {
        let t = (x - self.lo) * self.scale;
        // Inside the range t >= 0, so the clamp below 0 changes nothing there; NaN clamps to 0.
        let i = floor_of_small(t.max(0.0).min(self.last));
        (
            (i + TWO_TO_52).to_bits() - TWO_TO_52.to_bits(),
            (t - i).min(1.0),
        )
    }

    /// The values at `frac` (0 .. 1) of the way through cell `cell`.
    #[inline(always)]
    pub(super) fn interpolate(&self, cell: u64, frac: f64) -> [f64; K] {
        // `cell` is at most `last` (`cell_of`), so `get` always finds it.
        let Some((left, rise)) = usize::try_from(cell).ok().and_then(|i| self.cells.get(i)) else {
            return [f64::NAN; K];
        };
        let mut out = [0.0; K];
        for k in 0..K {
            out[k] = left[k] + rise[k] * frac;
        }
        out
    }
}

/// floor(t) for 0 <= t < 2^51, exactly: t + 2^52 rounds t to a whole number (the nearest), one
/// less when that lies above t [common practice; IEEE 754 round to nearest, std IEEE
/// 754-2008]. The same as `t as i64` there, without the checks a conversion makes.
#[inline(always)]
fn floor_of_small(t: f64) -> f64 {
    let nearest = (t + TWO_TO_52) - TWO_TO_52;
    if nearest > t {
        nearest - 1.0
    } else {
        nearest
    }
}

/// The gain's temperature factor ((Ta + 273.15) / 298.15)^XTB [text: Gummel-Poon], as
/// `drive::npn::corner::gain_factor`.
#[derive(Clone, Debug)]
pub(super) enum TemperatureGain {
    /// XTB a multiple of 1/2 (1.5, the usual value, among them): sqrt(ratio) to that many
    /// halves, by multiplication; no logarithm.
    Halves(u32),
    /// Any other XTB: sampled over the ambient range.
    Table(Table<1>),
    /// Any other XTB, by `powf` every build.
    Power,
}

impl TemperatureGain {
    /// Halves when XTB is a multiple of 1/2, else `powf` (no table).
    pub(super) fn exact(xtb: f64) -> TemperatureGain {
        let halves = 2.0 * xtb;
        if halves.fract() == 0.0 && (0.0..=16.0).contains(&halves) {
            // Exact: a whole number from 0 to 16.
            TemperatureGain::Halves(halves as u32)
        } else {
            TemperatureGain::Power
        }
    }

    /// Halves when XTB is a multiple of 1/2, else a table over the ambient range.
    pub(super) fn fast(xtb: f64, ambient_min: f64, ambient_max: f64) -> TemperatureGain {
        match Self::exact(xtb) {
            TemperatureGain::Power => TemperatureGain::Table(Table::new(
                ambient_min,
                ambient_max,
                TEMPERATURE_TABLE_CELLS,
                |t| [temperature_factor(xtb, t)],
            )),
            other => other,
        }
    }

    #[inline(always)]
    pub(super) fn at(&self, xtb: f64, ambient_c: f64) -> f64 {
        match self {
            TemperatureGain::Halves(k) => {
                let ratio = temperature_ratio(ambient_c);
                let mut f = if k % 2 == 1 { ratio.sqrt() } else { 1.0 };
                for _ in 0..k / 2 {
                    f *= ratio;
                }
                f
            }
            TemperatureGain::Table(t) => match t.at(ambient_c) {
                Some([v]) => v,
                None => temperature_factor(xtb, ambient_c),
            },
            TemperatureGain::Power => temperature_factor(xtb, ambient_c),
        }
    }
}
