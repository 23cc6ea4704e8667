//! Drive kinds: the switch a logic pin drives (an NPN, a logic-level N-channel MOSFET). Each kind
//! is one module behind the [`Switch`] trait, registered by one line in [`KINDS`]: its part record
//! and validation, its input resistors and their sizing, the worst-case input corner, the
//! on-state figure and its checks, the off-state check, its remedies, its yield model and its
//! picture. The drive-neutral checks (pin current, ratings, junction, clamp, resistors) are in
//! `analysis::common` and read what [`DriveAnalysis`] gives.
//!
//! To add a kind: write `src/drive/NAME/` (or one file) with a `pub static KIND: DriveKind` and
//! a part type that implements [`Switch`], add `pub mod NAME;` below and `&NAME::KIND` to
//! [`KINDS`].

pub mod nmos;
pub mod npn;

use std::any::Any;
use std::fmt;
use std::sync::Arc;

use serde_json::Value;

pub use crate::check::Figure;
use crate::check::{CheckId, Finding};
use crate::conditions::Conditions;
use crate::load::OnVoltage;
use crate::parts::PartInfo;
use crate::picture::Picture;
use crate::quantity::{Current, Power, Resistance, Temperature, ThermalResistance, Voltage};
use crate::remedy::Proposal;

/// The switch is pinned low (saturated, or fully on) at the worst corner (every drive kind).
pub const PINNED_LOW: CheckId = CheckId::new("pinned-low", 10);
/// The stage stays off while the pin floats or leaks (every drive kind).
pub const STAYS_OFF: CheckId = CheckId::new("stays-off", 30);

/// Every drive kind.
pub static KINDS: &[&DriveKind] = &[&npn::KIND, &nmos::KIND];

/// The kind whose part files say `"polarity": name`.
pub fn kind(name: &str) -> Option<&'static DriveKind> {
    KINDS.iter().copied().find(|k| k.name == name)
}

/// The names of every kind (`npn, nmos`).
pub fn kind_names() -> String {
    KINDS.iter().map(|k| k.name).collect::<Vec<_>>().join(", ")
}

/// How one of a drive's input resistors is named.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub struct ResistorRole {
    /// Symbol (`RB`).
    pub symbol: &'static str,
    /// Role in reports (`base`, `pull-down`).
    pub role: &'static str,
    /// Board key (`base_resistor_ohms`).
    pub key: &'static str,
    /// Report key that says it was sized (`base_resistor_sized`).
    pub sized_key: &'static str,
    /// Flag (`--base-resistor`).
    pub flag: &'static str,
}

/// The registration of a drive kind.
pub struct DriveKind {
    /// As written in part files (`"polarity": "npn"`) and reports (`"drive": "npn"`).
    pub name: &'static str,
    /// One line for help and `parts list`.
    pub about: &'static str,
    /// The series resistor from the pin (RB, RG).
    pub series: ResistorRole,
    /// The pull-down to ground (RBE, RGS).
    pub pull_down: ResistorRole,
    /// Stage keys only this kind takes (`overdrive` for npn), besides its series resistor.
    pub stage_keys: &'static [&'static str],
    /// The report figure that says how hard the switch is driven (`overdrive_min`), with its
    /// summary header (`Overdrive`).
    pub margin: (&'static str, &'static str),
    /// Keys of its part files (to name them when a part of another kind gives one).
    pub part_keys: &'static [&'static str],
    /// Read and validate a part file of this kind (`value` is the whole file, `file` names it).
    pub parse_part: fn(&Value, &str, crate::parts::PartSource) -> crate::Result<Arc<dyn Switch>>,
    /// The JSON Schema of its part files (its record's, `pinlow schema part`).
    pub part_schema: fn(&mut schemars::SchemaGenerator) -> schemars::Schema,
}

impl fmt::Debug for DriveKind {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        write!(f, "DriveKind({})", self.name)
    }
}

/// The load corner a drive is evaluated against (stage-model 4), computed by the engine from
/// the load before the drive is asked.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Corner {
    /// Highest supply.
    pub vcc_max: Voltage,
    /// Lowest supply.
    pub vcc_min: Voltage,
    /// IC,max (ID,max): the largest current the load can draw.
    pub current_max: Current,
    /// The most of VCC,max x IC,max a switch in its linear region dissipates with this load.
    pub linear_fraction: f64,
    /// The switch's peak voltage at turn-off; `None`: unbounded (inductive, no clamp).
    pub peak: Option<Voltage>,
    /// True when the load kicks back at turn-off.
    pub inductive: bool,
}

/// The ratings the drive-neutral checks hold a switch to.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Ratings {
    /// Id of the current-rating check (`collector-current`).
    pub current_check: CheckId,
    /// Rated continuous current.
    pub current: Current,
    /// Its key in part files (`ic_max_a`).
    pub current_key: &'static str,
    /// Id of the voltage-rating check (`collector-voltage`).
    pub voltage_check: CheckId,
    /// Voltage rating (VCEO, VDS max).
    pub voltage: Voltage,
    /// Its key in part files (`vceo_max_v`).
    pub voltage_key: &'static str,
    /// Name of the voltage rating (`VCEO`).
    pub voltage_name: &'static str,
    /// Name of the switched terminal (`collector`, `drain`).
    pub terminal: &'static str,
    /// Maximum junction temperature.
    pub tj_max: Temperature,
    /// Junction-to-ambient thermal resistance (JEDEC JESD51).
    pub r_th_ja: ThermalResistance,
}

/// What a drive finds for one stage: its input resistors (given or sized), the figures the
/// drive-neutral checks read, its own checks, and the figures of the report.
#[derive(Clone, Debug)]
pub struct DriveAnalysis {
    /// The series resistor in use (RB, RG).
    pub series: Resistance,
    /// It was sized.
    pub series_sized: bool,
    /// The pull-down in use (RBE, RGS).
    pub pull_down: Option<Resistance>,
    /// It was sized.
    pub pull_down_sized: bool,
    /// Worst power in the series resistor.
    pub series_power: Power,
    /// Worst power in the pull-down.
    pub pull_down_power: Option<Power>,
    /// The on-voltage the load checks take (VCE(sat),max at IC,max; Von,max).
    pub on_voltage_max: Voltage,
    /// Largest current the pin sources.
    pub pin_current_max: Current,
    /// Largest dissipation in the switch; `None` where the model gives none (thermal runaway).
    pub power_max: Option<Power>,
    /// Highest junction temperature; `None` under thermal runaway.
    pub junction_max: Option<Temperature>,
    /// The drive's own checks (pinned-low, stays-off, gate-voltage ...).
    pub findings: Vec<Finding>,
    /// The worst-case figures of the report, in report order.
    pub figures: Vec<Figure>,
    /// The drive's own intermediate figures, for its remedies, picture and yield.
    pub detail: Arc<dyn Any + Send + Sync>,
}

/// A part of one drive kind: its figures and the drive's physics.
pub trait Switch: Send + Sync + fmt::Debug {
    /// Id, description, package, provenance and source.
    fn info(&self) -> &PartInfo;

    /// The registration of its kind.
    fn kind(&self) -> &'static DriveKind;

    /// The ratings the drive-neutral checks hold it to.
    fn ratings(&self) -> Ratings;

    /// Every figure of the part for `parts show`: (figure, value in words).
    fn show(&self) -> Vec<(String, String)>;

    /// A few key figures for `parts list` (`VCEO 40 V, IC 200 mA, hFE >= 100 at 10 mA`).
    fn summary(&self) -> String;

    /// The part file as JSON (for `parts list --format json`).
    fn to_json(&self) -> Value;

    /// Defaults the part file left out, in words (listed as assumptions of its stages).
    fn assumptions(&self) -> Vec<String>;

    /// The on-voltage the load's sizing and checks take, for this stage's input resistors.
    fn on_voltage<'a>(&'a self, c: &'a Conditions) -> Box<dyn OnVoltage + 'a>;

    /// Size the input resistors the stage leaves open and evaluate the on and off states.
    fn analyse(&self, c: &Conditions, corner: &Corner) -> DriveAnalysis;

    /// Remedies for this drive's own checks that are not a pass (`findings` of the whole stage).
    fn remedies(
        &self,
        c: &Conditions,
        corner: &Corner,
        a: &DriveAnalysis,
        findings: &[Finding],
    ) -> Vec<Proposal>;

    /// The picture of the on state; `Err` says why there is none. `currents` gives the load's
    /// IC,max with the cold corner at each ambient of a sweep (ambient C, A).
    fn picture(
        &self,
        c: &Conditions,
        corner: &Corner,
        a: &DriveAnalysis,
        currents: &[(f64, f64)],
    ) -> Result<Picture, String>;

    /// What the yield model of this kind reads (the part record it draws builds from): `None`
    /// when its yield is not modelled.
    fn yield_terms(&self) -> Option<&dyn Any> {
        None
    }

    /// The part as `Any`, for code of its own kind.
    fn as_any(&self) -> &dyn Any;
}

/// A shared part.
pub type SharedSwitch = Arc<dyn Switch>;
