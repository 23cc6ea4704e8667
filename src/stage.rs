//! A stage: the logic pin, the switch with its input resistors, the load with its clamp, and the
//! conditions it works in, fully resolved (every default applied and listed as an assumption).

use std::sync::Arc;

use crate::board::RawStage;
use crate::conditions::Conditions;
use crate::drive::SharedSwitch;
use crate::fields::Origin;
use crate::load::{Clamp, SharedLoad};

/// Where a stage came from, kept so that a remedy can be applied to its raw fields and the
/// stage resolved again.
#[derive(Clone, Debug)]
pub struct StageSource {
    /// The stage's own fields as written.
    pub own: RawStage,
    /// The board's defaults.
    pub defaults: Arc<RawStage>,
    /// The file or the flags.
    pub origin: Origin,
    /// Index in the board's `stages` (0 for flags).
    pub index: usize,
}

/// One driver stage, ready for the engine.
#[derive(Clone, Debug)]
pub struct Stage {
    /// The stage's name (`K1 vent relay`).
    pub name: String,
    /// The switch (its part, of one drive kind).
    pub switch: SharedSwitch,
    /// Supply, logic pin, ambient, resistors and input resistors.
    pub conditions: Conditions,
    /// What is switched.
    pub load: SharedLoad,
    /// Turn-off clamp (inductive loads).
    pub clamp: Clamp,
    /// Every default the stage took, in words.
    pub assumptions: Vec<String>,
    /// Where it came from.
    pub source: StageSource,
}

impl Stage {
    /// The drive kind's name (`npn`, `nmos`).
    pub fn drive(&self) -> &'static str {
        self.switch.kind().name
    }

    /// The part's id.
    pub fn part_id(&self) -> &str {
        &self.switch.info().id
    }

    /// The load kind's name.
    pub fn load_kind(&self) -> &'static str {
        self.load.kind().name
    }
}
