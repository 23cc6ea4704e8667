//! Reading a figure between the points a datasheet gives (stage-model 3 and 5): linear between
//! points, held at the end values or extrapolated outside them, log-log for gains.

/// Linear interpolation between points sorted by x, for an `x` inside their span; the last y
/// beyond it; NaN with no points.
pub fn linear(points: &[(f64, f64)], x: f64) -> f64 {
    let mut prev: Option<(f64, f64)> = None;
    for &(px, py) in points {
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

/// Linear between points, held at the end values outside them (VBE(sat), stage-model 5).
pub fn held(points: &[(f64, f64)], x: f64) -> f64 {
    let (Some(&(fx, fy)), Some(&(lx, ly))) = (points.first(), points.last()) else {
        return f64::NAN;
    };
    if x <= fx {
        fy
    } else if x >= lx {
        ly
    } else {
        linear(points, x)
    }
}

/// The first value below the first point, linear between points, through the origin above the
/// last (resistive: VCE(sat), stage-model 3).
pub fn resistive(points: &[(f64, f64)], x: f64) -> f64 {
    let (Some(&(fx, fy)), Some(&(lx, ly))) = (points.first(), points.last()) else {
        // No figure is known: an infinite voltage fails every check it reaches.
        return f64::INFINITY;
    };
    if x <= fx {
        fy
    } else if x >= lx {
        ly * x / lx
    } else {
        linear(points, x)
    }
}

/// Gain from points: log-log between points, the first value below the first point, a 1/x fall
/// above the last (high-injection roll-off, conservative; stage-model 3). 0 with no points.
pub fn gain(points: &[(f64, f64)], x: f64) -> f64 {
    let (Some(&(fx, fy)), Some(&(lx, ly))) = (points.first(), points.last()) else {
        return 0.0;
    };
    if x <= fx {
        return fy;
    }
    if x >= lx {
        return ly * lx / x;
    }
    let logs: Vec<(f64, f64)> = points.iter().map(|&(a, b)| (a.ln(), b.ln())).collect();
    linear(&logs, x.ln()).exp()
}

#[cfg(test)]
mod tests {
    use super::*;
    use approx::assert_relative_eq;

    const GAIN: [(f64, f64); 3] = [(0.01, 100.0), (0.05, 60.0), (0.1, 30.0)];

    #[test]
    fn gain_is_log_log_between_points_flat_below_and_one_over_x_above() {
        // Points (10 mA, 100) and (50 mA, 60): at 20 mA log-log gives 100 x 2^(ln 0.6 / ln 5).
        let expected = 100.0 * 2f64.powf((0.6f64).ln() / 5f64.ln());
        assert_relative_eq!(gain(&GAIN, 0.02), expected, max_relative = 1e-12);
        assert_relative_eq!(gain(&GAIN, 0.001), 100.0);
        // 30 at 100 mA falls to 15 at 200 mA.
        assert_relative_eq!(gain(&GAIN, 0.2), 15.0, max_relative = 1e-12);
        assert_eq!(gain(&[], 0.2), 0.0);
    }

    #[test]
    fn resistive_and_held_readings() {
        let vce = [(0.01, 0.2), (0.05, 0.3)];
        assert_relative_eq!(resistive(&vce, 0.005), 0.2);
        assert_relative_eq!(resistive(&vce, 0.03), 0.25, max_relative = 1e-12);
        assert_relative_eq!(resistive(&vce, 0.1), 0.6, max_relative = 1e-12);
        assert!(resistive(&[], 0.1).is_infinite());
        let vbe = [(0.01, 0.85), (0.1, 0.95)];
        assert_relative_eq!(held(&vbe, 0.001), 0.85);
        assert_relative_eq!(held(&vbe, 1.0), 0.95);
        assert_relative_eq!(held(&vbe, 0.055), 0.9, max_relative = 1e-12);
    }
}
