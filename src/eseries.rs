//! Preferred resistor values: the E6 .. E96 series of IEC 60063 and helpers to pick a value.
//!
//! Every series value is built as an exact decimal double (`mantissa * 10^k`), so 4.7 kΩ is
//! exactly `4700.0` and 0.47 Ω is the double nearest 0.47, the same as the literal `0.47`.

use std::fmt;
use std::str::FromStr;

use crate::quantity::{ohms, Base, Resistance};

/// A series of preferred numbers.
#[derive(
    Clone,
    Copy,
    Debug,
    PartialEq,
    Eq,
    Hash,
    serde::Serialize,
    serde::Deserialize,
    schemars::JsonSchema,
)]
pub enum Series {
    /// 6 values a decade (20 %).
    E6,
    /// 12 values a decade (10 %).
    E12,
    /// 24 values a decade (5 %).
    E24,
    /// 48 values a decade (2 %).
    E48,
    /// 96 values a decade (1 %).
    E96,
}

// Source for the tables: IEC 60063 (preferred number series for resistors and capacitors),
// three significant digits per value. E6 and E12 are every 4th and every 2nd E24 value.
const E6: [u16; 6] = [100, 150, 220, 330, 470, 680];
const E12: [u16; 12] = [100, 120, 150, 180, 220, 270, 330, 390, 470, 560, 680, 820];
const E24: [u16; 24] = [
    100, 110, 120, 130, 150, 160, 180, 200, 220, 240, 270, 300, 330, 360, 390, 430, 470, 510, 560,
    620, 680, 750, 820, 910,
];
// IEC 60063: E48 is every second E96 value.
const E48: [u16; 48] = [
    100, 105, 110, 115, 121, 127, 133, 140, 147, 154, 162, 169, 178, 187, 196, 205, 215, 226, 237,
    249, 261, 274, 287, 301, 316, 332, 348, 365, 383, 402, 422, 442, 464, 487, 511, 536, 562, 590,
    619, 649, 681, 715, 750, 787, 825, 866, 909, 953,
];
// IEC 60063 E96. Every value equals round(100 * 10^(i/96)); the one well-known departure from
// that formula, 920 where the formula gives 919, belongs to E192 (from memory), not to E96:
// neither 919 nor 920 is an E96 value (909 and 931 are its neighbours). Checked in the tests.
const E96: [u16; 96] = [
    100, 102, 105, 107, 110, 113, 115, 118, 121, 124, 127, 130, 133, 137, 140, 143, 147, 150, 154,
    158, 162, 165, 169, 174, 178, 182, 187, 191, 196, 200, 205, 210, 215, 221, 226, 232, 237, 243,
    249, 255, 261, 267, 274, 280, 287, 294, 301, 309, 316, 324, 332, 340, 348, 357, 365, 374, 383,
    392, 402, 412, 422, 432, 442, 453, 464, 475, 487, 499, 511, 523, 536, 549, 562, 576, 590, 604,
    619, 634, 649, 665, 681, 698, 715, 732, 750, 768, 787, 806, 825, 845, 866, 887, 909, 931, 953,
    976,
];

/// Two resistances closer than this (relative) are treated as the same value, which absorbs the
/// float noise of values computed elsewhere (4699.999999 ohm is the E24 value 4.7 k).
const SAME_VALUE: f64 = 1e-9;

/// Whether `v` and `r` (positive, finite `r`) are the same value up to float noise.
fn same_value(v: f64, r: f64) -> bool {
    (v - r).abs() <= SAME_VALUE * r
}

/// Powers of ten that are exact in an f64 (10^22 is the largest).
const EXACT_POW10: [f64; 23] = [
    1e0, 1e1, 1e2, 1e3, 1e4, 1e5, 1e6, 1e7, 1e8, 1e9, 1e10, 1e11, 1e12, 1e13, 1e14, 1e15, 1e16,
    1e17, 1e18, 1e19, 1e20, 1e21, 1e22,
];

/// `mantissa * 10^exp` as the double nearest that decimal: multiplying or dividing an exact
/// integer by an exact power of ten rounds once, so the result is correctly rounded.
fn decimal(mantissa: u16, exp: i32) -> f64 {
    let m = f64::from(mantissa);
    match EXACT_POW10.get(exp.unsigned_abs() as usize) {
        Some(p) if exp >= 0 => m * p,
        Some(p) => m / p,
        // Outside 10^±22 no exact power exists; let the decimal reader round instead.
        None => format!("{mantissa}e{exp}").parse().unwrap_or(f64::NAN),
    }
}

/// The reason a series name was refused.
#[derive(Debug, Clone, PartialEq, Eq, thiserror::Error)]
#[error("unknown series `{input}`; accepted: E6, E12, E24, E48, E96")]
pub struct ParseSeriesError {
    /// The text as typed.
    pub input: String,
}

impl Series {
    /// Every series, coarsest first.
    pub const ALL: [Series; 5] = [
        Series::E6,
        Series::E12,
        Series::E24,
        Series::E48,
        Series::E96,
    ];

    /// The name as written on drawings ("E24").
    pub fn name(self) -> &'static str {
        match self {
            Series::E6 => "E6",
            Series::E12 => "E12",
            Series::E24 => "E24",
            Series::E48 => "E48",
            Series::E96 => "E96",
        }
    }

    /// The usual tolerance of parts sold in this series, as a fraction (E24: 0.05).
    pub fn tolerance_hint(self) -> f64 {
        match self {
            Series::E6 => 0.2,
            Series::E12 => 0.1,
            Series::E24 => 0.05,
            Series::E48 => 0.02,
            Series::E96 => 0.01,
        }
    }

    /// The mantissas of one decade as three-digit integers (100 ..= 976), ascending.
    pub fn mantissas(self) -> &'static [u16] {
        match self {
            Series::E6 => &E6,
            Series::E12 => &E12,
            Series::E24 => &E24,
            Series::E48 => &E48,
            Series::E96 => &E96,
        }
    }

    /// Series values in ohms around `r`: the three decades of mantissas (`m * 10^k`) centred on
    /// the decade of `r`, ascending. `r` must be positive and finite.
    fn around(self, r: f64) -> impl Iterator<Item = f64> {
        // floor(log10 r) may be off by one next to a power of ten; one extra decade on each
        // side keeps the neighbours of r in the list either way.
        let decade = r.log10().floor().clamp(-400.0, 400.0) as i32 - 2;
        let mantissas = self.mantissas();
        (decade - 1..=decade + 1).flat_map(move |k| mantissas.iter().map(move |&m| decimal(m, k)))
    }

    /// The smallest series value >= r (any decade). A value within a relative 1e-9 of a series
    /// value counts as that value. Zero, negative and non-finite inputs come back unchanged.
    pub fn at_or_above(self, r: Resistance) -> Resistance {
        let r = r.base();
        if !(r > 0.0 && r.is_finite()) {
            return ohms(r);
        }
        let found = self.around(r).find(|&v| v >= r || same_value(v, r));
        ohms(found.unwrap_or(f64::INFINITY))
    }

    /// The largest series value <= r (any decade). A value within a relative 1e-9 of a series
    /// value counts as that value. Zero, negative and non-finite inputs come back unchanged.
    pub fn at_or_below(self, r: Resistance) -> Resistance {
        let r = r.base();
        if !(r > 0.0 && r.is_finite()) {
            return ohms(r);
        }
        let found = self
            .around(r)
            .take_while(|&v| v <= r || same_value(v, r))
            .last();
        ohms(found.unwrap_or(0.0))
    }

    /// The series value nearest r by ratio (log distance); ties go to the larger value.
    /// Zero, negative and non-finite inputs come back unchanged.
    pub fn nearest(self, r: Resistance) -> Resistance {
        let x = r.base();
        if !(x > 0.0 && x.is_finite()) {
            return r;
        }
        let above = self.at_or_above(r).base();
        let below = self.at_or_below(r).base();
        if same_value(above, x) {
            return ohms(above);
        }
        let up = (above / x).ln();
        let down = (x / below).ln();
        // A tie in exact arithmetic can differ by a rounding step here; call it a tie.
        ohms(if up <= down + 1e-12 { above } else { below })
    }

    /// Every series value from 10 ohm to 10 Mohm inclusive, ascending (reverse it to walk down).
    /// E24 gives 6 * 24 + 1 = 145 values.
    pub fn values(self) -> impl DoubleEndedIterator<Item = Resistance> + Clone {
        let mantissas = self.mantissas();
        // Decades 10^-1 .. 10^4 of the three-digit mantissas: 100 / 10 = 10 ohm first; then the
        // series' first value one decade up, 100 * 10^5 = 10 Mohm, closes the range.
        (-1..=4)
            .flat_map(move |k| mantissas.iter().map(move |&m| ohms(decimal(m, k))))
            .chain(std::iter::once(ohms(decimal(100, 5))))
    }

    /// The values of [`Series::values`] at or below `r` (within a relative 1e-9), largest first,
    /// without computing the decades above `r`: the walk of a sizing loop with a known bound.
    pub fn values_down_from(self, r: Resistance) -> impl Iterator<Item = Resistance> + Clone {
        let mantissas = self.mantissas();
        let top = r.base();
        let limit = top * (1.0 + 1e-9);
        // The decade 10^k (k from -1 to 4, three-digit mantissas) that holds `top`; every value
        // of the decades above it is larger than `top`.
        let start = if top.is_finite() && top > 0.0 {
            (top.log10().floor() as i32 - 2).clamp(-2, 4)
        } else if top > 0.0 {
            4
        } else {
            -2
        };
        let ten_meg = (limit >= 10e6).then(|| ohms(decimal(100, 5)));
        ten_meg
            .into_iter()
            .chain(
                (-1..=start)
                    .rev()
                    .flat_map(move |k| mantissas.iter().rev().map(move |&m| ohms(decimal(m, k)))),
            )
            .skip_while(move |v| v.base() > limit)
    }
}

impl Series {
    /// Series values in any decade from the largest at or below `top` down to the smallest at or
    /// above `bottom` (both within a relative 1e-9), largest first: the walk of the LED sizing,
    /// which may go below 10 ohm (stage-model 6.1). Empty unless `top` >= `bottom` > 0, both finite.
    pub fn walk_down(
        self,
        top: Resistance,
        bottom: Resistance,
    ) -> impl Iterator<Item = Resistance> {
        let (top, bottom) = (top.base(), bottom.base());
        let valid = top.is_finite() && bottom.is_finite() && bottom > 0.0 && top >= bottom;
        let mantissas = self.mantissas();
        // Values of decade k are m x 10^k with three-digit m: 100 x 10^k ..= 999 x 10^k.
        let (hi, lo) = if valid {
            (
                (top.log10().floor() as i32 - 1).clamp(-300, 300),
                (bottom.log10().floor() as i32 - 3).clamp(-300, 300),
            )
        } else {
            (0, 1)
        };
        (lo..=hi)
            .rev()
            .flat_map(move |k| mantissas.iter().rev().map(move |&m| decimal(m, k)))
            .skip_while(move |&v| v > top && !same_value(v, top))
            .take_while(move |&v| v >= bottom || same_value(v, bottom))
            .map(ohms)
    }
}

impl fmt::Display for Series {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(self.name())
    }
}

impl FromStr for Series {
    type Err = ParseSeriesError;

    /// Case-insensitive: `E24`, `e24`.
    fn from_str(s: &str) -> Result<Self, Self::Err> {
        let t = s.trim();
        Series::ALL
            .into_iter()
            .find(|series| series.name().eq_ignore_ascii_case(t))
            .ok_or_else(|| ParseSeriesError {
                input: s.to_string(),
            })
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn r(v: f64) -> Resistance {
        ohms(v)
    }

    /// The rounding rule behind the series: mantissa i of En is 10^(i/n), kept to `digits`
    /// significant digits and scaled to an integer.
    fn formula(i: usize, n: usize, scale: f64) -> u16 {
        (scale * 10f64.powf(i as f64 / n as f64)).round() as u16
    }

    #[test]
    fn walk_down_crosses_decades_below_ten_ohm() {
        // IEC 60063 E24: the values at or below 12 ohm down to 1 ohm.
        let got: Vec<f64> = Series::E24
            .walk_down(r(12.0), r(1.0))
            .map(|v| v.base())
            .collect();
        let want = [
            12.0, 11.0, 10.0, 9.1, 8.2, 7.5, 6.8, 6.2, 5.6, 5.1, 4.7, 4.3, 3.9, 3.6, 3.3, 3.0, 2.7,
            2.4, 2.2, 2.0, 1.8, 1.6, 1.5, 1.3, 1.2, 1.1, 1.0,
        ];
        assert_eq!(got.len(), want.len(), "{got:?}");
        for (g, w) in got.iter().zip(want) {
            assert!((g - w).abs() < 1e-9 * w, "{g} vs {w}");
        }
        assert_eq!(Series::E24.walk_down(r(1.0), r(2.0)).count(), 0);
        let first = Series::E12
            .walk_down(r(150.0), r(0.15))
            .next()
            .map(|v| v.base());
        assert_eq!(first, Some(150.0));
    }

    #[test]
    fn table_lengths() {
        for (series, n) in [(Series::E6, 6), (Series::E12, 12), (Series::E24, 24)]
            .into_iter()
            .chain([(Series::E48, 48), (Series::E96, 96)])
        {
            assert_eq!(series.mantissas().len(), n, "{series}");
        }
    }

    #[test]
    fn tables_strictly_ascending_within_one_decade() {
        for series in Series::ALL {
            let m = series.mantissas();
            assert!(m.windows(2).all(|w| w[0] < w[1]), "{series}");
            assert_eq!(m[0], 100, "{series}");
            assert!(*m.last().unwrap() < 1000, "{series}");
        }
    }

    // IEC 60063: E12 is every second E24 value, E6 every second E12 value, E48 every second E96.
    #[test]
    fn coarser_series_are_every_second_value_of_the_finer() {
        for (coarse, fine) in [
            (Series::E6, Series::E12),
            (Series::E12, Series::E24),
            (Series::E48, Series::E96),
        ] {
            let every_second: Vec<u16> = fine.mantissas().iter().step_by(2).copied().collect();
            assert_eq!(
                coarse.mantissas(),
                every_second.as_slice(),
                "{coarse} vs {fine}"
            );
        }
    }

    // IEC 60063: E48 and E96 follow round(100 * 10^(i/n)) at every index.
    #[test]
    fn e48_and_e96_follow_the_formula() {
        for series in [Series::E48, Series::E96] {
            let m = series.mantissas();
            for (i, &v) in m.iter().enumerate() {
                assert_eq!(v, formula(i, m.len(), 100.0), "{series} index {i}");
            }
        }
    }

    // The 919 -> 920 exception of IEC 60063 (from memory) is an E192 value: the formula gives 919
    // at E192 index 185, an odd index, so it is not one of the E96 values (the even E192 indices).
    // The E96 table agrees: it holds neither 919 nor 920.
    #[test]
    fn the_919_exception_is_not_in_e96() {
        assert_eq!(formula(185, 192, 100.0), 919);
        assert!(!E96.contains(&919) && !E96.contains(&920));
        let i = E96.iter().position(|&v| v == 909).unwrap();
        assert_eq!(E96[i + 1], 931);
    }

    // IEC 60063: exactly eight E24 values depart from round(10 * 10^(i/24)).
    #[test]
    fn exactly_eight_e24_values_depart_from_the_formula() {
        let departures: Vec<(u16, u16)> = E24
            .iter()
            .enumerate()
            .map(|(i, &v)| (v, formula(i, 24, 10.0) * 10))
            .filter(|(table, f)| table != f)
            .collect();
        let table_values: Vec<u16> = departures.iter().map(|d| d.0).collect();
        assert_eq!(table_values, [270, 300, 330, 360, 390, 430, 470, 820]);
        // In every case the formula lands one step of 10 below the table, except 820 (formula 830).
        for (table, f) in departures {
            assert_eq!(table.abs_diff(f), 10, "{table} vs formula {f}");
        }
    }

    #[test]
    fn values_down_from_matches_the_full_walk() {
        for series in Series::ALL {
            for top in [
                0.5,
                9.99,
                10.0,
                10.5,
                47.0,
                99.9,
                100.0,
                4_700.0,
                4_699.0,
                9.1e6,
                9.999e6,
                1e7,
                2e7,
                f64::INFINITY,
                f64::NAN,
                -3.0,
            ] {
                let fast: Vec<f64> = series
                    .values_down_from(ohms(top))
                    .map(|v| v.base())
                    .collect();
                let full: Vec<f64> = series
                    .values()
                    .rev()
                    .map(|v| v.base())
                    .filter(|v| *v <= top * (1.0 + 1e-9))
                    .collect();
                assert_eq!(fast, full, "{series} at {top}");
            }
        }
    }

    #[test]
    fn values_are_exact_decimals() {
        assert_eq!(decimal(470, 1), 4700.0);
        assert_eq!(decimal(470, -3), 0.47);
        assert_eq!(decimal(220, 4), 2.2e6);
        assert_eq!(decimal(100, -1), 10.0);
        assert_eq!(decimal(976, -4), 0.0976);
        assert_eq!(decimal(330, 30), 3.3e32);
        assert_eq!(decimal(330, -30), 3.3e-28);
    }

    #[test]
    fn in_series_values_are_returned_exactly() {
        for series in Series::ALL {
            for v in series.values() {
                let x = v.base();
                assert_eq!(series.at_or_above(v).base(), x, "{series} {x}");
                assert_eq!(series.at_or_below(v).base(), x, "{series} {x}");
                assert_eq!(series.nearest(v).base(), x, "{series} {x}");
            }
        }
        assert_eq!(Series::E24.at_or_above(r(4700.0)).base(), 4700.0);
        assert_eq!(Series::E24.at_or_below(r(0.47)).base(), 0.47);
    }

    #[test]
    fn float_noise_counts_as_the_series_value() {
        let noisy_up = 4700.0 * (1.0 + 5e-10);
        let noisy_down = 4700.0 * (1.0 - 5e-10);
        assert_eq!(Series::E24.at_or_above(r(noisy_up)).base(), 4700.0);
        assert_eq!(Series::E24.at_or_below(r(noisy_down)).base(), 4700.0);
        assert_eq!(Series::E24.nearest(r(noisy_down)).base(), 4700.0);
        let third = 0.1 + 0.2 + 3.0; // 3.3000000000000003
        assert_eq!(Series::E24.at_or_below(r(third)).base(), 3.3);
        // Beyond the tolerance the neighbours are picked.
        assert_eq!(Series::E24.at_or_above(r(4700.0 * 1.000001)).base(), 5100.0);
        assert_eq!(Series::E24.at_or_below(r(4700.0 * 0.999999)).base(), 4300.0);
    }

    #[test]
    fn between_series_values() {
        assert_eq!(Series::E24.at_or_above(r(4500.0)).base(), 4700.0);
        assert_eq!(Series::E24.at_or_below(r(4500.0)).base(), 4300.0);
        assert_eq!(Series::E12.at_or_above(r(4500.0)).base(), 4700.0);
        assert_eq!(Series::E12.at_or_below(r(4500.0)).base(), 3900.0);
        assert_eq!(Series::E6.at_or_above(r(250.0)).base(), 330.0);
        assert_eq!(Series::E6.at_or_below(r(250.0)).base(), 220.0);
        assert_eq!(Series::E96.at_or_above(r(1005.0)).base(), 1020.0);
        assert_eq!(Series::E96.at_or_below(r(1005.0)).base(), 1000.0);
        assert_eq!(Series::E48.at_or_above(r(12_345.0)).base(), 12_700.0);
        assert_eq!(Series::E48.at_or_below(r(12_345.0)).base(), 12_100.0);
    }

    #[test]
    fn decade_edges() {
        assert_eq!(Series::E24.at_or_above(r(9500.0)).base(), 10_000.0);
        assert_eq!(Series::E24.at_or_below(r(9500.0)).base(), 9100.0);
        assert_eq!(Series::E24.at_or_above(r(0.95)).base(), 1.0);
        assert_eq!(Series::E24.at_or_below(r(0.95)).base(), 0.91);
        assert_eq!(Series::E96.at_or_above(r(9.9)).base(), 10.0);
        assert_eq!(Series::E96.at_or_below(r(10.05)).base(), 10.0);
        assert_eq!(Series::E6.at_or_below(r(999.0)).base(), 680.0);
        assert_eq!(Series::E6.at_or_above(r(1001.0)).base(), 1500.0);
        // Exactly on a power of ten, where floor(log10) is most fragile.
        for k in -3..=9 {
            let p = 10f64.powi(k);
            assert_eq!(Series::E24.at_or_above(r(p)).base(), p, "10^{k}");
            assert_eq!(Series::E24.at_or_below(r(p)).base(), p, "10^{k}");
        }
    }

    #[test]
    fn works_outside_the_usual_decades() {
        assert_eq!(Series::E24.at_or_above(r(0.0123)).base(), 0.013);
        assert_eq!(Series::E24.at_or_below(r(0.0123)).base(), 0.012);
        assert_eq!(Series::E12.at_or_above(r(25e6)).base(), 27e6);
        assert_eq!(Series::E12.at_or_below(r(25e6)).base(), 22e6);
        assert_eq!(Series::E24.nearest(r(1.23e9)).base(), 1.2e9);
        assert_eq!(Series::E24.at_or_above(r(1e-30)).base(), 1e-30);
        assert_eq!(Series::E6.at_or_above(r(2e40)).base(), 2.2e40);
    }

    #[test]
    fn nearest_uses_ratio_and_breaks_ties_upward() {
        // Between 1 k and 1.5 k (E6) the ratio midpoint is sqrt(1.5) k = 1224.7 ohm, not 1250.
        assert_eq!(Series::E6.nearest(r(1220.0)).base(), 1000.0);
        assert_eq!(Series::E6.nearest(r(1230.0)).base(), 1500.0);
        let midpoint = (1000.0f64 * 1500.0).sqrt();
        assert_eq!(Series::E6.nearest(r(midpoint)).base(), 1500.0);
        assert_eq!(Series::E24.nearest(r(4600.0)).base(), 4700.0);
        assert_eq!(Series::E24.nearest(r(4400.0)).base(), 4300.0);
        assert_eq!(Series::E24.nearest(r(9600.0)).base(), 10_000.0);
        assert_eq!(Series::E24.nearest(r(9500.0)).base(), 9100.0);
    }

    #[test]
    fn odd_inputs_come_back_unchanged() {
        for series in Series::ALL {
            for x in [0.0, -4700.0, f64::INFINITY] {
                assert_eq!(series.at_or_above(r(x)).base(), x);
                assert_eq!(series.at_or_below(r(x)).base(), x);
                assert_eq!(series.nearest(r(x)).base(), x);
            }
            assert!(series.nearest(r(f64::NAN)).base().is_nan());
            assert!(series.at_or_above(r(f64::MIN_POSITIVE)).base() > 0.0);
            assert!(series.at_or_below(r(f64::MAX)).base() <= f64::MAX);
        }
    }

    #[test]
    fn values_count_and_end_points() {
        for series in Series::ALL {
            let n = series.mantissas().len();
            let v: Vec<f64> = series.values().map(|x| x.base()).collect();
            assert_eq!(v.len(), 6 * n + 1, "{series}");
            assert_eq!(v[0], 10.0);
            assert_eq!(v[v.len() - 1], 10e6);
            assert!(v.windows(2).all(|w| w[0] < w[1]), "{series}");
        }
        assert_eq!(Series::E24.values().count(), 145);
        assert!(Series::E24.values().any(|x| x.base() == 4700.0));
        assert!(Series::E24.values().any(|x| x.base() == 91.0));
    }

    #[test]
    fn values_walk_backwards_and_clone() {
        let forward: Vec<f64> = Series::E12.values().map(|x| x.base()).collect();
        let mut backward: Vec<f64> = Series::E12.values().rev().map(|x| x.base()).collect();
        backward.reverse();
        assert_eq!(forward, backward);
        let mut it = Series::E12.values();
        it.next();
        let copy = it.clone();
        assert_eq!(it.count(), copy.count());
        assert_eq!(
            Series::E12.values().next_back().map(|x| x.base()),
            Some(10e6)
        );
    }

    #[test]
    fn parse_and_display() {
        for series in Series::ALL {
            assert_eq!(series.to_string().parse::<Series>(), Ok(series));
            assert_eq!(
                series.to_string().to_lowercase().parse::<Series>(),
                Ok(series)
            );
        }
        assert_eq!("e24".parse::<Series>(), Ok(Series::E24));
        assert_eq!(" E96 ".parse::<Series>(), Ok(Series::E96));
        assert_eq!(Series::E24.to_string(), "E24");
        for bad in ["", "E3", "E192", "24", "E 24", "E24x", "Е24"] {
            let err = bad.parse::<Series>().unwrap_err();
            assert_eq!(err.input, bad);
            let msg = err.to_string();
            for name in ["E6", "E12", "E24", "E48", "E96"] {
                assert!(msg.contains(name), "{msg}");
            }
        }
    }

    #[test]
    fn tolerance_hints_shrink_with_finer_series() {
        let hints: Vec<f64> = Series::ALL.iter().map(|s| s.tolerance_hint()).collect();
        assert_eq!(hints, [0.2, 0.1, 0.05, 0.02, 0.01]);
    }

    #[test]
    fn serde_round_trip_uses_the_name() {
        let json = serde_json::to_string(&Series::E48).unwrap();
        assert_eq!(json, "\"E48\"");
        assert_eq!(serde_json::from_str::<Series>(&json).unwrap(), Series::E48);
    }
}
