//! Worst-case corners (extreme-value analysis, stage-model 4): each figure at the corner that
//! hurts its check.

use super::temperature::{gain_factor, icbo_at, turn_on_edge, vbe_at};
use crate::load::Load;
use crate::quantity::{amps, watts, Base, Current, Power, Resistance, Temperature, Voltage};
use crate::stage::Stage;

/// The resistor values a stage is evaluated with (given or sized).
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Resistors {
    /// Base resistor.
    pub rb: Resistance,
    /// Pull-down, if fitted.
    pub rbe: Option<Resistance>,
    /// LED series resistor, for LED loads that have one.
    pub rl: Option<Resistance>,
}

/// The figures that do not depend on RB: computed once per stage, reused while sizing.
#[derive(Clone, Copy, Debug)]
pub struct LoadCorner {
    /// Highest supply.
    pub vcc_max: Voltage,
    /// Lowest supply.
    pub vcc_min: Voltage,
    /// IC,max.
    pub ic_max: Current,
    /// hFE,min at IC,max and Ta,min.
    pub gain_min: f64,
    /// VBE(sat),max at IC,max and Ta,min.
    pub vbe_sat_max_cold: Voltage,
    /// VBE(sat),min at IC,max and Ta,max.
    pub vbe_sat_min_hot: Voltage,
    /// VCE(sat),max at IC,max.
    pub vce_sat_max: Voltage,
}

impl LoadCorner {
    /// The load-side corner of a stage for a given LED resistor.
    pub fn of(stage: &Stage, rl: Option<Resistance>) -> LoadCorner {
        let vcc_max = stage.supply_max();
        let ic_max = stage.load.collector_current_max(
            vcc_max,
            stage.ambient_min,
            stage.resistor_tolerance,
            rl,
        );
        let part = &stage.part;
        let gain_min =
            part.gain_min_at(ic_max) * gain_factor(stage.ambient_min, part.gain_temp_exponent);
        let (vbe_min, vbe_max) = part.vbe_sat_at(ic_max);
        LoadCorner {
            vcc_max,
            vcc_min: stage.supply_min(),
            ic_max,
            gain_min,
            vbe_sat_max_cold: vbe_at(vbe_max, stage.ambient_min),
            vbe_sat_min_hot: vbe_at(vbe_min, stage.ambient_max),
            vce_sat_max: part.vce_sat_max_at(ic_max),
        }
    }

    /// IB,min at Ta,min for these resistors: (VOH,min - VBE(sat),max) / RB+ minus
    /// VBE(sat),max / RBE-. May be zero or negative: the stage cannot turn on.
    pub fn base_current_min(
        &self,
        stage: &Stage,
        rb: Resistance,
        rbe: Option<Resistance>,
    ) -> Current {
        let tol = stage.resistor_tolerance;
        let through_rb = (stage.logic_high_min - self.vbe_sat_max_cold) / (rb * (1.0 + tol));
        let stolen = match rbe {
            Some(r) => self.vbe_sat_max_cold / (r * (1.0 - tol)),
            None => amps(0.0),
        };
        through_rb - stolen
    }

    /// Worst-case overdrive hFE,wc x IB,min / IC,max; infinite when the load draws nothing.
    pub fn overdrive(&self, base_current_min: Current) -> f64 {
        let ib = base_current_min.base();
        if self.ic_max.base() <= 0.0 {
            return if ib > 0.0 { f64::INFINITY } else { 0.0 };
        }
        self.gain_min * ib / self.ic_max.base()
    }
}

/// LED currents at their corners.
#[derive(Clone, Copy, Debug)]
pub struct LedCurrents {
    /// (VCC,min - n Vf,max - VCE(sat),max) / RL+, never below 0.
    pub min: Current,
    /// (VCC,max - n Vf,min) / RL-, never below 0.
    pub max: Current,
}

/// Every worst-case figure of a stage with its resistors fixed.
#[derive(Clone, Debug)]
pub struct WorstCase {
    /// The resistors evaluated.
    pub resistors: Resistors,
    /// The load-side corner.
    pub load: LoadCorner,
    /// IB,min at Ta,min.
    pub base_current_min: Current,
    /// Worst-case overdrive.
    pub overdrive_min: f64,
    /// IC,max / IB,min; `None` when the stage cannot turn on.
    pub forced_beta_max: Option<f64>,
    /// Largest current the pin sources: (VOH,max - VBE(sat),min(Ta,max)) / RB-.
    pub pin_current_max: Current,
    /// Largest dissipation in the transistor.
    pub power_max: Power,
    /// Highest junction temperature.
    pub junction_max: Temperature,
    /// Highest collector voltage; `None` for an inductive load without a clamp (unbounded).
    pub collector_peak: Option<Voltage>,
    /// Leakage voltage across the pull-down at Ta,max (ICBO x RBE+), when one is fitted.
    pub leakage_voltage: Option<Voltage>,
    /// The turn-on edge at Ta,max.
    pub turn_on_edge_hot: Voltage,
    /// LED currents, for LED loads with a resistor.
    pub led: Option<LedCurrents>,
    /// Worst power in RB.
    pub rb_power: Power,
    /// Worst power in RBE.
    pub rbe_power: Option<Power>,
    /// Worst power in RL.
    pub rl_power: Option<Power>,
}

impl WorstCase {
    /// Evaluate a stage with these resistors.
    pub fn of(stage: &Stage, resistors: Resistors) -> WorstCase {
        let load = LoadCorner::of(stage, resistors.rl);
        Self::with_corner(stage, resistors, load)
    }

    /// Evaluate with an already computed load corner (same `rl`).
    pub fn with_corner(stage: &Stage, resistors: Resistors, load: LoadCorner) -> WorstCase {
        let tol = stage.resistor_tolerance;
        let rb = resistors.rb;
        let base_current_min = load.base_current_min(stage, rb, resistors.rbe);
        let overdrive_min = load.overdrive(base_current_min);
        let forced_beta_max = if base_current_min.base() > 0.0 {
            Some(load.ic_max.base() / base_current_min.base())
        } else {
            None
        };
        let rb_minus = rb * (1.0 - tol);
        let drive = stage.logic_high - load.vbe_sat_min_hot;
        let pin_current_max = if drive.base() > 0.0 {
            drive / rb_minus
        } else {
            amps(0.0)
        };
        let power_max: Power =
            load.vce_sat_max * load.ic_max + load.vbe_sat_max_cold * pin_current_max;
        let junction_max = stage.ambient_max + power_max * stage.part.r_th_ja;
        let collector_peak = match (&stage.load, stage.clamp.voltage()) {
            (Load::Relay(_), Some(vc)) => Some(load.vcc_max + vc),
            (Load::Relay(_), None) => None,
            _ => Some(load.vcc_max),
        };
        let leakage_voltage = resistors
            .rbe
            .map(|r| icbo_at(stage.part.icbo_max, stage.ambient_max) * (r * (1.0 + tol)));
        let led = match (&stage.load, resistors.rl) {
            (Load::Led(l), Some(rl)) => {
                let max = (load.vcc_max - l.drop_min()) / (rl * (1.0 - tol));
                let min = (load.vcc_min - l.drop_max() - load.vce_sat_max) / (rl * (1.0 + tol));
                Some(LedCurrents {
                    min: amps(min.base().max(0.0)),
                    max: amps(max.base().max(0.0)),
                })
            }
            _ => None,
        };
        let rb_power = watts(drive.base().max(0.0).powi(2) / rb_minus.base());
        let rbe_power = resistors
            .rbe
            .map(|r| watts(load.vbe_sat_max_cold.base().powi(2) / (r.base() * (1.0 - tol))));
        let rl_power = match (&stage.load, resistors.rl) {
            (Load::Led(l), Some(rl)) => {
                let v = (load.vcc_max - l.drop_min()).base().max(0.0);
                Some(watts(v * v / (rl.base() * (1.0 - tol))))
            }
            _ => None,
        };
        WorstCase {
            resistors,
            load,
            base_current_min,
            overdrive_min,
            forced_beta_max,
            pin_current_max,
            power_max,
            junction_max,
            collector_peak,
            leakage_voltage,
            turn_on_edge_hot: turn_on_edge(stage.ambient_max),
            led,
            rb_power,
            rbe_power,
            rl_power,
        }
    }
}
