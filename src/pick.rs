//! Pick a part: one stage tried with every part of a library, each candidate's input resistors
//! sized by the v2 rules (RB and RBE by stage-model 6.2, RG and RGS by section 8), everything
//! else of the stage kept as given, each candidate analysed once and ranked. When no part
//! passes, the figures a part would need are taken from the remedies of the best candidates.
//!
//! The stage is resolved once per drive kind and the part swapped into the resolved stage: the
//! resolver reads nothing of a part but its drive kind (which keys the stage takes) and the
//! assumptions it lists last, so the swapped stage is the one a full resolution gives (a unit
//! test below holds that for every part). No words are written here: `report::pick` draws the
//! result.

use std::cmp::Ordering;
use std::sync::Arc;

use crate::analysis::{analyse, compose, Analysis};
use crate::board::{resolve_with, RawStage};
use crate::check::{CheckId, Status};
use crate::drive::{DriveKind, SharedSwitch, Switch, KINDS};
use crate::error::{Error, Result};
use crate::fields::Origin;
use crate::parts::Library;
use crate::remedy::PartNeed;
use crate::report::sig;
use crate::stage::Stage;

/// How many of the best candidates of each drive kind the needs are taken from.
pub const NEEDS_FROM: usize = 3;

/// The stage to pick a part for, as written (a board stage's own fields and the board's
/// defaults, or the flags). Its part, series resistors and pull-down are set aside.
#[derive(Clone, Debug)]
pub struct Query {
    /// The stage's own fields.
    pub own: RawStage,
    /// The board's defaults (empty for flags).
    pub defaults: Arc<RawStage>,
    /// The file or the flags.
    pub origin: Origin,
    /// Index in the board's `stages` (0 for flags).
    pub index: usize,
    /// Fit no pull-down (`--no-pull-down`); otherwise each candidate's pull-down is sized.
    pub no_pull_down: bool,
}

impl Query {
    /// The stage's own fields for a candidate of `kind` whose id is `part`: the part swapped
    /// in, every series resistor left out (sized), the pull-down left out (sized) or `null`
    /// (none), and the keys that `kind` does not take (`overdrive` for nmos) left out.
    pub fn own_for(&self, kind: &DriveKind, part: &str) -> RawStage {
        let mut own = self.own.clone();
        own.part = Some(part.to_string());
        own.base_resistor_ohms = None;
        own.gate_resistor_ohms = None;
        own.pull_down_ohms = self.no_pull_down.then_some(None);
        if !kind.stage_keys.contains(&"overdrive") {
            own.overdrive = None;
        }
        own
    }

    /// The defaults without a part, series resistors or pull-down, so that none of them
    /// reaches a candidate.
    pub fn candidate_defaults(&self) -> Arc<RawStage> {
        let mut d = self.defaults.as_ref().clone();
        d.part = None;
        d.base_resistor_ohms = None;
        d.gate_resistor_ohms = None;
        d.pull_down_ohms = None;
        Arc::new(d)
    }

    /// The candidate stage of one part, resolved in full (the reference the swap is held to).
    pub fn resolve(&self, part: &SharedSwitch) -> Result<Stage> {
        let kind = part.kind();
        resolve_with(
            &self.own_for(kind, &part.info().id),
            &self.candidate_defaults(),
            &self.origin,
            self.index,
            &|_, _| Ok(Arc::clone(part)),
        )
    }
}

/// Which parts are tried, and which candidates are kept.
#[derive(Clone, Debug, Default)]
pub struct Filter {
    /// Only parts of this drive kind.
    pub drive: Option<&'static DriveKind>,
    /// Only parts whose package holds this text (any case).
    pub package: Option<String>,
    /// Only candidates that pass.
    pub only_passing: bool,
}

impl Filter {
    /// True when the part is tried.
    pub fn admits(&self, part: &dyn Switch) -> bool {
        let kind_ok = self.drive.is_none_or(|k| k.name == part.kind().name);
        let package_ok = self.package.as_ref().is_none_or(|p| {
            part.info()
                .package
                .to_lowercase()
                .contains(&p.to_lowercase())
        });
        kind_ok && package_ok
    }
}

/// One part tried in the stage.
#[derive(Clone, Debug)]
pub struct Candidate {
    /// The stage with this part, its input resistors left to the engine.
    pub stage: Stage,
    /// Its analysis (the sized resistors are in `analysis.drive`).
    pub analysis: Analysis,
    /// Number of checks that are not a pass.
    pub not_pass: usize,
    /// Worst-case junction temperature as the report gives it (six significant digits), °C;
    /// `None` where the model gives none (thermal runaway).
    pub junction_c: Option<f64>,
    /// The part id in lower case (ids are unique regardless of case).
    id_key: String,
}

impl Candidate {
    /// Analyse one candidate stage.
    pub fn of(stage: Stage) -> Candidate {
        let analysis = analyse(&stage);
        let not_pass = analysis
            .findings
            .iter()
            .filter(|f| f.status != Status::Pass)
            .count();
        let junction_c = analysis
            .figures
            .iter()
            .find(|f| f.key == "junction_max_c")
            .and_then(|f| f.value)
            .and_then(sig);
        let id_key = stage.part_id().to_lowercase();
        Candidate {
            stage,
            analysis,
            not_pass,
            junction_c,
            id_key,
        }
    }

    /// The candidate's verdict.
    pub fn verdict(&self) -> Status {
        self.analysis.verdict
    }

    /// The part id.
    pub fn part_id(&self) -> &str {
        self.stage.part_id()
    }
}

/// The ranking rule: verdict (pass, marginal, fail), then the number of checks that are not a
/// pass, then the junction temperature (lower first, none last), then the part id.
pub fn rank_order(a: &Candidate, b: &Candidate) -> Ordering {
    a.verdict()
        .cmp(&b.verdict())
        .then(a.not_pass.cmp(&b.not_pass))
        .then_with(|| match (a.junction_c, b.junction_c) {
            (Some(x), Some(y)) => x.total_cmp(&y),
            (Some(_), None) => Ordering::Less,
            (None, Some(_)) => Ordering::Greater,
            (None, None) => Ordering::Equal,
        })
        .then_with(|| a.id_key.cmp(&b.id_key))
        .then_with(|| a.part_id().cmp(b.part_id()))
}

/// What one of the best candidates would need of a part to pass.
#[derive(Clone, Debug, PartialEq)]
pub struct PartNeeds {
    /// The candidate's part.
    pub part: String,
    /// Its verdict.
    pub verdict: Status,
    /// Its checks still short after the board edits its remedy makes (or, when no board field
    /// changes, its checks that are not a pass).
    pub short: Vec<(CheckId, Status)>,
    /// For those checks, the figures a replacement part needs (a check short of a part figure
    /// needs another circuit or load).
    pub needs: Vec<(CheckId, PartNeed)>,
}

/// The needs of one drive kind, from its best candidates in rank order.
#[derive(Clone, Debug, PartialEq)]
pub struct KindNeeds {
    /// The drive kind.
    pub drive: &'static str,
    /// Its best [`NEEDS_FROM`] candidates, in rank order.
    pub parts: Vec<PartNeeds>,
}

/// The outcome of a pick.
#[derive(Clone, Debug)]
pub struct Picked {
    /// The stage as resolved for the first drive kind tried. Only its name, conditions, load
    /// and clamp describe the query; its part is that kind's first.
    pub stage: Stage,
    /// The drive kinds tried, in registry order.
    pub kinds: Vec<&'static DriveKind>,
    /// Parts tried (after the drive and package filters).
    pub tried: usize,
    /// The candidates in rank order (after every filter).
    pub candidates: Vec<Candidate>,
    /// When no part tried passes: per drive kind, the figures a part would need.
    pub needs: Vec<KindNeeds>,
}

impl Picked {
    /// The verdict of the best candidate; `Fail` when no candidate is left.
    pub fn verdict(&self) -> Status {
        self.candidates
            .first()
            .map(Candidate::verdict)
            .unwrap_or(Status::Fail)
    }
}

/// Try every part of `lib` that `filter` admits in the stage of `query`, and rank them.
pub fn pick(query: &Query, lib: &Library, filter: &Filter) -> Result<Picked> {
    let parts: Vec<&SharedSwitch> = lib.iter().filter(|p| filter.admits(p.as_ref())).collect();
    if parts.is_empty() {
        let mut with: Vec<String> = Vec::new();
        if let Some(k) = filter.drive {
            with.push(format!("--drive {}", k.name));
        }
        if let Some(p) = &filter.package {
            with.push(format!("--package {p:?}"));
        }
        let with = if with.is_empty() {
            String::new()
        } else {
            format!(" with {}", with.join(" and "))
        };
        return Err(Error::Usage(format!(
            "no part of the library is left to try{with} (`pinlow parts list` shows every part)"
        )));
    }
    let defaults = query.candidate_defaults();
    let mut candidates = Vec::with_capacity(parts.len());
    let mut first_stage: Option<Stage> = None;
    let mut kinds = Vec::new();
    for kind in KINDS.iter().copied() {
        let mut of_kind = parts.iter().filter(|p| p.kind().name == kind.name);
        let Some(first) = of_kind.next() else {
            continue;
        };
        let template = resolve_with(
            &query.own_for(kind, &first.info().id),
            &defaults,
            &query.origin,
            query.index,
            &|_, _| Ok(Arc::clone(first)),
        )?;
        // The resolver lists the part's own assumptions last.
        let shared = template
            .assumptions
            .len()
            .saturating_sub(first.assumptions().len());
        candidates.push(Candidate::of(template.clone()));
        for part in of_kind {
            candidates.push(Candidate::of(swap(&template, shared, part)));
        }
        kinds.push(kind);
        first_stage.get_or_insert(template);
    }
    let Some(stage) = first_stage else {
        return Err(Error::Usage("no part of the library is left to try".into()));
    };
    candidates.sort_by(rank_order);
    let needs = if candidates.iter().any(|c| c.verdict() == Status::Pass) {
        Vec::new()
    } else {
        needs_of(&kinds, &candidates)
    };
    if filter.only_passing {
        candidates.retain(|c| c.verdict() == Status::Pass);
    }
    Ok(Picked {
        stage,
        kinds,
        tried: parts.len(),
        candidates,
        needs,
    })
}

/// The template stage with another part of the same kind in place of its own.
fn swap(template: &Stage, shared: usize, part: &SharedSwitch) -> Stage {
    let mut s = template.clone();
    s.switch = Arc::clone(part);
    s.assumptions.truncate(shared);
    s.assumptions.extend(part.assumptions());
    s.source.own.part = Some(part.info().id.clone());
    s
}

/// Per drive kind, what its best candidates (in rank order) would need.
fn needs_of(kinds: &[&'static DriveKind], ranked: &[Candidate]) -> Vec<KindNeeds> {
    kinds
        .iter()
        .filter_map(|kind| {
            let parts: Vec<PartNeeds> = ranked
                .iter()
                .filter(|c| c.stage.drive() == kind.name)
                .take(NEEDS_FROM)
                .map(needs_of_one)
                .collect();
            (!parts.is_empty()).then_some(KindNeeds {
                drive: kind.name,
                parts,
            })
        })
        .collect()
}

/// What a candidate's composed remedy leaves: the checks still short after its board edits and
/// the part figures they need, or, when no board field changes, its checks that are not a pass
/// and the figures its proposals name.
fn needs_of_one(c: &Candidate) -> PartNeeds {
    let remedy = compose(&c.stage, &c.analysis);
    let (short, needs) = match remedy.as_ref().map(|r| (r, r.after.as_ref())) {
        Some((_, Some(after))) => (after.short.clone(), after.needs.clone()),
        Some((r, None)) => (
            c.analysis
                .findings
                .iter()
                .filter(|f| f.status != Status::Pass)
                .map(|f| (f.id, f.status))
                .collect(),
            r.proposals
                .iter()
                .flat_map(|p| p.needs.iter().map(move |n| (p.check, n.clone())))
                .collect(),
        ),
        None => (Vec::new(), Vec::new()),
    };
    PartNeeds {
        part: c.part_id().to_string(),
        verdict: c.verdict(),
        short,
        needs,
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::parts::{read_part, PartSource};

    /// An invented logic-level MOSFET (not a real part) beside the shipped parts.
    fn library() -> Library {
        let mut lib = Library::builtin().expect("shipped parts load");
        let text = r#"{"id": "test-nmos-ll", "description": "invented logic-level MOSFET for tests",
            "polarity": "nmos", "package": "SOT-23", "provenance": "invented for pinlow's tests; not a real part",
            "vds_max_v": 30, "id_max_a": 4, "vgs_max_v": 12, "vgs_th": {"min_v": 0.7, "max_v": 1.5},
            "rds_on_max": [{"vgs_v": 2.5, "ohms": 0.06}, {"vgs_v": 4.5, "ohms": 0.04}],
            "tj_max_c": 150, "r_th_ja_k_per_w": 250}"#;
        lib.insert(
            read_part("test-nmos-ll.json", text, PartSource::Builtin("test")).expect("valid"),
        );
        lib
    }

    fn relay_query(overdrive: Option<f64>) -> Query {
        let own = RawStage {
            supply_v: Some(12.0),
            logic_high_v: Some(3.3),
            overdrive,
            load: serde_json::from_str(r#"{"kind": "relay", "coil_ohms": 400}"#).ok(),
            clamp: serde_json::from_str(r#"{"kind": "diode"}"#).ok(),
            ..RawStage::default()
        };
        Query {
            own,
            defaults: Arc::new(RawStage::default()),
            origin: Origin::Flags,
            index: 0,
            no_pull_down: false,
        }
    }

    #[test]
    fn a_swapped_part_gives_the_stage_a_full_resolution_gives() {
        let lib = library();
        for overdrive in [None, Some(3.0)] {
            let q = relay_query(overdrive);
            let picked = pick(&q, &lib, &Filter::default()).expect("picks");
            assert_eq!(picked.tried, lib.len());
            for c in &picked.candidates {
                let part = lib.get(c.part_id()).expect("in the library");
                let full = q.resolve(part).expect("resolves");
                assert_eq!(c.stage.name, full.name);
                assert_eq!(c.stage.assumptions, full.assumptions, "{}", c.part_id());
                assert_eq!(
                    format!("{:?}", c.stage.conditions),
                    format!("{:?}", full.conditions)
                );
                assert_eq!(c.stage.source.own, full.source.own);
                assert_eq!(c.verdict(), analyse(&full).verdict, "{}", c.part_id());
            }
        }
    }

    #[test]
    fn the_resistors_are_sized_and_overdrive_stays_with_npn() {
        let lib = library();
        let q = relay_query(Some(3.0));
        let picked = pick(&q, &lib, &Filter::default()).expect("picks");
        for c in &picked.candidates {
            assert!(c.analysis.drive.series_sized, "{}", c.part_id());
            assert!(c.stage.conditions.inputs.series.is_none());
            match c.stage.drive() {
                "npn" => assert_eq!(c.stage.conditions.overdrive, 3.0),
                _ => assert!(c.stage.source.own.overdrive.is_none()),
            }
        }
        let q = Query {
            no_pull_down: true,
            ..relay_query(None)
        };
        let picked = pick(&q, &lib, &Filter::default()).expect("picks");
        assert!(picked
            .candidates
            .iter()
            .all(|c| c.analysis.drive.pull_down.is_none()));
    }

    #[test]
    fn filters_choose_the_parts_tried() {
        let lib = library();
        let q = relay_query(None);
        let nmos = Filter {
            drive: crate::drive::kind("nmos"),
            ..Filter::default()
        };
        let picked = pick(&q, &lib, &nmos).expect("picks");
        let nmos_parts = lib.iter().filter(|p| p.kind().name == "nmos").count();
        assert!(nmos_parts >= 2, "the test MOSFET and the shipped ones");
        assert_eq!(picked.tried, nmos_parts);
        assert!(picked.candidates.iter().all(|c| c.stage.drive() == "nmos"));
        assert_eq!(picked.kinds.len(), 1);
        let sot = Filter {
            package: Some("sot-2".into()),
            ..Filter::default()
        };
        let picked = pick(&q, &lib, &sot).expect("picks");
        assert!(picked.candidates.iter().all(|c| c
            .stage
            .switch
            .info()
            .package
            .to_lowercase()
            .contains("sot-2")));
        let none = Filter {
            package: Some("no such package".into()),
            ..Filter::default()
        };
        assert!(pick(&q, &lib, &none).is_err());
    }
}
