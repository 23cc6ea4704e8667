//! An exponential for the inner loop: inlined, no call, about half the instructions of the C
//! library's, relative error below 1e-15 (tested against `f64::exp`).
//!
//! Method [text: range reduction after W. J. Cody and W. Waite, "Software Manual for the
//! Elementary Functions" (1980); table-driven reconstruction after P. T. P. Tang,
//! "Table-driven implementation of the exponential function in IEEE floating-point arithmetic",
//! ACM TOMS 15 (1989); both from memory]: write x = (64 m + j) ln2/64 + r with |r| <= ln2/128,
//! so exp(x) = 2^m x 2^(j/64) x exp(r); 2^(j/64) comes from a 64-entry table and exp(r) from its
//! Taylor series to r^5 (the first term left out, r^6/720, is below 4e-17 for |r| <= 0.0055).
// Indexing reviewed by hand for the no-panic rule (src/lib.rs): the table index is masked to `0..N` (`k & (N - 1)`), so it cannot leave the table whatever the input.
#![allow(clippy::indexing_slicing)]

/// Entries of the table of 2^(j/64).
const N: usize = 64;
/// N / ln 2.
const N_OVER_LN2: f64 = N as f64 / std::f64::consts::LN_2;
/// ln 2 split in two [common practice: the split of fdlibm's e_exp.c, bit patterns
/// 0x3FE62E42FEE00000 and 0x3DEA39EF35793C76, from memory; hi + lo is within 1.2e-26 of ln 2,
/// checked with 60-digit decimal arithmetic; the test below checks the bit patterns]. The high
/// part ends in 21 zero bits, so k x LN2_HI is exact for |k| < 2^21 (|x| < 700 gives
/// |k| < 65 000).
const LN2_HI: f64 = 6.931_471_803_691_238e-1;
/// The rest of ln 2.
const LN2_LO: f64 = 1.908_214_929_270_587_7e-10;
/// ln 2 / N, high part (N a power of two: exact).
const LN2_N_HI: f64 = LN2_HI / N as f64;
/// ln 2 / N, low part.
const LN2_N_LO: f64 = LN2_LO / N as f64;
/// Adding 1.5 x 2^52 rounds a double of magnitude below 2^51 to an integer held in the low bits
/// of the sum [common practice].
const ROUNDER: f64 = 6_755_399_441_055_744.0;
/// Beyond this |x| the library's `exp` takes over (overflow, underflow, NaN).
const LIMIT: f64 = 700.0;

/// exp(x) with a table of 2^(j/64).
#[derive(Clone, Debug)]
pub struct FastExp {
    table: [f64; N],
}

impl Default for FastExp {
    fn default() -> Self {
        Self::new()
    }
}

impl FastExp {
    /// Fill the table (2^(j/64) by the library's `exp2`, accurate to an ulp or so).
    pub fn new() -> FastExp {
        let mut table = [0.0; N];
        for (j, t) in table.iter_mut().enumerate() {
            *t = (j as f64 / N as f64).exp2();
        }
        FastExp { table }
    }

    /// exp(x).
    #[inline(always)]
    pub fn exp(&self, x: f64) -> f64 {
        if Self::covers(x) {
            self.exp_within(x)
        } else {
            // Also NaN.
            x.exp()
        }
    }

    /// True when `x` is inside the range [`Self::exp_within`] is exact for (false for NaN).
    #[inline(always)]
    pub fn covers(x: f64) -> bool {
        x.abs() < LIMIT
    }

    /// exp(x) when [`Self::covers`] `x`; some finite or NaN value otherwise (the caller takes
    /// the library's `exp` there). No branch, so that a block's exponentials run back to back.
    #[inline(always)]
    pub fn exp_within(&self, x: f64) -> f64 {
        let (entry, scale, poly) = Self::reduce(x);
        Self::finish(self.entry(entry), poly, scale)
    }

    /// The steps of [`Self::exp_within`] before the table look-up: the table entry j, 2^m as
    /// a number to add to a double's bits (m << 52), and exp(r) - 1. Arithmetic only, so that
    /// a loop of them runs in vector registers.
    #[inline(always)]
    pub fn reduce(x: f64) -> (usize, i64, f64) {
        let shifted = x * N_OVER_LN2 + ROUNDER;
        // The low bits of the shifted sum are k = round(x N / ln2) in two's complement.
        let k = shifted.to_bits() as i64 as i32;
        let kf = shifted - ROUNDER;
        let r = (x - kf * LN2_N_HI) - kf * LN2_N_LO;
        let p = r * (1.0 + r * (0.5 + r * (1.0 / 6.0 + r * (1.0 / 24.0 + r * (1.0 / 120.0)))));
        let j = (k & (N as i32 - 1)) as usize;
        let m = i64::from(k >> 6);
        (j, m << 52, p)
    }

    /// 2^(j/64) (`j` taken modulo 64).
    #[inline(always)]
    pub fn entry(&self, j: usize) -> f64 {
        self.table[j & (N - 1)]
    }

    /// The steps after the look-up: 2^m x 2^(j/64) x exp(r) from the entry `t` and the rest of
    /// [`Self::reduce`]'s answer.
    #[inline(always)]
    pub fn finish(t: f64, poly: f64, scale: i64) -> f64 {
        let mantissa = t + t * poly;
        // Multiply by 2^m through the exponent field: |x| < 700 keeps the result normal.
        // (Wrapping: outside the range the sum means nothing, and must not stop the run.)
        f64::from_bits((mantissa.to_bits() as i64).wrapping_add(scale) as u64)
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn the_split_of_ln2_is_the_intended_one() {
        assert_eq!(LN2_HI.to_bits(), 0x3FE6_2E42_FEE0_0000);
        assert_eq!(LN2_LO.to_bits(), 0x3DEA_39EF_3579_3C76);
        // The high part ends in at least 21 zero bits.
        assert_eq!(LN2_HI.to_bits() & 0x1F_FFFF, 0);
        assert!((LN2_HI + LN2_LO - std::f64::consts::LN_2).abs() <= f64::EPSILON);
    }

    #[test]
    fn matches_the_library_exp() {
        let e = FastExp::new();
        let mut worst: f64 = 0.0;
        let mut x: f64 = -699.0;
        while x < 699.0 {
            let want = x.exp();
            let got = e.exp(x);
            worst = worst.max(((got - want) / want).abs());
            x += 0.0137;
        }
        // Also densely around the overdrive exponents (ln of hFE / IC for 10 .. 1e4 and
        // 1 uA .. 10 A).
        for i in 0..200_000 {
            let x = -3.0 + 25.0 * f64::from(i) / 200_000.0;
            let want = x.exp();
            worst = worst.max(((e.exp(x) - want) / want).abs());
        }
        assert!(worst < 1e-15, "worst relative error {worst:e}");
        assert_eq!(e.exp(0.0), 1.0);
        assert_eq!(e.exp(f64::INFINITY), f64::INFINITY);
        assert_eq!(e.exp(-1000.0), 0.0);
        assert!(e.exp(f64::NAN).is_nan());
    }
}
