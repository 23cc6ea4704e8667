//! What each command does: read input, call the engine, render, decide the exit code.
//! `main.rs` only parses the command line and turns the outcome into a process exit code.

use std::io::{IsTerminal, Write};
use std::path::{Path, PathBuf};

use crate::analysis::yield_mc::YieldOptions;
use crate::board::{read_board, resolve_stage, RawStage};
use crate::check::Status;
use crate::cli::{Cli, ColorArg, Command, FormatArg, PartsCommand, StageArgs, YieldArgs};
use crate::error::{Error, Result};
use crate::fields::Origin;
use crate::parts::{check_files, Library};
use crate::pipeline::{self, Options};
use crate::report::{output_width, renderer_with_width, write_report, Format, StageReport};
use crate::stage::Stage;

mod flags;
mod parts_view;
mod progress;

/// Seed of the yield draws when `--seed` is not given.
pub const DEFAULT_SEED: u64 = 1;

pub use flags::raw_from_flags;

/// Run a parsed command line, writing results to `out` (or to `--output`). `env_parts` is the
/// `PINLOW_PARTS` path list; `stdout_is_tty` and `no_color` decide colour under `--color auto`.
/// Returns the exit code of a result (0 or 1); errors mean exit code 2.
pub fn run(
    cli: &Cli,
    env_parts: Option<&std::ffi::OsStr>,
    stdout_is_tty: bool,
    no_color: bool,
    out: &mut dyn Write,
) -> Result<u8> {
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
    refuse_unused_flags(cli)?;
    match &cli.command {
        Command::Parts(PartsCommand::Check { files }) => {
            let (parts, mut errors) = check_files(files);
            let mut text = String::new();
            for (f, part) in &parts {
                text.push_str(&format!(
                    "{}: ok ({}, {})\n",
                    f.display(),
                    part.info().id,
                    part.kind().name
                ));
            }
            match errors.len() {
                0 => emit(cli, out, &text),
                1 => Err(errors.remove(0)),
                _ => Err(Error::Many(errors)),
            }
        }
        Command::Parts(PartsCommand::List) => {
            let lib = Library::load(&paths)?;
            emit(cli, out, &parts_view::list(&lib, format))
        }
        Command::Parts(PartsCommand::Show { id }) => {
            let lib = Library::load(&paths)?;
            let part = lib.require(id, "pinlow parts show")?;
            emit(cli, out, &parts_view::show(part.as_ref(), format))
        }
        Command::Size {
            stage: args,
            yield_args,
        } => {
            if args.base_resistor.is_some() || args.gate_resistor.is_some() {
                return Err(Error::Usage(
                    "--base-resistor / --gate-resistor: `size` sizes the input resistor; to check a given one use `pinlow audit ... --base-resistor` (or --gate-resistor)".into(),
                ));
            }
            let lib = Library::load(&paths)?;
            let stage = stage_from_flags(args, &lib)?;
            report(cli, yield_args, out, format, color, None, &[stage])
        }
        Command::Plot { board, stage } => {
            let lib = Library::load(&paths)?;
            let Some(target) = &cli.output else {
                return Err(Error::Usage("plot needs --output FILE.svg".into()));
            };
            let stages = match board {
                Some(path) => {
                    refuse_flags_with_board(stage)?;
                    read_board(path, &lib)?.stages
                }
                None => vec![stage_from_flags(stage, &lib)?],
            };
            let mut written = String::new();
            for (i, s) in stages.iter().enumerate() {
                let path = if stages.len() == 1 {
                    target.clone()
                } else {
                    numbered(target, i + 1)
                };
                write_stage_svg(s, &path)?;
                written.push_str(&format!("{}: {}\n", s.name, path.display()));
            }
            out.write_all(written.as_bytes()).map_err(stdout_error)?;
            Ok(0)
        }
        Command::Audit {
            board,
            stage,
            yield_args,
        } => {
            let lib = Library::load(&paths)?;
            match board {
                Some(path) => {
                    refuse_flags_with_board(stage)?;
                    let board = read_board(path, &lib)?;
                    report(
                        cli,
                        yield_args,
                        out,
                        format,
                        color,
                        board.name,
                        &board.stages,
                    )
                }
                None => {
                    if stage.base_resistor.is_none() && stage.gate_resistor.is_none() {
                        return Err(Error::Usage(
                            "audit needs a board FILE, or stage flags with --base-resistor (npn) or --gate-resistor (nmos) (use `pinlow size` to size one)".into(),
                        ));
                    }
                    let s = stage_from_flags(stage, &lib)?;
                    report(cli, yield_args, out, format, color, None, &[s])
                }
            }
        }
    }
}

/// Report flags mean nothing to `parts` and `plot`: say so rather than ignore them.
fn refuse_unused_flags(cli: &Cli) -> Result<()> {
    let command = match &cli.command {
        Command::Parts(_) => "parts",
        Command::Plot { .. } => "plot",
        Command::Size { .. } | Command::Audit { .. } => return Ok(()),
    };
    let used = [
        ("--strict", cli.strict),
        ("--only-problems", cli.only_problems),
        ("--plots", cli.plots.is_some()),
    ];
    match used.iter().find(|(_, set)| *set) {
        Some((flag, _)) => Err(Error::Usage(format!(
            "{flag} applies to `size` and `audit` reports, not to `{command}`"
        ))),
        None => Ok(()),
    }
}

fn stage_from_flags(args: &StageArgs, lib: &Library) -> Result<Stage> {
    resolve_stage(
        &raw_from_flags(args)?,
        &std::sync::Arc::new(RawStage::default()),
        &Origin::Flags,
        0,
        lib,
    )
}

fn refuse_flags_with_board(stage: &StageArgs) -> Result<()> {
    if stage.any() {
        return Err(Error::Usage(
            "stage flags cannot be combined with a board file; put the values in the file (a stage's own fields or `defaults`)".into(),
        ));
    }
    Ok(())
}

fn stdout_error(source: std::io::Error) -> Error {
    Error::Io {
        path: PathBuf::from("<standard output>"),
        source,
    }
}

/// Write plain command output to `--output` or `out`.
fn emit(cli: &Cli, out: &mut dyn Write, text: &str) -> Result<u8> {
    match &cli.output {
        Some(path) => std::fs::write(path, text).map_err(|source| Error::Io {
            path: path.clone(),
            source,
        })?,
        None => out.write_all(text.as_bytes()).map_err(stdout_error)?,
    }
    Ok(0)
}

/// Analyse each stage once, draw its picture when asked, and stream the report.
#[allow(clippy::too_many_arguments)]
fn report(
    cli: &Cli,
    yield_args: &YieldArgs,
    out: &mut dyn Write,
    format: Format,
    color: bool,
    board: Option<String>,
    stages: &[Stage],
) -> Result<u8> {
    if let Some(dir) = &cli.plots {
        std::fs::create_dir_all(dir).map_err(|source| Error::Io {
            path: dir.to_path_buf(),
            source,
        })?;
    }
    let only = cli.only_problems;
    let opts = Options {
        yield_opts: yield_args.builds.map(|builds| YieldOptions {
            builds,
            seed: yield_args.seed.unwrap_or(DEFAULT_SEED),
        }),
        picture: cli.plots.is_some(),
    };
    let bar = progress::Bar::on_stderr(stages.len());
    let plot_error: std::cell::RefCell<Option<Error>> = std::cell::RefCell::new(None);
    let reports = stages.iter().enumerate().map(|(i, s)| {
        let mut r = pipeline::stage_report(i + 1, s, &opts, &|done, total| {
            bar.update(i + 1, &s.name, done, total)
        });
        if let (Some(dir), Some(picture)) = (&cli.plots, r.picture.take()) {
            let path = dir.join(format!("stage-{}.svg", i + 1));
            match write_svg(&picture, &path) {
                Ok(()) => r.plot_svg = Some(path.display().to_string()),
                Err(e) => {
                    plot_error.borrow_mut().get_or_insert(e);
                }
            }
        }
        r
    });
    let width = cli.output.is_none().then(output_width).flatten();
    let mut renderer = renderer_with_width(format, color, width);
    let show = |r: &StageReport| !only || r.verdict != Status::Pass;
    let tail = match &cli.output {
        Some(path) => {
            let file = std::fs::File::create(path).map_err(|source| Error::Io {
                path: path.clone(),
                source,
            })?;
            let mut w = std::io::BufWriter::new(file);
            let tail = write_report(&mut w, renderer.as_mut(), board, reports, show)
                .and_then(|t| w.flush().map(|_| t));
            tail.map_err(|source| Error::Io {
                path: path.clone(),
                source,
            })?
        }
        None => write_report(out, renderer.as_mut(), board, reports, show).map_err(stdout_error)?,
    };
    bar.finish();
    if let Some(e) = plot_error.into_inner() {
        return Err(e);
    }
    Ok(exit_code(tail.verdict, cli.strict))
}

/// Exit code of a verdict: 1 on a failing stage, or a marginal one under `--strict`.
pub fn exit_code(verdict: Status, strict: bool) -> u8 {
    match verdict {
        Status::Fail => 1,
        Status::Marginal if strict => 1,
        _ => 0,
    }
}

/// Write a picture's SVG to `path`.
fn write_svg(picture: &crate::picture::Picture, path: &Path) -> Result<()> {
    let svg = crate::plot::picture_svg(picture)
        .map_err(|e| Error::invalid(path.display().to_string(), format!("cannot draw: {e}")))?;
    std::fs::write(path, svg).map_err(|source| Error::Io {
        path: path.to_path_buf(),
        source,
    })
}

/// Analyse one stage and write its SVG to `path`.
fn write_stage_svg(s: &Stage, path: &Path) -> Result<()> {
    let a = crate::analysis::analyse(s);
    let picture =
        pipeline::picture(s, &a).map_err(|e| Error::invalid(format!("stage `{}`", s.name), e))?;
    write_svg(&picture, path)
}

/// `out.svg` -> `out-N.svg`, beside it.
fn numbered(out: &Path, n: usize) -> PathBuf {
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

/// Decide colour for `--color auto` from the real terminal and environment.
pub fn terminal_facts() -> (bool, bool) {
    (
        std::io::stdout().is_terminal(),
        std::env::var_os("NO_COLOR").is_some_and(|v| !v.is_empty()),
    )
}
