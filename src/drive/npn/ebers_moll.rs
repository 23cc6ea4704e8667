//! The Ebers-Moll model of an NPN transistor (transport form, no series resistances, no Early
//! effect, no high-injection roll-off), as used by the output-curve panel of the plot and checked
//! against ngspice's Gummel-Poon model with the same parameters in `tests/ngspice.rs`.
//!
//! Transport form [text: Ebers & Moll (1954); as presented in Sedra & Smith, Microelectronic
//! Circuits, section on the Ebers-Moll model; edition not checked, from memory]:
//!
//! ```text
//! IC = IS (e^(VBE/VT) - e^(VBC/VT)) - (IS / beta_R) (e^(VBC/VT) - 1)
//! IB = (IS / beta_F) (e^(VBE/VT) - 1) + (IS / beta_R) (e^(VBC/VT) - 1)
//! ```
//!
//! This is what SPICE's Gummel-Poon model reduces to with IKF, IKR, VAF, VAR infinite and
//! ISE = ISC = 0, NF = NR = 1 and no series resistances [text: SPICE2/ngspice BJT model
//! documentation, from memory].

/// Boltzmann constant, J/K [std: SI 2019, exact; BIPM SI Brochure, 9th edition].
pub const BOLTZMANN_J_PER_K: f64 = 1.380_649e-23;
/// Elementary charge, C [std: SI 2019, exact; BIPM SI Brochure, 9th edition].
pub const ELEMENTARY_CHARGE_C: f64 = 1.602_176_634e-19;
/// 0 C in kelvins [std: SI].
const ZERO_C_IN_K: f64 = 273.15;

/// Thermal voltage kT/q at `t_c` degrees Celsius, V [text].
pub fn thermal_voltage(t_c: f64) -> f64 {
    BOLTZMANN_J_PER_K * (t_c + ZERO_C_IN_K) / ELEMENTARY_CHARGE_C
}

/// Saturation voltage of the Ebers-Moll model at a forced beta IC/IB:
///
/// VCE(sat) = VT ln[(1/alpha_R + (IC/IB)/beta_R) / (1 - (IC/IB)/beta_F)],
/// alpha_R = beta_R / (1 + beta_R).
///
/// [text: Sedra & Smith, Microelectronic Circuits, the BJT saturation discussion of the
/// Ebers-Moll model, written there as VT ln[(1 + (beta_forced + 1)/beta_R) /
/// (1 - beta_forced/beta_F)], which is the same expression; edition not checked, from memory.]
/// It follows from the two equations of the module header with the "- 1" terms dropped.
///
/// Returns `f64::INFINITY` when `ic_over_ib >= beta_f` (the transistor cannot be held in
/// saturation at that forced beta) and NaN for inputs that are not positive and finite
/// (`ic_over_ib` may be zero).
pub fn vce_sat_ebers_moll(ic_over_ib: f64, beta_f: f64, beta_r: f64, vt: f64) -> f64 {
    let valid = |x: f64| x.is_finite() && x > 0.0;
    let inputs_ok = valid(beta_f) && valid(beta_r) && valid(vt);
    if !(inputs_ok && ic_over_ib.is_finite() && ic_over_ib >= 0.0) {
        return f64::NAN;
    }
    if ic_over_ib >= beta_f {
        return f64::INFINITY;
    }
    let alpha_r = beta_r / (1.0 + beta_r);
    let num = 1.0 / alpha_r + ic_over_ib / beta_r;
    let den = 1.0 - ic_over_ib / beta_f;
    vt * (num / den).ln()
}

/// One Ebers-Moll transistor: saturation current, forward and reverse gain, thermal voltage.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct EbersMoll {
    /// Transport saturation current IS, A.
    pub is: f64,
    /// Forward common-emitter gain beta_F.
    pub beta_f: f64,
    /// Reverse common-emitter gain beta_R.
    pub beta_r: f64,
    /// Thermal voltage kT/q, V.
    pub vt: f64,
}

impl EbersMoll {
    /// The model whose VBE is `vbe` when it carries `ic` and `ib` (A, V), with the given gains
    /// and thermal voltage. Solves the two equations of the module header exactly for IS and
    /// e^(VBC/VT):
    ///
    /// IS = (IC + (1 + beta_R) IB) / ((e^(VBE/VT) - 1)(1 + (1 + beta_R)/beta_F)).
    ///
    /// `None` when no such model exists (non-positive or non-finite inputs, or an operating point
    /// that would need e^(VBC/VT) <= 0, i.e. IC well above beta_F x IB).
    pub fn with_vbe_at(
        ic: f64,
        ib: f64,
        vbe: f64,
        beta_f: f64,
        beta_r: f64,
        vt: f64,
    ) -> Option<EbersMoll> {
        let ok = |x: f64| x.is_finite() && x > 0.0;
        if !(ok(ic) && ok(ib) && ok(vbe) && ok(beta_f) && ok(beta_r) && ok(vt)) {
            return None;
        }
        let x = (vbe / vt).exp();
        if !x.is_finite() || x <= 1.0 {
            return None;
        }
        let is = (ic + (1.0 + beta_r) * ib) / ((x - 1.0) * (1.0 + (1.0 + beta_r) / beta_f));
        // IS e^(VBC/VT) from the base equation.
        let q = beta_r * ib - is * (beta_r * (x - 1.0) / beta_f - 1.0);
        if !(ok(is) && q > 0.0) {
            return None;
        }
        Some(EbersMoll {
            is,
            beta_f,
            beta_r,
            vt,
        })
    }

    /// e^(VBE/VT) at base current `ib` and collector-emitter voltage `vce`: the base equation
    /// with e^(VBC/VT) = e^(VBE/VT) e^(-VCE/VT) is linear in e^(VBE/VT).
    fn vbe_exp(&self, ib: f64, vce: f64) -> f64 {
        let k = (-vce / self.vt).exp();
        (ib / self.is + 1.0 / self.beta_f + 1.0 / self.beta_r)
            / (1.0 / self.beta_f + k / self.beta_r)
    }

    /// VBE at base current `ib` and `vce`, V.
    pub fn vbe(&self, ib: f64, vce: f64) -> f64 {
        self.vt * self.vbe_exp(ib, vce).ln()
    }

    /// Collector current at base current `ib` and `vce`, A (may be slightly negative near
    /// VCE = 0, where the base-collector diode conducts the other way).
    pub fn collector_current(&self, ib: f64, vce: f64) -> f64 {
        let x = self.vbe_exp(ib, vce);
        let y = x * (-vce / self.vt).exp();
        self.is * (x - y) - self.is / self.beta_r * (y - 1.0)
    }

    /// The VCE at which IC/IB reaches `fraction` x beta_F: the knee of the output curves, the
    /// same for every base current in this model (the "- 1" terms dropped).
    pub fn knee(&self, fraction: f64) -> f64 {
        vce_sat_ebers_moll(fraction * self.beta_f, self.beta_f, self.beta_r, self.vt)
    }

    /// Where the output curve at `ib` meets the resistive load line from (`supply`, 0) to
    /// (0, `supply` / `r_load`): (VCE, IC). `None` for non-positive inputs.
    pub fn operating_point(&self, ib: f64, supply: f64, r_load: f64) -> Option<(f64, f64)> {
        let ok = |x: f64| x.is_finite() && x > 0.0;
        if !(ok(ib) && ok(supply) && ok(r_load)) {
            return None;
        }
        // f(VCE) = IC(VCE) - (supply - VCE)/R rises with VCE: negative at 0, >= 0 at the supply.
        let f = |v: f64| self.collector_current(ib, v) - (supply - v) / r_load;
        let v = bisect(f, 0.0, supply)?;
        Some((v, (supply - v) / r_load))
    }
}

/// Root of an increasing `f` on [lo, hi] by bisection; `None` when it does not change sign.
pub(crate) fn bisect(f: impl Fn(f64) -> f64, mut lo: f64, mut hi: f64) -> Option<f64> {
    let (flo, fhi) = (f(lo), f(hi));
    if !(flo.is_finite() && fhi.is_finite()) || flo > 0.0 || fhi < 0.0 {
        return None;
    }
    for _ in 0..200 {
        let mid = 0.5 * (lo + hi);
        if f(mid) < 0.0 {
            lo = mid;
        } else {
            hi = mid;
        }
    }
    Some(0.5 * (lo + hi))
}

#[cfg(test)]
mod tests {
    use super::*;
    use approx::assert_relative_eq;

    #[test]
    fn thermal_voltage_at_room_temperature() {
        // kT/q at 300 K is 25.85 mV [text: any device-physics text].
        assert_relative_eq!(thermal_voltage(26.85), 0.025852, max_relative = 1e-4);
    }

    #[test]
    fn closed_form_vce_sat_matches_the_full_model() {
        // The formula drops the "- 1" terms; at mA currents with IS ~ 1e-14 A the full model must
        // agree to far better than 0.1 %.
        let vt = thermal_voltage(25.0);
        let m = EbersMoll::with_vbe_at(0.05, 0.005, 0.8, 100.0, 2.0, vt).expect("model");
        for forced in [5.0, 10.0, 30.0, 60.0, 90.0] {
            let ib = 0.001;
            let v = bisect(|v| m.collector_current(ib, v) - forced * ib, 0.0, 1.0).expect("root");
            let formula = vce_sat_ebers_moll(forced, 100.0, 2.0, vt);
            assert_relative_eq!(v, formula, max_relative = 1e-3);
        }
    }

    #[test]
    fn model_reproduces_its_fitting_point() {
        let vt = thermal_voltage(-40.0);
        let m = EbersMoll::with_vbe_at(0.03, 0.0012, 0.88, 45.0, 2.0, vt).expect("model");
        // At the VCE where IC = 30 mA with IB = 1.2 mA, VBE must be 0.88 V.
        let v = bisect(|v| m.collector_current(0.0012, v) - 0.03, 0.0, 1.0).expect("root");
        assert_relative_eq!(m.vbe(0.0012, v), 0.88, max_relative = 1e-9);
    }

    #[test]
    fn active_region_gain_is_beta_f() {
        let m = EbersMoll {
            is: 1e-14,
            beta_f: 80.0,
            beta_r: 2.0,
            vt: thermal_voltage(25.0),
        };
        assert_relative_eq!(
            m.collector_current(1e-4, 5.0) / 1e-4,
            80.0,
            max_relative = 1e-6
        );
    }

    #[test]
    fn forced_beta_at_or_above_beta_f_cannot_saturate() {
        assert!(vce_sat_ebers_moll(100.0, 100.0, 2.0, 0.025).is_infinite());
        assert!(vce_sat_ebers_moll(-1.0, 100.0, 2.0, 0.025).is_nan());
        // Deep saturation approaches VT ln(1/alpha_R) = VT ln(1.5) for beta_R = 2.
        assert_relative_eq!(
            vce_sat_ebers_moll(0.0, 100.0, 2.0, 0.025),
            0.025 * 1.5f64.ln(),
            max_relative = 1e-12
        );
    }
}
