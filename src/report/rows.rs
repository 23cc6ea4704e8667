//! The shared document builder: turns the head, each stage and the tail of a report into headings, tables and lists that the
//! table and Markdown renderers both draw. Numbers are formatted here, once.

use super::model::{StageReport, YieldReport};
use super::stream::{Head, SummaryRow, Tail};
use crate::check::Status;
use crate::quantity::format_engineering as fe;

/// A table cell: text, and a status when the cell shows one (for colour).
#[derive(Clone, Debug, PartialEq)]
pub struct Cell {
    /// What is shown.
    pub text: String,
    /// The status the cell shows, if any.
    pub status: Option<Status>,
}

impl From<String> for Cell {
    fn from(text: String) -> Self {
        Cell { text, status: None }
    }
}

impl From<&str> for Cell {
    fn from(text: &str) -> Self {
        Cell {
            text: text.to_string(),
            status: None,
        }
    }
}

/// A block of the document.
#[derive(Clone, Debug, PartialEq)]
pub enum Block {
    /// A heading of level 1 or 2.
    Heading(u8, String),
    /// A table with a header row.
    Table {
        /// Column headers, units in brackets.
        headers: Vec<String>,
        /// Rows.
        rows: Vec<Vec<Cell>>,
    },
    /// A titled bullet list.
    List(String, Vec<String>),
    /// A line of text.
    Line(String),
    /// A verdict line.
    Verdict(String, Status),
    /// A picture: alt text and path.
    Image(String, String),
}

/// Number with up to `digits` significant digits, trailing zeros trimmed; `-` for none.
pub fn plain(x: Option<f64>, digits: usize) -> String {
    match x {
        Some(v) if v.is_finite() => {
            if v == 0.0 {
                return "0".to_string();
            }
            let mag = v.abs().log10().floor() as i32;
            let decimals = (digits as i32 - 1 - mag).max(0) as usize;
            let s = format!("{v:.decimals$}");
            if s.contains('.') {
                s.trim_end_matches('0').trim_end_matches('.').to_string()
            } else {
                s
            }
        }
        _ => "-".to_string(),
    }
}

fn scaled(x: Option<f64>, scale: f64) -> String {
    plain(x.map(|v| v * scale), 3)
}

fn status_cell(s: Status) -> Cell {
    Cell {
        text: s.as_str().to_uppercase(),
        status: Some(s),
    }
}

fn figure(v: Option<f64>, unit: &str) -> String {
    match (v, unit) {
        (None, _) => "-".to_string(),
        (Some(v), "") => plain(Some(v), 3),
        (Some(v), "°C") => format!("{} °C", plain(Some(v), 4)),
        (Some(v), u) => fe(v, u),
    }
}

/// The blocks before the stages: board name and summary table.
pub fn head_blocks(head: &Head) -> Vec<Block> {
    let mut out = Vec::new();
    if let Some(b) = &head.board {
        out.push(Block::Heading(1, format!("Board: {b}")));
    }
    // One stage needs no summary: its own block follows at once.
    if head.summary.len() > 1 {
        out.push(Block::Heading(2, "Summary".to_string()));
        out.push(summary(&head.summary));
    }
    out
}

/// The heading of the assumptions list: what the provenance marks mean.
pub const ASSUMPTIONS_HEADING: &str = "Assumptions (defaults taken; marks: [std] a published standard, [text] textbook physics, [practice] common practice of the trade, [memory] a typical value recalled, to be verified)";

/// The blocks after the stages: verdict, assumptions, cautions.
pub fn tail_blocks(tail: &Tail) -> Vec<Block> {
    let (p, m, f) = tail.counts;
    let mut out = Vec::new();
    if tail.shown > 1 || tail.counts.0 + tail.counts.1 + tail.counts.2 > 1 {
        out.push(Block::Verdict(
            format!(
                "Board verdict: {} ({p} pass, {m} marginal, {f} fail)",
                tail.verdict.as_str().to_uppercase()
            ),
            tail.verdict,
        ));
    }
    if !tail.assumptions.is_empty() {
        let items = tail
            .assumptions
            .iter()
            .map(|t| format!("{} ({})", t.text, stage_list(t, tail.shown)))
            .collect();
        out.push(Block::List(ASSUMPTIONS_HEADING.to_string(), items));
    }
    out.push(Block::List("Cautions".to_string(), tail.cautions.clone()));
    out
}

/// "every stage", or up to eight names and a count of the rest.
fn stage_list(taken: &super::stream::Taken, shown: usize) -> String {
    if taken.count == shown && shown > 1 {
        return "every stage".to_string();
    }
    let mut text = taken.names.join(", ");
    if taken.count > taken.names.len() {
        text.push_str(&format!(" and {} more", taken.count - taken.names.len()));
    }
    text
}

/// A header shared by the rows, or both names when the rows differ (`RB / RG`).
fn shared(rows: &[SummaryRow], pick: impl Fn(&SummaryRow) -> &'static str) -> String {
    let mut names: Vec<&'static str> = Vec::new();
    for r in rows {
        let n = pick(r);
        if !names.contains(&n) {
            names.push(n);
        }
    }
    names.join(" / ")
}

fn summary(rows: &[SummaryRow]) -> Block {
    Block::Table {
        headers: vec![
            "Stage".into(),
            "Load".into(),
            "Part".into(),
            shared(rows, |r| r.series_symbol),
            shared(rows, |r| r.margin.1),
            "Tj max [°C]".into(),
            "Verdict".into(),
            "Worst finding".into(),
        ],
        rows: rows
            .iter()
            .map(|s| {
                vec![
                    Cell::from(s.name.clone()),
                    Cell::from(s.load_kind),
                    Cell::from(s.part.clone()),
                    Cell::from(format!(
                        "{}{}",
                        crate::quantity::format_rkm(s.series_ohms),
                        if s.series_sized { " (sized)" } else { "" }
                    )),
                    Cell::from(plain(s.margin_value, 3)),
                    Cell::from(plain(s.junction_max_c, 4)),
                    status_cell(s.verdict),
                    Cell::from(
                        s.worst_finding
                            .map(|(id, st)| format!("{id} {st}"))
                            .unwrap_or_else(|| "-".to_string()),
                    ),
                ]
            })
            .collect(),
    }
}

/// The blocks of one stage.
pub fn stage_blocks(s: &StageReport) -> Vec<Block> {
    let mut out = Vec::new();
    stage_into(&mut out, s);
    out
}

fn stage_into(out: &mut Vec<Block>, s: &StageReport) {
    let n = s.index;
    out.push(Block::Heading(
        2,
        format!(
            "Stage {n}: {} ({}, {} load): {}",
            s.name,
            s.part,
            s.load_kind,
            s.verdict.as_str().to_uppercase()
        ),
    ));
    if let Some(path) = &s.plot_svg {
        out.push(Block::Image(
            format!("Operating point of {}", s.name),
            path.clone(),
        ));
    }
    if let Some(note) = &s.plot_note {
        out.push(Block::Line(format!("No picture: {note}.")));
    }
    out.push(Block::Line(conditions_words(&s.conditions, "")));
    out.push(Block::Table {
        headers: vec![
            "Resistor".into(),
            "Value".into(),
            "Code".into(),
            "Fitted or sized".into(),
            "Worst power [mW]".into(),
            "Rating held to [W]".into(),
            "Rating needed [W]".into(),
        ],
        rows: s
            .resistors
            .iter()
            .map(|r| {
                vec![
                    Cell::from(format!("{} {}", r.symbol, r.role)),
                    Cell::from(fe(r.ohms, "Ω")),
                    Cell::from(r.code.clone()),
                    Cell::from(if r.sized { "sized" } else { "fitted" }),
                    Cell::from(scaled(Some(r.worst_power_w), 1e3)),
                    Cell::from(format!(
                        "{} ({})",
                        plain(Some(r.rating_w), 3),
                        match r.rating_source {
                            crate::analysis::RatingSource::Given => "the board's fitted rating",
                            crate::analysis::RatingSource::Assumed => "fitted rating, assumed",
                            crate::analysis::RatingSource::Proposed => "sized with it",
                        }
                    )),
                    Cell::from(plain(r.recommended_rating_w, 3)),
                ]
            })
            .collect(),
    });
    if let Some(cl) = &s.clamp {
        let mut line = format!(
            "Clamp fitted: {}{}. A clamp diode needs at least {} reverse and {} current (the minimum: 1.5 x the highest supply, and the winding's current); a standard part that covers it: {}, {}",
            cl.fitted,
            cl.clamp_v
                .map(|v| format!(" (holds the switch {} above the supply)", fe(v, "V")))
                .unwrap_or_default(),
            fe(cl.reverse_min_v, "V"),
            fe(cl.current_min_a, "A"),
            fe(cl.standard_reverse_v, "V"),
            fe(cl.standard_current_a, "A"),
        );
        if let (Some(e), Some(t)) = (cl.stored_energy_j, cl.decay_time_constant_s) {
            line.push_str(&format!(
                "; the winding stores {} and decays with L/R = {}",
                fe(e, "J"),
                fe(t, "s")
            ));
        }
        line.push('.');
        out.push(Block::Line(line));
    }
    let shown: Vec<_> = s.worst_case.iter().filter(|f| f.header.is_some()).collect();
    out.push(Block::Table {
        headers: shown
            .iter()
            .map(|f| f.header.unwrap_or_default().to_string())
            .collect(),
        rows: vec![shown
            .iter()
            .map(|f| {
                let digits = if f.key.ends_with("_c") { 4 } else { 3 };
                Cell::from(plain(f.value.map(|v| v * f.scale), digits))
            })
            .collect()],
    });
    out.push(Block::Table {
        headers: vec![
            "Check".into(),
            "Status".into(),
            "Figure".into(),
            "Limit".into(),
            "Why".into(),
        ],
        rows: s
            .checks
            .iter()
            .map(|f| {
                vec![
                    Cell::from(f.id.as_str()),
                    status_cell(f.status),
                    Cell::from(figure(f.value, f.unit)),
                    Cell::from(figure(f.limit, f.unit)),
                    Cell::from(f.detail.clone()),
                ]
            })
            .collect(),
    });
    match &s.yield_mc {
        Some(YieldReport::Modelled(y)) => yield_blocks(out, y),
        Some(YieldReport::NotModelled(why)) => out.push(Block::Line(format!(
            "Yield: {}; the worst case above stands alone.",
            why.phrase()
        ))),
        None => {}
    }
    if !s.fixes.is_empty() {
        let mut items: Vec<String> = s
            .fixes
            .iter()
            .map(|f| {
                let mut text = format!("{}: {}", f.check, f.action);
                if let Some(st) = f.recheck {
                    text.push_str(&format!(" (after the change: {st})"));
                }
                text
            })
            .collect();
        if let Some(r) = &s.remedy {
            if !r.changes.is_empty() {
                let changes: Vec<String> = r
                    .changes
                    .iter()
                    .map(|c| change_words(&c.field, c.from.as_ref(), &c.to))
                    .collect();
                items.push(format!("the change, all at once: {}", changes.join("; ")));
            }
            match r.verdict_after {
                Some(v) => {
                    let mut text = format!(
                        "re-checked with the whole change: {}",
                        v.as_str().to_uppercase()
                    );
                    if !r.still_short.is_empty() {
                        let short: Vec<String> = r
                            .still_short
                            .iter()
                            .map(|x| format!("{} ({})", x.check, x.status))
                            .collect();
                        text.push_str(&format!("; still short: {}", short.join(", ")));
                    }
                    for w in &r.worsened {
                        text.push_str(&format!("; {} goes from {} to {}", w.check, w.from, w.to));
                    }
                    items.push(text);
                }
                None => items.push(
                    "no board field can fix this stage: it needs another part or circuit"
                        .to_string(),
                ),
            }
            if !r.needs.is_empty() {
                let needs: Vec<String> = r.needs.iter().map(|n| n.text.clone()).collect();
                items.push(format!(
                    "what would pass in place of this part: {}",
                    needs.join("; ")
                ));
            }
        }
        out.push(Block::List(format!("Fixes, {}", s.name), items));
    }
}

/// A change of a board field in words: `RB 4k7 -> 1k6`, `pull-down none -> 47k`.
pub fn change_words(
    field: &str,
    from: Option<&serde_json::Value>,
    to: &serde_json::Value,
) -> String {
    format!(
        "{} {} -> {}",
        field_label(field),
        from.map(|v| show_value(field, v))
            .unwrap_or_else(|| "none".into()),
        show_value(field, to)
    )
}

/// A board field as a user names it.
pub fn field_label(field: &str) -> &str {
    match field {
        "base_resistor_ohms" => "RB",
        "gate_resistor_ohms" => "RG",
        "pull_down_ohms" => "pull-down",
        "load.resistor_ohms" => "RL",
        "resistor_rating_w" => "fitted resistor rating",
        other => other,
    }
}

/// A board field's value as a user reads it.
pub fn show_value(field: &str, v: &serde_json::Value) -> String {
    use serde_json::Value;
    match v {
        Value::Null => "none".to_string(),
        Value::Number(n) => {
            let x = n.as_f64().unwrap_or(f64::NAN);
            if field.ends_with("_ohms") {
                crate::quantity::format_rkm(x)
            } else if field.ends_with("_w") {
                fe(x, "W")
            } else {
                plain(Some(x), 4)
            }
        }
        Value::Object(m) => {
            let mut parts = vec![m
                .get("kind")
                .and_then(Value::as_str)
                .unwrap_or("?")
                .to_string()];
            for (key, unit, what) in [
                ("zener_v", "V", "Zener"),
                ("reverse_v", "V", "reverse"),
                ("current_a", "A", "current"),
            ] {
                if let Some(x) = m.get(key).and_then(Value::as_f64) {
                    parts.push(format!("{what} {}", fe(x, unit)));
                }
            }
            parts.join(", ")
        }
        other => other.to_string(),
    }
}

fn yield_blocks(out: &mut Vec<Block>, y: &crate::analysis::yield_mc::YieldResult) {
    let share = |f: f64, ci: [f64; 2]| {
        if f >= 1.0 {
            // Every build: the interval's upper end is 100 % too; only its lower bound says
            // anything, and it needs its digits.
            return format!(
                "100 % (95 % interval: at least {} %)",
                plain(Some(ci[0] * 100.0), 7)
            );
        }
        if f <= 0.0 {
            return format!(
                "0 % (95 % interval: at most {} %)",
                plain(Some(ci[1] * 100.0), 4)
            );
        }
        format!(
            "{} % (95 % interval {} .. {} %)",
            plain(Some(f * 100.0), 4),
            plain(Some(ci[0] * 100.0), 4),
            plain(Some(ci[1] * 100.0), 4)
        )
    };
    out.push(Block::Line(format!(
        "Yield over {} builds (seed {}): pinned low in {}; overdrive target met in {}.",
        y.builds,
        y.seed,
        share(y.pinned_low_fraction, y.pinned_low_interval),
        share(y.overdrive_met_fraction, y.overdrive_met_interval)
    )));
    let row = |name: &str, p: &crate::analysis::yield_mc::Percentiles, scale: f64, digits| {
        let tail = match p.worst_tail {
            crate::analysis::yield_mc::Tail::Low => "low",
            crate::analysis::yield_mc::Tail::High => "high",
        };
        vec![
            Cell::from(name),
            Cell::from(tail),
            Cell::from(plain(Some(p.p0_1 * scale), digits)),
            Cell::from(plain(Some(p.p1 * scale), digits)),
            Cell::from(plain(Some(p.p50 * scale), digits)),
        ]
    };
    let mut rows = vec![
        row("Overdrive", &y.overdrive_percentiles, 1.0, 3),
        row("Pin current [mA]", &y.pin_current_percentiles_a, 1e3, 3),
        row("Tj [°C]", &y.junction_percentiles_c, 1.0, 4),
    ];
    if let Some(led) = &y.led_current_percentiles_a {
        rows.push(row("LED current [mA]", led, 1e3, 3));
    }
    out.push(Block::Table {
        headers: vec![
            "Figure".into(),
            "Side that hurts".into(),
            "0.1 % worst".into(),
            "1 % worst".into(),
            "Median".into(),
        ],
        rows,
    });
    if y.below_corner_builds > 0 {
        out.push(Block::Line(format!(
            "{} builds fell below the worst-case corner: this part's curves break the conditions the corner rests on.",
            y.below_corner_builds
        )));
    }
}

pub(super) fn pct(f: f64) -> String {
    format!("{} %", plain(Some(f * 100.0), 3))
}

/// The conditions of a stage in one line: supply, logic pin, ambient and the overdrive wanted
/// (`overdrive_note` after it, e.g. ` (npn)`).
pub(super) fn conditions_words(c: &super::model::ConditionsReport, overdrive_note: &str) -> String {
    format!(
        "Supply {} ±{}, logic high {} (min {}), pin limit {}, ambient {} .. {} °C{}",
        fe(c.supply_v, "V"),
        pct(c.supply_tolerance),
        fe(c.logic_high_v, "V"),
        fe(c.logic_high_min_v, "V"),
        fe(c.pin_limit_a, "A"),
        plain(Some(c.ambient_c[0]), 4),
        plain(Some(c.ambient_c[1]), 4),
        match c.overdrive {
            Some(k) => format!(", overdrive {}{overdrive_note}", plain(Some(k), 3)),
            None => String::new(),
        }
    )
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn plain_trims_and_rounds() {
        assert_eq!(plain(Some(2.93456), 3), "2.93");
        assert_eq!(plain(Some(1000.0), 3), "1000");
        assert_eq!(plain(Some(0.0), 3), "0");
        assert_eq!(plain(None, 3), "-");
        assert_eq!(plain(Some(f64::INFINITY), 3), "-");
        assert_eq!(plain(Some(62.25), 4), "62.25");
    }
}
