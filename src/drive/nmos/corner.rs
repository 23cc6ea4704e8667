//! The MOSFET's worst-case figures (stage-model 8): the gate divider, the threshold at its
//! corners, RDS(on) at the drive, the self-consistent junction temperature, and the sizing of RG
//! and RGS. Arithmetic on typed quantities only.

use super::part::{NmosPart, RdsOnPoint};
use crate::conditions::{Conditions, PullDown};
use crate::drive::Corner;
use crate::quantity::{
    amps, celsius, ohms, volts, watts, Base, Current, Power, Resistance, Temperature, Voltage,
};

/// Reference temperature of the part's figures, C.
pub const T_REF_C: f64 = 25.0;
/// The sized gate pull-down is the series value nearest this many times RG [practice: 10 k to
/// 100 k] (stage-model 8).
pub const GATE_PULL_DOWN_RATIO: f64 = 100.0;
/// Smallest and largest gate resistor the sizing takes, ohms.
pub const RG_RANGE_OHMS: (f64, f64) = (10.0, 10e6);

/// The pull-down that goes with a gate resistor under the stage's rule.
pub fn pull_down_for(c: &Conditions, rg: Resistance) -> Option<Resistance> {
    match c.inputs.pull_down {
        PullDown::None => None,
        PullDown::Given(r) => Some(r),
        PullDown::Sized => Some(c.series.nearest(rg * GATE_PULL_DOWN_RATIO)),
    }
}

/// RG: the smallest series value with VOH,max / (RG x (1 - tol)) <= the pin limit.
pub fn size_gate(c: &Conditions) -> Resistance {
    let (lowest, highest) = RG_RANGE_OHMS;
    let ideal = c.logic_high.base() / (c.pin_limit.base() * (1.0 - c.resistor_tolerance));
    if !ideal.is_finite() || ideal <= lowest {
        return ohms(lowest);
    }
    let r = c.series.at_or_above(ohms(ideal));
    let r = if pin_current_max(c, r) > c.pin_limit {
        c.series.at_or_above(r * (1.0 + 1e-6))
    } else {
        r
    };
    ohms(r.base().min(highest))
}

/// Pin current max = VOH,max / RG- (the gate is a short at the switching edge).
pub fn pin_current_max(c: &Conditions, rg: Resistance) -> Current {
    c.logic_high / c.low(rg)
}

/// The junction solution of stage-model 8.
#[derive(Clone, Copy, Debug, PartialEq)]
pub enum Junction {
    /// Self-consistent (or, below 25 C, without a temperature factor).
    Settled {
        /// Highest junction temperature.
        tj: Temperature,
        /// RDS(on) at that temperature.
        rds: Resistance,
    },
    /// The denominator is not positive: the heating of RDS(on) outruns the cooling.
    Runaway,
}

/// Every worst-case figure of a MOSFET stage with its resistors fixed.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct NmosWorst {
    /// RG.
    pub rg: Resistance,
    /// RGS, if fitted.
    pub rgs: Option<Resistance>,
    /// ID,max.
    pub id_max: Current,
    /// VGS,min = VOH,min x RGS- / (RG+ + RGS-), or VOH,min.
    pub vgs_min: Voltage,
    /// VGS,eff = VGS,min less the threshold's rise in the cold.
    pub vgs_eff: Voltage,
    /// VGS(th),max at Ta,min.
    pub th_max_cold: Voltage,
    /// VGS(th),min at Ta,max.
    pub th_min_hot: Voltage,
    /// The RDS(on) point the drive is read at.
    pub point: RdsOnPoint,
    /// True when a point at or below VGS,eff exists (else the lowest is taken, not guaranteed).
    pub point_qualifies: bool,
    /// The smallest specified gate voltage.
    pub lowest_vgs: Voltage,
    /// True when VGS,min reaches 1.5 x VGS(th),max cold or a specified point (not failing).
    pub pinned: bool,
    /// The junction: settled or runaway (ohmic formulas).
    pub junction: Junction,
    /// RDS(on),max reported (`None` under runaway while pinned).
    pub rds_max: Option<Resistance>,
    /// Von,max reported (`None` under runaway while pinned).
    pub von_max: Option<Voltage>,
    /// The on-voltage the load checks take (Von,max, or the runaway fallback at Tj,max).
    pub von_for_loads: Voltage,
    /// Power max (`None` under runaway while pinned).
    pub power_max: Option<Power>,
    /// Junction max (`None` under runaway while pinned).
    pub junction_max: Option<Temperature>,
    /// Largest pin current.
    pub pin_current_max: Current,
    /// Gate leakage voltage across RGS+ (IGSS x RGS+), when fitted.
    pub leakage_voltage: Option<Voltage>,
    /// Worst power in RG.
    pub rg_power: Power,
    /// Worst power in RGS.
    pub rgs_power: Option<Power>,
}

impl NmosPart {
    /// VGS(th) at `t` from a 25 C figure.
    pub fn threshold_at(&self, v25: Voltage, t: Temperature) -> Voltage {
        v25 + volts(self.th_tempco * (t.base() - T_REF_C))
    }

    /// VGS,min with these resistors.
    pub fn gate_voltage_min(
        &self,
        c: &Conditions,
        rg: Resistance,
        rgs: Option<Resistance>,
    ) -> Voltage {
        match rgs {
            Some(r) => {
                let low = c.low(r);
                c.logic_high_min * (low.base() / (c.high(rg).base() + low.base()))
            }
            None => c.logic_high_min,
        }
    }

    /// The RDS(on) point for a gate voltage: the largest `vgs_v` at or below `vgs_eff` (never
    /// interpolated upward); when none qualifies, the lowest point (not guaranteed).
    pub fn point_for(&self, vgs_eff: Voltage) -> (RdsOnPoint, bool) {
        let lowest = self.rds_on.first().copied().unwrap_or(RdsOnPoint {
            vgs: volts(f64::INFINITY),
            ohms: ohms(f64::INFINITY),
            id: None,
        });
        match self.rds_on.iter().rev().find(|p| p.vgs <= vgs_eff) {
            Some(p) => (*p, true),
            None => (lowest, false),
        }
    }

    /// VGS,eff = VGS,min - max(0, c_th x (Ta,min - 25)).
    pub fn gate_voltage_eff(&self, c: &Conditions, vgs_min: Voltage) -> Voltage {
        let rise = (self.th_tempco * (c.ambient_min.base() - T_REF_C)).max(0.0);
        vgs_min - volts(rise)
    }

    /// The self-consistent junction: Tj = (Ta,max + P25 R (1 - 25 a)) / (1 - a P25 R), with
    /// P25 = ID^2 x RDS(on)(25 C); below 25 C, Ta,max + P25 R and no temperature factor; a
    /// denominator <= 0 is thermal runaway (stage-model 8).
    pub fn junction(&self, c: &Conditions, id: Current, rds25: Resistance) -> Junction {
        let a = self.rds_tempco;
        let r = self.info.r_th_ja.base();
        let p25 = id.base() * id.base() * rds25.base();
        let den = 1.0 - a * p25 * r;
        if den <= 0.0 {
            return Junction::Runaway;
        }
        let tj = (c.ambient_max.base() + p25 * r * (1.0 - T_REF_C * a)) / den;
        if tj < T_REF_C {
            return Junction::Settled {
                tj: celsius(c.ambient_max.base() + p25 * r),
                rds: rds25,
            };
        }
        Junction::Settled {
            tj: celsius(tj),
            rds: self.rds_at(rds25, celsius(tj)),
        }
    }

    /// RDS(on) at junction temperature `tj` from its 25 C figure.
    pub fn rds_at(&self, rds25: Resistance, tj: Temperature) -> Resistance {
        rds25 * (1.0 + self.rds_tempco * (tj.base() - T_REF_C))
    }

    /// Von,max at a drain current with these resistors (what the load checks take): from the
    /// settled junction, or under runaway ID x RDS(on)(25 C) x (1 + a (Tj,max - 25)).
    pub fn on_voltage_for_loads(
        &self,
        c: &Conditions,
        rg: Resistance,
        rgs: Option<Resistance>,
        id: Current,
    ) -> Voltage {
        let vgs_min = self.gate_voltage_min(c, rg, rgs);
        let (point, _) = self.point_for(self.gate_voltage_eff(c, vgs_min));
        match self.junction(c, id, point.ohms) {
            Junction::Settled { rds, .. } => id * rds,
            Junction::Runaway => id * self.rds_at(point.ohms, self.info.tj_max),
        }
    }
}

impl NmosWorst {
    /// The threshold's rise in the cold that VGS,eff takes off VGS,min (0 when Ta,min >= 25 C).
    pub fn cold_rise(&self) -> Voltage {
        self.vgs_min - self.vgs_eff
    }

    /// Evaluate the part with these resistors at the load corner.
    pub fn of(
        part: &NmosPart,
        c: &Conditions,
        load: &Corner,
        rg: Resistance,
        rgs: Option<Resistance>,
    ) -> NmosWorst {
        let id = amps(load.current_max.base().max(0.0));
        let vgs_min = part.gate_voltage_min(c, rg, rgs);
        let vgs_eff = part.gate_voltage_eff(c, vgs_min);
        let th_max_cold = part.threshold_at(part.vgs_th_max, c.ambient_min);
        let th_min_hot = part.threshold_at(part.vgs_th_min, c.ambient_max);
        let (point, qualifies) = part.point_for(vgs_eff);
        let lowest_vgs = part.rds_on.first().map(|p| p.vgs).unwrap_or(point.vgs);
        let pinned = lowest_vgs <= vgs_min || vgs_min.base() >= 1.5 * th_max_cold.base();
        let junction = part.junction(c, id, point.ohms);
        let r = part.info.r_th_ja;
        let (rds_max, von_max, power_max, junction_max) = if pinned {
            match junction {
                Junction::Settled { tj, rds } => {
                    let von = id * rds;
                    (Some(rds), Some(von), Some(id * von), Some(tj))
                }
                Junction::Runaway => (None, None, None, None),
            }
        } else {
            // Not fully on: the linear-region rule for the power (stage-model 4), no runaway
            // test; RDS(on) and Von still from the ohmic formulas at that junction temperature.
            let p: Power = watts(load.linear_fraction * load.vcc_max.base() * id.base());
            let tj = c.ambient_max + p * r;
            // Below 25 C no temperature factor, as in the settled case.
            let rds = if tj.base() < T_REF_C {
                point.ohms
            } else {
                part.rds_at(point.ohms, tj)
            };
            (Some(rds), Some(id * rds), Some(p), Some(tj))
        };
        let von_for_loads = match von_max {
            Some(v) => v,
            None => id * part.rds_at(point.ohms, part.info.tj_max),
        };
        let steady = match rgs {
            Some(s) => c.logic_high.base() / (c.low(rg).base() + c.low(s).base()),
            None => 0.0,
        };
        NmosWorst {
            rg,
            rgs,
            id_max: id,
            vgs_min,
            vgs_eff,
            th_max_cold,
            th_min_hot,
            point,
            point_qualifies: qualifies,
            lowest_vgs,
            pinned,
            junction,
            rds_max,
            von_max,
            von_for_loads,
            power_max,
            junction_max,
            pin_current_max: pin_current_max(c, rg),
            leakage_voltage: rgs.map(|s| part.igss * c.high(s)),
            rg_power: watts(steady * steady * c.low(rg).base()),
            rgs_power: rgs.map(|s| watts(steady * steady * c.low(s).base())),
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::conditions::InputResistors;
    use crate::eseries::Series;
    use crate::parts::PartSource;
    use approx::assert_relative_eq;

    fn part() -> NmosPart {
        let v: serde_json::Value = serde_json::from_str(
            r#"{"id": "m", "polarity": "nmos", "package": "SOT-23", "provenance": "test",
            "vds_max_v": 20, "id_max_a": 3, "vgs_max_v": 12, "vgs_th": {"min_v": 0.6, "max_v": 1.4},
            "rds_on_max": [{"vgs_v": 1.8, "ohms": 0.12}, {"vgs_v": 2.5, "ohms": 0.07}, {"vgs_v": 4.5, "ohms": 0.05}],
            "tj_max_c": 150, "r_th_ja_k_per_w": 250}"#,
        )
        .expect("json");
        NmosPart::from_value(&v, "m.json", PartSource::File("m.json".into())).expect("valid")
    }

    fn conditions() -> Conditions {
        Conditions {
            supply: volts(12.0),
            supply_tolerance: 0.05,
            logic_high: volts(3.3),
            logic_high_min: volts(2.9),
            pin_limit: amps(0.008),
            ambient_min: celsius(-20.0),
            ambient_max: celsius(60.0),
            resistor_tolerance: 0.05,
            series: Series::E24,
            resistor_rating: None,
            inputs: InputResistors {
                series: None,
                pull_down: PullDown::Sized,
            },
            overdrive: 2.0,
        }
    }

    #[test]
    fn gate_resistor_keeps_the_pin_within_its_limit() {
        // Ohm's law: 3.3 V / (8 mA x 0.95) = 434.2 ohm -> E24 470 ohm.
        assert_eq!(size_gate(&conditions()).base(), 470.0);
    }

    #[test]
    fn the_junction_settles_as_the_closed_form_says() {
        // Stage-model 8's closed form solves Tj = Ta + ID^2 RDS25 (1 + a (Tj - 25)) R: check
        // that the solution satisfies that balance (the fixed point of the heating loop).
        let p = part();
        let c = conditions();
        let id = amps(1.0);
        match p.junction(&c, id, ohms(0.07)) {
            Junction::Settled { tj, rds } => {
                let back = c.ambient_max.base() + id.base() * id.base() * rds.base() * 250.0;
                assert_relative_eq!(tj.base(), back, max_relative = 1e-12);
            }
            Junction::Runaway => panic!("1 A in 70 mohm at 250 K/W settles"),
        }
        // 3 A in 0.07 ohm at 250 K/W: a P25 R = 0.006 x 0.63 x 250 = 0.945 < 1, settles hot;
        // 4 A: 0.006 x 1.12 x 250 = 1.68 > 1, runaway.
        assert!(matches!(
            p.junction(&c, amps(4.0), ohms(0.07)),
            Junction::Runaway
        ));
    }

    #[test]
    fn the_gate_divider_and_the_cold_threshold() {
        let p = part();
        let c = conditions();
        // RGS 47k, RG 470: VGS,min = 2.9 x 44650 / (493.5 + 44650) = 2.868 V.
        let v = p.gate_voltage_min(&c, ohms(470.0), Some(ohms(47_000.0)));
        assert_relative_eq!(
            v.base(),
            2.9 * 44_650.0 / (493.5 + 44_650.0),
            max_relative = 1e-12
        );
        // -5 mV/K: the threshold rises 0.225 V from 25 C to -20 C; VGS,eff = 2.643 V picks the
        // 2.5 V point.
        let eff = p.gate_voltage_eff(&c, v);
        assert_relative_eq!(v.base() - eff.base(), 0.225, max_relative = 1e-9);
        assert_eq!(p.point_for(eff).0.vgs.base(), 2.5);
    }

    /// Stage-model 8 reads the RDS(on) point at VGS,eff (the drive less the cold threshold
    /// rise) and calls the figure not guaranteed when no point lies there; pinlow then holds
    /// pinned-low to marginal, as for a point's test current (docs/model.md, readings).
    #[test]
    fn a_point_reached_only_before_the_cold_rise_is_marginal() {
        use crate::check::Status;
        let v: serde_json::Value = serde_json::from_str(
            r#"{"id": "m2", "polarity": "nmos", "package": "SOT-23", "provenance": "test",
            "vds_max_v": 20, "id_max_a": 3, "vgs_max_v": 12, "vgs_th": {"min_v": 0.6, "max_v": 1.4},
            "rds_on_max": [{"vgs_v": 2.5, "ohms": 0.07}, {"vgs_v": 4.5, "ohms": 0.05}],
            "tj_max_c": 150, "r_th_ja_k_per_w": 250}"#,
        )
        .expect("json");
        let p =
            NmosPart::from_value(&v, "m2.json", PartSource::File("m2.json".into())).expect("valid");
        let corner = Corner {
            vcc_max: volts(12.6),
            vcc_min: volts(11.4),
            current_max: amps(0.5),
            linear_fraction: 1.0,
            peak: None,
            inductive: false,
        };
        let mut c = conditions();
        c.logic_high_min = volts(2.6);
        c.inputs.pull_down = PullDown::None;
        let at = |c: &Conditions| {
            let w = NmosWorst::of(&p, c, &corner, ohms(470.0), None);
            (w, super::super::checks::pinned_low(&w))
        };
        // -20 C: VGS,eff = 2.6 - 0.005 x 45 = 2.375 V, below the 2.5 V point.
        let (w, f) = at(&c);
        assert!(!w.point_qualifies);
        assert_eq!(f.status, Status::Marginal);
        assert!(
            f.why.sentence().contains("not guaranteed"),
            "{}",
            f.why.sentence()
        );
        // At 25 C there is no rise: the point qualifies and the stage passes.
        c.ambient_min = celsius(25.0);
        let (w, f) = at(&c);
        assert!(w.point_qualifies);
        assert_eq!(f.status, Status::Pass, "{}", f.why.sentence());
    }
}
