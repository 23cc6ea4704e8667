//! `pinlow fix BOARD -o FIXED.json`: the board with every stage's composed remedy applied. A
//! stage whose remedy leaves a check short (it needs another part or circuit) is written as it
//! was, with the figures a part would need printed; the others get the remedy's board fields,
//! values the engine sized written as fitted values. Names, order and untouched fields stay;
//! the output is checked against every input and written whole.

use std::io::Write;
use std::path::Path;

use serde_json::{Map, Value};

use crate::analysis::{analyse, apply_changes, compose};
use crate::board::BoardReader;
use crate::check::Status;
use crate::error::{Error, Result};
use crate::outputs::{Inputs, Kind, Plan};
use crate::parts::Library;
use crate::pipeline::need_text;
use crate::report::escape::terminal_text;
use crate::report::rows::change_words;

/// What `fix` did to one stage.
#[derive(Clone, Debug, PartialEq)]
pub enum Outcome {
    /// Every check passes: nothing to do.
    Unchanged,
    /// The remedy was applied: (before, after, changes in words).
    Fixed(Status, Status, Vec<String>),
    /// Left as it was: (before, what a part would need, or why not).
    Left(Status, Vec<String>),
}

/// The stage objects of a board with the remedies applied, and what was done to each.
pub struct Fixed {
    /// The board's name as written.
    pub board: Option<Value>,
    /// The defaults as written.
    pub defaults: Option<Value>,
    /// Every stage object, in file order.
    pub stages: Vec<Value>,
    /// Per stage: its name and outcome.
    pub outcomes: Vec<(String, Outcome)>,
}

/// Apply every stage's remedy (see the module notes).
pub fn fix_board(reader: &mut BoardReader, lib: &Library) -> Result<Fixed> {
    let label = reader.label().to_string();
    let (board, defaults) = reader.head_raw();
    let board: Option<Value> = board.map(|r| r.parse(&label, "board")).transpose()?;
    let defaults: Option<Value> = defaults.map(|r| r.parse(&label, "defaults")).transpose()?;
    let default_map = match &defaults {
        Some(Value::Object(m)) => m.clone(),
        _ => Map::new(),
    };
    let mut stages = Vec::new();
    let mut outcomes = Vec::new();
    for item in reader.stages_with_raw(lib)? {
        let (stage, element) = item?;
        let mut object: Map<String, Value> = element.raw.parse(&label, &element.path())?;
        let a = analyse(&stage);
        let outcome = match compose(&stage, &a) {
            None => Outcome::Unchanged,
            Some(r) => match &r.after {
                Some(after) if after.short.is_empty() && !r.changes.is_empty() => {
                    apply_changes(&mut object, &default_map, &r.changes);
                    let words = r
                        .changes
                        .iter()
                        .map(|c| change_words(&c.field, c.from.as_ref(), &c.to))
                        .collect();
                    Outcome::Fixed(a.verdict, after.analysis.verdict, words)
                }
                Some(after) => {
                    let mut why: Vec<String> =
                        after.needs.iter().map(|(_, n)| need_text(n)).collect();
                    if why.is_empty() {
                        // No part figure helps: say what the checks still short propose.
                        why = r
                            .proposals
                            .iter()
                            .filter(|p| p.edits.is_empty())
                            .filter(|p| after.short.iter().any(|(id, _)| *id == p.check))
                            .map(|p| format!("{}: {}", p.check, p.why.sentence()))
                            .collect();
                    }
                    if why.is_empty() {
                        why = after
                            .short
                            .iter()
                            .map(|(id, st)| format!("{id} stays {st} whatever the board fields"))
                            .collect();
                    }
                    Outcome::Left(a.verdict, why)
                }
                None => {
                    let mut why: Vec<String> = r
                        .proposals
                        .iter()
                        .flat_map(|p| p.needs.iter().map(need_text))
                        .collect();
                    if why.is_empty() {
                        why = r
                            .proposals
                            .iter()
                            .map(|p| format!("{}: {}", p.check, p.why.sentence()))
                            .collect();
                    }
                    Outcome::Left(a.verdict, why)
                }
            },
        };
        stages.push(Value::Object(object));
        outcomes.push((stage.name.clone(), outcome));
    }
    Ok(Fixed {
        board,
        defaults,
        stages,
        outcomes,
    })
}

/// The fixed board as a file: `board`, `defaults`, `stages`, pretty-printed.
pub fn board_text(f: &Fixed) -> String {
    let mut top = Map::new();
    if let Some(b) = &f.board {
        top.insert("board".into(), b.clone());
    }
    if let Some(d) = &f.defaults {
        top.insert("defaults".into(), d.clone());
    }
    top.insert("stages".into(), Value::Array(f.stages.clone()));
    let mut text = serde_json::to_string_pretty(&Value::Object(top)).unwrap_or_default();
    text.push('\n');
    text
}

/// What was done, for the terminal.
pub fn summary_text(f: &Fixed, from: &Path, to: &Path) -> String {
    let mut out = format!(
        "Fixed board written to {} (from {}).\n",
        terminal_text(&to.display().to_string()),
        terminal_text(&from.display().to_string())
    );
    let mut worst_before = Status::Pass;
    let mut worst_after = Status::Pass;
    let (mut changed, mut left) = (0, 0);
    for (i, (name, outcome)) in f.outcomes.iter().enumerate() {
        let name = terminal_text(name);
        let n = i + 1;
        match outcome {
            Outcome::Unchanged => out.push_str(&format!("Stage {n} {name}: PASS, unchanged\n")),
            Outcome::Fixed(before, after, words) => {
                changed += 1;
                worst_before = worst_before.max(*before);
                worst_after = worst_after.max(*after);
                out.push_str(&format!(
                    "Stage {n} {name}: {} -> {}: {}\n",
                    upper(*before),
                    upper(*after),
                    words.join("; ")
                ));
            }
            Outcome::Left(before, why) => {
                left += 1;
                worst_before = worst_before.max(*before);
                worst_after = worst_after.max(*before);
                out.push_str(&format!(
                    "Stage {n} {name}: {}, left as it was: another part or circuit is needed ({})\n",
                    upper(*before),
                    terminal_text(&why.join("; "))
                ));
            }
        }
    }
    out.push_str(&format!(
        "Board: {} -> {} ({changed} stage{} changed, {left} left as they were)\n",
        upper(worst_before),
        upper(worst_after),
        if changed == 1 { "" } else { "s" }
    ));
    out
}

fn upper(s: Status) -> String {
    s.as_str().to_uppercase()
}

/// The board verdict after the fix.
pub fn verdict_after(f: &Fixed) -> Status {
    f.outcomes
        .iter()
        .map(|(_, o)| match o {
            Outcome::Unchanged => Status::Pass,
            Outcome::Fixed(_, after, _) => *after,
            Outcome::Left(before, _) => *before,
        })
        .max()
        .unwrap_or(Status::Pass)
}

/// Run `pinlow fix`: read, fix, check the output against the inputs, write, report.
pub fn run(
    board: &Path,
    output: &Path,
    force: bool,
    lib: &Library,
    mut inputs: Inputs,
    out: &mut dyn Write,
) -> Result<Status> {
    if board.as_os_str() == "-" {
        inputs.add_stdin();
    } else {
        inputs.add_file(board, &board.display().to_string());
    }
    let mut plan = Plan::new(&inputs, force);
    let target = plan.file(output, Kind::Board)?;
    let mut reader = BoardReader::open(board)?;
    let fixed = fix_board(&mut reader, lib)?;
    target.write(board_text(&fixed).as_bytes())?;
    out.write_all(summary_text(&fixed, board, output).as_bytes())
        .map_err(|source| {
            if source.kind() == std::io::ErrorKind::BrokenPipe {
                Error::OutputClosed
            } else {
                Error::Write {
                    path: "<standard output>".into(),
                    source,
                }
            }
        })?;
    Ok(verdict_after(&fixed))
}
