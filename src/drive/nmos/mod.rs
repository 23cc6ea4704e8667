//! The nmos drive (stage-model 8): a logic pin drives a logic-level N-channel MOSFET through RG,
//! with an optional gate pull-down RGS, the source grounded.

pub mod checks;
pub mod corner;
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
use corner::{pull_down_for, size_gate, NmosWorst};
pub use part::NmosPart;

/// The drain current within the part's rating (stage-model 8).
pub const DRAIN_CURRENT: CheckId = CheckId::new("drain-current", 40);
/// The drain voltage within VDS max (stage-model 8).
pub const DRAIN_VOLTAGE: CheckId = CheckId::new("drain-voltage", 50);
/// The pin's high level within the gate rating (stage-model 8).
pub const GATE_VOLTAGE: CheckId = CheckId::new("gate-voltage", 55);

/// The registration of the nmos drive.
pub static KIND: DriveKind = DriveKind {
    name: "nmos",
    about: "a logic-level N-channel MOSFET, driven through a gate resistor",
    series: ResistorRole {
        symbol: "RG",
        role: "gate",
        key: "gate_resistor_ohms",
        sized_key: "gate_resistor_sized",
        flag: "--gate-resistor",
    },
    pull_down: ResistorRole {
        symbol: "RGS",
        role: "pull-down",
        key: "pull_down_ohms",
        sized_key: "pull_down_sized",
        flag: "--pull-down",
    },
    stage_keys: &[],
    margin: ("gate_voltage_min_v", "VGS min [V]"),
    part_keys: part::KEYS,
    parse_part,
    part_schema: schemars::SchemaGenerator::subschema_for::<part::NmosRecord>,
};

fn parse_part(value: &Value, file: &str, source: PartSource) -> crate::Result<Arc<dyn Switch>> {
    Ok(Arc::new(NmosPart::from_value(value, file, source)?))
}

/// What the nmos drive found, kept for its remedies and picture.
#[derive(Clone, Debug)]
pub struct NmosDetail {
    /// Every worst-case figure.
    pub worst: NmosWorst,
}

#[derive(Debug)]
struct NmosOn<'a> {
    part: &'a NmosPart,
    c: &'a Conditions,
}

impl NmosOn<'_> {
    fn resistors(
        &self,
    ) -> (
        crate::quantity::Resistance,
        Option<crate::quantity::Resistance>,
    ) {
        let rg = self.c.inputs.series.unwrap_or_else(|| size_gate(self.c));
        (rg, pull_down_for(self.c, rg))
    }
}

impl OnVoltage for NmosOn<'_> {
    /// Target x RDS(on) at 25 C at the drive (stage-model 6.1 for nmos).
    fn at_25c(&self, current: Current) -> Voltage {
        let (rg, rgs) = self.resistors();
        let vgs = self.part.gate_voltage_min(self.c, rg, rgs);
        let (point, _) = self.part.point_for(self.part.gate_voltage_eff(self.c, vgs));
        current * point.ohms
    }

    /// Von,max at ID,max (the runaway fallback at Tj,max when the junction does not settle).
    fn at_corner(&self, current_max: Current) -> Voltage {
        let (rg, rgs) = self.resistors();
        self.part.on_voltage_for_loads(self.c, rg, rgs, current_max)
    }
}

impl Switch for NmosPart {
    fn info(&self) -> &PartInfo {
        &self.info
    }

    fn kind(&self) -> &'static DriveKind {
        &KIND
    }

    fn ratings(&self) -> Ratings {
        Ratings {
            current_check: DRAIN_CURRENT,
            current: self.id_max,
            current_key: "id_max_a",
            voltage_check: DRAIN_VOLTAGE,
            voltage: self.vds_max,
            voltage_key: "vds_max_v",
            voltage_name: "VDS max",
            terminal: "drain",
            tj_max: self.info.tj_max,
            r_th_ja: self.info.r_th_ja,
        }
    }

    fn show(&self) -> Vec<(String, String)> {
        let n = crate::quantity::limits::show_number;
        let assumed = |a: bool| if a { " (assumed)" } else { "" };
        let mut rows = vec![
            ("VDS max".to_string(), fe(self.vds_max.base(), "V")),
            ("ID max".into(), fe(self.id_max.base(), "A")),
            ("VGS max".into(), fe(self.vgs_max.base(), "V")),
            (
                "VGS(th) (25 °C)".into(),
                format!(
                    "{} .. {}",
                    fe(self.vgs_th_min.base(), "V"),
                    fe(self.vgs_th_max.base(), "V")
                ),
            ),
            (
                "Tj max".into(),
                format!("{} °C", n(self.info.tj_max.base())),
            ),
            (
                "RthJA".into(),
                format!("{} K/W", n(self.info.r_th_ja.base())),
            ),
            (
                "RDS(on) temperature coefficient".into(),
                format!(
                    "{} per K{}",
                    n(self.rds_tempco),
                    assumed(self.rds_tempco_assumed)
                ),
            ),
            (
                "VGS(th) temperature coefficient".into(),
                format!(
                    "{} mV/K{}",
                    n(self.th_tempco * 1e3),
                    assumed(self.th_tempco_assumed)
                ),
            ),
            (
                "IGSS max".into(),
                format!(
                    "{}{}",
                    fe(self.igss.base(), "A"),
                    assumed(self.igss_assumed)
                ),
            ),
        ];
        for p in &self.rds_on {
            rows.push((
                "RDS(on) max (25 °C)".into(),
                format!(
                    "{} at VGS {}{}",
                    fe(p.ohms.base(), "Ω"),
                    fe(p.vgs.base(), "V"),
                    p.id.map(|i| format!(", ID {}", fe(i.base(), "A")))
                        .unwrap_or_default()
                ),
            ));
        }
        rows
    }

    fn summary(&self) -> String {
        match self.rds_on.first() {
            Some(p) => format!(
                "RDS(on) <= {} at VGS {}, VGS(th) <= {}",
                fe(p.ohms.base(), "Ω"),
                fe(p.vgs.base(), "V"),
                fe(self.vgs_th_max.base(), "V")
            ),
            None => String::new(),
        }
    }

    fn to_json(&self) -> Value {
        serde_json::to_value(&self.record).unwrap_or(Value::Null)
    }

    fn assumptions(&self) -> Vec<String> {
        let id = &self.info.id;
        let mut out = Vec::new();
        if self.rds_tempco_assumed {
            out.push(format!(
                "part {id}: RDS(on) temperature coefficient 0.006 per K assumed [memory]"
            ));
        }
        if self.th_tempco_assumed {
            out.push(format!(
                "part {id}: gate threshold temperature coefficient -5 mV/K assumed [memory]"
            ));
        }
        if self.igss_assumed {
            out.push(format!(
                "part {id}: gate leakage IGSS 100 nA assumed [memory]"
            ));
        }
        out
    }

    fn on_voltage<'a>(&'a self, c: &'a Conditions) -> Box<dyn OnVoltage + 'a> {
        Box::new(NmosOn { part: self, c })
    }

    fn analyse(&self, c: &Conditions, load: &Corner) -> DriveAnalysis {
        let (rg, sized) = match c.inputs.series {
            Some(r) => (r, false),
            None => (size_gate(c), true),
        };
        let rgs = pull_down_for(c, rg);
        let w = NmosWorst::of(self, c, load, rg, rgs);
        let findings = vec![
            checks::pinned_low(&w),
            checks::stays_off(c, &w),
            checks::gate_voltage(self, c),
        ];
        let v = |x: Voltage| Some(x.base());
        let figures = vec![
            Figure::new(
                "drain_current_max_a",
                Some(w.id_max.base()),
                Some("ID max [mA]"),
                1e3,
            ),
            Figure::new("gate_voltage_min_v", v(w.vgs_min), Some("VGS min [V]"), 1.0),
            Figure::new(
                "rds_on_max_ohms",
                w.rds_max.map(|r| r.base()),
                Some("RDS(on) max [mΩ]"),
                1e3,
            ),
            Figure::new(
                "on_voltage_max_v",
                w.von_max.map(|x| x.base()),
                Some("Von max [mV]"),
                1e3,
            ),
            Figure::new(
                "pin_current_max_a",
                Some(w.pin_current_max.base()),
                Some("Pin max [mA]"),
                1e3,
            ),
            Figure::new(
                "power_max_w",
                w.power_max.map(|p| p.base()),
                Some("P max [mW]"),
                1e3,
            ),
            Figure::new(
                "junction_max_c",
                w.junction_max.map(|t| t.base()),
                Some("Tj max [°C]"),
                1.0,
            ),
            Figure::new(
                "drain_peak_v",
                load.peak.map(|p| p.base()),
                Some("VD peak [V]"),
                1.0,
            ),
            Figure::new("supply_max_v", v(load.vcc_max), None, 1.0),
            Figure::new("supply_min_v", v(load.vcc_min), None, 1.0),
            Figure::new("gate_voltage_eff_v", v(w.vgs_eff), None, 1.0),
            Figure::new("vgs_th_max_cold_v", v(w.th_max_cold), None, 1.0),
            Figure::new("vgs_th_min_hot_v", v(w.th_min_hot), None, 1.0),
            Figure::new("rds_on_25c_ohms", Some(w.point.ohms.base()), None, 1.0),
            Figure::new(
                "leakage_voltage_v",
                w.leakage_voltage.map(|x| x.base()),
                None,
                1.0,
            ),
        ];
        DriveAnalysis {
            series: rg,
            series_sized: sized,
            pull_down: rgs,
            pull_down_sized: matches!(c.inputs.pull_down, PullDown::Sized) && rgs.is_some(),
            series_power: w.rg_power,
            pull_down_power: w.rgs_power,
            on_voltage_max: w.von_for_loads,
            pin_current_max: w.pin_current_max,
            power_max: w.power_max,
            junction_max: w.junction_max,
            findings,
            figures,
            detail: Arc::new(NmosDetail { worst: w }),
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
        _currents: &[(f64, f64)],
    ) -> Result<Picture, String> {
        picture::picture(self, c, corner, a)
    }

    fn as_any(&self) -> &dyn Any {
        self
    }
}

/// The nmos detail of an analysis made by this drive.
pub fn detail(a: &DriveAnalysis) -> Option<&NmosDetail> {
    a.detail.downcast_ref::<NmosDetail>()
}
