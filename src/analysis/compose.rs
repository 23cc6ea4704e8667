//! One remedy per stage: the proposals of every check that is not a pass are composed into one
//! change of the board fields, applied to the stage's raw fields, and the whole stage is
//! resolved and analysed again. Values the engine sized are then written as fitted values (with
//! a fitted rating that covers them) and the stage is checked once more: that last analysis is
//! what `pinlow fix` writes and what a new audit of the fixed board gives.

use std::sync::Arc;

use serde_json::{Map, Value};

use super::{analyse, common, Analysis};
use crate::board::{resolve_with, RawStage};
use crate::check::{CheckId, Status};
use crate::error::Result;
use crate::remedy::{number, Edit, PartNeed, Proposal};
use crate::stage::Stage;

/// One board field the remedy changes.
#[derive(Clone, Debug, PartialEq)]
pub struct Change {
    /// The field (`base_resistor_ohms`, `load.resistor_ohms`, `clamp`).
    pub field: String,
    /// Its value before (the stage's own, or the defaults'), `None` when absent.
    pub from: Option<Value>,
    /// Its value after.
    pub to: Value,
}

/// The stage after the remedy.
#[derive(Clone, Debug)]
pub struct After {
    /// The stage's own fields with the remedy applied (what `pinlow fix` writes).
    pub own: RawStage,
    /// The stage resolved from them.
    pub stage: Stage,
    /// Its analysis.
    pub analysis: Analysis,
    /// Checks that are still not a pass: (id, status).
    pub short: Vec<(CheckId, Status)>,
    /// Checks that got worse than before: (id, before, after).
    pub worsened: Vec<(CheckId, Status, Status)>,
    /// What a replacement part needs for the checks still short (from their remedies).
    pub needs: Vec<(CheckId, PartNeed)>,
}

/// The composed remedy of one stage.
#[derive(Clone, Debug)]
pub struct Remedy {
    /// Each check's proposal, in report order.
    pub proposals: Vec<Proposal>,
    /// The board fields changed, in the order they were first proposed; empty when only another
    /// part (or circuit) helps.
    pub changes: Vec<Change>,
    /// The stage re-checked after the change (`None` when nothing changed).
    pub after: Option<After>,
}

impl Remedy {
    /// The fields to set, as the JSON `apply` object.
    pub fn apply(&self) -> Map<String, Value> {
        self.changes
            .iter()
            .map(|c| (c.field.clone(), c.to.clone()))
            .collect()
    }
}

/// The proposals of every check of `a` that is not a pass.
pub fn proposals(stage: &Stage, a: &Analysis) -> Vec<Proposal> {
    let c = &stage.conditions;
    let mut out = stage.switch.remedies(c, &a.corner, &a.drive, &a.findings);
    let on = stage.switch.on_voltage(c);
    let ctx = crate::load::LoadContext {
        conditions: c,
        vcc_max: a.corner.vcc_max,
        vcc_min: a.corner.vcc_min,
        current_max: a.corner.current_max,
        on_voltage_max: a.drive.on_voltage_max,
        own: a.own,
        on: on.as_ref(),
    };
    for f in a.findings.iter().filter(|f| f.status != Status::Pass) {
        out.extend(stage.load.remedy(f, &ctx));
    }
    out.extend(common::remedies(stage, a));
    out.sort_by_key(|p| p.check.rank);
    out
}

/// The remedy of a stage, or `None` when every check passes.
pub fn compose(stage: &Stage, a: &Analysis) -> Option<Remedy> {
    if a.verdict == Status::Pass {
        return None;
    }
    let mut proposals = proposals(stage, a);
    // Every edit first; should that leave the stage worse than it was (a pull-down that starves
    // the base, say), only the edits that answer failing checks; failing that, no change.
    let status_of = |id: CheckId| a.finding(id).map(|f| f.status).unwrap_or(Status::Pass);
    let all: Vec<Edit> = proposals
        .iter()
        .flat_map(|p| p.edits.iter().cloned())
        .collect();
    let failing: Vec<Edit> = proposals
        .iter()
        .filter(|p| status_of(p.check) == Status::Fail)
        .flat_map(|p| p.edits.iter().cloned())
        .collect();
    for (i, edits) in [all, failing].into_iter().enumerate() {
        if edits.is_empty() {
            continue;
        }
        // A change the resolver refuses (it never should) counts as no change.
        if let Ok((changes, after)) = apply(stage, a, &edits) {
            if after.analysis.verdict <= a.verdict {
                if i > 0 {
                    // The edits left out are not part of the remedy any more.
                    for p in &mut proposals {
                        if status_of(p.check) != Status::Fail {
                            p.edits.clear();
                        }
                    }
                }
                return Some(Remedy {
                    proposals,
                    changes,
                    after: Some(after),
                });
            }
        }
    }
    for p in &mut proposals {
        p.edits.clear();
    }
    Some(Remedy {
        proposals,
        changes: Vec::new(),
        after: None,
    })
}

/// Apply the changes of a remedy to a stage object as written (key order kept; an object the
/// stage takes from `defaults` is copied into the stage first): what `pinlow fix` writes.
pub fn apply_changes(
    stage: &mut Map<String, Value>,
    defaults: &Map<String, Value>,
    changes: &[Change],
) {
    for c in changes {
        put(stage, defaults, &c.field, Some(c.to.clone()));
    }
}

/// The stage's own fields as a JSON object.
fn to_map(raw: &RawStage) -> Map<String, Value> {
    match serde_json::to_value(raw) {
        Ok(Value::Object(m)) => m,
        _ => Map::new(),
    }
}

fn from_map(map: Map<String, Value>) -> Result<RawStage> {
    crate::error::from_value("<remedy>", "", &Value::Object(map))
}

/// The value of a field in the stage's own object, else in the defaults'.
fn current(own: &Map<String, Value>, defaults: &Map<String, Value>, field: &str) -> Option<Value> {
    let get = |m: &Map<String, Value>| -> Option<Value> {
        match field.split_once('.') {
            Some((object, key)) => m.get(object)?.get(key).cloned(),
            None => m.get(field).cloned(),
        }
    };
    get(own).or_else(|| get(defaults))
}

/// Set (`Some`) or remove (`None`) a field in the stage's own object; a field inside an object
/// the stage takes from the defaults copies that object into the stage first.
fn put(
    own: &mut Map<String, Value>,
    defaults: &Map<String, Value>,
    field: &str,
    value: Option<Value>,
) {
    match field.split_once('.') {
        Some((object, key)) => {
            if !own.contains_key(object) {
                if let Some(d) = defaults.get(object) {
                    own.insert(object.to_string(), d.clone());
                }
            }
            if let Some(Value::Object(inner)) = own.get_mut(object) {
                match value {
                    Some(v) => {
                        inner.insert(key.to_string(), v);
                    }
                    None => {
                        inner.remove(key);
                    }
                }
            }
        }
        None => match value {
            Some(v) => {
                own.insert(field.to_string(), v);
            }
            None => {
                own.remove(field);
            }
        },
    }
}

/// Resolve `own` over `defaults` (`None`: the stage's own defaults, unchanged) with the stage's
/// own part, and analyse it.
fn rerun(
    stage: &Stage,
    own: &Map<String, Value>,
    defaults: Option<&Map<String, Value>>,
) -> Result<(RawStage, Stage, Analysis)> {
    let raw = from_map(own.clone())?;
    let defaults = match defaults {
        Some(d) => Arc::new(from_map(d.clone())?),
        None => Arc::clone(&stage.source.defaults),
    };
    let switch = Arc::clone(&stage.switch);
    let s = resolve_with(
        &raw,
        &defaults,
        &stage.source.origin,
        stage.source.index,
        &|_, _| Ok(Arc::clone(&switch)),
    )?;
    let a = analyse(&s);
    Ok((raw, s, a))
}

fn apply(stage: &Stage, before: &Analysis, edits: &[Edit]) -> Result<(Vec<Change>, After)> {
    let kind = stage.switch.kind();
    let original = to_map(&stage.source.own);
    let defaults = to_map(&stage.source.defaults);
    let mut own = original.clone();
    let mut local_defaults = defaults.clone();
    let mut order: Vec<String> = Vec::new();
    let mut note = |f: &str| {
        if !order.iter().any(|o| o == f) {
            order.push(f.to_string());
        }
    };
    for e in edits {
        note(e.field());
        match e {
            Edit::Set(field, v) => put(&mut own, &defaults, field, Some(v.clone())),
            Edit::Size(field) => {
                put(&mut own, &defaults, field, None);
                put(&mut local_defaults, &Map::new(), field, None);
                // A series resistor given without a pull-down meant none: keep it so when the
                // resistor is sized (unless a remedy fits one).
                if *field == kind.series.key
                    && current(&original, &defaults, "pull_down_ohms").is_none()
                    && !edits.iter().any(|e| e.field() == "pull_down_ohms")
                {
                    put(&mut own, &defaults, "pull_down_ohms", Some(Value::Null));
                    note("pull_down_ohms");
                }
            }
        }
    }
    let changed_defaults = (local_defaults != defaults).then_some(&local_defaults);
    let (_, _, first) = rerun(stage, &own, changed_defaults)?;
    // Write what the engine sized as fitted values, with a fitted rating that covers them all.
    if first.drive.series_sized {
        put(
            &mut own,
            &defaults,
            kind.series.key,
            Some(number(first.drive.series.value())),
        );
        note(kind.series.key);
    }
    if first.drive.pull_down_sized {
        if let Some(r) = first.drive.pull_down {
            put(
                &mut own,
                &defaults,
                "pull_down_ohms",
                Some(number(r.value())),
            );
            note("pull_down_ohms");
        }
    }
    if let (Some(o), Some(key)) = (first.own, stage.load.own_resistor_key()) {
        if let (true, Some(r)) = (o.sized, o.value) {
            let field = format!("load.{key}");
            put(&mut own, &defaults, &field, Some(number(r.value())));
            note(&field);
        }
    }
    let needed = first
        .resistors
        .iter()
        .filter_map(|r| r.needed_rating.map(|p| p.value()))
        .fold(0.0_f64, f64::max);
    if needed > stage.conditions.fitted_rating().value() {
        put(
            &mut own,
            &defaults,
            "resistor_rating_w",
            Some(number(needed)),
        );
        note("resistor_rating_w");
    }
    let (raw, s2, a2) = rerun(stage, &own, None)?;
    let changes = order
        .iter()
        .filter_map(|f| {
            let to = current(&own, &defaults, f)?;
            let from = current(&original, &defaults, f);
            (from.as_ref() != Some(&to)).then(|| Change {
                field: f.clone(),
                from,
                to,
            })
        })
        .collect();
    let short: Vec<(CheckId, Status)> = a2
        .findings
        .iter()
        .filter(|f| f.status != Status::Pass)
        .map(|f| (f.id, f.status))
        .collect();
    let worsened = a2
        .findings
        .iter()
        .filter_map(|f| {
            let old = before
                .finding(f.id)
                .map(|b| b.status)
                .unwrap_or(Status::Pass);
            (f.status > old).then_some((f.id, old, f.status))
        })
        .collect();
    let needs = proposals(&s2, &a2)
        .into_iter()
        .filter(|p| short.iter().any(|(id, _)| *id == p.check))
        .flat_map(|p| p.needs.into_iter().map(move |n| (p.check, n)))
        .collect();
    Ok((
        changes,
        After {
            own: raw,
            stage: s2,
            analysis: a2,
            short,
            worsened,
            needs,
        },
    ))
}

/// A quantity's value in its base unit, for board fields.
trait Plain {
    fn value(&self) -> f64;
}

impl<T: crate::quantity::Base> Plain for T {
    fn value(&self) -> f64 {
        self.base()
    }
}
