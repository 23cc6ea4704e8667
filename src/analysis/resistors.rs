//! The resistors a stage uses, with their worst power and the rating they are held to
//! (stage-model 5 and 6.4): a sized resistor is held to the rating sized for it, a fitted one to
//! the stage's fitted rating.

use serde::Serialize;

use crate::conditions::Conditions;
use crate::quantity::{watts, Base, Power, Resistance};

/// Standard resistor power ratings, W [practice: the usual catalogue steps].
pub const POWER_RATINGS_W: [f64; 9] = [0.063, 0.1, 0.125, 0.25, 0.5, 1.0, 2.0, 3.0, 5.0];
/// A resistor is rated at least this many times its worst power [practice].
pub const POWER_DERATING: f64 = 2.0;

/// Where the rating a resistor is held to comes from.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Serialize)]
#[serde(rename_all = "lowercase")]
pub enum RatingSource {
    /// The stage states `resistor_rating_w` for its fitted resistors.
    Given,
    /// The stage states none: 0.25 W assumed for its fitted resistors.
    Assumed,
    /// The resistor was sized, and so was its rating (stage-model 6.4).
    Proposed,
}

/// A resistor of the stage.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct ResistorUse {
    /// Symbol (`RB`, `RGS`, `RL`).
    pub symbol: &'static str,
    /// Role in reports (`base`, `pull-down`, `led`).
    pub role: &'static str,
    /// Its value.
    pub value: Resistance,
    /// Sized by the engine, or fitted.
    pub sized: bool,
    /// Worst-case dissipation.
    pub worst_power: Power,
    /// The rating it is held to.
    pub rating: Power,
    /// Where that rating comes from.
    pub rating_source: RatingSource,
    /// The smallest standard rating at least twice its worst power (`None` above the largest).
    pub needed_rating: Option<Power>,
}

impl ResistorUse {
    /// A resistor of the stage with its worst power.
    pub fn new(
        c: &Conditions,
        symbol: &'static str,
        role: &'static str,
        value: Resistance,
        sized: bool,
        worst_power: Power,
    ) -> ResistorUse {
        let needed = power_rating_for(worst_power);
        let [.., largest] = POWER_RATINGS_W;
        let (rating, rating_source) = if sized {
            (needed.unwrap_or(watts(largest)), RatingSource::Proposed)
        } else if c.resistor_rating.is_some() {
            (c.fitted_rating(), RatingSource::Given)
        } else {
            (c.fitted_rating(), RatingSource::Assumed)
        };
        ResistorUse {
            symbol,
            role,
            value,
            sized,
            worst_power,
            rating,
            rating_source,
            needed_rating: needed,
        }
    }

    /// Worst power over rating.
    pub fn load_ratio(&self) -> f64 {
        self.worst_power.base() / self.rating.base()
    }
}

/// The smallest standard rating at least twice the worst power; `None` above 5 W / 2.
pub fn power_rating_for(worst: Power) -> Option<Power> {
    POWER_RATINGS_W
        .iter()
        .copied()
        .find(|r| *r >= POWER_DERATING * worst.base())
        .map(watts)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn ratings_step_up_to_twice_the_worst_power() {
        // Common practice: rate a resistor at least twice its worst dissipation.
        assert_eq!(power_rating_for(watts(0.03)).map(|p| p.base()), Some(0.063));
        assert_eq!(power_rating_for(watts(0.1)).map(|p| p.base()), Some(0.25));
        assert_eq!(power_rating_for(watts(0.126)).map(|p| p.base()), Some(0.5));
        assert_eq!(power_rating_for(watts(3.0)), None);
    }
}
