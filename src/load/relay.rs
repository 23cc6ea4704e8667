//! The relay load: a relay, solenoid or valve coil (inductive, with a must-operate level), its
//! worst-case current with a cold coil, and its checks: coil-voltage (v2) and coil-pull-in with
//! a hot coil (stage-model 2, 4, 5).

use std::sync::Arc;

use super::{copper_at, CurrentLaw, Field, Kick, Load, LoadContext, LoadKind, SharedLoad};
use crate::check::{why, CheckId, Explain, Finding, Status};
use crate::conditions::Conditions;
use crate::fields::{pct, Accepts, Fields, Resolution};
use crate::quantity::limits::{show_number, Span, GAIN, HENRIES, OHMS, VOLTS};
use crate::quantity::{
    format_engineering as fe, henries, ohms, volts, Base, Current, Inductance, Resistance,
    Temperature, ValueKind, Voltage,
};
use crate::remedy::{Bound, PartNeed, Proposal};

/// Coil resistance tolerance when none is given [practice].
pub const DEFAULT_COIL_TOLERANCE: f64 = 0.10;
/// Must-operate fraction of the rated coil voltage when none is given [practice].
pub const DEFAULT_MUST_OPERATE_FRACTION: f64 = 0.75;
/// Must-operate fractions accepted: above 0 (the smallest gain figure) and at most 1.
pub const MUST_OPERATE: Span = Span {
    min: GAIN.min,
    max: 1.0,
    unit: "",
};
/// A coil bears about this many times its rated voltage continuously: pass at or below
/// [practice: coils are made to bear about 110 % of their rating continuously; memory].
pub const COIL_OVERVOLTAGE_PASS: f64 = 1.1;
/// Above this many times its rated voltage a coil fails [practice, memory].
pub const COIL_OVERVOLTAGE_LIMIT: f64 = 1.3;

/// The coil's voltage against its rating (stage-model 5, v2).
pub const COIL_VOLTAGE: CheckId = CheckId::new("coil-voltage", 70);
/// A hot coil still pulls in at the lowest supply (stage-model 5).
pub const COIL_PULL_IN: CheckId = CheckId::new("coil-pull-in", 75);

/// The registration of the relay load.
pub static KIND: LoadKind = LoadKind {
    name: "relay",
    about: "a relay, solenoid or valve coil (inductive: needs a clamp)",
    fields: &[
        Field {
            key: "coil_ohms",
            flag: "--coil",
            value: ValueKind::Resistance,
            value_name: "OHMS",
            help: "the coil resistance at 20 °C, e.g. 400 or 400R",
            form: "a number of ohms, e.g. 400",
            accepts: Accepts::Span(OHMS),
            required: true,
        },
        Field {
            key: "coil_tolerance",
            flag: "--coil-tolerance",
            value: ValueKind::Fraction,
            value_name: "FRACTION",
            help: "the coil resistance tolerance [default: 10 %]",
            form: "a fraction, e.g. 0.1 for ±10 %",
            accepts: Accepts::Fraction,
            required: false,
        },
        Field {
            key: "rated_v",
            flag: "--coil-rated",
            value: ValueKind::Voltage,
            value_name: "VOLTS",
            help: "the rated coil voltage [default: the nominal supply]",
            form: "a number of volts, e.g. 12",
            accepts: Accepts::Span(VOLTS),
            required: false,
        },
        Field {
            key: "must_operate_fraction",
            flag: "--must-operate",
            value: ValueKind::Fraction,
            value_name: "FRACTION",
            help: "the must-operate voltage as a fraction of the rated voltage [default: 0.75]",
            form: "a fraction of the rated voltage, e.g. 0.75",
            accepts: Accepts::Span(MUST_OPERATE),
            required: false,
        },
        Field {
            key: "inductance_h",
            flag: "--inductance",
            value: ValueKind::Inductance,
            value_name: "HENRIES",
            help: "the winding's inductance, e.g. 200mH (gives the stored energy and decay)",
            form: "a number of henries, e.g. 0.2",
            accepts: Accepts::Span(HENRIES),
            required: false,
        },
    ],
    resolve,
};

/// A relay, solenoid or valve coil.
#[derive(Clone, Debug, PartialEq)]
pub struct Relay {
    /// Coil resistance at 20 C.
    pub coil_20c: Resistance,
    /// +/- fraction of the coil resistance.
    pub tolerance: f64,
    /// Rated coil voltage.
    pub rated: Voltage,
    /// Must-operate voltage as a fraction of the rated voltage.
    pub must_operate_fraction: f64,
    /// Coil inductance, when known.
    pub inductance: Option<Inductance>,
}

fn resolve(f: &Fields<'_>, res: &mut Resolution<'_>) -> crate::Result<SharedLoad> {
    let coil = f.need("coil_ohms", OHMS)?;
    let tolerance = match f.fraction("coil_tolerance")? {
        Some(t) => t,
        None => {
            res.assume(format!(
                "coil tolerance ±{} assumed [practice]",
                pct(DEFAULT_COIL_TOLERANCE)
            ));
            DEFAULT_COIL_TOLERANCE
        }
    };
    let rated = match f.number("rated_v", VOLTS)? {
        Some(v) => volts(v),
        None => {
            let v = res.conditions.supply;
            res.assume(format!(
                "coil rated voltage {} assumed (the nominal supply)",
                fe(v.base(), "V")
            ));
            v
        }
    };
    let must = match f.number("must_operate_fraction", GAIN)? {
        Some(v) if v <= MUST_OPERATE.max => v,
        Some(v) => {
            return Err(crate::Error::range(
                f.place("must_operate_fraction"),
                show_number(v),
                "a fraction above 0 and at most 1 is needed (0.75 is usual)",
            ))
        }
        None => {
            res.assume(format!(
                "must-operate voltage {} of rated assumed [practice]",
                pct(DEFAULT_MUST_OPERATE_FRACTION)
            ));
            DEFAULT_MUST_OPERATE_FRACTION
        }
    };
    let inductance = f.number("inductance_h", HENRIES)?.map(henries);
    Ok(Arc::new(Relay {
        coil_20c: ohms(coil),
        tolerance,
        rated,
        must_operate_fraction: must,
        inductance,
    }))
}

impl Relay {
    /// Copper coil resistance at `t` [std IEC 60028].
    pub fn coil_at(&self, t: Temperature) -> Resistance {
        copper_at(self.coil_20c, t)
    }

    /// The lowest coil resistance: cold copper at -tol.
    pub fn coil_min(&self, t_min: Temperature) -> Resistance {
        self.coil_at(t_min) * (1.0 - self.tolerance)
    }

    /// The voltage the coil needs to pull in when hot: must-operate x rated x R(Ta,max)/R(20 C).
    pub fn pull_in_needed(&self, t_max: Temperature) -> Voltage {
        let warm = self.coil_at(t_max).base() / self.coil_20c.base();
        self.rated * (self.must_operate_fraction * warm)
    }
}

impl Load for Relay {
    fn kind(&self) -> &'static LoadKind {
        &KIND
    }

    fn works_contacts(&self) -> bool {
        true
    }

    fn kick(&self, c: &Conditions) -> Option<Kick> {
        Some(Kick {
            inductance: self.inductance,
            resistance_min: self.coil_min(c.ambient_min),
        })
    }

    /// VCC,max / Rc(1 - tol) at Ta,min: copper cold (stage-model 4).
    fn current_max(&self, c: &Conditions, _own: Option<Resistance>) -> Current {
        let i: Current = c.supply_max() / self.coil_min(c.ambient_min);
        crate::quantity::amps(i.base().max(0.0))
    }

    fn checks(&self, ctx: &LoadContext<'_>, out: &mut Vec<Finding>) {
        let rated = self.rated.base();
        let vcc_max = ctx.vcc_max.base();
        let status = Status::at_most(
            vcc_max,
            COIL_OVERVOLTAGE_PASS * rated,
            COIL_OVERVOLTAGE_LIMIT * rated,
        );
        out.push(Finding::new(
            COIL_VOLTAGE,
            status,
            Some(vcc_max),
            Some(COIL_OVERVOLTAGE_PASS * rated),
            "V",
            why(CoilVoltage {
                status,
                vcc_max,
                rated,
            }),
        ));
        let available = (ctx.vcc_min - ctx.on_voltage_max).base();
        let needed = self.pull_in_needed(ctx.conditions.ambient_max).base();
        let status = if available >= needed {
            Status::Pass
        } else {
            Status::Fail
        };
        out.push(Finding::new(
            COIL_PULL_IN,
            status,
            Some(available),
            Some(needed),
            "V",
            why(PullIn {
                available,
                needed,
                hot_c: ctx.conditions.ambient_max.base(),
            }),
        ));
    }

    fn remedy(&self, finding: &Finding, ctx: &LoadContext<'_>) -> Option<Proposal> {
        let warm = self.coil_at(ctx.conditions.ambient_max).base() / self.coil_20c.base();
        if finding.id == COIL_VOLTAGE {
            let rated_min = ctx.vcc_max.base() / COIL_OVERVOLTAGE_PASS;
            return Some(Proposal::part(
                COIL_VOLTAGE,
                vec![PartNeed {
                    figure: "relay.rated_v",
                    bound: Bound::AtLeast,
                    value: rated_min,
                    unit: "V",
                    at: None,
                }],
                why(CoilVoltageFix {
                    rated_min,
                    supply: ctx.conditions.supply.base(),
                }),
            ));
        }
        if finding.id == COIL_PULL_IN {
            let available = (ctx.vcc_min - ctx.on_voltage_max).base();
            let needed = self.pull_in_needed(ctx.conditions.ambient_max).base();
            return Some(Proposal::part(
                COIL_PULL_IN,
                vec![PartNeed {
                    figure: "relay.must_operate_v",
                    bound: Bound::AtMost,
                    value: available / warm,
                    unit: "V",
                    at: None,
                }],
                why(PullInFix {
                    must_max_20c: available / warm,
                    must_now_20c: needed / warm,
                    raise: needed - available,
                }),
            ));
        }
        None
    }

    fn current_law(&self, _own: Option<Resistance>) -> Option<CurrentLaw> {
        Some(CurrentLaw::Copper {
            r20: self.coil_20c.base(),
            tolerance: self.tolerance,
        })
    }
}

// Words.

#[derive(Debug)]
struct CoilVoltage {
    status: Status,
    vcc_max: f64,
    rated: f64,
}

impl Explain for CoilVoltage {
    fn sentence(&self) -> String {
        let ratio = self.vcc_max / self.rated * 100.0;
        let tail = match self.status {
            Status::Pass => "within the 110 % a coil bears continuously",
            Status::Marginal => "above the 110 % a coil bears continuously: it runs hot",
            Status::Fail => "above 130 %: the coil overheats",
        };
        format!(
            "the highest supply {} is {:.0} % of the coil's rated {}, {tail}",
            fe(self.vcc_max, "V"),
            ratio,
            fe(self.rated, "V")
        )
    }
}

#[derive(Debug)]
struct PullIn {
    available: f64,
    needed: f64,
    hot_c: f64,
}

impl Explain for PullIn {
    fn sentence(&self) -> String {
        format!(
            "at the lowest supply the coil gets {}; hot at {} °C it needs {} to pull in",
            fe(self.available, "V"),
            show_number(self.hot_c),
            fe(self.needed, "V")
        )
    }
}

#[derive(Debug)]
struct CoilVoltageFix {
    rated_min: f64,
    supply: f64,
}

impl Explain for CoilVoltageFix {
    fn sentence(&self) -> String {
        format!(
            "choose a relay with a rated coil voltage of at least {} (a {} coil for a {} supply), or feed the coil from a supply near its rating",
            fe(self.rated_min, "V"),
            fe(self.supply, "V"),
            fe(self.supply, "V")
        )
    }
}

#[derive(Debug)]
struct PullInFix {
    must_max_20c: f64,
    must_now_20c: f64,
    raise: f64,
}

impl Explain for PullInFix {
    fn sentence(&self) -> String {
        format!(
            "choose a relay whose must-operate voltage at 20 °C is at most {} (now {}), or raise the lowest supply by {}",
            fe(self.must_max_20c, "V"),
            fe(self.must_now_20c, "V"),
            fe(self.raise, "V")
        )
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::conditions::{InputResistors, PullDown};
    use crate::eseries::Series;
    use crate::quantity::{amps, celsius};
    use approx::assert_relative_eq;

    fn conditions(t_min: f64) -> Conditions {
        Conditions {
            supply: volts(12.0),
            supply_tolerance: 0.05,
            logic_high: volts(3.3),
            logic_high_min: volts(2.9),
            pin_limit: amps(0.004),
            ambient_min: celsius(t_min),
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

    #[derive(Debug)]
    struct Von;
    impl crate::load::OnVoltage for Von {
        fn at_25c(&self, _i: Current) -> Voltage {
            volts(0.2)
        }
        fn at_corner(&self, _i: Current) -> Voltage {
            volts(0.2)
        }
    }

    fn relay(rated: f64) -> Relay {
        Relay {
            coil_20c: ohms(400.0),
            tolerance: 0.1,
            rated: volts(rated),
            must_operate_fraction: 0.75,
            inductance: None,
        }
    }

    #[test]
    fn relay_current_uses_cold_low_tolerance_coil() {
        // Hand-worked: at -20 C the coil is 400 x (1 - 0.00393 x 40) = 337.12 ohm; at -10 %
        // 303.408 ohm; 12.6 V / 303.408 ohm = 41.53 mA.
        let i = relay(12.0).current_max(&conditions(-20.0), None);
        assert_relative_eq!(i.base(), 12.6 / 303.408, max_relative = 1e-9);
    }

    #[test]
    fn a_coil_far_below_the_supply_fails_coil_voltage() {
        // Common practice: a coil bears about 110 % of its rating continuously (from memory);
        // 12.6 V on a 1 V coil is 1260 %.
        let c = conditions(0.0);
        for (rated, want) in [
            (12.0, Status::Pass),
            (10.5, Status::Marginal),
            (1.0, Status::Fail),
        ] {
            let r = relay(rated);
            let ctx = LoadContext {
                conditions: &c,
                vcc_max: c.supply_max(),
                vcc_min: c.supply_min(),
                current_max: r.current_max(&c, None),
                on_voltage_max: volts(0.2),
                own: None,
                on: &Von,
            };
            let mut out = Vec::new();
            r.checks(&ctx, &mut out);
            let f = out
                .iter()
                .find(|f| f.id == COIL_VOLTAGE)
                .expect("coil-voltage runs");
            assert_eq!(f.status, want, "{rated} V coil: {}", f.detail());
        }
    }
}
