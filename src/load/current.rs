//! The current load: a load that draws at most a fixed current (stage-model 2).

use std::sync::Arc;

use super::{CurrentLaw, Field, Load, LoadKind, SharedLoad};
use crate::conditions::Conditions;
use crate::fields::{Accepts, Fields, Resolution};
use crate::quantity::limits::AMPS;
use crate::quantity::{amps, Base, Current, Resistance, ValueKind};

/// The registration of the current load.
pub static KIND: LoadKind = LoadKind {
    name: "current",
    about: "a load that draws at most a fixed current (--current)",
    fields: &[Field {
        key: "current_a",
        flag: "--current",
        value: ValueKind::Current,
        value_name: "AMPS",
        help: "the most current the load draws (current load) or the LED target current (led load), e.g. 150mA",
        form: "a number of amperes, e.g. 0.15",
        accepts: Accepts::Span(AMPS),
        required: true,
    }],
    resolve,
};

/// A load that draws at most a fixed current.
#[derive(Clone, Debug, PartialEq)]
pub struct CurrentLoad {
    /// The most the load draws.
    pub current: Current,
}

fn resolve(f: &Fields<'_>, _res: &mut Resolution<'_>) -> crate::Result<SharedLoad> {
    Ok(Arc::new(CurrentLoad {
        current: amps(f.need("current_a", AMPS)?),
    }))
}

impl Load for CurrentLoad {
    fn kind(&self) -> &'static LoadKind {
        &KIND
    }

    fn current_max(&self, _c: &Conditions, _own: Option<Resistance>) -> Current {
        self.current
    }

    /// A current load holds its current whatever the switch's voltage: in the linear region the
    /// switch can take the whole supply at that current [text].
    fn linear_power_fraction(&self) -> f64 {
        1.0
    }

    fn current_law(&self, _own: Option<Resistance>) -> Option<CurrentLaw> {
        Some(CurrentLaw::Fixed(self.current.base()))
    }
}
