//! Stage flags -> the raw stage form a board file has, refusing flags that do not belong to the
//! chosen load or clamp.

use crate::board::{RawClamp, RawLoad, RawStage};
use crate::cli::{ClampArg, LoadArg, StageArgs};
use crate::error::{Error, Result};

/// Turn the stage flags into the same raw form a board file has, refusing flags that do not
/// belong to the chosen load or clamp.
pub fn raw_from_flags(a: &StageArgs) -> Result<RawStage> {
    let load = match a.load {
        None => {
            if let Some(flag) = first_set(&load_flags(a)) {
                return Err(Error::Usage(format!(
                    "{flag} needs --load to say which load it belongs to"
                )));
            }
            None
        }
        Some(kind) => Some(load_from_flags(a, kind)?),
    };
    let clamp = match a.clamp {
        None => {
            if let Some(flag) = first_set(&clamp_flags(a)) {
                return Err(Error::Usage(format!(
                    "{flag} needs --clamp diode or --clamp zener"
                )));
            }
            None
        }
        Some(ClampArg::None) => {
            if let Some(flag) = first_set(&clamp_flags(a)) {
                return Err(Error::Usage(format!(
                    "{flag} does not apply to --clamp none"
                )));
            }
            Some(RawClamp::None)
        }
        Some(ClampArg::Diode) => {
            if a.zener.is_some() {
                return Err(Error::Usage("--zener needs --clamp zener".into()));
            }
            Some(RawClamp::Diode {
                forward_v: a.clamp_forward,
                reverse_v: a.clamp_reverse,
                current_a: a.clamp_current,
            })
        }
        Some(ClampArg::Zener) => Some(RawClamp::Zener {
            zener_v: a.zener.ok_or_else(|| {
                Error::invalid("--zener", "missing (the Zener voltage of a zener clamp)")
            })?,
            forward_v: a.clamp_forward,
            reverse_v: a.clamp_reverse,
            current_a: a.clamp_current,
        }),
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

fn first_set(flags: &[(&'static str, bool)]) -> Option<&'static str> {
    flags.iter().find(|(_, set)| *set).map(|(name, _)| *name)
}

fn load_flags(a: &StageArgs) -> Vec<(&'static str, bool)> {
    vec![
        ("--current", a.current.is_some()),
        ("--coil", a.coil.is_some()),
        ("--coil-tolerance", a.coil_tolerance.is_some()),
        ("--coil-rated", a.coil_rated.is_some()),
        ("--must-operate", a.must_operate.is_some()),
        ("--inductance", a.inductance.is_some()),
        ("--led-count", a.led_count.is_some()),
        ("--led-vf", a.led_vf.is_some()),
        ("--led-vf-min", a.led_vf_min.is_some()),
        ("--led-vf-max", a.led_vf_max.is_some()),
        ("--led-max-current", a.led_max_current.is_some()),
        ("--led-resistor", a.led_resistor.is_some()),
        ("--strip-voltage", a.strip_voltage.is_some()),
        (
            "--strip-current-per-metre",
            a.strip_current_per_metre.is_some(),
        ),
        ("--strip-length", a.strip_length.is_some()),
    ]
}

fn clamp_flags(a: &StageArgs) -> Vec<(&'static str, bool)> {
    vec![
        ("--clamp-forward", a.clamp_forward.is_some()),
        ("--zener", a.zener.is_some()),
        ("--clamp-reverse", a.clamp_reverse.is_some()),
        ("--clamp-current", a.clamp_current.is_some()),
    ]
}

fn load_from_flags(a: &StageArgs, kind: LoadArg) -> Result<RawLoad> {
    let (name, allowed): (&str, &[&str]) = match kind {
        LoadArg::Current => ("current", &["--current"]),
        LoadArg::Relay => (
            "relay",
            &[
                "--coil",
                "--coil-tolerance",
                "--coil-rated",
                "--must-operate",
                "--inductance",
            ],
        ),
        LoadArg::Led => (
            "led",
            &[
                "--led-count",
                "--led-vf",
                "--led-vf-min",
                "--led-vf-max",
                "--led-max-current",
                "--led-resistor",
                "--current",
            ],
        ),
        LoadArg::Strip => (
            "strip",
            &[
                "--strip-voltage",
                "--strip-current-per-metre",
                "--strip-length",
            ],
        ),
    };
    for (flag, set) in load_flags(a) {
        if set && !allowed.contains(&flag) {
            return Err(Error::Usage(format!(
                "{flag} does not apply to --load {name}; it takes {}",
                allowed.join(", ")
            )));
        }
    }
    let need = |v: Option<f64>, flag: &str, what: &str| -> Result<f64> {
        v.ok_or_else(|| Error::invalid(flag, format!("missing ({what}) for --load {name}")))
    };
    Ok(match kind {
        LoadArg::Current => RawLoad::Current {
            current_a: need(a.current, "--current", "the load current")?,
        },
        LoadArg::Relay => RawLoad::Relay {
            coil_ohms: need(a.coil, "--coil", "the coil resistance at 20 °C")?,
            coil_tolerance: a.coil_tolerance,
            rated_v: a.coil_rated,
            must_operate_fraction: a.must_operate,
            inductance_h: a.inductance,
        },
        LoadArg::Led => {
            let n = need(a.led_count, "--led-count", "how many LEDs in series")?;
            if n.fract() != 0.0 || !(1.0..=1000.0).contains(&n) {
                return Err(Error::invalid(
                    "--led-count",
                    format!("{n} is not allowed: a whole number from 1 to 1000 is needed"),
                ));
            }
            RawLoad::Led {
                count: n as u32,
                forward_v: need(a.led_vf, "--led-vf", "the LED forward voltage")?,
                forward_min_v: a.led_vf_min,
                forward_max_v: a.led_vf_max,
                current_a: need(a.current, "--current", "the LED target current")?,
                max_current_a: a.led_max_current,
                resistor_ohms: a.led_resistor,
            }
        }
        LoadArg::Strip => RawLoad::Strip {
            rated_v: need(
                a.strip_voltage,
                "--strip-voltage",
                "the strip's rated voltage",
            )?,
            current_per_m_a: need(
                a.strip_current_per_metre,
                "--strip-current-per-metre",
                "current per metre",
            )?,
            length_m: need(a.strip_length, "--strip-length", "segment length")?,
        },
    })
}
