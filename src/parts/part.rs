//! A validated part: typed quantities and the look-ups the engine needs at 25 C.

use crate::quantity::{amps, volts, Base, Current, Temperature, ThermalResistance, Time, Voltage};

use super::PartSource;

/// A minimum (or maximum) gain figure at a collector current.
#[derive(Clone, Debug, PartialEq)]
pub struct GainPoint {
    /// Collector current.
    pub ic: Current,
    /// DC gain there.
    pub hfe: f64,
}

/// A VCE(sat) maximum at a test condition.
#[derive(Clone, Debug, PartialEq)]
pub struct VceSatPoint {
    /// Collector current.
    pub ic: Current,
    /// Base current of the test condition.
    pub ib: Current,
    /// The maximum VCE(sat).
    pub v: Voltage,
}

/// VBE(sat) limits at a test condition.
#[derive(Clone, Debug, PartialEq)]
pub struct VbeSatPoint {
    /// Collector current.
    pub ic: Current,
    /// Base current of the test condition.
    pub ib: Current,
    /// Minimum VBE(sat).
    pub min: Voltage,
    /// Maximum VBE(sat).
    pub max: Voltage,
}

/// A transistor the engine can use. Built only by [`super::part_from_record`], so every list is
/// non-empty and sorted by current and every figure is positive.
#[derive(Clone, Debug)]
pub struct Part {
    /// Unique id.
    pub id: String,
    /// One line for people.
    pub description: String,
    /// Polarity (always `npn` in version 1).
    pub polarity: String,
    /// Package.
    pub package: String,
    /// Where the figures come from.
    pub provenance: String,
    /// VCEO rating.
    pub vceo: Voltage,
    /// Rated collector current.
    pub ic_max: Current,
    /// Minimum gain points at 25 C.
    pub gain_min: Vec<GainPoint>,
    /// Maximum gain points at 25 C, when the file gives them.
    pub gain_max: Option<Vec<GainPoint>>,
    /// The gain temperature exponent XTB, and whether it was assumed.
    pub gain_temp_exponent: f64,
    /// True when the file gave no exponent and the default was taken.
    pub gain_temp_exponent_assumed: bool,
    /// VCE(sat) maximum points.
    pub vce_sat_max: Vec<VceSatPoint>,
    /// VBE(sat) points.
    pub vbe_sat: Vec<VbeSatPoint>,
    /// ICBO at 25 C.
    pub icbo_max: Current,
    /// True when the file gave no ICBO and the default was taken.
    pub icbo_assumed: bool,
    /// Storage time, when given.
    pub storage_time: Option<Time>,
    /// Maximum junction temperature.
    pub tj_max: Temperature,
    /// Junction-to-ambient thermal resistance.
    pub r_th_ja: ThermalResistance,
    /// Where the part was loaded from.
    pub source: PartSource,
}

impl Part {
    /// Minimum gain at `ic` and 25 C: log-log interpolation between the points, the first value
    /// below the first point, and a 1/IC fall above the last point (stage-model 3: [text + practice]).
    pub fn gain_min_at(&self, ic: Current) -> f64 {
        gain_at(&self.gain_min, ic)
    }

    /// Maximum gain at `ic` and 25 C, when the part gives maximum points.
    pub fn gain_max_at(&self, ic: Current) -> Option<f64> {
        self.gain_max.as_deref().map(|points| gain_at(points, ic))
    }

    /// Maximum VCE(sat) at `ic`: linear in IC between points, the first value below the first
    /// point, extrapolated through the origin above the last (stage-model 3).
    pub fn vce_sat_max_at(&self, ic: Current) -> Voltage {
        let x = ic.base();
        let pts = &self.vce_sat_max;
        // `part_from_record` never builds a part without points; with none, no figure is known,
        // and an infinite VCE(sat) fails every check it reaches rather than passing one.
        let (Some(first), Some(last)) = (pts.first(), pts.last()) else {
            return volts(f64::INFINITY);
        };
        if x <= first.ic.base() {
            return first.v;
        }
        if x >= last.ic.base() {
            return volts(last.v.base() * x / last.ic.base());
        }
        volts(linear(pts.iter().map(|p| (p.ic.base(), p.v.base())), x))
    }

    /// VBE(sat) (minimum, maximum) at `ic` and 25 C: linear in IC between points, held at the end
    /// values outside them (stage-model 5).
    pub fn vbe_sat_at(&self, ic: Current) -> (Voltage, Voltage) {
        let x = ic.base();
        let pts = &self.vbe_sat;
        let min = held_linear(pts.iter().map(|p| (p.ic.base(), p.min.base())), x);
        let max = held_linear(pts.iter().map(|p| (p.ic.base(), p.max.base())), x);
        (volts(min), volts(max))
    }

    /// The collector current of the last gain point (the roll-off begins above it).
    pub fn gain_last_ic(&self) -> Current {
        self.gain_min
            .last()
            .map(|p| p.ic)
            .unwrap_or_else(|| amps(0.0))
    }
}

/// Gain at `ic` from sorted points: log-log between points, flat below, 1/IC above.
fn gain_at(points: &[GainPoint], ic: Current) -> f64 {
    let x = ic.base();
    // `part_from_record` never builds a part without points; with none, no gain is known and
    // zero gain is the conservative answer.
    let (Some(first), Some(last)) = (points.first(), points.last()) else {
        return 0.0;
    };
    if x <= first.ic.base() {
        return first.hfe;
    }
    if x >= last.ic.base() {
        return last.hfe * last.ic.base() / x;
    }
    let logs = points.iter().map(|p| (p.ic.base().ln(), p.hfe.ln()));
    linear(logs, x.ln()).exp()
}

/// Linear interpolation between sorted points for an `x` inside their span.
fn linear(points: impl Iterator<Item = (f64, f64)> + Clone, x: f64) -> f64 {
    let mut prev: Option<(f64, f64)> = None;
    for (px, py) in points {
        if let Some((ax, ay)) = prev {
            if x <= px {
                if px == ax {
                    return py;
                }
                return ay + (py - ay) * (x - ax) / (px - ax);
            }
        }
        prev = Some((px, py));
    }
    prev.map(|(_, y)| y).unwrap_or(f64::NAN)
}

/// Linear between points, held at the end values outside.
fn held_linear(points: impl Iterator<Item = (f64, f64)> + Clone, x: f64) -> f64 {
    let mut it = points.clone();
    let Some((fx, fy)) = it.next() else {
        return f64::NAN;
    };
    if x <= fx {
        return fy;
    }
    let (lx, ly) = points.clone().last().unwrap_or((fx, fy));
    if x >= lx {
        return ly;
    }
    linear(points, x)
}

#[cfg(test)]
pub(crate) mod tests {
    use super::*;
    use crate::parts::Library;
    use approx::assert_relative_eq;

    pub(crate) fn demo40() -> Part {
        Library::builtin()
            .expect("shipped parts load")
            .get("demo-npn-40v")
            .expect("demo part is shipped")
            .clone()
    }

    #[test]
    fn gain_is_interpolated_log_log_between_points() {
        let p = demo40();
        // Points (10 mA, 100) and (50 mA, 60): at 20 mA log-log gives 100 * (2)^(ln(0.6)/ln(5)).
        let expected = 100.0 * 2f64.powf((0.6f64).ln() / 5f64.ln());
        assert_relative_eq!(p.gain_min_at(amps(0.02)), expected, max_relative = 1e-12);
        assert_relative_eq!(p.gain_min_at(amps(0.05)), 60.0, max_relative = 1e-12);
    }

    #[test]
    fn gain_is_flat_below_and_falls_as_one_over_ic_above() {
        let p = demo40();
        assert_relative_eq!(p.gain_min_at(amps(0.001)), 100.0);
        // Above the last point (100 mA, 30) the gain falls as 1/IC: 30 at 100 mA -> 15 at 200 mA.
        assert_relative_eq!(p.gain_min_at(amps(0.2)), 15.0, max_relative = 1e-12);
    }

    #[test]
    fn vce_sat_is_linear_then_resistive() {
        let p = demo40();
        assert_relative_eq!(p.vce_sat_max_at(amps(0.005)).base(), 0.2);
        assert_relative_eq!(
            p.vce_sat_max_at(amps(0.03)).base(),
            0.25,
            max_relative = 1e-12
        );
        // Through the origin above the last point: 0.3 V at 50 mA -> 0.6 V at 100 mA.
        assert_relative_eq!(
            p.vce_sat_max_at(amps(0.1)).base(),
            0.6,
            max_relative = 1e-12
        );
    }

    #[test]
    fn a_part_without_points_gives_conservative_figures_not_a_panic() {
        // Regression for the indexing lint: `pts[0]` used to panic on an empty list. Parts from
        // files always have points; one built by hand without them gets no gain and an infinite
        // VCE(sat), which fail the checks instead of passing them.
        let mut p = demo40();
        p.gain_min.clear();
        p.vce_sat_max.clear();
        assert_eq!(p.gain_min_at(amps(0.02)), 0.0);
        assert!(p.vce_sat_max_at(amps(0.02)).base().is_infinite());
    }

    #[test]
    fn vbe_sat_is_held_outside_the_points() {
        let p = demo40();
        let (lo, hi) = p.vbe_sat_at(amps(0.001));
        assert_relative_eq!(lo.base(), 0.65);
        assert_relative_eq!(hi.base(), 0.85);
        let (lo, hi) = p.vbe_sat_at(amps(0.03));
        assert_relative_eq!(lo.base(), 0.675, max_relative = 1e-12);
        assert_relative_eq!(hi.base(), 0.9, max_relative = 1e-12);
        let (lo, hi) = p.vbe_sat_at(amps(1.0));
        assert_relative_eq!(lo.base(), 0.7);
        assert_relative_eq!(hi.base(), 0.95);
    }
}
