//! Stage flags -> the raw stage form a board file has, refusing flags that do not belong to the
//! chosen load or clamp. The load's flags come from its kind's field table, so the load object
//! made here goes through the same reader as a board file's.

use serde_json::{Map, Value};

use crate::board::RawStage;
use crate::cli::{ClampArg, StageArgs};
use crate::error::{Error, Result};
use crate::load;
use crate::remedy::number;

/// Turn the stage flags into the same raw form a board file has.
pub fn raw_from_flags(a: &StageArgs) -> Result<RawStage> {
    let load = match &a.load {
        None => {
            if let Some((flag, _, _)) = a.load_flags.set.first() {
                return Err(Error::Usage(format!(
                    "{flag} needs --load to say which load it belongs to ({})",
                    load::kind_names()
                )));
            }
            None
        }
        Some(name) => Some(load_from_flags(a, name)?),
    };
    let clamp_flags = [
        ("--clamp-forward", "forward_v", a.clamp_forward),
        ("--zener", "zener_v", a.zener),
        ("--clamp-reverse", "reverse_v", a.clamp_reverse),
        ("--clamp-current", "current_a", a.clamp_current),
    ];
    let first_clamp_flag = clamp_flags
        .iter()
        .find(|(_, _, v)| v.is_some())
        .map(|(f, _, _)| *f);
    let clamp = match a.clamp {
        None => {
            if let Some(flag) = first_clamp_flag {
                return Err(Error::Usage(format!(
                    "{flag} needs --clamp diode or --clamp zener"
                )));
            }
            None
        }
        Some(kind) => {
            let name = match kind {
                ClampArg::None => "none",
                ClampArg::Diode => "diode",
                ClampArg::Zener => "zener",
            };
            let mut m = Map::new();
            m.insert("kind".into(), Value::from(name));
            for (_, key, v) in clamp_flags {
                if let Some(v) = v {
                    m.insert(key.into(), number(v));
                }
            }
            if kind == ClampArg::Zener && a.zener.is_none() {
                return Err(Error::invalid(
                    "--zener",
                    "missing (the Zener voltage of a zener clamp)",
                ));
            }
            Some(m)
        }
    };
    Ok(RawStage {
        name: a.name.clone(),
        part: a.part.clone(),
        supply_v: a.supply,
        supply_tolerance: a.supply_tolerance,
        logic_high_v: a.logic_high,
        logic_high_min_v: a.logic_high_min,
        pin_limit_a: a.pin_limit,
        ambient_c: a.ambient.map(|(lo, hi)| [lo, hi]),
        grade: a.grade.map(Into::into),
        load,
        clamp,
        base_resistor_ohms: a.base_resistor,
        gate_resistor_ohms: a.gate_resistor,
        pull_down_ohms: if a.no_pull_down {
            Some(None)
        } else {
            a.pull_down.map(Some)
        },
        resistor_tolerance: a.resistor_tolerance,
        resistor_rating_w: a.resistor_rating,
        series: a.series,
        overdrive: a.overdrive,
    })
}

fn load_from_flags(a: &StageArgs, name: &str) -> Result<Map<String, Value>> {
    let kind = load::kind(name).ok_or_else(|| {
        Error::Usage(format!(
            "--load {name}: unknown load kind; the kinds are {}",
            load::kind_names()
        ))
    })?;
    let mut m = Map::new();
    m.insert("kind".into(), Value::from(kind.name));
    for (flag, key, v) in &a.load_flags.set {
        if kind.field(key).is_none_or(|f| f.flag != *flag) {
            let takes: Vec<&str> = kind.fields.iter().map(|f| f.flag).collect();
            return Err(Error::Usage(format!(
                "{flag} does not apply to --load {name}; it takes {}",
                takes.join(", ")
            )));
        }
        m.insert((*key).into(), number(*v));
    }
    Ok(m)
}
