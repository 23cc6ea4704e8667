//! What each command does: read input, call the engine, render, decide the exit code.
//! `main.rs` only parses the command line and turns the outcome into a process exit code.

use std::cell::RefCell;
use std::io::{IsTerminal, Write};
use std::path::{Path, PathBuf};

use crate::analysis::yield_mc::YieldOptions;
use crate::board::{resolve_stage, BoardReader, RawStage};
use crate::check::Status;
use crate::cli::{
    Cli, ColorArg, Command, FormatArg, LibraryArgs, OutputArgs, PartsCommand, ReportArgs,
    StageArgs, YieldArgs,
};
use crate::error::{Error, Result};
use crate::fields::Origin;
use crate::outputs::{relative_link, Folder, Inputs, Kind, Plan, Target};
use crate::parts::{check_paths, Library, PartsPath};
use crate::pipeline::{self, Options};
use crate::report::{output_width, renderer_with_width, write_report, Format, StageReport};
use crate::stage::Stage;

mod fix;
mod flags;
mod parts_view;
mod pick;
mod progress;
mod schema;
mod shell;

/// Seed of the yield draws when `--seed` is not given.
pub const DEFAULT_SEED: u64 = 1;

/// Exit status when standard output is closed before everything is written (the reader of a
/// pipe went away, `pinlow audit b.json | head -1`): 128 + 13, as for a process ended by
/// SIGPIPE, and nothing on standard error.
pub const OUTPUT_CLOSED_EXIT: u8 = 141;

pub use flags::raw_from_flags;

/// What `--color auto` looks at.
#[derive(Clone, Copy, Debug)]
struct Terminal {
    stdout_is_tty: bool,
    no_color: bool,
}

/// Run a parsed command line, writing results to `out` (or to `--output`). `env_parts` is the
/// `PINLOW_PARTS` path list; `stdout_is_tty` and `no_color` decide colour under `--color auto`.
/// Returns the exit code of a result (0 or 1); errors mean exit code 2, except
/// [`Error::OutputClosed`] ([`OUTPUT_CLOSED_EXIT`]).
pub fn run(
    cli: &Cli,
    env_parts: Option<&std::ffi::OsStr>,
    stdout_is_tty: bool,
    no_color: bool,
    out: &mut dyn Write,
) -> Result<u8> {
    let env = env_parts.map(PartsPath::from_env).unwrap_or_default();
    let terminal = Terminal {
        stdout_is_tty,
        no_color,
    };
    match &cli.command {
        Command::Fix {
            board,
            library,
            output,
            force,
            strict,
        } => {
            let (lib, inputs) = library_of(&env, library)?;
            let verdict = fix::run(board, output, *force, &lib, inputs, out)?;
            Ok(exit_code(verdict, *strict))
        }
        Command::Schema { file } => schema::print(*file, out),
        Command::Completions { shell } => shell::completions(*shell, out),
        Command::Man => shell::man(out),
        Command::Parts(PartsCommand::Check { files, output }) => parts_check(files, output, out),
        Command::Parts(PartsCommand::List {
            format,
            library,
            output,
        }) => {
            let (lib, inputs) = library_of(&env, library)?;
            let text = parts_view::list(&lib, format_of(*format));
            emit(&inputs, output, kind_of(*format), out, &text)
        }
        Command::Parts(PartsCommand::Show {
            id,
            format,
            library,
            output,
        }) => {
            let (lib, inputs) = library_of(&env, library)?;
            let part = lib.require(id, "pinlow parts show")?;
            let text = parts_view::show(part.as_ref(), format_of(*format));
            emit(&inputs, output, kind_of(*format), out, &text)
        }
        Command::Size {
            stage,
            yield_args,
            library,
            report: args,
            output,
        } => {
            if stage.base_resistor.is_some() || stage.gate_resistor.is_some() {
                return Err(Error::Usage(
                    "--base-resistor / --gate-resistor: `size` sizes the input resistor; to check a given one use `pinlow audit ... --base-resistor` (or --gate-resistor)".into(),
                ));
            }
            let (lib, inputs) = library_of(&env, library)?;
            let stages = Stages::one(stage_from_flags(stage, &lib)?);
            let run = ReportRun {
                lib: &lib,
                inputs: &inputs,
                args,
                yield_args,
                output,
                terminal,
            };
            run.report(stages, out)
        }
        Command::Audit {
            board,
            stage,
            yield_args,
            library,
            report: args,
            output,
        } => {
            let (lib, mut inputs) = library_of(&env, library)?;
            let stages = match board {
                Some(path) => {
                    refuse_flags_with_board(stage)?;
                    Stages::open(path, &mut inputs)?
                }
                None => {
                    if stage.base_resistor.is_none() && stage.gate_resistor.is_none() {
                        return Err(Error::Usage(
                            "audit needs a board FILE, or stage flags with --base-resistor (npn) or --gate-resistor (nmos) (use `pinlow size` to size one)".into(),
                        ));
                    }
                    Stages::one(stage_from_flags(stage, &lib)?)
                }
            };
            let run = ReportRun {
                lib: &lib,
                inputs: &inputs,
                args,
                yield_args,
                output,
                terminal,
            };
            run.report(stages, out)
        }
        Command::Pick(args) => pick::run(args, &env, terminal, out),
        Command::Plot {
            board,
            stage,
            library,
            output,
        } => {
            let (lib, mut inputs) = library_of(&env, library)?;
            let mut stages = match board {
                Some(path) => {
                    refuse_flags_with_board(stage)?;
                    Stages::open(path, &mut inputs)?
                }
                None => Stages::one(stage_from_flags(stage, &lib)?),
            };
            // Every file is checked before the first is written.
            let mut plan = Plan::new(&inputs, output.force);
            let count = stages.len();
            let targets = if count == 1 {
                vec![plan.file(&output.output, Kind::Svg)?]
            } else {
                (1..=count)
                    .map(|n| plan.file(&numbered(&output.output, n), Kind::Svg))
                    .collect::<Result<Vec<_>>>()?
            };
            for s in stages.iter(&lib)? {
                s?;
            }
            for (s, target) in stages.iter(&lib)?.zip(&targets) {
                let s = s?;
                let name = crate::report::escape::terminal_text(&s.name).into_owned();
                let a = crate::analysis::analyse(&s);
                match pipeline::picture(&s, &a) {
                    Ok(picture) => {
                        write_svg(&picture, target)?;
                        writeln!(out, "{name}: {}", target.shown().display())
                    }
                    // A stage with nothing to draw gets no file and says why.
                    Err(why) => writeln!(
                        out,
                        "{name}: no picture ({})",
                        crate::report::escape::terminal_text(&why)
                    ),
                }
                .map_err(stdout_error)?;
            }
            Ok(0)
        }
    }
}

/// The stages a report or a plot goes over: one from flags, or a board read as a stream
/// (each pass reads it again, so its stages are never all held).
enum Stages {
    One(Box<Stage>),
    Board(Box<BoardReader>),
}

impl Stages {
    /// Open a board file (`-`: standard input) and count it among the inputs.
    fn open(path: &Path, inputs: &mut Inputs) -> Result<Stages> {
        if path.as_os_str() == "-" {
            inputs.add_stdin();
        } else {
            inputs.add_file(path, &path.display().to_string());
        }
        Ok(Stages::Board(Box::new(BoardReader::open(path)?)))
    }

    fn one(stage: Stage) -> Stages {
        Stages::One(Box::new(stage))
    }

    fn len(&self) -> usize {
        match self {
            Stages::One(_) => 1,
            Stages::Board(b) => b.len(),
        }
    }

    fn name(&self) -> Option<String> {
        match self {
            Stages::One(_) => None,
            Stages::Board(b) => b.name().map(str::to_string),
        }
    }

    fn iter<'a>(
        &'a mut self,
        lib: &'a Library,
    ) -> Result<Box<dyn Iterator<Item = Result<Stage>> + 'a>> {
        match self {
            Stages::One(s) => Ok(Box::new(std::iter::once(Ok(s.as_ref().clone())))),
            Stages::Board(b) => Ok(Box::new(b.stages(lib)?)),
        }
    }
}

/// The shipped parts with those of `PINLOW_PARTS` and `--parts`, and those paths as inputs.
fn library_of(env: &[PartsPath], args: &LibraryArgs) -> Result<(Library, Inputs)> {
    let mut sources = env.to_vec();
    sources.extend(args.parts.iter().cloned().map(PartsPath::given));
    let mut inputs = Inputs::new();
    for source in &sources {
        inputs.add_parts(&source.path);
    }
    Ok((Library::load_from(&sources)?, inputs))
}

/// `pinlow parts check`: every file and folder, then ids across them.
fn parts_check(files: &[PathBuf], output: &OutputArgs, out: &mut dyn Write) -> Result<u8> {
    let mut inputs = Inputs::new();
    for f in files {
        inputs.add_parts(f);
    }
    let mut plan = Plan::new(&inputs, output.force);
    let target = output
        .output
        .as_ref()
        .map(|p| plan.file(p, Kind::Text))
        .transpose()?;
    let (good, mut errors) = check_paths(files);
    if errors.len() > 1 {
        return Err(Error::Many(errors));
    }
    if let Some(e) = errors.pop() {
        return Err(e);
    }
    let text: String = good
        .iter()
        .map(|(f, part)| {
            format!(
                "{}: ok ({}, {})\n",
                f.display(),
                part.info().id,
                part.kind().name
            )
        })
        .collect();
    match target {
        Some(t) => t.write(text.as_bytes())?,
        None => out.write_all(text.as_bytes()).map_err(stdout_error)?,
    }
    Ok(0)
}

fn format_of(f: FormatArg) -> Format {
    match f {
        FormatArg::Table => Format::Table,
        FormatArg::Json => Format::Json,
        FormatArg::Markdown => Format::Markdown,
    }
}

fn kind_of(f: FormatArg) -> Kind {
    match f {
        FormatArg::Table => Kind::Text,
        FormatArg::Json => Kind::Json,
        FormatArg::Markdown => Kind::Markdown,
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

/// A failed write to standard output: [`Error::OutputClosed`] when its reader went away.
fn stdout_error(source: std::io::Error) -> Error {
    if source.kind() == std::io::ErrorKind::BrokenPipe {
        return Error::OutputClosed;
    }
    Error::Write {
        path: PathBuf::from("<standard output>"),
        source,
    }
}

/// Write plain command output to `--output` or `out`.
fn emit(
    inputs: &Inputs,
    output: &OutputArgs,
    kind: Kind,
    out: &mut dyn Write,
    text: &str,
) -> Result<u8> {
    match &output.output {
        Some(path) => Plan::new(inputs, output.force)
            .file(path, kind)?
            .write(text.as_bytes())?,
        None => out.write_all(text.as_bytes()).map_err(stdout_error)?,
    }
    Ok(0)
}

/// What a `size` or `audit` report needs beside its stages.
struct ReportRun<'a> {
    lib: &'a Library,
    inputs: &'a Inputs,
    args: &'a ReportArgs,
    yield_args: &'a YieldArgs,
    output: &'a OutputArgs,
    terminal: Terminal,
}

impl ReportRun<'_> {
    /// Check every output, read every stage once (nothing is written before each has been
    /// read and resolved; the summary is gathered then), then stream the report while the
    /// stages are read again.
    fn report(&self, mut stages: Stages, out: &mut dyn Write) -> Result<u8> {
        let args = self.args;
        let color = match args.color {
            ColorArg::Always => true,
            ColorArg::Never => false,
            ColorArg::Auto => {
                self.terminal.stdout_is_tty
                    && !self.terminal.no_color
                    && self.output.output.is_none()
            }
        };
        let mut plan = Plan::new(self.inputs, self.output.force);
        let target = match &self.output.output {
            Some(path) => Some(plan.file(path, kind_of(args.format))?),
            None => None,
        };
        let plots = match &args.plots {
            Some(dir) => Some(Plots::plan(&mut plan, dir, stages.len(), target.as_ref())?),
            None => None,
        };
        let width = self.output.output.is_none().then(output_width).flatten();
        let mut renderer = renderer_with_width(format_of(args.format), color, width);
        let only = args.only_problems;
        // Every stage is read and resolved once before anything is written: a bad stage is an
        // input error (exit 2) with no report half written.
        for s in stages.iter(self.lib)? {
            s?;
        }
        if let Some(p) = &plots {
            p.folder.create()?;
        }
        let opts = Options {
            yield_opts: self.yield_args.builds.map(|builds| YieldOptions {
                builds,
                seed: self.yield_args.seed.unwrap_or(DEFAULT_SEED),
            }),
            picture: plots.is_some(),
        };
        let bar = progress::Bar::on_stderr(stages.len());
        let name = stages.name();
        // A stage that fails on the second read (the file changed in between) stops the
        // stream; the error is returned and a report file is not written.
        let failure: RefCell<Option<Error>> = RefCell::new(None);
        let reports = stages.iter(self.lib)?.enumerate().map_while(|(i, s)| {
            let made = s.and_then(|s| {
                let mut r = pipeline::stage_report(i + 1, &s, &opts, &|done, total| {
                    bar.update(i + 1, &s.name, done, total)
                });
                if let (Some(p), Some(picture)) = (&plots, r.picture.take()) {
                    r.plot_svg = Some(p.draw(i, &picture)?);
                }
                Ok(r)
            });
            match made {
                Ok(r) => Some(r),
                Err(e) => {
                    *failure.borrow_mut() = Some(e);
                    None
                }
            }
        });
        let show = |r: &StageReport| !only || r.verdict != Status::Pass;
        let tail = match &target {
            Some(t) => {
                let mut file = t.create()?;
                let tail = write_report(&mut file, renderer.as_mut(), name, reports, show)
                    .map_err(|e| file.error(e))?;
                if let Some(e) = failure.take() {
                    return Err(e);
                }
                file.commit()?;
                tail
            }
            None => {
                let tail = write_report(out, renderer.as_mut(), name, reports, show)
                    .map_err(stdout_error)?;
                if let Some(e) = failure.take() {
                    return Err(e);
                }
                tail
            }
        };
        bar.finish();
        Ok(exit_code(tail.verdict, args.strict))
    }
}

/// The SVG files of `--plots DIR`, checked, and the links the report gives them.
struct Plots {
    folder: Folder,
    targets: Vec<Target>,
    links: Vec<String>,
}

impl Plots {
    /// `DIR/stage-N.svg` for each stage; links relative to the report file's folder when the
    /// report goes to a file, else the paths as given.
    fn plan(
        plan: &mut Plan<'_>,
        dir: &Path,
        count: usize,
        report: Option<&Target>,
    ) -> Result<Plots> {
        let folder = plan.folder(dir)?;
        let mut targets = Vec::with_capacity(count);
        let mut links = Vec::with_capacity(count);
        for n in 1..=count {
            let name = format!("stage-{n}.svg");
            let target = plan.file_in(&folder, &name, Kind::Svg)?;
            let link = match report.and_then(|r| r.path().parent()) {
                Some(report_dir) => relative_link(report_dir, target.path()),
                None => folder.shown().join(&name).display().to_string(),
            };
            targets.push(target);
            links.push(link);
        }
        Ok(Plots {
            folder,
            targets,
            links,
        })
    }

    /// Draw the picture of stage `i` (from 0); returns its link.
    fn draw(&self, i: usize, picture: &crate::picture::Picture) -> Result<String> {
        let (Some(target), Some(link)) = (self.targets.get(i), self.links.get(i)) else {
            return Err(Error::Usage(format!(
                "stage {} was not in the board when its plots were planned (did the file change?)",
                i + 1
            )));
        };
        write_svg(picture, target)?;
        Ok(link.clone())
    }
}

/// Exit code of a verdict: 1 on a failing stage, or a marginal one under `--strict`.
pub fn exit_code(verdict: Status, strict: bool) -> u8 {
    match verdict {
        Status::Fail => 1,
        Status::Marginal if strict => 1,
        _ => 0,
    }
}

/// Write a picture's SVG.
fn write_svg(picture: &crate::picture::Picture, target: &Target) -> Result<()> {
    let svg = crate::plot::picture_svg(picture).map_err(|e| {
        Error::invalid(
            target.shown().display().to_string(),
            format!("cannot draw: {e}"),
        )
    })?;
    target.write(svg.as_bytes())
}

/// `out.svg` -> `out-N.svg`, beside it; always `.svg`, whatever `out` ends with, so that the
/// files of a board cannot take the name of a JSON input.
fn numbered(out: &Path, n: usize) -> PathBuf {
    let stem = out
        .file_stem()
        .map(|s| s.to_string_lossy().into_owned())
        .unwrap_or_else(|| "stage".into());
    out.with_file_name(format!("{stem}-{n}.svg"))
}

/// Decide colour for `--color auto` from the real terminal and environment.
pub fn terminal_facts() -> (bool, bool) {
    (
        std::io::stdout().is_terminal(),
        std::env::var_os("NO_COLOR").is_some_and(|v| !v.is_empty()),
    )
}
