//! One pass per stage: the engine runs once, the remedy is composed (and re-checked) from that
//! analysis, the yield and the picture are drawn from it when asked for, and the report value
//! is built. Renderers then only draw what this gives them.

use serde_json::Map;

use crate::analysis::yield_mc::YieldOptions;
use crate::analysis::{analyse, compose, Analysis, Remedy};
use crate::picture::Picture;
use crate::quantity::{celsius, format_engineering as fe, format_rkm, Base};
use crate::remedy::{Bound, PartNeed};
use crate::report::{
    num, sig, ChangeReport, CheckReport, ClampReport, ConditionsReport, FigureReport, FixReport,
    NeedReport, NoYield, RemedyReport, ResistorReport, Short, StageReport, Worsened, YieldReport,
};
use crate::stage::Stage;

/// Points of the ambient sweep a picture gets.
pub const SWEEP_POINTS: usize = 61;

/// What to add to each stage's report.
#[derive(Clone, Copy, Debug, Default)]
pub struct Options {
    /// Draw builds for the yield.
    pub yield_opts: Option<YieldOptions>,
    /// Build the picture's data.
    pub picture: bool,
}

/// The report of stage `index` (from 1), analysed once.
pub fn stage_report(
    index: usize,
    stage: &Stage,
    opts: &Options,
    progress: &(dyn Fn(u64, u64) + Sync),
) -> StageReport {
    let a = analyse(stage);
    let remedy = compose(stage, &a);
    let mut r = build(index, stage, &a, remedy.as_ref());
    if let Some(o) = &opts.yield_opts {
        r.yield_mc = Some(yield_of(stage, &a, o, progress));
    }
    if opts.picture {
        match picture(stage, &a) {
            Ok(p) => r.picture = Some(p),
            Err(why) => r.plot_note = Some(why),
        }
    }
    r
}

/// The yield of a stage: modelled for the drive kinds that have a yield model.
fn yield_of(
    stage: &Stage,
    a: &Analysis,
    opts: &YieldOptions,
    progress: &(dyn Fn(u64, u64) + Sync),
) -> YieldReport {
    match crate::analysis::yield_mc::run(stage, a, opts, progress) {
        Some(y) => YieldReport::Modelled(y),
        None if stage.switch.yield_terms().is_none() => {
            YieldReport::NotModelled(NoYield::Drive(stage.drive()))
        }
        None => YieldReport::NotModelled(NoYield::Load(stage.load_kind())),
    }
}

/// Analyse every stage and gather the report in memory (small boards, tests).
pub fn audit(board: Option<String>, stages: &[Stage]) -> crate::report::Report {
    crate::report::Report {
        board,
        stages: stages
            .iter()
            .enumerate()
            .map(|(i, s)| stage_report(i + 1, s, &Options::default(), &|_, _| {}))
            .collect(),
    }
}

/// The picture of a stage from its analysis; the first panel's caption names the stage.
pub fn picture(stage: &Stage, a: &Analysis) -> Result<Picture, String> {
    let c = &stage.conditions;
    let (lo, hi) = (c.ambient_min.base(), c.ambient_max.base());
    let n = SWEEP_POINTS.max(2);
    let currents: Vec<(f64, f64)> = (0..n)
        .map(|i| {
            let t = lo + (hi - lo) * i as f64 / (n - 1) as f64;
            let mut ct = c.clone();
            ct.ambient_min = celsius(t);
            (
                t,
                stage.load.current_max(&ct, a.own_value()).base().max(0.0),
            )
        })
        .collect();
    let mut picture = stage
        .switch
        .picture(c, &a.corner, &a.drive, &currents)
        .map_err(|e| format!("stage `{}`: {e}", stage.name))?;
    if let Some(first) = picture.panels.first_mut() {
        first.caption = format!("{}: {}", stage.name, first.caption);
    }
    Ok(picture)
}

/// The report value of an analysed stage and its remedy.
pub fn build(index: usize, stage: &Stage, a: &Analysis, remedy: Option<&Remedy>) -> StageReport {
    let c = &stage.conditions;
    let kind = stage.switch.kind();
    let led = a.own.filter(|_| stage.load.own_resistor_key().is_some());
    StageReport {
        index,
        name: stage.name.clone(),
        verdict: a.verdict,
        drive: kind.name,
        part: stage.part_id().to_string(),
        load_kind: stage.load_kind(),
        series_keys: (kind.series.key, kind.series.sized_key),
        series_symbol: kind.series.symbol,
        series_ohms: num(a.drive.series.base()),
        series_sized: a.drive.series_sized,
        pull_down_keys: (kind.pull_down.key, kind.pull_down.sized_key),
        pull_down_ohms: a.drive.pull_down.map(|r| num(r.base())),
        pull_down_sized: a.drive.pull_down_sized,
        led_resistor_ohms: led.and_then(|o| o.value).map(|r| num(r.base())),
        led_resistor_sized: led.is_some_and(|o| o.sized && o.value.is_some()),
        conditions: conditions_report(c, kind.stage_keys.contains(&"overdrive")),
        resistors: a
            .resistors
            .iter()
            .map(|r| ResistorReport {
                role: r.role,
                symbol: r.symbol,
                ohms: num(r.value.base()),
                code: format_rkm(r.value.base()),
                sized: r.sized,
                worst_power_w: num(r.worst_power.base()),
                rating_w: num(r.rating.base()),
                rating_source: r.rating_source,
                recommended_rating_w: r.needed_rating.map(|p| num(p.base())),
            })
            .collect(),
        clamp: a.clamp.map(|p| ClampReport {
            fitted: stage.clamp.kind_name(),
            clamp_v: stage.clamp.voltage().map(|v| num(v.base())),
            reverse_min_v: num(p.reverse_min.base()),
            current_min_a: num(p.current_min.base()),
            standard_reverse_v: crate::analysis::common::step_up(
                &crate::analysis::common::DIODE_REVERSE_STEPS_V,
                p.reverse_min.base(),
            ),
            standard_current_a: crate::analysis::common::step_up(
                &crate::analysis::common::DIODE_CURRENT_STEPS_A,
                p.current_min.base(),
            ),
            stored_energy_j: p.stored_energy.map(|e| num(e.base())),
            decay_time_constant_s: p.decay_time_constant.map(|t| num(t.base())),
        }),
        worst_case: a
            .figures
            .iter()
            .map(|f| FigureReport {
                key: f.key,
                value: f.value.and_then(sig),
                header: f.header,
                scale: f.scale,
            })
            .collect(),
        margin: kind.margin,
        checks: a
            .findings
            .iter()
            .map(|f| CheckReport {
                id: f.id,
                status: f.status,
                value: f.value.and_then(sig),
                limit: f.limit.and_then(sig),
                unit: f.unit,
                detail: f.detail(),
            })
            .collect(),
        assumptions: a.assumptions(stage).cloned().collect(),
        cautions: a.cautions.iter().map(|c| c.sentence()).collect(),
        fixes: remedy.map(fixes).unwrap_or_default(),
        remedy: remedy.map(remedy_report),
        plot_svg: None,
        plot_note: None,
        yield_mc: None,
        picture: None,
    }
}

fn fixes(r: &Remedy) -> Vec<FixReport> {
    r.proposals
        .iter()
        .map(|p| {
            let apply: Map<String, serde_json::Value> = r
                .changes
                .iter()
                .filter(|c| p.edits.iter().any(|e| e.field() == c.field))
                .map(|c| (c.field.clone(), c.to.clone()))
                .collect();
            let recheck = r.after.as_ref().and_then(|after| {
                (!p.edits.is_empty())
                    .then(|| after.analysis.finding(p.check).map(|f| f.status))
                    .flatten()
            });
            FixReport {
                check: p.check,
                action: p.why.sentence(),
                apply,
                recheck,
                needs: p.needs.iter().map(crate::report::rounded_need).collect(),
            }
        })
        .collect()
}

fn remedy_report(r: &Remedy) -> RemedyReport {
    RemedyReport {
        apply: r.apply(),
        changes: r
            .changes
            .iter()
            .map(|c| ChangeReport {
                field: c.field.clone(),
                from: c.from.clone(),
                to: c.to.clone(),
            })
            .collect(),
        verdict_after: r.after.as_ref().map(|a| a.analysis.verdict),
        still_short: r
            .after
            .as_ref()
            .map(|a| {
                a.short
                    .iter()
                    .map(|(check, status)| Short {
                        check: *check,
                        status: *status,
                    })
                    .collect()
            })
            .unwrap_or_default(),
        worsened: r
            .after
            .as_ref()
            .map(|a| {
                a.worsened
                    .iter()
                    .map(|(check, from, to)| Worsened {
                        check: *check,
                        from: *from,
                        to: *to,
                    })
                    .collect()
            })
            .unwrap_or_default(),
        needs: r
            .after
            .as_ref()
            .map(|a| {
                a.needs
                    .iter()
                    .map(|(check, need)| NeedReport {
                        check: *check,
                        need: crate::report::rounded_need(need),
                        text: need_text(need),
                    })
                    .collect()
            })
            .unwrap_or_default(),
    }
}

/// A part figure in words: `minimum gain (25 °C) >= 247 at 41.5 mA`.
pub fn need_text(n: &PartNeed) -> String {
    let bound = match n.bound {
        Bound::AtLeast => ">=",
        Bound::AtMost => "<=",
    };
    let value = if n.unit.is_empty() {
        crate::report::rows::plain(Some(n.value), 3)
    } else {
        fe(n.value, n.unit)
    };
    let at = match n.at {
        Some((key, v)) if key.ends_with("_a") => format!(" at {}", fe(v, "A")),
        Some((_, v)) => format!(" at {}", fe(v, "V")),
        None => String::new(),
    };
    format!(
        "{} {bound} {value}{at}",
        crate::remedy::figure_label(n.figure)
    )
}

/// The report of a pick: the first `top` candidates (all when `None`) each as the full stage
/// report of an audit (analysed once, in `pick`; its remedy composed here), and the needs.
pub fn pick_report(
    picked: &crate::pick::Picked,
    board: Option<String>,
    top: Option<usize>,
) -> crate::report::pick::PickReport {
    use crate::report::pick::{
        cautions_of, KindNeedsReport, PartNeedsReport, PickReport, PickStage, RankedReport,
    };
    let stage = &picked.stage;
    let c = &stage.conditions;
    let index = stage.source.index + 1;
    let shown = top.unwrap_or(usize::MAX);
    let candidates: Vec<RankedReport> = picked
        .candidates
        .iter()
        .take(shown)
        .enumerate()
        .map(|(i, cand)| {
            let remedy = compose(&cand.stage, &cand.analysis);
            RankedReport {
                rank: i + 1,
                report: build(index, &cand.stage, &cand.analysis, remedy.as_ref()),
            }
        })
        .collect();
    let raw = |get: fn(&crate::board::RawStage) -> Option<&Map<String, serde_json::Value>>| {
        get(&stage.source.own)
            .or_else(|| get(&stage.source.defaults))
            .cloned()
    };
    PickReport {
        model_version: crate::report::MODEL_VERSION,
        board,
        stage: PickStage {
            name: stage.name.clone(),
            index,
            load_kind: stage.load_kind(),
            conditions: conditions_report(
                c,
                picked
                    .kinds
                    .iter()
                    .any(|k| k.stage_keys.contains(&"overdrive")),
            ),
            load: raw(|r| r.load.as_ref()).unwrap_or_default(),
            clamp: raw(|r| r.clamp.as_ref()),
        },
        drives: picked.kinds.iter().map(|k| k.name).collect(),
        tried: picked.tried,
        kept: picked.candidates.len(),
        verdict: picked.verdict(),
        cautions: cautions_of(&candidates),
        candidates,
        needs: picked
            .needs
            .iter()
            .map(|k| KindNeedsReport {
                drive: k.drive,
                parts: k
                    .parts
                    .iter()
                    .map(|p| PartNeedsReport {
                        part: p.part.clone(),
                        verdict: p.verdict,
                        still_short: p
                            .short
                            .iter()
                            .map(|(check, status)| Short {
                                check: *check,
                                status: *status,
                            })
                            .collect(),
                        needs: p
                            .needs
                            .iter()
                            .map(|(check, need)| NeedReport {
                                check: *check,
                                need: crate::report::rounded_need(need),
                                text: need_text(need),
                            })
                            .collect(),
                    })
                    .collect(),
            })
            .collect(),
    }
}

/// The conditions as the report gives them; the overdrive wanted only where a drive kind of the
/// stage takes one.
fn conditions_report(c: &crate::conditions::Conditions, overdrive: bool) -> ConditionsReport {
    ConditionsReport {
        supply_v: num(c.supply.base()),
        supply_tolerance: c.supply_tolerance,
        logic_high_v: num(c.logic_high.base()),
        logic_high_min_v: num(c.logic_high_min.base()),
        pin_limit_a: num(c.pin_limit.base()),
        ambient_c: [num(c.ambient_min.base()), num(c.ambient_max.base())],
        overdrive: overdrive.then_some(c.overdrive),
        resistor_tolerance: c.resistor_tolerance,
        series: c.series.to_string(),
    }
}

#[cfg(test)]
mod tests {
    use std::sync::Arc;

    use super::*;
    use crate::conditions::Conditions;
    use crate::load::{CurrentLaw, Load, LoadKind};
    use crate::quantity::{Current, Resistance};

    /// A relay coil that gives no current law, as a future load kind might.
    #[derive(Debug)]
    struct Lawless(crate::load::SharedLoad);

    impl Load for Lawless {
        fn kind(&self) -> &'static LoadKind {
            self.0.kind()
        }
        fn current_max(&self, c: &Conditions, own: Option<Resistance>) -> Current {
            self.0.current_max(c, own)
        }
        fn current_law(&self, _own: Option<Resistance>) -> Option<CurrentLaw> {
            None
        }
    }

    fn yield_of_stage(json: &str, lawless: bool) -> Option<YieldReport> {
        let lib = crate::parts::Library::builtin().expect("shipped parts");
        let board = crate::board::parse_board("t.json", json, &lib).expect("board");
        let mut stage = board.stages.into_iter().next().expect("a stage");
        if lawless {
            stage.load = Arc::new(Lawless(stage.load.clone()));
        }
        let opts = Options {
            yield_opts: Some(YieldOptions {
                builds: 1000,
                seed: 1,
            }),
            picture: false,
        };
        stage_report(1, &stage, &opts, &|_, _| {}).yield_mc
    }

    /// A stage without yield figures says why: its drive kind, or its load kind.
    #[test]
    fn a_missing_yield_names_what_is_missing() {
        let relay = r#"{"stages": [{"name": "K1", "part": "demo-npn-40v", "supply_v": 12, "logic_high_v": 3.3,
            "load": {"kind": "relay", "coil_ohms": 400}, "clamp": {"kind": "diode"}}]}"#;
        assert!(matches!(
            yield_of_stage(relay, false),
            Some(YieldReport::Modelled(_))
        ));
        assert_eq!(
            yield_of_stage(relay, true),
            Some(YieldReport::NotModelled(NoYield::Load("relay")))
        );
        let fet = relay.replace("demo-npn-40v", "demo-nmos-40v");
        assert_eq!(
            yield_of_stage(&fet, false),
            Some(YieldReport::NotModelled(NoYield::Drive("nmos")))
        );
    }
}
