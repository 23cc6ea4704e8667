//! The resistors a stage uses, with their worst power and the rating they are held to.

use serde::Serialize;

use super::corners::WorstCase;
use super::sizing::{power_rating_for, POWER_RATINGS_W};
use crate::quantity::{watts, Base, Power, Resistance};
use crate::stage::Stage;

/// Which resistor.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum Role {
    /// RB.
    Base,
    /// RBE.
    PullDown,
    /// RL.
    Led,
}

impl Role {
    /// Short label for reports.
    pub fn label(self) -> &'static str {
        match self {
            Role::Base => "RB",
            Role::PullDown => "RBE",
            Role::Led => "RL",
        }
    }
}

/// Where a resistor's power rating comes from.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Serialize)]
#[serde(rename_all = "lowercase")]
pub enum RatingSource {
    /// The stage gave `resistor_rating_w`.
    Given,
    /// The stage gave none: 0.25 W assumed.
    Assumed,
    /// The resistor was sized; so was its rating.
    Proposed,
}

impl RatingSource {
    /// `given`, `assumed` or `proposed`.
    pub fn as_str(self) -> &'static str {
        match self {
            RatingSource::Given => "given",
            RatingSource::Assumed => "assumed",
            RatingSource::Proposed => "proposed",
        }
    }
}

/// A resistor of the stage.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct ResistorUse {
    /// Which one.
    pub role: Role,
    /// Its value.
    pub value: Resistance,
    /// Sized by the engine, or given.
    pub sized: bool,
    /// Worst-case dissipation.
    pub worst_power: Power,
    /// The rating it is held to.
    pub rating: Power,
    /// Where that rating comes from.
    pub rating_source: RatingSource,
    /// The smallest standard rating at least twice its worst power (`None` above the largest).
    pub recommended_rating: Option<Power>,
}

impl ResistorUse {
    /// Worst power over rating.
    pub fn load_ratio(&self) -> f64 {
        self.worst_power.base() / self.rating.base()
    }
}

/// Which of the stage's resistors were sized by the engine.
#[derive(Clone, Copy, Debug, Default, PartialEq, Eq)]
pub struct SizedFlags {
    /// RB was sized.
    pub base: bool,
    /// RBE was sized.
    pub pull_down: bool,
    /// RL was sized.
    pub led: bool,
}

/// List the resistors of a stage with their worst powers and the ratings they are held to.
pub fn resistor_uses(stage: &Stage, wc: &WorstCase, sized: SizedFlags) -> Vec<ResistorUse> {
    let [.., largest_w] = POWER_RATINGS_W;
    let largest = watts(largest_w);
    let mut out = Vec::new();
    let mut push = |role: Role, value: Resistance, was_sized: bool, power: Power| {
        let recommended = power_rating_for(power);
        let (rating, source) = if was_sized {
            (recommended.unwrap_or(largest), RatingSource::Proposed)
        } else if stage.resistor_rating.is_some() {
            (stage.fitted_rating(), RatingSource::Given)
        } else {
            (stage.fitted_rating(), RatingSource::Assumed)
        };
        out.push(ResistorUse {
            role,
            value,
            sized: was_sized,
            worst_power: power,
            rating,
            rating_source: source,
            recommended_rating: recommended,
        });
    };
    push(Role::Base, wc.resistors.rb, sized.base, wc.rb_power);
    if let (Some(r), Some(p)) = (wc.resistors.rbe, wc.rbe_power) {
        push(Role::PullDown, r, sized.pull_down, p);
    }
    if let (Some(r), Some(p)) = (wc.resistors.rl, wc.rl_power) {
        push(Role::Led, r, sized.led, p);
    }
    out
}
