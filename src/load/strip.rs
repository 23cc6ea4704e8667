//! The strip load: a constant-voltage LED strip segment with on-board resistors (stage-model 2
//! v2): its current rises four times faster than the voltage above its rating, and the
//! strip-voltage check holds the supply to the rating from both sides.

use std::sync::Arc;

use super::{CurrentLaw, Field, Load, LoadContext, LoadKind, SharedLoad};
use crate::check::{why, CheckId, Explain, Finding, Status};
use crate::conditions::Conditions;
use crate::fields::{Accepts, Fields, Resolution};
use crate::quantity::limits::{AMPS, METRES, VOLTS};
use crate::quantity::{
    amps, format_engineering as fe, volts, Base, Current, Resistance, ValueKind, Voltage,
};
use crate::remedy::{Bound, PartNeed, Proposal};

/// The share of the rated voltage that falls on the strip's own resistors [practice, memory]:
/// above the rating its current rises 1 / 0.25 = 4 times faster than the voltage.
pub const RESISTOR_SHARE: f64 = 0.25;
/// Highest supply at or below this many times the rating passes [practice].
pub const HIGH_PASS: f64 = 1.1;
/// Highest supply above this many times the rating fails [practice].
pub const HIGH_LIMIT: f64 = 1.2;
/// Lowest voltage across the strip at or above this many times the rating passes [practice].
pub const LOW_PASS: f64 = 0.9;
/// Lowest voltage across the strip below this many times the rating fails (it may not light)
/// [practice].
pub const LOW_LIMIT: f64 = 0.75;

/// The strip's voltage against its rating (stage-model 5, v2).
pub const STRIP_VOLTAGE: CheckId = CheckId::new("strip-voltage", 72);

/// The registration of the strip load.
pub static KIND: LoadKind = LoadKind {
    name: "strip",
    about: "a constant-voltage LED strip segment with on-board resistors",
    fields: &[
        Field {
            key: "rated_v",
            flag: "--strip-voltage",
            value: ValueKind::Voltage,
            value_name: "VOLTS",
            help: "the strip's rated voltage, e.g. 12V",
            form: "a number of volts, e.g. 12",
            accepts: Accepts::Span(VOLTS),
            required: true,
        },
        Field {
            key: "current_per_m_a",
            flag: "--strip-current-per-metre",
            value: ValueKind::Current,
            value_name: "AMPS",
            help: "the strip's current per metre at its rated voltage, e.g. 0.5A",
            form: "a number of amperes, e.g. 0.5",
            accepts: Accepts::Span(AMPS),
            required: true,
        },
        Field {
            key: "length_m",
            flag: "--strip-length",
            value: ValueKind::Length,
            value_name: "METRES",
            help: "the segment's length, e.g. 1.5m",
            form: "a number of metres, e.g. 1.5",
            accepts: Accepts::Span(METRES),
            required: true,
        },
    ],
    resolve,
};

/// A constant-voltage LED strip segment.
#[derive(Clone, Debug, PartialEq)]
pub struct Strip {
    /// Rated strip voltage.
    pub rated: Voltage,
    /// Current of one metre at the rated voltage.
    pub current_per_metre: Current,
    /// Segment length in metres.
    pub length_m: f64,
}

fn resolve(f: &Fields<'_>, _res: &mut Resolution<'_>) -> crate::Result<SharedLoad> {
    Ok(Arc::new(Strip {
        rated: volts(f.need("rated_v", VOLTS)?),
        current_per_metre: amps(f.need("current_per_m_a", AMPS)?),
        length_m: f.need("length_m", METRES)?,
    }))
}

impl Strip {
    /// The segment's current at its rated voltage.
    pub fn rated_current(&self) -> Current {
        self.current_per_metre * self.length_m
    }

    /// Its current at `v`: I_rated x max(1, 1 + (V - Vrated) / (0.25 x Vrated)) (stage-model 2).
    pub fn current_at(&self, v: Voltage) -> Current {
        let r = self.rated.base();
        let rise = 1.0 + (v.base() - r) / (RESISTOR_SHARE * r);
        self.rated_current() * rise.max(1.0)
    }
}

impl Load for Strip {
    fn kind(&self) -> &'static LoadKind {
        &KIND
    }

    /// I(VCC,max) (stage-model 4).
    fn current_max(&self, c: &Conditions, _own: Option<Resistance>) -> Current {
        self.current_at(c.supply_max())
    }

    fn checks(&self, ctx: &LoadContext<'_>, out: &mut Vec<Finding>) {
        let rated = self.rated.base();
        let high = ctx.vcc_max.base();
        let low = (ctx.vcc_min - ctx.on_voltage_max).base();
        let high_status = Status::at_most(high, HIGH_PASS * rated, HIGH_LIMIT * rated);
        let low_status = Status::at_least(low, LOW_PASS * rated, LOW_LIMIT * rated);
        let status = high_status.max(low_status);
        let (value, limit) = if high_status >= low_status {
            (high, HIGH_PASS * rated)
        } else {
            (low, LOW_PASS * rated)
        };
        out.push(Finding::new(
            STRIP_VOLTAGE,
            status,
            Some(value),
            Some(limit),
            "V",
            why(StripVoltage {
                rated,
                high,
                low,
                high_status,
                low_status,
            }),
        ));
    }

    fn remedy(&self, finding: &Finding, ctx: &LoadContext<'_>) -> Option<Proposal> {
        if finding.id != STRIP_VOLTAGE {
            return None;
        }
        let rated = self.rated.base();
        let too_high = ctx.vcc_max.base() > HIGH_PASS * rated;
        Some(Proposal::part(
            STRIP_VOLTAGE,
            vec![PartNeed {
                figure: "strip.rated_v",
                bound: if too_high {
                    Bound::AtLeast
                } else {
                    Bound::AtMost
                },
                value: if too_high {
                    ctx.vcc_max.base() / HIGH_PASS
                } else {
                    (ctx.vcc_min - ctx.on_voltage_max).base() / LOW_PASS
                },
                unit: "V",
                at: None,
            }],
            why(StripFix {
                too_high,
                rated,
                supply: ctx.conditions.supply.base(),
            }),
        ))
    }

    fn current_law(&self, _own: Option<Resistance>) -> Option<CurrentLaw> {
        Some(CurrentLaw::Strip {
            rated_current: self.rated_current().base(),
            rated_v: self.rated.base(),
        })
    }
}

// Words.

#[derive(Debug)]
struct StripVoltage {
    rated: f64,
    high: f64,
    low: f64,
    high_status: Status,
    low_status: Status,
}

impl Explain for StripVoltage {
    fn sentence(&self) -> String {
        let pct = |v: f64| format!("{:.0} %", v / self.rated * 100.0);
        if self.high_status == Status::Pass && self.low_status == Status::Pass {
            return format!(
                "the strip sees {} to {} ({} to {} of its rated {})",
                fe(self.low, "V"),
                fe(self.high, "V"),
                pct(self.low),
                pct(self.high),
                fe(self.rated, "V")
            );
        }
        if self.high_status >= self.low_status {
            let tail = if self.high_status == Status::Fail {
                "above 120 %: its current rises four times faster than the voltage and it overheats"
            } else {
                "above 110 %: its current rises four times faster than the voltage"
            };
            format!(
                "the highest supply {} is {} of the strip's rated {}, {tail}",
                fe(self.high, "V"),
                pct(self.high),
                fe(self.rated, "V")
            )
        } else {
            let tail = if self.low_status == Status::Fail {
                "below 75 %: it may not light"
            } else {
                "below 90 %: it runs dim"
            };
            format!(
                "at the lowest supply less the switch's on-voltage the strip gets {}, {} of its rated {}, {tail}",
                fe(self.low, "V"),
                pct(self.low),
                fe(self.rated, "V")
            )
        }
    }
}

#[derive(Debug)]
struct StripFix {
    too_high: bool,
    rated: f64,
    supply: f64,
}

impl Explain for StripFix {
    fn sentence(&self) -> String {
        if self.too_high {
            format!(
                "choose a strip rated for the {} supply, or feed this {} strip from a supply within 10 % of its rating",
                fe(self.supply, "V"),
                fe(self.rated, "V")
            )
        } else {
            format!(
                "the {} strip gets too little voltage: feed it from a supply nearer its rating, or choose a strip rated lower",
                fe(self.rated, "V")
            )
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use approx::assert_relative_eq;

    fn strip(rated: f64) -> Strip {
        Strip {
            rated: volts(rated),
            current_per_metre: amps(0.5),
            length_m: 2.0,
        }
    }

    #[test]
    fn current_rises_four_times_faster_above_the_rating() {
        // Stage-model 2 (v2), common practice: a quarter of the rating falls on the strip's
        // resistors. 1 A at 12 V; at 12.6 V (5 % over) it draws 1 + 0.6 / 3 = 1.2 A (20 % more).
        let s = strip(12.0);
        assert_relative_eq!(s.current_at(volts(12.0)).base(), 1.0, max_relative = 1e-12);
        assert_relative_eq!(s.current_at(volts(12.6)).base(), 1.2, max_relative = 1e-12);
        // Below the rating it is held at the rated current (conservative).
        assert_relative_eq!(s.current_at(volts(11.0)).base(), 1.0, max_relative = 1e-12);
        // A 5 V strip on 12.6 V: 1 + 7.6 / 1.25 = 7.08 times its rated current.
        assert_relative_eq!(
            strip(5.0).current_at(volts(12.6)).base(),
            7.08,
            max_relative = 1e-12
        );
    }
}
