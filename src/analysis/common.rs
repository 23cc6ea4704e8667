//! The drive-neutral checks (stage-model 5 and 8): pin current, the switch's current and voltage
//! ratings, the junction, the clamp's stated ratings and the resistors' power, with their
//! remedies. They read what the drive found ([`DriveAnalysis`]) and its [`Ratings`].

use serde_json::json;

use super::resistors::ResistorUse;
use crate::check::{
    why, Explain, Finding, Status, CLAMP_RATING, JUNCTION_TEMP, PIN_CURRENT, RESISTOR_POWER,
};
use crate::conditions::Conditions;
use crate::drive::{Corner, DriveAnalysis, Ratings};
use crate::load::{Clamp, ClampProposal, CLAMP_REVERSE_MARGIN};
use crate::quantity::limits::show_number;
use crate::quantity::{format_engineering as fe, format_rkm, Base};
use crate::remedy::{number, Bound, Edit, PartNeed, Proposal};

/// IC,max at or below this fraction of the rating passes [practice].
pub const CURRENT_DERATING: f64 = 0.8;
/// The switch's peak at or below this fraction of its voltage rating passes [practice].
pub const VOLTAGE_DERATING: f64 = 0.8;
/// Junction margin below Tj,max for a pass, K [practice].
pub const JUNCTION_MARGIN_K: f64 = 25.0;
/// A resistor at or below this fraction of its rating passes [practice].
pub const RESISTOR_DERATING: f64 = 0.5;
/// Standard diode reverse ratings, V [practice: the usual rectifier steps].
pub const DIODE_REVERSE_STEPS_V: [f64; 7] = [50.0, 100.0, 200.0, 400.0, 600.0, 800.0, 1000.0];
/// Standard diode current ratings, A [practice].
pub const DIODE_CURRENT_STEPS_A: [f64; 5] = [0.2, 0.5, 1.0, 3.0, 5.0];

/// pin-current: the pin sources at most its limit.
pub fn pin_current(c: &Conditions, d: &DriveAnalysis) -> Finding {
    let i = d.pin_current_max.base();
    let limit = c.pin_limit.base();
    let status = if i <= limit {
        Status::Pass
    } else {
        Status::Fail
    };
    Finding::new(
        PIN_CURRENT,
        status,
        Some(i),
        Some(limit),
        "A",
        why(Pin { i, limit }),
    )
}

/// The current-rating check (collector-current, drain-current).
pub fn current_rating(r: &Ratings, corner: &Corner) -> Finding {
    let i = corner.current_max.base();
    let rated = r.current.base();
    let pass = CURRENT_DERATING * rated;
    let status = Status::at_most(i, pass, rated);
    Finding::new(
        r.current_check,
        status,
        Some(i),
        Some(pass),
        "A",
        why(Rated { status, i, rated }),
    )
}

/// The voltage-rating check (collector-voltage, drain-voltage): an inductive load with no clamp
/// fails.
pub fn voltage_rating(r: &Ratings, corner: &Corner) -> Finding {
    let rating = r.voltage.base();
    let pass = VOLTAGE_DERATING * rating;
    let Some(peak) = corner.peak.map(|v| v.base()) else {
        return Finding::new(
            r.voltage_check,
            Status::Fail,
            None,
            Some(pass),
            "V",
            why(Peak {
                status: Status::Fail,
                peak: None,
                rating,
                name: r.voltage_name,
                terminal: r.terminal,
            }),
        );
    };
    let status = Status::at_most(peak, pass, rating);
    Finding::new(
        r.voltage_check,
        status,
        Some(peak),
        Some(pass),
        "V",
        why(Peak {
            status,
            peak: Some(peak),
            rating,
            name: r.voltage_name,
            terminal: r.terminal,
        }),
    )
}

/// junction-temp: Tj <= Tj,max - 25 K passes, <= Tj,max is marginal; thermal runaway fails.
pub fn junction(r: &Ratings, c: &Conditions, d: &DriveAnalysis) -> Finding {
    let tj_max = r.tj_max.base();
    let pass = tj_max - JUNCTION_MARGIN_K;
    let (status, tj) = match d.junction_max {
        Some(t) => (Status::at_most(t.base(), pass, tj_max), Some(t.base())),
        None => (Status::Fail, None),
    };
    Finding::new(
        JUNCTION_TEMP,
        status,
        tj,
        Some(pass),
        "°C",
        why(Junction {
            tj,
            pass,
            tj_max,
            power: d.power_max.map(|p| p.base()),
            ambient: c.ambient_max.base(),
        }),
    )
}

/// clamp-rating (v2): each rating the clamp states is checked; none stated: no check.
pub fn clamp_rating(clamp: &Clamp, corner: &Corner, proposal: &ClampProposal) -> Option<Finding> {
    let (reverse, current) = clamp.ratings();
    if *clamp == Clamp::None || (reverse.is_none() && current.is_none()) {
        return None;
    }
    let vcc_max = corner.vcc_max.base();
    let ic_max = corner.current_max.base();
    let reverse_status =
        reverse.map(|r| Status::at_least(r.base(), CLAMP_REVERSE_MARGIN * vcc_max, vcc_max));
    let current_status = current.map(|i| {
        if i.base() >= ic_max {
            Status::Pass
        } else {
            Status::Fail
        }
    });
    let status = reverse_status
        .unwrap_or(Status::Pass)
        .max(current_status.unwrap_or(Status::Pass));
    let use_reverse = match (reverse_status, current_status) {
        (Some(r), Some(i)) => r >= i,
        (Some(_), None) => true,
        _ => false,
    };
    let (value, limit, unit) = if use_reverse {
        (
            reverse.map(|r| r.base()),
            Some(CLAMP_REVERSE_MARGIN * vcc_max),
            "V",
        )
    } else {
        (current.map(|i| i.base()), Some(ic_max), "A")
    };
    Some(Finding::new(
        CLAMP_RATING,
        status,
        value,
        limit,
        unit,
        why(ClampWords {
            reverse: reverse.map(|r| r.base()),
            current: current.map(|i| i.base()),
            reverse_needed: CLAMP_REVERSE_MARGIN * vcc_max,
            vcc_max,
            current_needed: ic_max,
            proposed_reverse: proposal.reverse_min.base(),
            proposed_current: proposal.current_min.base(),
        }),
    ))
}

/// resistor-power: the resistor closest to its rating decides.
pub fn resistor_power(resistors: &[ResistorUse]) -> Finding {
    let worst = resistors
        .iter()
        .max_by(|a, b| a.load_ratio().total_cmp(&b.load_ratio()));
    let Some(r) = worst else {
        return Finding::new(
            RESISTOR_POWER,
            Status::Pass,
            None,
            None,
            "W",
            why(NoResistor),
        );
    };
    let p = r.worst_power.base();
    let rating = r.rating.base();
    let status = Status::at_most(p, RESISTOR_DERATING * rating, rating);
    Finding::new(
        RESISTOR_POWER,
        status,
        Some(p),
        Some(RESISTOR_DERATING * rating),
        "W",
        why(ResistorWords {
            symbol: r.symbol,
            value: r.value.base(),
            power: p,
            rating,
            sized: r.sized,
        }),
    )
}

/// The smallest standard step at or above `v` (or `v` rounded up beyond the steps).
pub fn step_up(steps: &[f64], v: f64) -> f64 {
    steps.iter().copied().find(|s| *s >= v).unwrap_or(v.ceil())
}

/// The clamp object a board file takes for a clamp of the stage's kind with standard ratings
/// that cover the proposal (a diode when none is fitted).
pub fn clamp_object(clamp: &Clamp, proposal: &ClampProposal) -> (serde_json::Value, f64, f64) {
    let reverse = step_up(&DIODE_REVERSE_STEPS_V, proposal.reverse_min.base());
    let current = step_up(&DIODE_CURRENT_STEPS_A, proposal.current_min.base());
    let value = match clamp {
        Clamp::Zener { forward, zener, .. } => json!({
            "kind": "zener", "zener_v": number(zener.base()), "forward_v": number(forward.base()),
            "reverse_v": number(reverse), "current_a": number(current)
        }),
        Clamp::Diode { forward, .. } => json!({
            "kind": "diode", "forward_v": number(forward.base()), "reverse_v": number(reverse),
            "current_a": number(current)
        }),
        Clamp::None => json!({
            "kind": "diode", "reverse_v": number(reverse), "current_a": number(current)
        }),
    };
    (value, reverse, current)
}

/// Remedies of the drive-neutral checks of an analysed stage that are not a pass.
pub fn remedies(stage: &crate::stage::Stage, a: &super::Analysis) -> Vec<Proposal> {
    let c = &stage.conditions;
    let corner = &a.corner;
    let ratings = &stage.switch.ratings();
    let clamp = &stage.clamp;
    let proposal = a.clamp.as_ref();
    let d = &a.drive;
    let resistors = &a.resistors;
    let findings = &a.findings;
    let mut out = Vec::new();
    for f in findings.iter().filter(|f| f.status != Status::Pass) {
        if f.id == ratings.current_check {
            let need = corner.current_max.base() / CURRENT_DERATING;
            out.push(Proposal::part(
                f.id,
                vec![PartNeed {
                    figure: ratings.current_key,
                    bound: Bound::AtLeast,
                    value: need,
                    unit: "A",
                    at: None,
                }],
                why(Advice::Current {
                    need,
                    draws: corner.current_max.base(),
                }),
            ));
        } else if f.id == ratings.voltage_check {
            match (corner.peak, proposal) {
                (None, Some(p)) => {
                    let (value, reverse, current) = clamp_object(clamp, p);
                    out.push(Proposal::edit(
                        f.id,
                        vec![Edit::Set("clamp", value)],
                        why(Advice::FitClamp { reverse, current }),
                    ));
                }
                (peak, _) => {
                    let peak = peak.map(|v| v.base()).unwrap_or(0.0);
                    let need = peak / VOLTAGE_DERATING;
                    out.push(Proposal::part(
                        f.id,
                        vec![PartNeed {
                            figure: ratings.voltage_key,
                            bound: Bound::AtLeast,
                            value: need,
                            unit: "V",
                            at: None,
                        }],
                        why(Advice::Voltage {
                            need,
                            peak,
                            name: ratings.voltage_name,
                            zener: matches!(clamp, Clamp::Zener { .. }),
                        }),
                    ));
                }
            }
        } else if f.id == JUNCTION_TEMP {
            let budget = ratings.tj_max.base() - JUNCTION_MARGIN_K - c.ambient_max.base();
            match d.power_max.map(|p| p.base()) {
                Some(p) if budget > 0.0 && p > 0.0 => out.push(Proposal::part(
                    f.id,
                    vec![PartNeed {
                        figure: "r_th_ja_k_per_w",
                        bound: Bound::AtMost,
                        value: budget / p,
                        unit: "K/W",
                        at: None,
                    }],
                    why(Advice::Thermal {
                        rth: budget / p,
                        power: p,
                        ambient: c.ambient_max.base(),
                    }),
                )),
                Some(_) => out.push(Proposal::part(
                    f.id,
                    vec![PartNeed {
                        figure: "tj_max_c",
                        bound: Bound::AtLeast,
                        value: c.ambient_max.base() + JUNCTION_MARGIN_K,
                        unit: "°C",
                        at: None,
                    }],
                    why(Advice::NoMargin),
                )),
                None => out.push(Proposal::part(f.id, Vec::new(), why(Advice::Runaway))),
            }
        } else if f.id == CLAMP_RATING {
            if let Some(p) = proposal {
                let (value, reverse, current) = clamp_object(clamp, p);
                out.push(Proposal::edit(
                    f.id,
                    vec![Edit::Set("clamp", value)],
                    why(Advice::FitClamp { reverse, current }),
                ));
            }
        } else if f.id == RESISTOR_POWER {
            let needed = resistors
                .iter()
                .filter(|r| !r.sized)
                .filter_map(|r| r.needed_rating.map(|p| p.base()))
                .fold(0.0_f64, f64::max);
            if needed > 0.0 {
                out.push(Proposal::edit(
                    f.id,
                    vec![Edit::Set("resistor_rating_w", number(needed))],
                    why(Advice::Rating { needed }),
                ));
            } else {
                out.push(Proposal::part(f.id, Vec::new(), why(Advice::TooHot)));
            }
        } else if f.id == PIN_CURRENT && c.inputs.series.is_none() {
            // A sized series resistor already keeps the pin within its limit; only a limit
            // below what 10 Mohm draws is left.
            out.push(Proposal::part(f.id, Vec::new(), why(Advice::PinTooWeak)));
        }
    }
    out
}

// Words.

#[derive(Debug)]
struct Pin {
    i: f64,
    limit: f64,
}

impl Explain for Pin {
    fn sentence(&self) -> String {
        if self.i <= self.limit {
            format!(
                "the pin sources at most {} of its {} limit",
                fe(self.i, "A"),
                fe(self.limit, "A")
            )
        } else {
            format!(
                "the pin would source {}, above its {} limit",
                fe(self.i, "A"),
                fe(self.limit, "A")
            )
        }
    }
}

#[derive(Debug)]
struct Rated {
    status: Status,
    i: f64,
    rated: f64,
}

impl Explain for Rated {
    fn sentence(&self) -> String {
        let word = match self.status {
            Status::Pass => "within 80 % of",
            Status::Marginal => "above 80 % of",
            Status::Fail => "above",
        };
        format!(
            "the load draws at most {}, {word} the part's {} rating",
            fe(self.i, "A"),
            fe(self.rated, "A")
        )
    }
}

#[derive(Debug)]
struct Peak {
    status: Status,
    peak: Option<f64>,
    rating: f64,
    name: &'static str,
    terminal: &'static str,
}

impl Explain for Peak {
    fn sentence(&self) -> String {
        let Some(peak) = self.peak else {
            return format!(
                "an inductive load with no clamp: the winding's turn-off kick drives the {} far above {} {}",
                self.terminal,
                self.name,
                fe(self.rating, "V")
            );
        };
        let word = match self.status {
            Status::Pass => "within 80 % of",
            Status::Marginal => "above 80 % of",
            Status::Fail => "above",
        };
        format!(
            "the {} peaks at {}, {word} {} {}",
            self.terminal,
            fe(peak, "V"),
            self.name,
            fe(self.rating, "V")
        )
    }
}

#[derive(Debug)]
struct Junction {
    tj: Option<f64>,
    pass: f64,
    tj_max: f64,
    power: Option<f64>,
    ambient: f64,
}

impl Explain for Junction {
    fn sentence(&self) -> String {
        let limit = format!(
            "the {} °C pass limit (Tj,max {} °C less a 25 K margin)",
            show_number(self.pass),
            show_number(self.tj_max)
        );
        match (self.tj, self.power) {
            (Some(tj), Some(p)) => format!(
                "{} dissipated at {} °C ambient heats the junction to {:.1} °C, against {limit}",
                fe(p, "W"),
                show_number(self.ambient),
                tj
            ),
            _ => format!(
                "thermal runaway: the on-resistance heats faster than the part can shed the heat at {} °C ambient, so no junction temperature settles below {}",
                show_number(self.ambient),
                limit
            ),
        }
    }
}

#[derive(Debug)]
struct ClampWords {
    reverse: Option<f64>,
    current: Option<f64>,
    reverse_needed: f64,
    vcc_max: f64,
    current_needed: f64,
    proposed_reverse: f64,
    proposed_current: f64,
}

impl Explain for ClampWords {
    fn sentence(&self) -> String {
        let reverse = match self.reverse {
            Some(r) if r >= self.reverse_needed => format!(
                "reverse rating {} covers 1.5 x the highest supply ({})",
                fe(r, "V"),
                fe(self.reverse_needed, "V")
            ),
            Some(r) if r >= self.vcc_max => format!(
                "reverse rating {} is above the highest supply {} but below 1.5 x it ({})",
                fe(r, "V"),
                fe(self.vcc_max, "V"),
                fe(self.reverse_needed, "V")
            ),
            Some(r) => format!(
                "reverse rating {} is below the highest supply {}",
                fe(r, "V"),
                fe(self.vcc_max, "V")
            ),
            None => format!(
                "no reverse rating stated (a diode for at least {} is the minimum)",
                fe(self.proposed_reverse, "V")
            ),
        };
        let current = match self.current {
            Some(i) if i >= self.current_needed => format!(
                "current rating {} covers the winding's {}",
                fe(i, "A"),
                fe(self.current_needed, "A")
            ),
            Some(i) => format!(
                "current rating {} is below the winding's {}",
                fe(i, "A"),
                fe(self.current_needed, "A")
            ),
            None => format!(
                "no current rating stated (a diode for at least {} is the minimum)",
                fe(self.proposed_current, "A")
            ),
        };
        format!("{reverse}; {current}")
    }
}

#[derive(Debug)]
struct NoResistor;

impl Explain for NoResistor {
    fn sentence(&self) -> String {
        "no resistor to check".to_string()
    }
}

#[derive(Debug)]
struct ResistorWords {
    symbol: &'static str,
    value: f64,
    power: f64,
    rating: f64,
    sized: bool,
}

impl Explain for ResistorWords {
    fn sentence(&self) -> String {
        format!(
            "{} {} dissipates at most {} against its {} rating ({})",
            self.symbol,
            format_rkm(self.value),
            fe(self.power, "W"),
            fe(self.rating, "W"),
            if self.sized {
                "the rating sized for it: the smallest standard one of at least twice its worst power"
            } else {
                "the rating of the fitted resistors"
            }
        )
    }
}

#[derive(Debug)]
enum Advice {
    Current {
        need: f64,
        draws: f64,
    },
    Voltage {
        need: f64,
        peak: f64,
        name: &'static str,
        zener: bool,
    },
    FitClamp {
        reverse: f64,
        current: f64,
    },
    Thermal {
        rth: f64,
        power: f64,
        ambient: f64,
    },
    NoMargin,
    Runaway,
    Rating {
        needed: f64,
    },
    TooHot,
    PinTooWeak,
}

impl Explain for Advice {
    fn sentence(&self) -> String {
        match self {
            Advice::Current { need, draws } => format!(
                "choose a part rated for at least {} (the load draws {}; a rating of 1.25 times that keeps it within 80 %)",
                fe(*need, "A"),
                fe(*draws, "A")
            ),
            Advice::Voltage { need, peak, name, zener } => format!(
                "choose a part with {name} of at least {} (the switch peaks at {}){}",
                fe(*need, "V"),
                fe(*peak, "V"),
                if *zener { ", or a lower Zener voltage" } else { "" }
            ),
            Advice::FitClamp { reverse, current } => format!(
                "fit a flyback diode across the winding: a standard part rated {} reverse and {} forward current (the minimum is 1.5 x the highest supply and the winding's current)",
                fe(*reverse, "V"),
                fe(*current, "A")
            ),
            Advice::Thermal { rth, power, ambient } => format!(
                "keep RthJA at or below {:.0} K/W (more copper, a heat sink or a larger package) for {} at {} °C ambient",
                rth,
                fe(*power, "W"),
                show_number(*ambient)
            ),
            Advice::NoMargin => "the ambient leaves no junction margin: choose a part with a higher Tj,max".to_string(),
            Advice::Runaway => "thermal runaway: choose a MOSFET with a lower RDS(on) at this gate drive, or a lower RthJA (more copper, a heat sink)".to_string(),
            Advice::Rating { needed } => format!(
                "fit resistors rated at least {} (twice their worst power)",
                fe(*needed, "W")
            ),
            Advice::TooHot => "a resistor dissipates more than the largest standard rating can take at twice its power: change the circuit".to_string(),
            Advice::PinTooWeak => "the pin cannot supply even what the largest resistor draws: add a buffer".to_string(),
        }
    }
}
