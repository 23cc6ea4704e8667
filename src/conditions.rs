//! The drive-neutral inputs of a stage (stage-model 2): the supply, the logic pin, the ambient
//! range, the resistors' tolerance and series, and the input resistors the pin drives through.
//! The drive kinds and load kinds read these; they depend on nothing but quantities.

use crate::eseries::Series;
use crate::quantity::{watts, Current, Power, Resistance, Temperature, Voltage};

/// Power rating assumed for a fitted resistor when the stage states none, W [practice].
pub const DEFAULT_RESISTOR_RATING_W: f64 = 0.25;

/// The shunt resistor from the control terminal to ground (RBE for an NPN, RGS for a MOSFET).
#[derive(Clone, Copy, Debug, PartialEq)]
pub enum PullDown {
    /// None fitted.
    None,
    /// A given resistor.
    Given(Resistance),
    /// Size it by the drive's rule.
    Sized,
}

/// The resistors from the pin to the switch's control terminal: the series resistor (RB or RG)
/// and the pull-down (RBE or RGS).
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct InputResistors {
    /// The series resistor; `None`: size it.
    pub series: Option<Resistance>,
    /// The pull-down.
    pub pull_down: PullDown,
}

/// Everything about a stage that is neither the switch nor the load.
#[derive(Clone, Debug, PartialEq)]
pub struct Conditions {
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
    /// +/- fraction of every resistor.
    pub resistor_tolerance: f64,
    /// Preferred-value series used when sizing.
    pub series: Series,
    /// Power rating of the fitted resistors; `None`: [`DEFAULT_RESISTOR_RATING_W`] assumed.
    pub resistor_rating: Option<Power>,
    /// The input resistors.
    pub inputs: InputResistors,
    /// Wanted worst-case overdrive over the minimum gain (npn drives; others ignore it).
    pub overdrive: f64,
}

impl Conditions {
    /// Highest supply: VCC x (1 + tol).
    pub fn supply_max(&self) -> Voltage {
        self.supply * (1.0 + self.supply_tolerance)
    }

    /// Lowest supply: VCC x (1 - tol).
    pub fn supply_min(&self) -> Voltage {
        self.supply * (1.0 - self.supply_tolerance)
    }

    /// A resistor at +tol.
    pub fn high(&self, r: Resistance) -> Resistance {
        r * (1.0 + self.resistor_tolerance)
    }

    /// A resistor at -tol.
    pub fn low(&self, r: Resistance) -> Resistance {
        r * (1.0 - self.resistor_tolerance)
    }

    /// The rating fitted resistors are held to.
    pub fn fitted_rating(&self) -> Power {
        self.resistor_rating
            .unwrap_or_else(|| watts(DEFAULT_RESISTOR_RATING_W))
    }
}
