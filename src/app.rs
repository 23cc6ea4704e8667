//! What each command does: read input, call the engine, render, decide the exit code.
//! `main.rs` only parses the command line and turns the outcome into a process exit code.

use std::io::IsTerminal;
use std::path::PathBuf;

use crate::analysis::{audit, Status};
use crate::board::{read_board, resolve_stage, Origin, RawClamp, RawLoad, RawStage};
use crate::cli::{ClampArg, Cli, ColorArg, Command, FormatArg, LoadArg, PartsCommand, StageArgs};
use crate::error::{Error, Result};
use crate::parts::{check_file, Library};
use crate::report::{render, Format, Report};

mod parts_view;

/// What a run produced: text for standard output and the exit code.
#[derive(Debug)]
pub struct Outcome {
    /// The rendered output (already written to `--output` when given).
    pub stdout: String,
    /// 0, 1 or 2 (files.md).
    pub code: u8,
}

/// Run a parsed command line. `env_parts` is the `PINLOW_PARTS` path list, `stdout_is_tty` and
/// `no_color` decide colour under `--color auto`.
pub fn run(
    cli: &Cli,
    env_parts: Option<&std::ffi::OsStr>,
    stdout_is_tty: bool,
    no_color: bool,
) -> Result<Outcome> {
    let mut paths: Vec<PathBuf> = env_parts
        .map(|v| {
            std::env::split_paths(v)
                .filter(|p| !p.as_os_str().is_empty())
                .collect()
        })
        .unwrap_or_default();
    paths.extend(cli.parts.iter().cloned());
    let color = match cli.color {
        ColorArg::Always => true,
        ColorArg::Never => false,
        ColorArg::Auto => stdout_is_tty && !no_color && cli.output.is_none(),
    };
    let format = match cli.format {
        FormatArg::Table => Format::Table,
        FormatArg::Json => Format::Json,
        FormatArg::Markdown => Format::Markdown,
    };
    let outcome = match &cli.command {
        Command::Parts(PartsCommand::Check { files }) => {
            let mut text = String::new();
            let mut errors = Vec::new();
            for f in files {
                match check_file(f) {
                    Ok(part) => text.push_str(&format!("{}: ok ({})\n", f.display(), part.id)),
                    Err(e) => errors.push(e),
                }
            }
            match errors.len() {
                0 => Outcome {
                    stdout: text,
                    code: 0,
                },
                1 => return Err(errors.remove(0)),
                _ => return Err(Error::Many(errors)),
            }
        }
        Command::Parts(PartsCommand::List) => {
            let lib = Library::load(&paths)?;
            Outcome {
                stdout: parts_view::list(&lib, format),
                code: 0,
            }
        }
        Command::Parts(PartsCommand::Show { id }) => {
            let lib = Library::load(&paths)?;
            let part = lib.require(id, "pinlow parts show")?;
            Outcome {
                stdout: parts_view::show(part, format),
                code: 0,
            }
        }
        Command::Size(args) => {
            if args.base_resistor.is_some() {
                return Err(Error::Usage(
                    "--base-resistor: `size` sizes the base resistor; to check a given one use `pinlow audit ... --base-resistor`".into(),
                ));
            }
            let lib = Library::load(&paths)?;
            let stage = resolve_stage(
                &raw_from_flags(args)?,
                &RawStage::default(),
                &Origin::Flags,
                &lib,
            )?;
            report_outcome(&audit(None, &[stage]), format, color, cli)
        }
        Command::Plot { board, stage } => {
            let lib = Library::load(&paths)?;
            let Some(out) = &cli.output else {
                return Err(Error::Usage("plot needs --output FILE.svg".into()));
            };
            let stages = match board {
                Some(path) => {
                    if stage.any() {
                        return Err(Error::Usage(
                            "stage flags cannot be combined with a board file".into(),
                        ));
                    }
                    read_board(path, &lib)?.stages
                }
                None => vec![resolve_stage(
                    &raw_from_flags(stage)?,
                    &RawStage::default(),
                    &Origin::Flags,
                    &lib,
                )?],
            };
            let mut written = String::new();
            for (i, s) in stages.iter().enumerate() {
                let path = if stages.len() == 1 {
                    out.clone()
                } else {
                    numbered(out, i + 1)
                };
                write_stage_svg(s, &path)?;
                written.push_str(&format!("{}: {}\n", s.name, path.display()));
            }
            return Ok(Outcome {
                stdout: written,
                code: 0,
            });
        }
        Command::Audit { board, stage } => {
            let lib = Library::load(&paths)?;
            let report = match board {
                Some(path) => {
                    if stage.any() {
                        return Err(Error::Usage(
                            "stage flags cannot be combined with a board file; put the values in the file (a stage's own fields or `defaults`)".into(),
                        ));
                    }
                    let board = read_board(path, &lib)?;
                    let mut report = audit(board.name, &board.stages);
                    draw_plots(cli, &board.stages, &mut report)?;
                    report
                }
                None => {
                    if stage.base_resistor.is_none() {
                        return Err(Error::Usage(
                            "audit needs a board FILE, or stage flags with --base-resistor (use `pinlow size` to size one)".into(),
                        ));
                    }
                    let s = resolve_stage(
                        &raw_from_flags(stage)?,
                        &RawStage::default(),
                        &Origin::Flags,
                        &lib,
                    )?;
                    let mut report = audit(None, std::slice::from_ref(&s));
                    draw_plots(cli, &[s], &mut report)?;
                    report
                }
            };
            report_outcome(&report, format, color, cli)
        }
    };
    if let Some(path) = &cli.output {
        std::fs::write(path, &outcome.stdout).map_err(|source| Error::Io {
            path: path.clone(),
            source,
        })?;
        return Ok(Outcome {
            stdout: String::new(),
            code: outcome.code,
        });
    }
    Ok(outcome)
}

/// With `--plots DIR`, draw every stage into DIR and note the path in its report.
fn draw_plots(cli: &Cli, stages: &[crate::stage::Stage], report: &mut Report) -> Result<()> {
    let Some(dir) = &cli.plots else {
        return Ok(());
    };
    std::fs::create_dir_all(dir).map_err(|source| Error::Io {
        path: dir.clone(),
        source,
    })?;
    for (s, r) in stages.iter().zip(report.stages.iter_mut()) {
        let path = dir.join(format!("stage-{}.svg", r.index));
        write_stage_svg(s, &path)?;
        r.plot_svg = Some(path.display().to_string());
    }
    Ok(())
}

/// Analyse one stage and write its SVG to `path`.
fn write_stage_svg(s: &crate::stage::Stage, path: &std::path::Path) -> Result<()> {
    let a = crate::analysis::analyse(s);
    let svg = crate::plot::stage_svg(s, &a)
        .map_err(|e| Error::invalid(format!("stage `{}`", s.name), format!("cannot draw: {e}")))?;
    std::fs::write(path, svg).map_err(|source| Error::Io {
        path: path.to_path_buf(),
        source,
    })
}

/// `out.svg` -> `out-N.svg`, beside it.
fn numbered(out: &std::path::Path, n: usize) -> PathBuf {
    let stem = out
        .file_stem()
        .map(|s| s.to_string_lossy().into_owned())
        .unwrap_or_else(|| "stage".into());
    let ext = out
        .extension()
        .map(|e| e.to_string_lossy().into_owned())
        .unwrap_or_else(|| "svg".into());
    out.with_file_name(format!("{stem}-{n}.{ext}"))
}

/// Exit code of a report: 1 on a failing stage, or a marginal one under `--strict`.
pub fn exit_code(report: &Report, strict: bool) -> u8 {
    match report.verdict {
        Status::Fail => 1,
        Status::Marginal if strict => 1,
        _ => 0,
    }
}

fn report_outcome(report: &Report, format: Format, color: bool, cli: &Cli) -> Outcome {
    let shown = if cli.only_problems {
        report.only_problems()
    } else {
        report.clone()
    };
    Outcome {
        stdout: render(&shown, format, color),
        code: exit_code(report, cli.strict),
    }
}

/// Decide colour for `--color auto` from the real terminal and environment.
pub fn terminal_facts() -> (bool, bool) {
    (
        std::io::stdout().is_terminal(),
        std::env::var_os("NO_COLOR").is_some_and(|v| !v.is_empty()),
    )
}

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
