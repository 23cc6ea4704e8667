//! `pinlow pick`: the stage from flags (without `--part`) or a board stage by name, every part
//! of the library tried in it (`crate::pick`), the ranked report drawn and written whole.

use std::io::Write;
use std::sync::Arc;

use super::{
    exit_code, format_of, kind_of, library_of, raw_from_flags, refuse_flags_with_board,
    stdout_error, Terminal,
};
use crate::board::{BoardReader, RawStage};
use crate::cli::{ColorArg, PickArgs};
use crate::error::{Error, Place, Result};
use crate::fields::Origin;
use crate::outputs::Plan;
use crate::parts::{edit_distance, PartsPath};
use crate::pick::{pick, Filter, Query};
use crate::report::output_width;
use crate::report::pick::render_pick;

/// Run `pinlow pick`.
pub(super) fn run(
    args: &PickArgs,
    env: &[PartsPath],
    terminal: Terminal,
    out: &mut dyn Write,
) -> Result<u8> {
    if args.report.only_problems {
        return Err(Error::Usage(
            "--only-problems does not apply to `pick`; use --only-passing to keep the candidates that pass".into(),
        ));
    }
    if args.report.plots.is_some() {
        return Err(Error::Usage(
            "--plots does not apply to `pick`; plot the part you choose with `pinlow plot ... --part ID`".into(),
        ));
    }
    let (lib, mut inputs) = library_of(env, &args.library)?;
    let (query, board) = match &args.board {
        Some(path) => {
            refuse_flags_with_board(&args.stage)?;
            if path.as_os_str() == "-" {
                inputs.add_stdin();
            } else {
                inputs.add_file(path, &path.display().to_string());
            }
            let mut reader = BoardReader::open(path)?;
            let query = board_stage(&mut reader, args.stage_name.as_deref())?;
            (query, reader.name().map(str::to_string))
        }
        None => (flags_stage(args)?, None),
    };
    let mut plan = Plan::new(&inputs, args.output.force);
    let target = match &args.output.output {
        Some(path) => Some(plan.file(path, kind_of(args.report.format))?),
        None => None,
    };
    let filter = Filter {
        drive: args.drive.as_deref().and_then(crate::drive::kind),
        package: args.package.clone(),
        only_passing: args.only_passing,
    };
    let picked = pick(&query, &lib, &filter)?;
    let top = args.top.and_then(|n| usize::try_from(n).ok());
    let report = crate::pipeline::pick_report(&picked, board, top);
    let color = match args.report.color {
        ColorArg::Always => true,
        ColorArg::Never => false,
        ColorArg::Auto => {
            terminal.stdout_is_tty && !terminal.no_color && args.output.output.is_none()
        }
    };
    let width = args.output.output.is_none().then(output_width).flatten();
    let text = render_pick(&report, format_of(args.report.format), color, width);
    match target {
        Some(t) => t.write(text.as_bytes())?,
        None => out.write_all(text.as_bytes()).map_err(stdout_error)?,
    }
    Ok(exit_code(report.verdict, args.report.strict))
}

/// The stage from flags: no part (every part is tried), no series resistor or pull-down value
/// (each candidate's are sized); `--no-pull-down` is kept.
fn flags_stage(args: &PickArgs) -> Result<Query> {
    let s = &args.stage;
    if s.part.is_some() {
        return Err(Error::Usage(
            "--part: `pick` tries every part of the library; leave --part out (to size one part use `pinlow size --part ID`)".into(),
        ));
    }
    if s.base_resistor.is_some() || s.gate_resistor.is_some() || s.pull_down.is_some() {
        return Err(Error::Usage(
            "--base-resistor / --gate-resistor / --pull-down: `pick` sizes the input resistors of each part (--no-pull-down leaves the pull-down out)".into(),
        ));
    }
    if !s.any() {
        return Err(Error::Usage(
            "pick needs the stage flags (--supply, --logic-high, --load and the load's flags), or a board FILE with --stage NAME".into(),
        ));
    }
    Ok(Query {
        own: raw_from_flags(s)?,
        defaults: Arc::new(RawStage::default()),
        origin: Origin::Flags,
        index: 0,
        no_pull_down: s.no_pull_down,
    })
}

/// The board's stage named `name` (exactly, else the one that matches regardless of case);
/// not found: an error naming the nearest stage names.
fn board_stage(reader: &mut BoardReader, name: Option<&str>) -> Result<Query> {
    let label = reader.label().to_string();
    let defaults = Arc::clone(reader.defaults());
    let mut stages: Vec<(usize, RawStage)> = Vec::new();
    for s in reader.raw_stages()? {
        stages.push(s?);
    }
    let names: Vec<&str> = stages
        .iter()
        .filter_map(|(_, raw)| raw.name.as_deref())
        .collect();
    let Some(name) = name else {
        return Err(Error::Usage(format!(
            "pick with a board needs --stage NAME; {label} has {}",
            listed(&names)
        )));
    };
    let found = stages
        .iter()
        .find(|(_, raw)| raw.name.as_deref() == Some(name))
        .or_else(|| {
            let mut alike = stages.iter().filter(|(_, raw)| {
                raw.name
                    .as_deref()
                    .is_some_and(|n| n.to_lowercase() == name.to_lowercase())
            });
            match (alike.next(), alike.next()) {
                (Some(one), None) => Some(one),
                _ => None,
            }
        });
    let Some((index, own)) = found else {
        return Err(Error::invalid(
            Place::json(label, "stages"),
            format!("no stage is named {name:?}; {}", nearest(name, &names)),
        ));
    };
    Ok(Query {
        own: own.clone(),
        defaults,
        origin: Origin::File(reader.label().to_string()),
        index: *index,
        no_pull_down: false,
    })
}

/// Up to eight names, quoted, and a count of the rest.
fn listed(names: &[&str]) -> String {
    const MAX: usize = 8;
    let mut text = names
        .iter()
        .take(MAX)
        .map(|n| format!("{n:?}"))
        .collect::<Vec<_>>()
        .join(", ");
    if names.len() > MAX {
        text.push_str(&format!(" and {} more", names.len() - MAX));
    }
    format!("the stages {text}")
}

/// "did you mean ...?" with the nearest names, or the names there are.
fn nearest(name: &str, names: &[&str]) -> String {
    let wanted = name.to_lowercase();
    let mut near: Vec<(usize, &str)> = names
        .iter()
        .map(|n| (edit_distance(&wanted, &n.to_lowercase()), *n))
        .filter(|(d, _)| *d <= 3.max(wanted.chars().count() / 3))
        .collect();
    near.sort();
    near.dedup();
    if near.is_empty() {
        return format!("the board has {}", listed(names));
    }
    let shown: Vec<String> = near.iter().take(3).map(|(_, n)| format!("{n:?}")).collect();
    format!("did you mean {}?", shown.join(", "))
}
