//! The LED load: n LEDs in series with a resistor RL (given, or sized over the worst-case window
//! of stage-model 6.1 v2), and the led-current check against the target and the ceiling.

use std::sync::Arc;

use super::{CurrentLaw, Field, Load, LoadContext, LoadKind, OnVoltage, OwnResistor, SharedLoad};
use crate::check::{why, CheckId, Explain, Figure, Finding, Status};
use crate::conditions::Conditions;
use crate::fields::{Accepts, Fields, Resolution};
use crate::quantity::limits::{AMPS, OHMS, VOLTS};
use crate::quantity::{
    amps, format_engineering as fe, format_rkm, ohms, volts, watts, Base, Current, Power,
    Resistance, ValueKind, Voltage,
};
use crate::remedy::{Edit, Proposal};

/// LED forward voltage spread when no limits are given, V per LED [memory].
pub const DEFAULT_LED_VF_SPREAD_V: f64 = 0.2;
/// The LED ceiling when no absolute maximum is given, times the target [practice] (v2).
pub const DEFAULT_CEILING_OVER_TARGET: f64 = 1.5;
/// LED current at least this fraction of the target passes [practice].
pub const LED_PASS_FRACTION: f64 = 0.8;
/// LED current at least this fraction of the target is marginal [practice].
pub const LED_MARGINAL_FRACTION: f64 = 0.5;
/// The LED sizing walks at most this many decades below its bound (stage-model 6.1).
pub const SIZING_DECADES: i32 = 3;

/// The LED current stays in its window (stage-model 5).
pub const LED_CURRENT: CheckId = CheckId::new("led-current", 78);

/// Most LEDs in one series string a stage takes [practice: a generous bound].
pub const MAX_LED_COUNT: u32 = 1000;

/// The registration of the LED load.
pub static KIND: LoadKind = LoadKind {
    name: "led",
    about: "LEDs in series with a resistor (given with --led-resistor, or sized)",
    fields: &[
        Field {
            key: "count",
            flag: "--led-count",
            value: ValueKind::Plain,
            value_name: "N",
            help: "how many LEDs in series",
            form: "a whole number, e.g. 3",
            accepts: Accepts::Whole(1, MAX_LED_COUNT),
            required: true,
        },
        Field {
            key: "forward_v",
            flag: "--led-vf",
            value: ValueKind::Voltage,
            value_name: "VOLTS",
            help: "the nominal forward voltage of one LED",
            form: "a number of volts, e.g. 2.1",
            accepts: Accepts::Span(VOLTS),
            required: true,
        },
        Field {
            key: "forward_min_v",
            flag: "--led-vf-min",
            value: ValueKind::Voltage,
            value_name: "VOLTS",
            help: "the lowest forward voltage of one LED [default: nominal - 0.2 V]",
            form: "a number of volts, e.g. 1.9",
            accepts: Accepts::Span(VOLTS),
            required: false,
        },
        Field {
            key: "forward_max_v",
            flag: "--led-vf-max",
            value: ValueKind::Voltage,
            value_name: "VOLTS",
            help: "the highest forward voltage of one LED [default: nominal + 0.2 V]",
            form: "a number of volts, e.g. 2.4",
            accepts: Accepts::Span(VOLTS),
            required: false,
        },
        Field {
            key: "current_a",
            flag: "--current",
            value: ValueKind::Current,
            value_name: "AMPS",
            help: "the most current the load draws (current load) or the LED target current (led load), e.g. 150mA",
            form: "a number of amperes, e.g. 0.02",
            accepts: Accepts::Span(AMPS),
            required: true,
        },
        Field {
            key: "max_current_a",
            flag: "--led-max-current",
            value: ValueKind::Current,
            value_name: "AMPS",
            help: "the LEDs' absolute maximum current [default: 1.5 x the target]",
            form: "a number of amperes, e.g. 0.03",
            accepts: Accepts::Span(AMPS),
            required: false,
        },
        Field {
            key: "resistor_ohms",
            flag: "--led-resistor",
            value: ValueKind::Resistance,
            value_name: "OHMS",
            help: "the LED series resistor (sized when absent)",
            form: "a number of ohms, e.g. 150",
            accepts: Accepts::Span(OHMS),
            required: false,
        },
    ],
    resolve,
};

/// A string of LEDs with its series resistor.
#[derive(Clone, Debug, PartialEq)]
pub struct Led {
    /// LEDs in series.
    pub count: u32,
    /// Nominal forward voltage of one LED.
    pub forward: Voltage,
    /// Lowest forward voltage of one LED.
    pub forward_min: Voltage,
    /// Highest forward voltage of one LED.
    pub forward_max: Voltage,
    /// Target current.
    pub current: Current,
    /// The most current the LEDs may carry: the given absolute maximum, else 1.5 x the target.
    pub ceiling: Current,
    /// True when the ceiling was assumed (no absolute maximum given).
    pub ceiling_assumed: bool,
    /// Series resistor; `None` means size it.
    pub resistor: Option<Resistance>,
}

fn resolve(f: &Fields<'_>, res: &mut Resolution<'_>) -> crate::Result<SharedLoad> {
    let count = f
        .whole("count", 1, MAX_LED_COUNT)?
        .ok_or_else(|| f.missing("count"))?;
    let vf = f.need("forward_v", VOLTS)?;
    let lo = f.number("forward_min_v", VOLTS)?;
    let hi = f.number("forward_max_v", VOLTS)?;
    if lo.is_none() || hi.is_none() {
        res.assume(format!(
            "LED forward voltage spread ±{} per LED assumed [memory]",
            fe(DEFAULT_LED_VF_SPREAD_V, "V")
        ));
    }
    let lo = lo.unwrap_or((vf - DEFAULT_LED_VF_SPREAD_V).max(0.0));
    let hi = hi.unwrap_or(vf + DEFAULT_LED_VF_SPREAD_V);
    if lo > vf || vf > hi {
        return Err(crate::Error::invalid(
            f.place("forward_v"),
            format!(
                "the forward voltages must run min <= nominal <= max; got {lo} <= {vf} <= {hi} V"
            ),
        ));
    }
    let current = f.need("current_a", AMPS)?;
    let (ceiling, ceiling_assumed) = match f.number("max_current_a", AMPS)? {
        Some(m) => (m, false),
        None => {
            res.assume(format!(
                "LED ceiling {} assumed (1.5 x the {} target; give max_current_a) [practice]",
                fe(DEFAULT_CEILING_OVER_TARGET * current, "A"),
                fe(current, "A")
            ));
            (DEFAULT_CEILING_OVER_TARGET * current, true)
        }
    };
    Ok(Arc::new(Led {
        count,
        forward: volts(vf),
        forward_min: volts(lo),
        forward_max: volts(hi),
        current: amps(current),
        ceiling: amps(ceiling),
        ceiling_assumed,
        resistor: f.number("resistor_ohms", OHMS)?.map(ohms),
    }))
}

/// LED currents at their corners (stage-model 5), never below 0.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct LedCurrents {
    /// (VCC,min - n Vf,max - Von,max) / RL+.
    pub min: Current,
    /// (VCC,max - n Vf,min) / RL-.
    pub max: Current,
}

impl Led {
    /// The string's drop with every LED at the lowest forward voltage.
    pub fn drop_min(&self) -> Voltage {
        self.forward_min * f64::from(self.count)
    }

    /// The string's drop with every LED at the highest forward voltage.
    pub fn drop_max(&self) -> Voltage {
        self.forward_max * f64::from(self.count)
    }

    /// The largest current through `rl`: (VCC,max - n Vf,min) / RL-, never below 0.
    pub fn current_max_with(&self, c: &Conditions, rl: Resistance) -> Current {
        let i = (c.supply_max() - self.drop_min()) / c.low(rl);
        amps(i.base().max(0.0))
    }

    /// The LED currents through `rl` with the switch's on-voltage `von_max`.
    pub fn currents(&self, c: &Conditions, rl: Resistance, von_max: Voltage) -> LedCurrents {
        let min = (c.supply_min() - self.drop_max() - von_max) / c.high(rl);
        LedCurrents {
            min: amps(min.base().max(0.0)),
            max: self.current_max_with(c, rl),
        }
    }

    /// RL,hi = (VCC,min - n Vf,max - Von) / (0.8 x target x (1 + tol)), ohms (stage-model 6.1).
    fn sizing_bound(&self, c: &Conditions, on: &dyn OnVoltage) -> f64 {
        let von = on.at_25c(self.current);
        let spare = c.supply_min() - self.drop_max() - von;
        spare.base() / (LED_PASS_FRACTION * self.current.base() * (1.0 + c.resistor_tolerance))
    }
}

impl Load for Led {
    fn kind(&self) -> &'static LoadKind {
        &KIND
    }

    fn own_resistor_given(&self) -> Option<Option<Resistance>> {
        Some(self.resistor)
    }

    fn own_resistor_key(&self) -> Option<&'static str> {
        Some("resistor_ohms")
    }

    /// Stage-model 6.1 (v2): walk the series values at or below RL,hi downward (any decade, at
    /// most three decades) and take the first whose audit I,min reaches 0.8 x the target; none,
    /// or RL,hi <= 0, is no headroom.
    fn size(&self, c: &Conditions, on: &dyn OnVoltage) -> Option<OwnResistor> {
        if let Some(r) = self.resistor {
            return Some(OwnResistor {
                value: Some(r),
                sized: false,
                bound_ohms: None,
            });
        }
        let bound = self.sizing_bound(c, on);
        let none = OwnResistor {
            value: None,
            sized: true,
            bound_ohms: Some(bound),
        };
        if !(bound > 0.0 && bound.is_finite()) {
            return Some(none);
        }
        let floor = bound / 10f64.powi(SIZING_DECADES);
        let wanted = LED_PASS_FRACTION * self.current.base();
        let found = c.series.walk_down(ohms(bound), ohms(floor)).find(|&rl| {
            let von = on.at_corner(self.current_max_with(c, rl));
            self.currents(c, rl, von).min.base() >= wanted
        });
        Some(match found {
            Some(rl) => OwnResistor {
                value: Some(rl),
                sized: true,
                bound_ohms: Some(bound),
            },
            None => none,
        })
    }

    /// (VCC,max - n Vf,min) / RL-, never below 0; with no resistor (no headroom) the target
    /// current stands in (stage-model 4).
    fn current_max(&self, c: &Conditions, own: Option<Resistance>) -> Current {
        match own {
            Some(rl) => self.current_max_with(c, rl),
            None => self.current,
        }
    }

    /// RL (VCC,max - n Vf,min)^2 / RL- (stage-model 5).
    fn own_resistor_power(&self, c: &Conditions, rl: Resistance) -> Option<Power> {
        let v = (c.supply_max() - self.drop_min()).base().max(0.0);
        Some(watts(v * v / c.low(rl).base()))
    }

    fn checks(&self, ctx: &LoadContext<'_>, out: &mut Vec<Finding>) {
        out.push(self.led_current(ctx));
    }

    fn figures(&self, ctx: &LoadContext<'_>) -> Vec<Figure> {
        let currents = ctx
            .own
            .and_then(|o| o.value)
            .map(|rl| self.currents(ctx.conditions, rl, ctx.on_voltage_max));
        vec![
            Figure::new(
                "led_current_min_a",
                currents.map(|c| c.min.base()),
                None,
                1.0,
            ),
            Figure::new(
                "led_current_max_a",
                currents.map(|c| c.max.base()),
                None,
                1.0,
            ),
        ]
    }

    fn remedy(&self, finding: &Finding, ctx: &LoadContext<'_>) -> Option<Proposal> {
        if finding.id != LED_CURRENT {
            return None;
        }
        let c = ctx.conditions;
        let reason = self.reason(ctx);
        // What sizing the resistor again would give: a value inside the window, a value that
        // lets too much through at the high corner (the window is empty), or none at all.
        let resized = Led {
            resistor: None,
            ..self.clone()
        }
        .size(c, ctx.on)
        .and_then(|o| o.value);
        let inside = resized.is_some_and(|rl| {
            let cur = self.currents(c, rl, ctx.on.at_corner(self.current_max_with(c, rl)));
            cur.max <= self.ceiling && cur.min.base() >= LED_PASS_FRACTION * self.current.base()
        });
        let headroom = || {
            Proposal::part(
                LED_CURRENT,
                Vec::new(),
                why(LedFix::Headroom {
                    supply_min: c.supply_min().base(),
                    spare: (c.supply_min() - self.drop_max() - ctx.on_voltage_max)
                        .base()
                        .max(0.0),
                    count: self.count,
                }),
            )
        };
        match reason.case {
            LedCase::Fine => None,
            _ if inside && self.resistor.is_some() => Some(Proposal::edit(
                LED_CURRENT,
                vec![Edit::Size("load.resistor_ohms")],
                why(LedFix::Resize {
                    series: c.series.name(),
                }),
            )),
            _ if resized.is_some() => Some(Proposal::part(
                LED_CURRENT,
                Vec::new(),
                why(LedFix::ConstantCurrent),
            )),
            _ => Some(headroom()),
        }
    }

    fn current_law(&self, own: Option<Resistance>) -> Option<CurrentLaw> {
        Some(match own {
            Some(rl) => CurrentLaw::Led {
                count: self.count,
                forward_min: self.forward_min.base(),
                forward_span: (self.forward_max - self.forward_min).base(),
                rl: rl.base(),
            },
            None => CurrentLaw::Fixed(self.current.base()),
        })
    }
}

impl Led {
    fn reason(&self, ctx: &LoadContext<'_>) -> LedReason {
        let own = ctx.own.unwrap_or(OwnResistor {
            value: self.resistor,
            sized: false,
            bound_ohms: None,
        });
        let mut r = LedReason {
            case: LedCase::Fine,
            count: self.count,
            target: self.current.base(),
            ceiling: self.ceiling.base(),
            ceiling_assumed: self.ceiling_assumed,
            min: 0.0,
            max: 0.0,
            supply: ctx.conditions.supply.base(),
            forward: self.forward.base(),
            bound: own.bound_ohms.unwrap_or(0.0),
            resistor: 0.0,
        };
        let Some(rl) = own.value else {
            r.case = LedCase::NoHeadroom;
            return r;
        };
        let currents = self.currents(ctx.conditions, rl, ctx.on_voltage_max);
        r.resistor = rl.base();
        r.min = currents.min.base();
        r.max = currents.max.base();
        r.case = if r.max > r.ceiling {
            if own.sized {
                LedCase::WindowEmpty
            } else {
                LedCase::Over
            }
        } else if r.min >= LED_PASS_FRACTION * r.target {
            LedCase::Fine
        } else if r.min <= 0.0 {
            LedCase::DarkAtLowCorner
        } else {
            LedCase::Low
        };
        r
    }

    fn led_current(&self, ctx: &LoadContext<'_>) -> Finding {
        let r = self.reason(ctx);
        let pass_min = LED_PASS_FRACTION * r.target;
        let (status, value, limit) = match r.case {
            LedCase::NoHeadroom => (Status::Fail, None, Some(pass_min)),
            LedCase::Over | LedCase::WindowEmpty => (Status::Fail, Some(r.max), Some(r.ceiling)),
            _ => (
                Status::at_least(r.min, pass_min, LED_MARGINAL_FRACTION * r.target),
                Some(r.min),
                Some(pass_min),
            ),
        };
        Finding::new(LED_CURRENT, status, value, limit, "A", why(r))
    }
}

// Words.

#[derive(Clone, Copy, Debug, PartialEq, Eq)]
enum LedCase {
    Fine,
    Low,
    DarkAtLowCorner,
    NoHeadroom,
    Over,
    WindowEmpty,
}

#[derive(Debug)]
struct LedReason {
    case: LedCase,
    count: u32,
    target: f64,
    ceiling: f64,
    ceiling_assumed: bool,
    min: f64,
    max: f64,
    supply: f64,
    forward: f64,
    bound: f64,
    resistor: f64,
}

impl Explain for LedReason {
    fn sentence(&self) -> String {
        let ceiling = if self.ceiling_assumed {
            format!(
                "{} ceiling (1.5 x the target, assumed)",
                fe(self.ceiling, "A")
            )
        } else {
            format!("{} absolute maximum", fe(self.ceiling, "A"))
        };
        match self.case {
            LedCase::Fine => format!(
                "the LEDs carry {} to {} for a {} target, within the {ceiling}",
                fe(self.min, "A"),
                fe(self.max, "A"),
                fe(self.target, "A")
            ),
            LedCase::Low => format!(
                "little headroom: at the lowest supply and highest forward voltage the LEDs get only {} of the {} target",
                fe(self.min, "A"),
                fe(self.target, "A")
            ),
            LedCase::DarkAtLowCorner => format!(
                "no headroom at the low corner: the lowest supply cannot forward-bias {} LEDs at their highest forward voltage",
                self.count
            ),
            LedCase::NoHeadroom => format!(
                "no headroom: the supply {} less {} LEDs at {} and the switch's on-voltage leaves no resistor that keeps 80 % of the target at the low corner (bound {})",
                fe(self.supply, "V"),
                self.count,
                fe(self.forward, "V"),
                fe(self.bound, "Ω")
            ),
            LedCase::Over => format!(
                "at the highest supply and lowest forward voltage the LEDs carry {} through RL = {}, above the {ceiling}",
                fe(self.max, "A"),
                format_rkm(self.resistor)
            ),
            LedCase::WindowEmpty => format!(
                "the window is empty: the resistor that keeps 80 % of the target at the low corner ({}) lets {} through at the high corner, above the {ceiling}; the supply tolerance and forward-voltage spread are too wide for a resistor",
                format_rkm(self.resistor),
                fe(self.max, "A")
            ),
        }
    }
}

#[derive(Debug)]
enum LedFix {
    Resize {
        series: &'static str,
    },
    ConstantCurrent,
    Headroom {
        supply_min: f64,
        spare: f64,
        count: u32,
    },
}

impl Explain for LedFix {
    fn sentence(&self) -> String {
        match self {
            LedFix::Resize { series } => format!(
                "fit the {series} value of RL that keeps the LEDs at 80 % of their target at the low corner and under their ceiling at the high corner"
            ),
            LedFix::ConstantCurrent => "no resistor holds the LEDs inside their window over the supply tolerance and forward-voltage spread: drive them from a constant-current driver, or give the LEDs' real absolute maximum (max_current_a)".to_string(),
            LedFix::Headroom { supply_min, spare, count } => format!(
                "too little headroom: the lowest supply {} leaves {} over {count} LEDs at their highest forward voltage; put fewer in series or raise the supply",
                fe(*supply_min, "V"),
                fe(*spare, "V")
            ),
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::conditions::{InputResistors, PullDown};
    use crate::eseries::Series;
    use crate::quantity::celsius;

    #[derive(Debug)]
    struct Fixed(f64);
    impl OnVoltage for Fixed {
        fn at_25c(&self, _i: Current) -> Voltage {
            volts(self.0)
        }
        fn at_corner(&self, _i: Current) -> Voltage {
            volts(self.0)
        }
    }

    fn conditions(supply: f64, tol: f64) -> Conditions {
        Conditions {
            supply: volts(supply),
            supply_tolerance: tol,
            logic_high: volts(3.3),
            logic_high_min: volts(2.9),
            pin_limit: amps(0.004),
            ambient_min: celsius(0.0),
            ambient_max: celsius(70.0),
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

    fn led(count: u32, vf: f64, target: f64, ceiling: f64) -> Led {
        Led {
            count,
            forward: volts(vf),
            forward_min: volts(vf - 0.2),
            forward_max: volts(vf + 0.2),
            current: amps(target),
            ceiling: amps(ceiling),
            ceiling_assumed: false,
            resistor: None,
        }
    }

    #[test]
    fn sizing_takes_the_largest_value_that_keeps_eighty_percent_at_the_low_corner() {
        // Hand-worked to stage-model 6.1 with Ohm's law: 12 V +/-5 %, two LEDs of 2.0 V +/-0.2 V,
        // 20 mA, VCE(sat) 0.1 V. RL,hi = (11.4 - 4.4 - 0.1) / (0.016 x 1.05) = 410.7 ohm. E24
        // 390 ohm gives I,min = 6.9 V / 409.5 ohm = 16.85 mA >= 16 mA: taken.
        let c = conditions(12.0, 0.05);
        let l = led(2, 2.0, 0.02, 0.05);
        let own = l.size(&c, &Fixed(0.1)).expect("an LED has a resistor");
        assert_eq!(own.value.map(|r| r.base()), Some(390.0));
        let cur = l.currents(&c, ohms(390.0), volts(0.1));
        approx::assert_relative_eq!(cur.min.base(), 6.9 / 409.5, max_relative = 1e-9);
        // I,max = (12.6 - 3.6) / 370.5 = 24.3 mA, inside a 50 mA maximum.
        approx::assert_relative_eq!(cur.max.base(), 9.0 / 370.5, max_relative = 1e-9);
    }

    #[test]
    fn too_wide_a_window_empties_it_and_no_headroom_fails() {
        let c = conditions(12.0, 0.05);
        // Ceiling only 1.05 x the target: the resistor for 80 % at the low corner lets more
        // through at the high corner.
        let l = led(2, 2.0, 0.02, 0.021);
        let own = l.size(&c, &Fixed(0.1)).expect("sized");
        let ctx = LoadContext {
            conditions: &c,
            vcc_max: c.supply_max(),
            vcc_min: c.supply_min(),
            current_max: l.current_max(&c, own.value),
            on_voltage_max: volts(0.1),
            own: Some(own),
            on: &Fixed(0.1),
        };
        let f = l.led_current(&ctx);
        assert_eq!(f.status, Status::Fail);
        assert!(f.detail().contains("window is empty"), "{}", f.detail());
        // Four 3 V LEDs cannot light from 12 V -5 %: no headroom.
        let l = led(4, 3.0, 0.02, 0.03);
        let own = l.size(&c, &Fixed(0.1)).expect("sized");
        assert_eq!(own.value, None);
    }
}
