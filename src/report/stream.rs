//! Streaming: a report is drawn as a head (board name and summary), one part per stage, and a
//! tail (verdict, assumptions, cautions), so a board of any size is written with memory bounded
//! by its summary, not by its full report.

use std::io::Write;

use serde::Serialize;

use super::model::{Report, StageReport, GENERAL_CAUTION};
use crate::analysis::{CheckId, Status};

/// One line of the board summary.
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct SummaryRow {
    /// Position in the board, from 1.
    pub index: usize,
    /// Stage name.
    pub name: String,
    /// Load kind.
    pub load_kind: &'static str,
    /// Part id.
    pub part: String,
    /// RB.
    pub base_resistor_ohms: f64,
    /// RB was sized.
    pub base_resistor_sized: bool,
    /// Worst-case overdrive.
    pub overdrive_min: Option<f64>,
    /// Highest junction temperature.
    pub junction_max_c: f64,
    /// Stage verdict.
    pub verdict: Status,
    /// The first check that is not a pass.
    pub first_problem: Option<(CheckId, Status)>,
}

impl SummaryRow {
    /// The summary line of a stage report.
    pub fn of(s: &StageReport) -> SummaryRow {
        SummaryRow {
            index: s.index,
            name: s.name.clone(),
            load_kind: s.load_kind,
            part: s.part.clone(),
            base_resistor_ohms: s.base_resistor_ohms,
            base_resistor_sized: s.base_resistor_sized,
            overdrive_min: s.worst_case.overdrive_min,
            junction_max_c: s.worst_case.junction_max_c,
            verdict: s.verdict,
            first_problem: s.first_problem().map(|f| (f.id, f.status)),
        }
    }
}

/// What comes before the stages.
#[derive(Clone, Debug, PartialEq)]
pub struct Head {
    /// The board's name.
    pub board: Option<String>,
    /// Summary lines of the stages shown (empty for renderers that do not draw one).
    pub summary: Vec<SummaryRow>,
}

/// What comes after the stages.
#[derive(Clone, Debug, PartialEq)]
pub struct Tail {
    /// Worst verdict over every stage (shown or not).
    pub verdict: Status,
    /// Stages that pass, are marginal, fail (every stage).
    pub counts: (usize, usize, usize),
    /// Each distinct assumption with the names of the shown stages that took it.
    pub assumptions: Vec<(String, Vec<String>)>,
    /// Distinct cautions of the shown stages, then the general one.
    pub cautions: Vec<String>,
    /// Stages shown.
    pub shown: usize,
}

/// Gathers the tail while the stages stream past.
#[derive(Debug)]
struct TailBuilder {
    tail: Tail,
}

impl TailBuilder {
    fn new() -> Self {
        TailBuilder {
            tail: Tail {
                verdict: Status::Pass,
                counts: (0, 0, 0),
                assumptions: Vec::new(),
                cautions: Vec::new(),
                shown: 0,
            },
        }
    }

    fn count(&mut self, s: &StageReport) {
        let t = &mut self.tail;
        t.verdict = t.verdict.max(s.verdict);
        match s.verdict {
            Status::Pass => t.counts.0 += 1,
            Status::Marginal => t.counts.1 += 1,
            Status::Fail => t.counts.2 += 1,
        }
    }

    fn show(&mut self, s: &StageReport) {
        let t = &mut self.tail;
        t.shown += 1;
        for a in &s.assumptions {
            match t.assumptions.iter_mut().find(|(text, _)| text == a) {
                Some((_, names)) => names.push(s.name.clone()),
                None => t.assumptions.push((a.clone(), vec![s.name.clone()])),
            }
        }
        for c in &s.cautions {
            if !t.cautions.contains(c) {
                t.cautions.push(c.clone());
            }
        }
    }

    fn finish(mut self) -> Tail {
        self.tail.cautions.push(GENERAL_CAUTION.to_string());
        self.tail
    }
}

/// Something that draws a report part by part.
pub trait Renderer {
    /// Before the first stage.
    fn head(&mut self, head: &Head) -> String;
    /// One stage.
    fn stage(&mut self, stage: &StageReport) -> String;
    /// After the last stage.
    fn tail(&mut self, tail: &Tail) -> String;
    /// True when the head draws the summary (so the caller must gather it first).
    fn wants_summary(&self) -> bool;
}

/// Stream a report: `summary` gives the summary rows of the shown stages (called only when the
/// renderer draws one), `stages` yields every stage report in order, `show` picks those drawn.
/// Returns the tail (its verdict counts every stage).
pub fn write_report<W: Write + ?Sized>(
    out: &mut W,
    renderer: &mut dyn Renderer,
    board: Option<String>,
    summary: impl FnOnce() -> Vec<SummaryRow>,
    stages: impl Iterator<Item = StageReport>,
    show: impl Fn(&StageReport) -> bool,
) -> std::io::Result<Tail> {
    let summary = if renderer.wants_summary() {
        summary()
    } else {
        Vec::new()
    };
    out.write_all(renderer.head(&Head { board, summary }).as_bytes())?;
    let mut tail = TailBuilder::new();
    for s in stages {
        tail.count(&s);
        if show(&s) {
            tail.show(&s);
            out.write_all(renderer.stage(&s).as_bytes())?;
        }
    }
    let tail = tail.finish();
    out.write_all(renderer.tail(&tail).as_bytes())?;
    Ok(tail)
}

/// Draw an in-memory report whole.
pub fn render_report(report: &Report, renderer: &mut dyn Renderer) -> String {
    let mut out: Vec<u8> = Vec::new();
    let written = write_report(
        &mut out,
        renderer,
        report.board.clone(),
        || report.stages.iter().map(SummaryRow::of).collect(),
        report.stages.iter().cloned(),
        |_| true,
    );
    match written {
        Ok(_) => String::from_utf8_lossy(&out).into_owned(),
        Err(e) => format!("cannot render: {e}\n"),
    }
}
