//! Streaming: a report is drawn as a head (board name and summary), one part per stage, and a
//! tail (verdict, assumptions, cautions), so a board of any size is written with memory bounded
//! by its summary, not by its full report.

use std::io::Write;

use serde::Serialize;

use super::model::{StageReport, GENERAL_CAUTION};
use crate::check::{CheckId, Status};

/// One line of the board summary.
#[derive(Clone, Debug, PartialEq, Serialize)]
pub struct SummaryRow {
    /// Position in the board, from 1.
    pub index: usize,
    /// Stage name.
    pub name: String,
    /// Load kind.
    pub load_kind: &'static str,
    /// Drive kind.
    pub drive: &'static str,
    /// Part id.
    pub part: String,
    /// The series resistor's symbol (`RB`, `RG`).
    pub series_symbol: &'static str,
    /// Its value.
    pub series_ohms: f64,
    /// It was sized.
    pub series_sized: bool,
    /// The figure that says how hard the switch is driven: (key, header).
    pub margin: (&'static str, &'static str),
    /// Its value.
    pub margin_value: Option<f64>,
    /// Highest junction temperature.
    pub junction_max_c: Option<f64>,
    /// Stage verdict.
    pub verdict: Status,
    /// The worst check that is not a pass.
    pub worst_finding: Option<(CheckId, Status)>,
}

impl SummaryRow {
    /// The summary line of a stage report.
    pub fn of(s: &StageReport) -> SummaryRow {
        SummaryRow {
            index: s.index,
            name: s.name.clone(),
            load_kind: s.load_kind,
            drive: s.drive,
            part: s.part.clone(),
            series_symbol: s.series_symbol,
            series_ohms: s.series_ohms,
            series_sized: s.series_sized,
            margin: s.margin,
            margin_value: s.figure(s.margin.0),
            junction_max_c: s.figure("junction_max_c"),
            verdict: s.verdict,
            worst_finding: s.worst_finding().map(|f| (f.id, f.status)),
        }
    }
}

/// A whole report held in memory: one board (or one stage from flags).
#[derive(Clone, Debug)]
pub struct Report {
    /// The board's name, when given.
    pub board: Option<String>,
    /// Every stage, in input order.
    pub stages: Vec<StageReport>,
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
    /// Each distinct assumption with the shown stages that took it.
    pub assumptions: Vec<Taken>,
    /// Distinct cautions of the shown stages, then the general one.
    pub cautions: Vec<String>,
    /// Stages shown.
    pub shown: usize,
}

/// An assumption and the shown stages that took it: how many, and the first names (at most
/// [`Taken::NAMES`]), so that the tail stays small on a board of any size.
#[derive(Clone, Debug, PartialEq)]
pub struct Taken {
    /// The assumption, in words.
    pub text: String,
    /// The first stages that took it, in order.
    pub names: Vec<String>,
    /// How many stages took it.
    pub count: usize,
}

impl Taken {
    /// Names kept.
    pub const NAMES: usize = 8;
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
            match t.assumptions.iter_mut().find(|taken| &taken.text == a) {
                Some(taken) => {
                    taken.count += 1;
                    if taken.names.len() < Taken::NAMES {
                        taken.names.push(s.name.clone());
                    }
                }
                None => t.assumptions.push(Taken {
                    text: a.clone(),
                    names: vec![s.name.clone()],
                    count: 1,
                }),
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

/// Stream a report: `stages` yields every stage report in order (each analysed once), `show`
/// picks those drawn. A renderer that draws a summary first gets it gathered from the same pass:
/// the drawn stages go to a spool file meanwhile, so memory stays bounded by the summary rows.
/// Returns the tail (its verdict counts every stage).
pub fn write_report<W: Write + ?Sized>(
    out: &mut W,
    renderer: &mut dyn Renderer,
    board: Option<String>,
    stages: impl Iterator<Item = StageReport>,
    show: impl Fn(&StageReport) -> bool,
) -> std::io::Result<Tail> {
    let mut tail = TailBuilder::new();
    if !renderer.wants_summary() {
        out.write_all(
            renderer
                .head(&Head {
                    board,
                    summary: Vec::new(),
                })
                .as_bytes(),
        )?;
        for s in stages {
            tail.count(&s);
            if show(&s) {
                tail.show(&s);
                out.write_all(renderer.stage(&s).as_bytes())?;
            }
        }
        let tail = tail.finish();
        out.write_all(renderer.tail(&tail).as_bytes())?;
        return Ok(tail);
    }
    let mut summary = Vec::new();
    let mut spool = std::io::BufWriter::new(tempfile::tempfile()?);
    for s in stages {
        tail.count(&s);
        if show(&s) {
            tail.show(&s);
            summary.push(SummaryRow::of(&s));
            spool.write_all(renderer.stage(&s).as_bytes())?;
        }
    }
    out.write_all(renderer.head(&Head { board, summary }).as_bytes())?;
    let mut file = spool.into_inner().map_err(|e| e.into_error())?;
    std::io::Seek::seek(&mut file, std::io::SeekFrom::Start(0))?;
    std::io::copy(&mut file, out)?;
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
        report.stages.iter().cloned(),
        |_| true,
    );
    match written {
        Ok(_) => String::from_utf8_lossy(&out).into_owned(),
        Err(e) => format!("cannot render: {e}\n"),
    }
}
