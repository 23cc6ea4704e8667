//! The NPN drive (stage-model 1 to 6, 6b): a logic pin drives an NPN transistor (or a Darlington
//! pair) through RB, with an optional pull-down RBE, the emitter grounded.

pub mod checks;
pub mod corner;
pub mod ebers_moll;
pub mod part;
mod picture;
mod remedy;

use std::any::Any;
use std::sync::Arc;

use serde_json::Value;

use crate::check::CheckId;
use crate::conditions::{Conditions, PullDown};
use crate::drive::{Corner, DriveAnalysis, DriveKind, Figure, Ratings, ResistorRole, Switch};
use crate::load::OnVoltage;
use crate::parts::{PartInfo, PartSource};
use crate::picture::Picture;
use crate::quantity::{format_engineering as fe, Base, Current, Voltage};
use crate::remedy::Proposal;
use checks::{pinned_low, stays_off};
use corner::{pin_limited, pull_down_for, size_base, BaseSizing, NpnCorner, NpnWorst};
pub use part::{NpnPart, Structure};
pub use picture::class as picture_class;

/// The collector current within the part's rating (stage-model 5).
pub const COLLECTOR_CURRENT: CheckId = CheckId::new("collector-current", 40);
/// The collector voltage within VCEO (stage-model 5).
pub const COLLECTOR_VOLTAGE: CheckId = CheckId::new("collector-voltage", 50);

/// The registration of the NPN drive.
pub static KIND: DriveKind = DriveKind {
    name: "npn",
    about: "an NPN transistor or Darlington pair, driven through a base resistor",
    series: ResistorRole {
        symbol: "RB",
        role: "base",
        key: "base_resistor_ohms",
        sized_key: "base_resistor_sized",
        flag: "--base-resistor",
    },
    pull_down: ResistorRole {
        symbol: "RBE",
        role: "pull-down",
        key: "pull_down_ohms",
        sized_key: "pull_down_sized",
        flag: "--pull-down",
    },
    stage_keys: &["overdrive"],
    margin: ("overdrive_min", "Overdrive"),
    part_keys: part::KEYS,
    parse_part,
    part_schema: schemars::SchemaGenerator::subschema_for::<part::NpnRecord>,
};

fn parse_part(value: &Value, file: &str, source: PartSource) -> crate::Result<Arc<dyn Switch>> {
    Ok(Arc::new(NpnPart::from_value(value, file, source)?))
}

/// What the NPN drive found, kept for its remedies, picture and yield.
#[derive(Clone, Debug)]
pub struct NpnDetail {
    /// Every worst-case figure.
    pub worst: NpnWorst,
    /// The sizing of RB, when it was sized.
    pub sizing: Option<BaseSizing>,
    /// RB,pin for this stage (whether RB was sized or given).
    pub rb_pin: crate::quantity::Resistance,
    /// The minimum gain at the load current (25 C) a replacement needs for the overdrive at
    /// RB,pin.
    pub gain_needed: corner::GainNeed,
}

#[derive(Debug)]
struct NpnOn<'a> {
    part: &'a NpnPart,
}

impl OnVoltage for NpnOn<'_> {
    /// VCE(sat),max read at the current (stage-model 6.1: at the target current).
    fn at_25c(&self, current: Current) -> Voltage {
        self.part.vce_sat_max_at(current)
    }

    /// VCE(sat),max at IC,max (stage-model 5).
    fn at_corner(&self, current_max: Current) -> Voltage {
        self.part.vce_sat_max_at(current_max)
    }
}

impl Switch for NpnPart {
    fn info(&self) -> &PartInfo {
        &self.info
    }

    fn kind(&self) -> &'static DriveKind {
        &KIND
    }

    fn ratings(&self) -> Ratings {
        Ratings {
            current_check: COLLECTOR_CURRENT,
            current: self.ic_max,
            current_key: "ic_max_a",
            voltage_check: COLLECTOR_VOLTAGE,
            voltage: self.vceo,
            voltage_key: "vceo_max_v",
            voltage_name: "VCEO",
            terminal: "collector",
            tj_max: self.info.tj_max,
            r_th_ja: self.info.r_th_ja,
        }
    }

    fn show(&self) -> Vec<(String, String)> {
        let trim = |v: f64| crate::quantity::limits::show_number((v * 1e4).round() / 1e4);
        let assumed = |a: bool| if a { " (assumed)" } else { "" };
        let mut rows = vec![
            (
                "structure".to_string(),
                match self.structure {
                    Structure::Single => "single transistor".to_string(),
                    Structure::Darlington => "Darlington pair".to_string(),
                },
            ),
            ("VCEO".into(), fe(self.vceo.base(), "V")),
            ("IC max".into(), fe(self.ic_max.base(), "A")),
            (
                "Tj max".into(),
                format!("{} °C", trim(self.info.tj_max.base())),
            ),
            (
                "RthJA".into(),
                format!("{} K/W", trim(self.info.r_th_ja.base())),
            ),
            (
                "ICBO max (25 °C)".into(),
                format!(
                    "{}{}",
                    fe(self.icbo_max.base(), "A"),
                    assumed(self.icbo_assumed)
                ),
            ),
            (
                "gain temperature exponent".into(),
                format!(
                    "{}{}",
                    trim(self.gain_temp_exponent),
                    assumed(self.gain_temp_exponent_assumed)
                ),
            ),
        ];
        if let Some(r) = self.internal_base_emitter {
            rows.push(("internal base-emitter resistor".into(), fe(r.base(), "Ω")));
        }
        for (ic, hfe) in &self.gain_min {
            rows.push((
                "hFE min".into(),
                format!("{} at {}", trim(*hfe), fe(*ic, "A")),
            ));
        }
        for (ic, hfe) in self.gain_max.iter().flatten() {
            rows.push((
                "hFE max".into(),
                format!("{} at {}", trim(*hfe), fe(*ic, "A")),
            ));
        }
        for v in &self.vce_sat_max {
            rows.push((
                "VCE(sat) max".into(),
                format!(
                    "{} at IC {}, IB {}",
                    fe(v.v.base(), "V"),
                    fe(v.ic.base(), "A"),
                    fe(v.ib.base(), "A")
                ),
            ));
        }
        for v in &self.vbe_sat {
            rows.push((
                "VBE(sat)".into(),
                format!(
                    "{} .. {} at IC {}, IB {}",
                    fe(v.min.base(), "V"),
                    fe(v.max.base(), "V"),
                    fe(v.ic.base(), "A"),
                    fe(v.ib.base(), "A")
                ),
            ));
        }
        rows
    }

    fn summary(&self) -> String {
        let best = self
            .gain_min
            .iter()
            .max_by(|a, b| a.1.total_cmp(&b.1))
            .map(|(ic, hfe)| {
                format!(
                    "hFE >= {} at {}",
                    crate::quantity::limits::show_number(*hfe),
                    fe(*ic, "A")
                )
            })
            .unwrap_or_default();
        if self.is_darlington() {
            format!("{best} (Darlington pair)")
        } else {
            best
        }
    }

    fn to_json(&self) -> Value {
        serde_json::to_value(&self.record).unwrap_or(Value::Null)
    }

    fn assumptions(&self) -> Vec<String> {
        let mut out = Vec::new();
        if self.gain_temp_exponent_assumed {
            out.push(format!(
                "part {}: gain temperature exponent XTB {} assumed [text, memory]",
                self.info.id,
                crate::quantity::limits::show_number(self.gain_temp_exponent)
            ));
        }
        if self.icbo_assumed {
            out.push(format!(
                "part {}: ICBO 50 nA at 25 °C assumed [memory]",
                self.info.id
            ));
        }
        out
    }

    fn on_voltage<'a>(&'a self, _c: &'a Conditions) -> Box<dyn OnVoltage + 'a> {
        Box::new(NpnOn { part: self })
    }

    fn analyse(&self, c: &Conditions, load: &Corner) -> DriveAnalysis {
        let corner = NpnCorner::of(self, c, load.current_max);
        let (rb, sizing) = match c.inputs.series {
            Some(rb) => (rb, None),
            None => {
                let s = size_base(c, &corner);
                (s.rb, Some(s))
            }
        };
        let rbe = pull_down_for(c, rb);
        let w = NpnWorst::of(self, c, load, corner, rb, rbe);
        let rb_pin = sizing
            .map(|s| s.rb_pin)
            .unwrap_or_else(|| pin_limited(c, &corner));
        let gain_needed = self.gain_need(c, &corner, rb_pin);
        let findings = vec![
            pinned_low(self, c, &w, sizing.as_ref(), gain_needed),
            stays_off(self, c, &w),
        ];
        let v = |x: Voltage| Some(x.base());
        let figures = vec![
            Figure::new(
                "collector_current_max_a",
                Some(corner.ic_max.base()),
                Some("IC max [mA]"),
                1e3,
            ),
            Figure::new(
                "base_current_min_a",
                Some(w.base_current_min.base()),
                Some("IB min [mA]"),
                1e3,
            ),
            Figure::new("gain_min", Some(corner.gain_wc), Some("hFE min"), 1.0),
            Figure::new("overdrive_min", w.overdrive, Some("Overdrive"), 1.0),
            Figure::new("forced_beta_max", w.forced_beta, Some("Forced beta"), 1.0),
            Figure::new(
                "pin_current_max_a",
                Some(w.pin_current_max.base()),
                Some("Pin max [mA]"),
                1e3,
            ),
            Figure::new(
                "power_max_w",
                Some(w.power_max.base()),
                Some("P max [mW]"),
                1e3,
            ),
            Figure::new(
                "junction_max_c",
                Some(w.junction_max.base()),
                Some("Tj max [°C]"),
                1.0,
            ),
            Figure::new(
                "collector_peak_v",
                load.peak.map(|p| p.base()),
                Some("VC peak [V]"),
                1.0,
            ),
            Figure::new("supply_max_v", v(load.vcc_max), None, 1.0),
            Figure::new("supply_min_v", v(load.vcc_min), None, 1.0),
            Figure::new("vbe_sat_max_v", v(corner.vbe_max_cold), None, 1.0),
            Figure::new("vbe_sat_min_v", v(corner.vbe_min_hot), None, 1.0),
            Figure::new("vce_sat_max_v", v(corner.vce_sat_max), None, 1.0),
            Figure::new(
                "leakage_voltage_v",
                w.leakage_voltage.map(|x| x.base()),
                None,
                1.0,
            ),
            Figure::new("turn_on_edge_v", v(w.edge_hot), None, 1.0),
        ];
        DriveAnalysis {
            series: rb,
            series_sized: sizing.is_some(),
            pull_down: rbe,
            pull_down_sized: matches!(c.inputs.pull_down, PullDown::Sized) && rbe.is_some(),
            series_power: w.rb_power,
            pull_down_power: w.rbe_power,
            on_voltage_max: corner.vce_sat_max,
            pin_current_max: w.pin_current_max,
            power_max: Some(w.power_max),
            junction_max: Some(w.junction_max),
            findings,
            figures,
            detail: Arc::new(NpnDetail {
                worst: w,
                sizing,
                rb_pin,
                gain_needed,
            }),
        }
    }

    fn remedies(
        &self,
        c: &Conditions,
        corner: &Corner,
        a: &DriveAnalysis,
        findings: &[crate::check::Finding],
    ) -> Vec<Proposal> {
        remedy::remedies(self, c, corner, a, findings)
    }

    fn picture(
        &self,
        c: &Conditions,
        corner: &Corner,
        a: &DriveAnalysis,
        currents: &[(f64, f64)],
    ) -> Result<Picture, String> {
        picture::picture(self, c, corner, a, currents)
    }

    fn yield_terms(&self) -> Option<&dyn Any> {
        // The yield model reads the part's own figures (analysis::yield_mc::YieldStage).
        Some(self)
    }

    fn as_any(&self) -> &dyn Any {
        self
    }
}

/// The NPN detail of an analysis made by this drive.
pub fn detail(a: &DriveAnalysis) -> Option<&NpnDetail> {
    a.detail.downcast_ref::<NpnDetail>()
}
