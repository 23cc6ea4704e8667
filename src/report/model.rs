//! The report value: plain numbers in base SI units with the unit in each key (files.md), built
//! once per stage by `pipeline`; every renderer reads it and none computes.

use serde::ser::{SerializeMap, Serializer};
use serde::Serialize;
use serde_json::{Map, Value};

use crate::analysis::yield_mc::YieldResult;
use crate::check::{CheckId, Status};
use crate::picture::Picture;
use crate::remedy::PartNeed;

/// Version of the stage model the figures follow.
pub const MODEL_VERSION: u32 = 2;

/// The caution every report carries.
pub const GENERAL_CAUTION: &str = "pinlow checks the driver stage against its model only and does not replace a design review; follow local codes and licensed practice, above all where anything touches mains";

/// The inputs that shape the corners.
#[derive(Clone, Debug, Serialize, PartialEq)]
pub struct ConditionsReport {
    /// Nominal supply.
    pub supply_v: f64,
    /// Supply tolerance.
    pub supply_tolerance: f64,
    /// Nominal logic high.
    pub logic_high_v: f64,
    /// Guaranteed logic high.
    pub logic_high_min_v: f64,
    /// Pin limit.
    pub pin_limit_a: f64,
    /// Ambient [min, max].
    pub ambient_c: [f64; 2],
    /// Wanted overdrive (npn stages).
    #[serde(skip_serializing_if = "Option::is_none")]
    pub overdrive: Option<f64>,
    /// Resistor tolerance.
    pub resistor_tolerance: f64,
    /// Series used for sizing.
    pub series: String,
}

/// A resistor of the stage.
#[derive(Clone, Debug, Serialize, PartialEq)]
pub struct ResistorReport {
    /// `base`, `gate`, `pull-down` or `led`.
    pub role: &'static str,
    /// `RB`, `RG`, `RBE`, `RGS`, `RL`.
    pub symbol: &'static str,
    /// Value.
    pub ohms: f64,
    /// IEC 60062 RKM code.
    pub code: String,
    /// Sized by the engine.
    pub sized: bool,
    /// Worst dissipation.
    pub worst_power_w: f64,
    /// The rating it is held to.
    pub rating_w: f64,
    /// `given`, `assumed` (the fitted rating) or `proposed` (the rating sized for it).
    pub rating_source: crate::analysis::RatingSource,
    /// The smallest standard rating at least twice the worst power (null above 5 W).
    pub recommended_rating_w: Option<f64>,
}

/// The clamp: what is fitted and what it needs.
#[derive(Clone, Debug, Serialize, PartialEq)]
pub struct ClampReport {
    /// `none`, `diode` or `zener`.
    pub fitted: &'static str,
    /// Clamp voltage above the supply, when fitted.
    pub clamp_v: Option<f64>,
    /// Least reverse rating a clamp needs.
    pub reverse_min_v: f64,
    /// Least current rating a clamp needs.
    pub current_min_a: f64,
    /// The standard reverse rating that covers the least (the rectifier steps).
    pub standard_reverse_v: f64,
    /// The standard current rating that covers the least.
    pub standard_current_a: f64,
    /// Energy in the winding at IC,max.
    pub stored_energy_j: Option<f64>,
    /// L/R with the lowest winding resistance.
    pub decay_time_constant_s: Option<f64>,
}

/// A worst-case figure.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct FigureReport {
    /// JSON key.
    pub key: &'static str,
    /// Value (six significant digits).
    pub value: Option<f64>,
    /// Table header, when tables show it.
    pub header: Option<&'static str>,
    /// Display scale.
    pub scale: f64,
}

/// One check's outcome.
#[derive(Clone, Debug, Serialize, PartialEq)]
pub struct CheckReport {
    /// Check id.
    pub id: CheckId,
    /// Status.
    pub status: Status,
    /// Figure checked.
    pub value: Option<f64>,
    /// The limit it is held to (the pass threshold).
    pub limit: Option<f64>,
    /// Unit of value and limit.
    pub unit: &'static str,
    /// One sentence: why.
    pub detail: String,
}

/// One check's remedy within the stage's composed remedy.
#[derive(Clone, Debug, Serialize, PartialEq)]
pub struct FixReport {
    /// The check it answers.
    pub check: CheckId,
    /// What to do.
    pub action: String,
    /// The board fields this remedy sets (empty: another part or circuit).
    pub apply: Map<String, Value>,
    /// Status of the check after the whole composed change (`null`: nothing to re-check).
    pub recheck: Option<Status>,
    /// Figures a replacement part needs.
    pub needs: Vec<PartNeed>,
}

/// A board field the remedy changes.
#[derive(Clone, Debug, Serialize, PartialEq)]
pub struct ChangeReport {
    /// The field.
    pub field: String,
    /// Before (`null`: absent).
    pub from: Option<Value>,
    /// After.
    pub to: Value,
}

/// A check and its status.
#[derive(Clone, Debug, Serialize, PartialEq)]
pub struct Short {
    /// The check.
    pub check: CheckId,
    /// Its status.
    pub status: Status,
}

/// A check that got worse.
#[derive(Clone, Debug, Serialize, PartialEq)]
pub struct Worsened {
    /// The check.
    pub check: CheckId,
    /// Before.
    pub from: Status,
    /// After.
    pub to: Status,
}

/// A part figure a check still needs.
#[derive(Clone, Debug, Serialize, PartialEq)]
pub struct NeedReport {
    /// For which check.
    pub check: CheckId,
    /// The figure.
    #[serde(flatten)]
    pub need: PartNeed,
    /// In words.
    pub text: String,
}

/// The stage's composed remedy.
#[derive(Clone, Debug, Serialize, PartialEq)]
pub struct RemedyReport {
    /// Every board field to set, as `pinlow fix` writes them.
    pub apply: Map<String, Value>,
    /// The same, with the values before.
    pub changes: Vec<ChangeReport>,
    /// The stage's verdict after the change (`null`: no board field can help).
    pub verdict_after: Option<Status>,
    /// Checks still not a pass after the change.
    pub still_short: Vec<Short>,
    /// Checks that got worse.
    pub worsened: Vec<Worsened>,
    /// What a part would need for the checks still short.
    pub needs: Vec<NeedReport>,
}

/// The yield of a stage, or why it has none.
#[derive(Clone, Debug, PartialEq)]
pub enum YieldReport {
    /// The Monte Carlo figures.
    Modelled(YieldResult),
    /// The stage has no yield model yet.
    NotModelled(NoYield),
}

/// Why a stage has no yield figures.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum NoYield {
    /// Its drive kind has no yield model (the drive kind).
    Drive(&'static str),
    /// Its load kind gives no current law (the load kind).
    Load(&'static str),
}

impl NoYield {
    /// What is missing, in words (`not modelled for nmos stages yet`).
    pub fn phrase(self) -> String {
        match self {
            NoYield::Drive(drive) => format!("not modelled for {drive} stages yet"),
            NoYield::Load(load) => format!("not modelled for {load} loads yet"),
        }
    }

    /// The reason of the JSON report (`the yield is not modelled for nmos stages yet`).
    pub fn reason(self) -> String {
        format!("the yield is {}", self.phrase())
    }
}

impl Serialize for YieldReport {
    fn serialize<S: Serializer>(&self, s: S) -> Result<S::Ok, S::Error> {
        match self {
            YieldReport::Modelled(y) => y.serialize(s),
            YieldReport::NotModelled(why) => {
                let mut m = s.serialize_map(Some(2))?;
                m.serialize_entry("modelled", &false)?;
                m.serialize_entry("reason", &why.reason())?;
                m.end()
            }
        }
    }
}

/// One stage's results.
#[derive(Clone, Debug, PartialEq)]
pub struct StageReport {
    /// Position in the board, from 1.
    pub index: usize,
    /// Name.
    pub name: String,
    /// Worst check.
    pub verdict: Status,
    /// `npn` or `nmos`.
    pub drive: &'static str,
    /// Part id.
    pub part: String,
    /// The load kind.
    pub load_kind: &'static str,
    /// JSON keys of the series resistor and its sized flag (`base_resistor_ohms`, ...).
    pub series_keys: (&'static str, &'static str),
    /// The series resistor's symbol (`RB`, `RG`).
    pub series_symbol: &'static str,
    /// Its value.
    pub series_ohms: f64,
    /// It was sized.
    pub series_sized: bool,
    /// JSON keys of the pull-down and its sized flag (`pull_down_ohms`, `pull_down_sized`).
    pub pull_down_keys: (&'static str, &'static str),
    /// The pull-down, if any.
    pub pull_down_ohms: Option<f64>,
    /// It was sized.
    pub pull_down_sized: bool,
    /// RL, for LED loads that have one.
    pub led_resistor_ohms: Option<f64>,
    /// RL was sized.
    pub led_resistor_sized: bool,
    /// The conditions the stage was judged under.
    pub conditions: ConditionsReport,
    /// Each resistor with its power and rating.
    pub resistors: Vec<ResistorReport>,
    /// What the clamp of an inductive load needs, and what is fitted.
    pub clamp: Option<ClampReport>,
    /// Worst-case figures, in report order.
    pub worst_case: Vec<FigureReport>,
    /// The figure that says how hard the switch is driven: (key, summary header).
    pub margin: (&'static str, &'static str),
    /// One entry per check.
    pub checks: Vec<CheckReport>,
    /// Defaults taken.
    pub assumptions: Vec<String>,
    /// Cautions that apply.
    pub cautions: Vec<String>,
    /// One entry per check that is not a pass.
    pub fixes: Vec<FixReport>,
    /// The composed remedy, when a check is not a pass.
    pub remedy: Option<RemedyReport>,
    /// The SVG drawn for this stage (`--plots DIR`), when one was.
    pub plot_svg: Option<String>,
    /// Why no picture was drawn, when one was asked for and none could be.
    pub plot_note: Option<String>,
    /// Monte Carlo yield (`--yield N`), when asked for.
    pub yield_mc: Option<YieldReport>,
    /// The picture's data, when one was asked for (not serialized).
    pub picture: Option<Picture>,
}

impl StageReport {
    /// A worst-case figure by key.
    pub fn figure(&self, key: &str) -> Option<f64> {
        self.worst_case
            .iter()
            .find(|f| f.key == key)
            .and_then(|f| f.value)
    }

    /// The worst check: the highest status, the first in report order among equals.
    pub fn worst_finding(&self) -> Option<&CheckReport> {
        self.checks
            .iter()
            .filter(|c| c.status != Status::Pass)
            .fold(None, |best: Option<&CheckReport>, c| match best {
                Some(b) if b.status >= c.status => Some(b),
                _ => Some(c),
            })
    }
}

struct Figures<'a>(&'a [FigureReport]);

impl Serialize for Figures<'_> {
    fn serialize<S: Serializer>(&self, s: S) -> Result<S::Ok, S::Error> {
        let mut m = s.serialize_map(Some(self.0.len()))?;
        for f in self.0 {
            m.serialize_entry(f.key, &f.value)?;
        }
        m.end()
    }
}

impl Serialize for StageReport {
    fn serialize<S: Serializer>(&self, s: S) -> Result<S::Ok, S::Error> {
        let mut m = s.serialize_map(None)?;
        m.serialize_entry("index", &self.index)?;
        m.serialize_entry("name", &self.name)?;
        m.serialize_entry("verdict", &self.verdict)?;
        m.serialize_entry("drive", self.drive)?;
        m.serialize_entry("part", &self.part)?;
        m.serialize_entry("load_kind", self.load_kind)?;
        m.serialize_entry(self.series_keys.0, &self.series_ohms)?;
        m.serialize_entry(self.series_keys.1, &self.series_sized)?;
        m.serialize_entry(self.pull_down_keys.0, &self.pull_down_ohms)?;
        m.serialize_entry(self.pull_down_keys.1, &self.pull_down_sized)?;
        m.serialize_entry("led_resistor_ohms", &self.led_resistor_ohms)?;
        m.serialize_entry("led_resistor_sized", &self.led_resistor_sized)?;
        m.serialize_entry("conditions", &self.conditions)?;
        m.serialize_entry("resistors", &self.resistors)?;
        m.serialize_entry("clamp", &self.clamp)?;
        m.serialize_entry("worst_case", &Figures(&self.worst_case))?;
        m.serialize_entry("checks", &self.checks)?;
        m.serialize_entry("assumptions", &self.assumptions)?;
        m.serialize_entry("cautions", &self.cautions)?;
        m.serialize_entry("fixes", &self.fixes)?;
        m.serialize_entry("remedy", &self.remedy)?;
        m.serialize_entry("plot_svg", &self.plot_svg)?;
        if let Some(note) = &self.plot_note {
            m.serialize_entry("plot_note", note)?;
        }
        if let Some(y) = &self.yield_mc {
            m.serialize_entry("yield", y)?;
        }
        m.end()
    }
}

/// Round to six significant digits so reports read cleanly; non-finite becomes `None`.
pub fn sig(x: f64) -> Option<f64> {
    if !x.is_finite() {
        return None;
    }
    if x == 0.0 {
        return Some(0.0);
    }
    let digits = 6 - 1 - x.abs().log10().floor() as i32;
    let scale = 10f64.powi(digits.clamp(-300, 300));
    let r = (x * scale).round() / scale;
    Some(if r.is_finite() { r } else { x })
}

/// A part need with its figures at six significant digits, as the report shows every figure.
pub fn rounded_need(n: &PartNeed) -> PartNeed {
    PartNeed {
        value: num(n.value),
        at: n.at.map(|(key, v)| (key, num(v))),
        ..n.clone()
    }
}

/// [`sig`], keeping a non-finite value as it is.
pub fn num(x: f64) -> f64 {
    sig(x).unwrap_or(x)
}
