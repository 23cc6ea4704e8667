//! The report of `pinlow pick`: the stage, its ranked candidates (each the full stage report of
//! an audit, with its rank) and, when no part passes, what a part would need. Built once by
//! `pipeline::pick_report`; drawn as a table, Markdown or JSON here, every text through
//! [`super::escape`] as in the other renderers.

use serde::Serialize;
use serde_json::{Map, Value};

use super::model::{ConditionsReport, NeedReport, Short, StageReport, GENERAL_CAUTION};
use super::rows::{conditions_words, pct, plain, Block, Cell};
use super::{markdown, Format, TableRenderer};
use crate::check::Status;
use crate::drive::PINNED_LOW;
use crate::quantity::format_engineering as fe;

/// The stage the parts were tried in: its conditions and load as given.
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct PickStage {
    /// The stage's name.
    pub name: String,
    /// Its position in the board, from 1 (1 for flags).
    pub index: usize,
    /// The load kind.
    pub load_kind: &'static str,
    /// The conditions every candidate was judged under.
    pub conditions: ConditionsReport,
    /// The load object as written.
    pub load: Map<String, Value>,
    /// The clamp object as written, if any.
    pub clamp: Option<Map<String, Value>>,
}

/// One candidate: its rank and its full stage report.
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct RankedReport {
    /// Place in the ranking, from 1.
    pub rank: usize,
    /// The stage report of an audit of the stage with this part (it carries `part`).
    #[serde(flatten)]
    pub report: StageReport,
}

/// What one of the best candidates would need of a part.
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct PartNeedsReport {
    /// The candidate's part.
    pub part: String,
    /// Its verdict.
    pub verdict: Status,
    /// Its checks still short after the board edits of its remedy.
    pub still_short: Vec<Short>,
    /// For those checks, each figure a replacement part needs.
    pub needs: Vec<NeedReport>,
}

/// The needs of one drive kind.
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct KindNeedsReport {
    /// The drive kind.
    pub drive: &'static str,
    /// Its best candidates that name a need, in rank order.
    pub parts: Vec<PartNeedsReport>,
}

/// The whole report of a pick.
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct PickReport {
    /// Version of the stage model.
    pub model_version: u32,
    /// The board's name, when the stage came from a board that has one.
    pub board: Option<String>,
    /// The stage.
    pub stage: PickStage,
    /// The drive kinds tried.
    pub drives: Vec<&'static str>,
    /// Parts tried.
    pub tried: usize,
    /// Candidates left after the filters, before `--top`.
    pub kept: usize,
    /// The best candidate's verdict (`fail` when none is left).
    pub verdict: Status,
    /// The candidates shown, in rank order.
    pub candidates: Vec<RankedReport>,
    /// When no part passes: per drive kind, what a part would need.
    pub needs: Vec<KindNeedsReport>,
    /// Cautions of the candidates shown, then the general one.
    pub cautions: Vec<String>,
}

/// Draw a pick report in a format; `color` and `width` apply to tables only.
pub fn render_pick(
    report: &PickReport,
    format: Format,
    color: bool,
    width: Option<usize>,
) -> String {
    match format {
        Format::Json => {
            let text = super::escape::json_pretty(report)
                .unwrap_or_else(|e| format!("{{\"error\": {:?}}}", e.to_string()));
            format!("{text}\n")
        }
        Format::Table => {
            let text = TableRenderer { color, width }.draw(blocks(report), String::new());
            text.trim_start_matches('\n').to_string()
        }
        Format::Markdown => markdown::draw(blocks(report), String::new()),
    }
}

fn status_cell(s: Status) -> Cell {
    Cell {
        text: s.as_str().to_uppercase(),
        status: Some(s),
    }
}

/// The input resistors (and the LED resistor) of a candidate: `RB 1k3, RBE 13k`.
fn resistors(r: &StageReport) -> String {
    let shown: Vec<String> = r
        .resistors
        .iter()
        .map(|x| format!("{} {}", x.symbol, x.code))
        .collect();
    if shown.is_empty() {
        "-".to_string()
    } else {
        shown.join(", ")
    }
}

/// The margin that matters, from the pinned-low check: the worst-case overdrive against the
/// one asked for (npn), the least gate voltage against the lowest gate voltage RDS(on) is
/// specified at (nmos).
pub fn margin_text(r: &StageReport) -> String {
    let Some(check) = r.checks.iter().find(|c| c.id == PINNED_LOW) else {
        return "-".to_string();
    };
    let label = match r.drive {
        "npn" => "overdrive",
        "nmos" => "VGS",
        _ => r.margin.1,
    };
    let show = |v: f64| {
        if check.unit.is_empty() {
            plain(Some(v), 3)
        } else {
            fe(v, check.unit)
        }
    };
    match (check.value, check.limit) {
        (Some(v), Some(l)) => {
            let sign = if v >= l { "≥" } else { "<" };
            format!("{label} {} {sign} {}", show(v), show(l))
        }
        (Some(v), None) => format!("{label} {}", show(v)),
        (None, Some(l)) => format!("{label} none (asked {})", show(l)),
        (None, None) => "-".to_string(),
    }
}

fn conditions_line(c: &ConditionsReport) -> String {
    format!(
        "{}; resistors ±{}, {}",
        conditions_words(c, " (npn)"),
        pct(c.resistor_tolerance),
        c.series
    )
}

/// The document of a pick, for the table and Markdown renderers.
pub fn blocks(r: &PickReport) -> Vec<Block> {
    let mut out = Vec::new();
    let s = &r.stage;
    let from = match &r.board {
        Some(b) => format!(", board {b}"),
        None => String::new(),
    };
    out.push(Block::Heading(
        1,
        format!("Pick a part: {} ({} load{from})", s.name, s.load_kind),
    ));
    out.push(Block::Line(conditions_line(&s.conditions)));
    out.push(Block::Line(format!(
        "{} tried ({}), each with its input resistors sized; {} kept, {} shown. Ranked by verdict, then checks not passing, then Tj max, then part id.",
        if r.tried == 1 {
            "1 part".to_string()
        } else {
            format!("{} parts", r.tried)
        },
        r.drives.join(", "),
        r.kept,
        r.candidates.len()
    )));
    if r.candidates.is_empty() {
        out.push(Block::Line("No candidate is left to show.".to_string()));
    } else {
        out.push(Block::Table {
            headers: vec![
                "Rank".into(),
                "Part".into(),
                "Drive".into(),
                "Verdict".into(),
                "Resistors".into(),
                "Margin".into(),
                "Pin max [mA]".into(),
                "Tj max [°C]".into(),
                "Worst finding".into(),
            ],
            rows: r
                .candidates
                .iter()
                .map(|c| {
                    let s = &c.report;
                    vec![
                        Cell::from(c.rank.to_string()),
                        Cell::from(s.part.clone()),
                        Cell::from(s.drive),
                        status_cell(s.verdict),
                        Cell::from(resistors(s)),
                        Cell::from(margin_text(s)),
                        Cell::from(plain(s.figure("pin_current_max_a").map(|v| v * 1e3), 3)),
                        Cell::from(plain(s.figure("junction_max_c"), 4)),
                        Cell::from(
                            s.worst_finding()
                                .map(|f| format!("{} {}", f.id, f.status))
                                .unwrap_or_else(|| "-".to_string()),
                        ),
                    ]
                })
                .collect(),
        });
    }
    for kind in &r.needs {
        let items = kind
            .parts
            .iter()
            .map(|p| {
                let mut said: Vec<String> = p
                    .needs
                    .iter()
                    .map(|n| format!("{}: {}", n.check, n.text))
                    .collect();
                let beyond: Vec<String> = p
                    .still_short
                    .iter()
                    .filter(|s| !p.needs.iter().any(|n| n.check == s.check))
                    .map(|s| format!("{} ({})", s.check, s.status))
                    .collect();
                if !beyond.is_empty() {
                    said.push(format!(
                        "no part figure answers {}: that needs another circuit or load (see the candidate's fixes)",
                        beyond.join(", ")
                    ));
                }
                if said.is_empty() {
                    said.push("its fixes bring it to a pass".to_string());
                }
                format!("in place of {} ({}): {}", p.part, p.verdict, said.join("; "))
            })
            .collect();
        out.push(Block::List(
            format!(
                "No part passes. What an {} part would need, from the best {} candidates",
                kind.drive, kind.drive
            ),
            items,
        ));
    }
    let mut assumptions: Vec<String> = Vec::new();
    for c in &r.candidates {
        for a in &c.report.assumptions {
            if !assumptions.contains(a) {
                assumptions.push(a.clone());
            }
        }
    }
    if !assumptions.is_empty() {
        out.push(Block::List(
            super::rows::ASSUMPTIONS_HEADING.to_string(),
            assumptions,
        ));
    }
    let verdict = match r.candidates.first() {
        Some(best) => format!(
            "Best candidate: {} ({}): {}",
            best.report.part,
            best.report.drive,
            best.report.verdict.as_str().to_uppercase()
        ),
        None => "No candidate: FAIL".to_string(),
    };
    out.push(Block::Verdict(verdict, r.verdict));
    out.push(Block::List("Cautions".to_string(), r.cautions.clone()));
    out
}

/// The cautions of the candidates shown, each once, then the general one.
pub fn cautions_of(candidates: &[RankedReport]) -> Vec<String> {
    let mut out: Vec<String> = Vec::new();
    for c in candidates {
        for text in &c.report.cautions {
            if !out.contains(text) {
                out.push(text.clone());
            }
        }
    }
    out.push(GENERAL_CAUTION.to_string());
    out
}
