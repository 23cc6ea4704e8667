//! The command line: clap derive structs and value enums, no logic.

mod load_flags;
mod version;

pub use load_flags::{unique_fields, LoadFlags};

use std::path::PathBuf;

use clap::{Args, Parser, Subcommand, ValueEnum};

use crate::board::Grade;
use crate::eseries::Series;
use crate::quantity::{parse_temperature_range, parse_value, ParseValueError, ValueKind};

const ABOUT: &str = "Sizes and audits transistor switch stages: a logic pin driving an NPN transistor or a logic-level N-channel MOSFET that pins a relay or solenoid coil, a motor, LEDs, a strip segment or another load to ground, checked over worst-case corners.";

const AFTER_HELP: &str = "Examples:
  pinlow size --supply 12V --logic-high 3V3 --part demo-npn-40v --load relay --coil 400 --clamp diode
  pinlow audit examples/greenhouse.json
  pinlow audit examples/greenhouse.json --format markdown --output review.md
  cat examples/greenhouse.json | pinlow audit -
  pinlow fix examples/greenhouse.json -o greenhouse-fixed.json
  pinlow pick --supply 12V --logic-high 3V3 --load relay --coil 400 --clamp diode
  pinlow parts list

Each command takes only its own flags (see `pinlow COMMAND --help`).
Files written with --output are written whole or not at all, never over an input, and never over
a file pinlow did not write unless --force is given.
Exit codes: 0 every stage passes or is marginal; 1 a stage fails (with --strict, marginal too);
2 the input could not be used; 141 standard output was closed early (as by SIGPIPE).
pinlow checks the driver stage only: follow local codes and licensed practice.
Documentation in the source repository: docs/board-file.md (board files), docs/part-file.md
(part files), docs/report.md (reports, exit codes, fix), docs/model.md (the stage model).";

/// The whole command line.
#[derive(Debug, Parser)]
#[command(name = "pinlow", version = version::text(), about = ABOUT, after_help = AFTER_HELP)]
pub struct Cli {
    /// What to do.
    #[command(subcommand)]
    pub command: Command,
}

/// Where parts come from, beside the shipped ones.
#[derive(Debug, Clone, Default, Args)]
pub struct LibraryArgs {
    /// Add part files: a folder of *.json or one file; repeatable; later ones override by id.
    /// The PINLOW_PARTS variable (a path list) is read first.
    #[arg(long = "parts", value_name = "PATH", help_heading = "Parts")]
    pub parts: Vec<PathBuf>,
}

/// How a report is drawn (`size`, `audit`).
#[derive(Debug, Clone, Args)]
pub struct ReportArgs {
    /// Output format.
    #[arg(long, value_enum, default_value_t = FormatArg::Table, help_heading = "Report")]
    pub format: FormatArg,
    /// Exit 1 on a marginal stage too.
    #[arg(long, help_heading = "Report")]
    pub strict: bool,
    /// Colour in tables: auto (a terminal, NO_COLOR unset), always or never.
    #[arg(long, value_enum, default_value_t = ColorArg::Auto, help_heading = "Report")]
    pub color: ColorArg,
    /// Print only the stages that are not a pass (the exit code still counts every stage).
    #[arg(long, help_heading = "Report")]
    pub only_problems: bool,
    /// Draw each stage's operating point as DIR/stage-N.svg and link it from the report.
    #[arg(long, value_name = "DIR", help_heading = "Report")]
    pub plots: Option<PathBuf>,
}

/// Where a command's output goes.
#[derive(Debug, Clone, Default, Args)]
pub struct OutputArgs {
    /// Write to FILE instead of standard output: whole or not at all, never over an input.
    #[arg(long, short = 'o', value_name = "FILE", help_heading = "Output")]
    pub output: Option<PathBuf>,
    /// Replace existing files that pinlow did not write (its own outputs are replaced without
    /// asking; inputs never are).
    #[arg(long, help_heading = "Output")]
    pub force: bool,
}

/// Where `plot` writes its SVG files.
#[derive(Debug, Clone, Args)]
pub struct PlotOutputArgs {
    /// The SVG file; for a board of several stages FILE-1.svg, FILE-2.svg, ... beside it.
    #[arg(
        long,
        short = 'o',
        value_name = "FILE.svg",
        required = true,
        help_heading = "Output"
    )]
    pub output: PathBuf,
    /// Replace existing files that pinlow did not write (its own outputs are replaced without
    /// asking; inputs never are).
    #[arg(long, help_heading = "Output")]
    pub force: bool,
}

/// The commands.
#[derive(Debug, Subcommand)]
pub enum Command {
    /// Propose RB, RBE, the LED resistor, power ratings and clamp ratings for one stage, then check it.
    #[command(after_help = "Examples:
  pinlow size --supply 5V --logic-high 3V3 --part 2N3904 --load current --current 150mA
  pinlow size --supply 12V --logic-high 3V3 --part demo-npn-40v --load relay --coil 400 --clamp diode --grade industrial
  pinlow size --supply 12V --logic-high 5V --part demo-npn-1a --load led --led-count 3 --led-vf 3.0 --current 20mA
  pinlow size --supply 12V --logic-high 3V3 --part demo-npn-1a --load strip --strip-voltage 12V --strip-current-per-metre 0.5A --strip-length 1m
  pinlow size --supply 5V --logic-high 3V3 --part 2N3904 --load current --current 100mA --yield 100000")]
    Size {
        /// The stage.
        #[command(flatten)]
        stage: StageArgs,
        /// Monte Carlo yield beside the worst case.
        #[command(flatten)]
        yield_args: YieldArgs,
        /// Parts beside the shipped ones.
        #[command(flatten)]
        library: LibraryArgs,
        /// How the report is drawn.
        #[command(flatten)]
        report: ReportArgs,
        /// Where it goes.
        #[command(flatten)]
        output: OutputArgs,
    },
    /// Audit every stage of a board file, or one stage given by flags with --base-resistor.
    #[command(after_help = "Examples:
  pinlow audit examples/greenhouse.json
  pinlow audit examples/greenhouse.json --format json --strict
  pinlow audit examples/greenhouse.json --format markdown --plots plots --output review.md
  cat examples/greenhouse.json | pinlow audit -
  pinlow audit --supply 12V --logic-high 3V3 --part demo-npn-40v --load relay --coil 400 --clamp diode --base-resistor 1k --pull-down 10k
  pinlow audit examples/greenhouse.json --yield 1000000 --seed 7")]
    Audit {
        /// A board file (docs/board-file.md), `-` for standard input. Without it, the stage flags
        /// describe one stage.
        #[arg(value_name = "FILE")]
        board: Option<PathBuf>,
        /// The stage, when no board file is given.
        #[command(flatten)]
        stage: StageArgs,
        /// Monte Carlo yield beside the worst case.
        #[command(flatten)]
        yield_args: YieldArgs,
        /// Parts beside the shipped ones.
        #[command(flatten)]
        library: LibraryArgs,
        /// How the report is drawn.
        #[command(flatten)]
        report: ReportArgs,
        /// Where it goes.
        #[command(flatten)]
        output: OutputArgs,
    },
    /// Draw an SVG of one stage (stage flags) or of each stage of a board file: output curves,
    /// load line, nominal and worst-case operating points, and overdrive against ambient.
    #[command(after_help = "Examples:
  pinlow plot --supply 12V --logic-high 3V3 --part demo-npn-40v --load relay --coil 400 --clamp diode --output relay.svg
  pinlow plot examples/greenhouse.json --output greenhouse.svg   (one file per stage: greenhouse-1.svg, ...)")]
    Plot {
        /// A board file, `-` for standard input; without it, the stage flags describe one stage.
        #[arg(value_name = "FILE")]
        board: Option<PathBuf>,
        /// The stage, when no board file is given.
        #[command(flatten)]
        stage: StageArgs,
        /// Parts beside the shipped ones.
        #[command(flatten)]
        library: LibraryArgs,
        /// Where the SVG files go.
        #[command(flatten)]
        output: PlotOutputArgs,
    },
    /// Write the board with every stage's remedy applied (values the engine sized written as
    /// fitted values); stages that need another part are left as they were and say which figures.
    #[command(after_help = "Examples:
  pinlow fix examples/greenhouse.json -o greenhouse-fixed.json
  pinlow fix board.json -o board.json.fixed --parts my-parts

The output is never one of the inputs; an existing file is replaced only with --force.
Exit codes as for audit, from the fixed board.")]
    Fix {
        /// The board file, `-` for standard input.
        #[arg(value_name = "FILE")]
        board: PathBuf,
        /// Parts beside the shipped ones.
        #[command(flatten)]
        library: LibraryArgs,
        /// The fixed board file.
        #[arg(
            long,
            short = 'o',
            value_name = "FIXED.json",
            required = true,
            help_heading = "Output"
        )]
        output: PathBuf,
        /// Replace an existing file (never an input).
        #[arg(long, help_heading = "Output")]
        force: bool,
        /// Exit 1 on a marginal stage too.
        #[arg(long)]
        strict: bool,
    },
    /// Try every part of the library in one stage, each with its input resistors sized, and
    /// rank them; when none passes, say what a part would need.
    #[command(after_help = "Examples:
  pinlow pick --supply 12V --logic-high 3V3 --load relay --coil 400 --clamp diode
  pinlow pick --supply 12V --logic-high 3V3 --load strip --strip-voltage 12V --strip-current-per-metre 0.5A --strip-length 2m --drive nmos --top 3
  pinlow pick examples/greenhouse.json --stage \"K1 vent relay\" --only-passing --format json
  pinlow pick --supply 5V --logic-high 3V3 --load current --current 150mA --package TO-92 --parts ./my-parts")]
    Pick(PickArgs),
    /// List, show or check part files.
    #[command(
        subcommand,
        after_help = "Examples:\n  pinlow parts list\n  pinlow parts show 2N3904\n  pinlow parts check my-parts/*.json"
    )]
    Parts(PartsCommand),
    /// Print the JSON Schema (draft 2020-12) of a board file or a part file, for editors.
    #[command(
        after_help = "Examples:\n  pinlow schema board > board.schema.json\n  pinlow schema part > part.schema.json"
    )]
    Schema {
        /// Which file's schema.
        #[arg(value_enum, value_name = "FILE")]
        file: SchemaArg,
    },
    /// Print a completion script for a shell.
    #[command(
        after_help = "Examples:\n  pinlow completions bash > ~/.local/share/bash-completion/completions/pinlow\n  pinlow completions zsh > ~/.zfunc/_pinlow\n  pinlow completions fish > ~/.config/fish/completions/pinlow.fish\n  pinlow completions powershell >> $PROFILE"
    )]
    Completions {
        /// The shell.
        #[arg(value_enum, value_name = "SHELL")]
        shell: ShellArg,
    },
    /// Print the manual page (roff), every command in one page.
    #[command(after_help = "Example:\n  pinlow man > pinlow.1 && man ./pinlow.1")]
    Man,
}

/// The files `pinlow schema` describes.
#[derive(Clone, Copy, Debug, PartialEq, Eq, ValueEnum)]
pub enum SchemaArg {
    /// A board file (the input of `audit`).
    Board,
    /// A part file.
    Part,
}

/// The shells `pinlow completions` writes for.
#[derive(Clone, Copy, Debug, PartialEq, Eq, ValueEnum)]
pub enum ShellArg {
    /// Bash.
    Bash,
    /// Zsh.
    Zsh,
    /// Fish.
    Fish,
    /// PowerShell.
    Powershell,
}

/// `pinlow pick ...`
#[derive(Debug, Clone, Args)]
pub struct PickArgs {
    /// A board file, `-` for standard input, whose stage `--stage` names (its part, base or
    /// gate resistor and pull-down are set aside). Without it, the stage flags describe the stage.
    #[arg(value_name = "FILE")]
    pub board: Option<PathBuf>,
    /// The board's stage to pick a part for, by name.
    #[arg(
        long = "stage",
        value_name = "NAME",
        requires = "board",
        help_heading = "Pick"
    )]
    pub stage_name: Option<String>,
    /// The stage, when no board file is given (without --part: every part is tried).
    #[command(flatten)]
    pub stage: StageArgs,
    /// Try only parts of this drive kind.
    #[arg(long, value_name = "KIND", value_parser = clap::builder::PossibleValuesParser::new(crate::drive::KINDS.iter().map(|k| k.name)), help_heading = "Pick")]
    pub drive: Option<String>,
    /// Try only parts whose package holds TEXT (any case), e.g. SOT-23.
    #[arg(long, value_name = "TEXT", help_heading = "Pick")]
    pub package: Option<String>,
    /// Keep only the candidates that pass.
    #[arg(long, help_heading = "Pick")]
    pub only_passing: bool,
    /// Show the best N candidates only.
    #[arg(long, value_name = "N", value_parser = clap::value_parser!(u32).range(1..), help_heading = "Pick")]
    pub top: Option<u32>,
    /// Parts beside the shipped ones.
    #[command(flatten)]
    pub library: LibraryArgs,
    /// How the report is drawn.
    #[command(flatten)]
    pub report: ReportArgs,
    /// Where it goes.
    #[command(flatten)]
    pub output: OutputArgs,
}

/// `pinlow parts ...`
#[derive(Debug, Subcommand)]
pub enum PartsCommand {
    /// Table of every known part.
    #[command(
        after_help = "Examples:\n  pinlow parts list --parts ./my-parts\n  pinlow parts list --format json --output parts-list.json"
    )]
    List {
        /// Output format.
        #[arg(long, value_enum, default_value_t = FormatArg::Table)]
        format: FormatArg,
        /// Parts beside the shipped ones.
        #[command(flatten)]
        library: LibraryArgs,
        /// Where it goes.
        #[command(flatten)]
        output: OutputArgs,
    },
    /// Every figure of one part.
    #[command(after_help = "Example:\n  pinlow parts show demo-npn-40v")]
    Show {
        /// The part id.
        #[arg(value_name = "ID")]
        id: String,
        /// Output format.
        #[arg(long, value_enum, default_value_t = FormatArg::Table)]
        format: FormatArg,
        /// Parts beside the shipped ones.
        #[command(flatten)]
        library: LibraryArgs,
        /// Where it goes.
        #[command(flatten)]
        output: OutputArgs,
    },
    /// Validate part files and folders; names the file and JSON path of each problem, and an
    /// id defined by two of them.
    #[command(
        after_help = "Examples:\n  pinlow parts check my-parts/*.json\n  pinlow parts check my-parts"
    )]
    Check {
        /// Part files or folders of them to check.
        #[arg(value_name = "PATH", required = true)]
        files: Vec<PathBuf>,
        /// Where the list of good files goes.
        #[command(flatten)]
        output: OutputArgs,
    },
}

/// The Monte Carlo yield flags.
#[derive(Debug, Clone, Copy, Default, Args)]
pub struct YieldArgs {
    /// Draw N builds of each stage within its tolerances and report the yield (e.g. 100000, 1e6).
    #[arg(long = "yield", value_name = "N", value_parser = builds, help_heading = "Yield")]
    pub builds: Option<u64>,
    /// Seed of the yield draws; the same seed gives the same figures [default: 1].
    #[arg(long, value_name = "S", requires = "builds", help_heading = "Yield")]
    pub seed: Option<u64>,
}

/// Most builds a run may ask for (a billion builds take about a minute on two cores).
pub const MAX_BUILDS: u64 = 1_000_000_000;

fn builds(s: &str) -> Result<u64, String> {
    let n = parse_value(s, ValueKind::Plain).map_err(|e| e.to_string())?;
    if n.fract() != 0.0 || !(1.0..=MAX_BUILDS as f64).contains(&n) {
        return Err(format!(
            "{n} is not allowed: a whole number of builds from 1 to {MAX_BUILDS} is needed"
        ));
    }
    Ok(n as u64)
}

/// Report formats.
#[derive(Clone, Copy, Debug, PartialEq, Eq, ValueEnum)]
pub enum FormatArg {
    /// Text tables.
    Table,
    /// JSON (docs/report.md).
    Json,
    /// Markdown for a design review.
    Markdown,
}

/// Colour choice.
#[derive(Clone, Copy, Debug, PartialEq, Eq, ValueEnum)]
pub enum ColorArg {
    /// On a terminal, unless NO_COLOR is set.
    Auto,
    /// Always.
    Always,
    /// Never.
    Never,
}

/// Clamp kinds on the command line.
#[derive(Clone, Copy, Debug, PartialEq, Eq, ValueEnum)]
pub enum ClampArg {
    /// No clamp.
    None,
    /// A diode across the coil.
    Diode,
    /// A diode plus a Zener (--zener).
    Zener,
}

/// Grades on the command line.
#[derive(Clone, Copy, Debug, PartialEq, Eq, ValueEnum)]
pub enum GradeArg {
    /// 0 .. 70 °C.
    Commercial,
    /// -40 .. 85 °C.
    Industrial,
    /// -40 .. 125 °C.
    Automotive,
}

impl From<GradeArg> for Grade {
    fn from(g: GradeArg) -> Grade {
        match g {
            GradeArg::Commercial => Grade::Commercial,
            GradeArg::Industrial => Grade::Industrial,
            GradeArg::Automotive => Grade::Automotive,
        }
    }
}

macro_rules! value_parser_fn {
    ($name:ident, $kind:expr) => {
        fn $name(s: &str) -> Result<f64, ParseValueError> {
            crate::quantity::parse_value_in_span(s, $kind)
        }
    };
}
value_parser_fn!(volts, ValueKind::Voltage);
value_parser_fn!(amps, ValueKind::Current);
value_parser_fn!(ohms, ValueKind::Resistance);
value_parser_fn!(watts, ValueKind::Power);
value_parser_fn!(fraction, ValueKind::Fraction);
value_parser_fn!(number, ValueKind::Plain);

fn ambient(s: &str) -> Result<(f64, f64), ParseValueError> {
    parse_temperature_range(s)
}

fn series(s: &str) -> Result<Series, String> {
    s.parse::<Series>().map_err(|e| e.to_string())
}

/// The flags that describe one stage.
#[derive(Debug, Clone, Default, Args)]
pub struct StageArgs {
    /// A name for the stage in the report.
    #[arg(long, value_name = "TEXT", help_heading = "Stage")]
    pub name: Option<String>,
    /// Part id from the parts library (see `pinlow parts list`).
    #[arg(long, value_name = "ID", help_heading = "Stage")]
    pub part: Option<String>,
    /// Nominal supply of the load, e.g. 12V.
    #[arg(long, value_name = "VOLTS", value_parser = volts, allow_hyphen_values = true, help_heading = "Stage")]
    pub supply: Option<f64>,
    /// Supply tolerance, e.g. 5% or 0.05 [default: 5 %].
    #[arg(long, value_name = "FRACTION", value_parser = fraction, allow_hyphen_values = true, help_heading = "Stage")]
    pub supply_tolerance: Option<f64>,
    /// The pin's nominal logic high (its supply), e.g. 3V3.
    #[arg(long, value_name = "VOLTS", value_parser = volts, allow_hyphen_values = true, help_heading = "Logic pin")]
    pub logic_high: Option<f64>,
    /// Guaranteed logic high at the pin's rated current [default: logic high - 0.4 V].
    #[arg(long, value_name = "VOLTS", value_parser = volts, allow_hyphen_values = true, help_heading = "Logic pin")]
    pub logic_high_min: Option<f64>,
    /// Most current the pin may source [default: 4 mA].
    #[arg(long, value_name = "AMPS", value_parser = amps, allow_hyphen_values = true, help_heading = "Logic pin")]
    pub pin_limit: Option<f64>,
    /// Ambient range, e.g. -40..85 [default: 0..70].
    #[arg(long, value_name = "RANGE", value_parser = ambient, allow_hyphen_values = true, conflicts_with = "grade", help_heading = "Stage")]
    pub ambient: Option<(f64, f64)>,
    /// Temperature grade instead of --ambient.
    #[arg(long, value_enum, help_heading = "Stage")]
    pub grade: Option<GradeArg>,
    /// The load kind; its flags follow under "Load".
    #[arg(long, value_name = "KIND", value_parser = load_flags::load_kind_parser(), help_heading = "Load")]
    pub load: Option<String>,
    /// The load's own flags.
    #[command(flatten)]
    pub load_flags: LoadFlags,
    /// Clamp across an inductive load.
    #[arg(long, value_enum, help_heading = "Clamp")]
    pub clamp: Option<ClampArg>,
    /// Clamp diode forward drop [default: 1 V].
    #[arg(long, value_name = "VOLTS", value_parser = volts, allow_hyphen_values = true, help_heading = "Clamp")]
    pub clamp_forward: Option<f64>,
    /// Zener voltage of a zener clamp.
    #[arg(long, value_name = "VOLTS", value_parser = volts, allow_hyphen_values = true, help_heading = "Clamp")]
    pub zener: Option<f64>,
    /// Clamp diode reverse rating.
    #[arg(long, value_name = "VOLTS", value_parser = volts, allow_hyphen_values = true, help_heading = "Clamp")]
    pub clamp_reverse: Option<f64>,
    /// Clamp diode current rating.
    #[arg(long, value_name = "AMPS", value_parser = amps, allow_hyphen_values = true, help_heading = "Clamp")]
    pub clamp_current: Option<f64>,
    /// Given base resistor of an npn stage (audit); `size` always sizes it.
    #[arg(long, value_name = "OHMS", value_parser = ohms, allow_hyphen_values = true, conflicts_with = "gate_resistor", help_heading = "Resistors")]
    pub base_resistor: Option<f64>,
    /// Given gate resistor of an nmos stage (audit); `size` always sizes it.
    #[arg(long, value_name = "OHMS", value_parser = ohms, allow_hyphen_values = true, help_heading = "Resistors")]
    pub gate_resistor: Option<f64>,
    /// Given pull-down from the base (or gate) to ground.
    #[arg(long, value_name = "OHMS", value_parser = ohms, conflicts_with = "no_pull_down", help_heading = "Resistors")]
    pub pull_down: Option<f64>,
    /// No pull-down (when sizing, one of 10 x RB is proposed unless this is given).
    #[arg(long, help_heading = "Resistors")]
    pub no_pull_down: bool,
    /// Resistor tolerance [default: 5 %].
    #[arg(long, value_name = "FRACTION", value_parser = fraction, allow_hyphen_values = true, help_heading = "Resistors")]
    pub resistor_tolerance: Option<f64>,
    /// Power rating of the fitted resistors [default: 0.25 W].
    #[arg(long, value_name = "WATTS", value_parser = watts, allow_hyphen_values = true, help_heading = "Resistors")]
    pub resistor_rating: Option<f64>,
    /// Preferred-value series for sized values: E6, E12, E24, E48, E96 [default: E24].
    #[arg(long, value_name = "SERIES", value_parser = series, help_heading = "Resistors")]
    pub series: Option<Series>,
    /// Wanted worst-case overdrive over the minimum gain [default: 2].
    #[arg(long, value_name = "K", value_parser = number, allow_hyphen_values = true, help_heading = "Resistors")]
    pub overdrive: Option<f64>,
}

impl StageArgs {
    /// True when any stage flag is set.
    pub fn any(&self) -> bool {
        let d = StageArgs::default();
        format!("{self:?}") != format!("{d:?}")
    }
}
