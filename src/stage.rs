//! A stage: the logic pin, the transistor, its resistors, the load and the conditions it works in,
//! fully resolved (every default applied and listed as an assumption).

use std::sync::Arc;

use crate::eseries::Series;
use crate::load::{Clamp, Load};
use crate::parts::Part;
use crate::quantity::{Current, Power, Resistance, Temperature, Voltage};

/// The pull-down from base to emitter.
#[derive(Clone, Debug, PartialEq)]
pub enum PullDown {
    /// No pull-down fitted.
    None,
    /// A given resistor.
    Given(Resistance),
    /// Size it: the series value nearest 10 x RB.
    Sized,
}

/// One driver stage, ready for the engine.
#[derive(Clone, Debug)]
pub struct Stage {
    /// The stage's name (`K1 vent relay`).
    pub name: String,
    /// The transistor.
    pub part: Arc<Part>,
    /// Nominal supply.
    pub supply: Voltage,
    /// +/- fraction of the supply.
    pub supply_tolerance: f64,
    /// The pin's nominal high level (VOH,max).
    pub logic_high: Voltage,
    /// The pin's guaranteed high level at its rated current (VOH,min).
    pub logic_high_min: Voltage,
    /// The most current the pin may source.
    pub pin_limit: Current,
    /// Lowest ambient.
    pub ambient_min: Temperature,
    /// Highest ambient.
    pub ambient_max: Temperature,
    /// What is switched.
    pub load: Load,
    /// Turn-off clamp (inductive loads).
    pub clamp: Clamp,
    /// The base resistor; `None` means size it.
    pub base_resistor: Option<Resistance>,
    /// The pull-down.
    pub pull_down: PullDown,
    /// +/- fraction of every resistor.
    pub resistor_tolerance: f64,
    /// Preferred-value series used when sizing.
    pub series: Series,
    /// Power rating of the fitted (given) resistors; `None`: 0.25 W assumed where it is used.
    pub resistor_rating: Option<Power>,
    /// Wanted ratio of worst-case drive to the bare minimum.
    pub overdrive: f64,
    /// Every default the stage took, in words.
    pub assumptions: Vec<String>,
}

/// Power rating assumed for a given resistor when the stage states none, W [practice].
pub const DEFAULT_RESISTOR_RATING_W: f64 = 0.25;

impl Stage {
    /// The rating given resistors are held to.
    pub fn fitted_rating(&self) -> Power {
        self.resistor_rating
            .unwrap_or_else(|| crate::quantity::watts(DEFAULT_RESISTOR_RATING_W))
    }

    /// Highest supply: VCC x (1 + tol).
    pub fn supply_max(&self) -> Voltage {
        self.supply * (1.0 + self.supply_tolerance)
    }
    /// Lowest supply: VCC x (1 - tol).
    pub fn supply_min(&self) -> Voltage {
        self.supply * (1.0 - self.supply_tolerance)
    }
}
