//! A logic-level N-channel MOSFET part file (files.md v2): its record, validation, and the
//! typed part (stage-model 8).

use schemars::JsonSchema;
use serde::{Deserialize, Serialize};
use serde_json::Value;

use crate::error::{from_value, Error, Result};
use crate::fields::Accepts;
use crate::parts::{PartCheck, PartInfo, PartSource, TJ_MAX_RANGE_C};
use crate::quantity::limits::{show_number, AMPS, KELVIN_PER_WATT, LEAKAGE_AMPS, OHMS, VOLTS};
use crate::quantity::{
    amps, celsius, kelvin_per_watt, ohms, volts, Base, Current, Resistance, Voltage,
};

/// RDS(on) temperature coefficient when a part gives none, per K [memory: RDS(on) typically
/// grows 1.5 to 2 times from 25 to 150 C].
pub const DEFAULT_RDS_ON_TEMPCO_PER_K: f64 = 0.006;
/// VGS(th) temperature coefficient when a part gives none, V/K [memory: typically -3 to -7 mV/K].
pub const DEFAULT_VGS_TH_TEMPCO_V_PER_K: f64 = -0.005;
/// Gate leakage IGSS at 25 C when a part gives none, A [memory].
pub const DEFAULT_IGSS_A: f64 = 100e-9;

/// RDS(on) temperature coefficients accepted, per K [practice: 0.006 is typical].
pub const RDS_ON_TEMPCO_RANGE: (f64, f64) = (0.0, 0.02);
/// VGS(th) temperature coefficients accepted, V/K [practice: -0.005 is typical].
pub const VGS_TH_TEMPCO_RANGE: (f64, f64) = (-0.02, 0.0);

/// The keys of an nmos part file.
pub const KEYS: &[&str] = &[
    "id",
    "description",
    "polarity",
    "package",
    "provenance",
    "vds_max_v",
    "id_max_a",
    "vgs_max_v",
    "vgs_th",
    "rds_on_max",
    "rds_on_tempco_per_k",
    "vgs_th_tempco_v_per_k",
    "igss_max_a",
    "tj_max_c",
    "r_th_ja_k_per_w",
];

/// One nmos part file as written on disk. Its JSON Schema (`pinlow schema part`) is derived
/// from it: the doc comments below are the descriptions an editor shows.
#[derive(Clone, Debug, Deserialize, Serialize, JsonSchema)]
#[serde(deny_unknown_fields)]
#[schemars(
    title = "nmos part",
    description = "A logic-level N-channel MOSFET (`\"polarity\": \"nmos\"`)."
)]
pub struct NmosRecord {
    /// Unique id used by boards and flags (matched without regard to case).
    #[schemars(length(min = 1))]
    pub id: String,
    /// One line for people.
    #[serde(default)]
    pub description: String,
    /// The drive kind: a logic-level N-channel MOSFET.
    #[schemars(extend("const" = super::KIND.name))]
    pub polarity: String,
    /// Package name (`SOT-23`).
    #[schemars(length(min = 1))]
    pub package: String,
    /// Where the figures come from (a datasheet and its revision, a measurement, invented demo data).
    #[schemars(length(min = 1))]
    pub provenance: String,
    /// Drain-source voltage rating, V.
    #[schemars(transform = crate::schema::accepts(Accepts::Span(VOLTS)))]
    pub vds_max_v: f64,
    /// Continuous drain current rating, A.
    #[schemars(transform = crate::schema::accepts(Accepts::Span(AMPS)))]
    pub id_max_a: f64,
    /// Gate-source voltage rating, V, above the threshold's maximum.
    #[schemars(transform = crate::schema::accepts(Accepts::Span(VOLTS)))]
    pub vgs_max_v: f64,
    /// Gate threshold limits at 25 °C.
    pub vgs_th: ThresholdRecord,
    /// RDS(on) maximum at gate voltages, at 25 °C, sorted by gate voltage.
    #[schemars(length(min = 1))]
    pub rds_on_max: Vec<RdsOnRecord>,
    /// RDS(on) temperature coefficient, per K [default: 0.006].
    #[serde(default, skip_serializing_if = "Option::is_none")]
    #[schemars(transform = crate::schema::between(RDS_ON_TEMPCO_RANGE.0, RDS_ON_TEMPCO_RANGE.1))]
    pub rds_on_tempco_per_k: Option<f64>,
    /// VGS(th) temperature coefficient, V/K [default: -0.005].
    #[serde(default, skip_serializing_if = "Option::is_none")]
    #[schemars(transform = crate::schema::between(VGS_TH_TEMPCO_RANGE.0, VGS_TH_TEMPCO_RANGE.1))]
    pub vgs_th_tempco_v_per_k: Option<f64>,
    /// Gate leakage (IGSS) at 25 °C, A [default: 100 nA].
    #[serde(default, skip_serializing_if = "Option::is_none")]
    #[schemars(transform = crate::schema::accepts(Accepts::Span(LEAKAGE_AMPS)))]
    pub igss_max_a: Option<f64>,
    /// Maximum junction temperature, °C.
    #[schemars(transform = crate::schema::strictly_between(TJ_MAX_RANGE_C.0, TJ_MAX_RANGE_C.1))]
    pub tj_max_c: f64,
    /// Junction-to-ambient thermal resistance (JEDEC JESD51), K/W.
    #[schemars(transform = crate::schema::accepts(Accepts::Span(KELVIN_PER_WATT)))]
    pub r_th_ja_k_per_w: f64,
}

/// The gate threshold limits.
#[derive(Clone, Debug, Deserialize, Serialize, JsonSchema)]
#[serde(deny_unknown_fields)]
pub struct ThresholdRecord {
    /// Minimum VGS(th), V, at most the maximum.
    #[schemars(transform = crate::schema::accepts(Accepts::Span(VOLTS)))]
    pub min_v: f64,
    /// Maximum VGS(th), V, below the gate rating.
    #[schemars(transform = crate::schema::accepts(Accepts::Span(VOLTS)))]
    pub max_v: f64,
}

/// An RDS(on) point.
#[derive(Clone, Debug, Deserialize, Serialize, JsonSchema)]
#[serde(deny_unknown_fields)]
pub struct RdsOnRecord {
    /// Gate-source voltage of the point, V, above the threshold's minimum and at most the gate rating.
    #[schemars(transform = crate::schema::accepts(Accepts::Span(VOLTS)))]
    pub vgs_v: f64,
    /// Maximum RDS(on) there, ohms, not above that of a lower gate voltage.
    #[schemars(transform = crate::schema::accepts(Accepts::Span(OHMS)))]
    pub ohms: f64,
    /// The datasheet's test current, A, when stated.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    #[schemars(transform = crate::schema::accepts(Accepts::Span(AMPS)))]
    pub id_a: Option<f64>,
}

/// An RDS(on) maximum at a gate voltage, 25 C.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct RdsOnPoint {
    /// Gate-source voltage.
    pub vgs: Voltage,
    /// Maximum RDS(on).
    pub ohms: Resistance,
    /// Test current, when stated.
    pub id: Option<Current>,
}

/// A validated logic-level N-channel MOSFET.
#[derive(Clone, Debug)]
pub struct NmosPart {
    /// Id, description, package, provenance, source, Tj,max, RthJA.
    pub info: PartInfo,
    /// VDS rating.
    pub vds_max: Voltage,
    /// ID rating.
    pub id_max: Current,
    /// VGS rating.
    pub vgs_max: Voltage,
    /// VGS(th) minimum at 25 C.
    pub vgs_th_min: Voltage,
    /// VGS(th) maximum at 25 C.
    pub vgs_th_max: Voltage,
    /// RDS(on) points at 25 C, sorted by gate voltage (non-empty).
    pub rds_on: Vec<RdsOnPoint>,
    /// RDS(on) temperature coefficient a, per K.
    pub rds_tempco: f64,
    /// True when assumed.
    pub rds_tempco_assumed: bool,
    /// VGS(th) temperature coefficient c_th, V/K.
    pub th_tempco: f64,
    /// True when assumed.
    pub th_tempco_assumed: bool,
    /// Gate leakage IGSS (taken as not rising with temperature).
    pub igss: Current,
    /// True when assumed.
    pub igss_assumed: bool,
    /// The record as read.
    pub record: NmosRecord,
}

impl NmosPart {
    /// Read and validate an nmos part file's value.
    pub fn from_value(value: &Value, file: &str, source: PartSource) -> Result<NmosPart> {
        crate::shape::objects_in(value, "rds_on_max", file, "", "an RDS(on) point")?;
        if let Some(th) = value.get("vgs_th") {
            crate::shape::object(th, file, "vgs_th", "the gate threshold")?;
        }
        let rec: NmosRecord = from_value(file, "", value)?;
        let c = PartCheck { file };
        c.text("id", &rec.id)?;
        c.no_controls("description", &rec.description)?;
        c.text("package", &rec.package)?;
        c.text("provenance", &rec.provenance)?;
        let vds = c.within("vds_max_v", rec.vds_max_v, VOLTS)?;
        let id_max = c.within("id_max_a", rec.id_max_a, AMPS)?;
        let vgs_max = c.within("vgs_max_v", rec.vgs_max_v, VOLTS)?;
        let th_min = c.within("vgs_th.min_v", rec.vgs_th.min_v, VOLTS)?;
        let th_max = c.within("vgs_th.max_v", rec.vgs_th.max_v, VOLTS)?;
        if th_min > th_max {
            return Err(Error::invalid(
                c.at("vgs_th.min_v"),
                format!(
                    "the minimum threshold {} V is above the maximum {} V",
                    show_number(th_min),
                    show_number(th_max)
                ),
            ));
        }
        if th_max >= vgs_max {
            return Err(Error::invalid(
                c.at("vgs_th.max_v"),
                format!(
                    "a threshold of {} V at or above the {} V gate rating cannot be right",
                    show_number(th_max),
                    show_number(vgs_max)
                ),
            ));
        }
        let tj_max = c.tj_max(rec.tj_max_c)?;
        let rth = c.within("r_th_ja_k_per_w", rec.r_th_ja_k_per_w, KELVIN_PER_WATT)?;
        if rec.rds_on_max.is_empty() {
            return Err(Error::invalid(
                c.at("rds_on_max"),
                "needs at least one point",
            ));
        }
        c.sorted(
            "rds_on_max",
            "vgs_v",
            rec.rds_on_max.iter().map(|p| p.vgs_v),
        )?;
        let mut rds_on: Vec<RdsOnPoint> = Vec::new();
        for (i, p) in rec.rds_on_max.iter().enumerate() {
            let path = |k: &str| format!("rds_on_max[{i}].{k}");
            let vgs = c.within(&path("vgs_v"), p.vgs_v, VOLTS)?;
            let r = c.within(&path("ohms"), p.ohms, OHMS)?;
            if vgs <= th_min || vgs > vgs_max {
                return Err(Error::invalid(
                    c.at(&path("vgs_v")),
                    format!(
                        "an RDS(on) point at {} V must lie above the minimum threshold {} V and at most the {} V gate rating",
                        show_number(vgs),
                        show_number(th_min),
                        show_number(vgs_max)
                    ),
                ));
            }
            let id = match p.id_a {
                Some(v) => Some(amps(c.within(&path("id_a"), v, AMPS)?)),
                None => None,
            };
            if let Some(prev) = rds_on.last().map(|q| q.ohms.base()) {
                if r > prev {
                    return Err(Error::invalid(
                        c.at(&path("ohms")),
                        format!(
                            "RDS(on) {} Ω at {} V is above the {} Ω of a lower gate voltage; it falls as the gate voltage rises",
                            show_number(r),
                            show_number(vgs),
                            show_number(prev)
                        ),
                    ));
                }
            }
            rds_on.push(RdsOnPoint {
                vgs: volts(vgs),
                ohms: ohms(r),
                id,
            });
        }
        let a = match rec.rds_on_tempco_per_k {
            Some(v)
                if v.is_finite()
                    && (RDS_ON_TEMPCO_RANGE.0..=RDS_ON_TEMPCO_RANGE.1).contains(&v) =>
            {
                v
            }
            Some(v) => {
                return Err(Error::range(
                    c.at("rds_on_tempco_per_k"),
                    show_number(v),
                    "a coefficient from 0 to 0.02 per K is needed (0.006 is typical)",
                ))
            }
            None => DEFAULT_RDS_ON_TEMPCO_PER_K,
        };
        let cth = match rec.vgs_th_tempco_v_per_k {
            Some(v)
                if v.is_finite()
                    && (VGS_TH_TEMPCO_RANGE.0..=VGS_TH_TEMPCO_RANGE.1).contains(&v) =>
            {
                v
            }
            Some(v) => {
                return Err(Error::range(
                    c.at("vgs_th_tempco_v_per_k"),
                    show_number(v),
                    "a coefficient from -0.02 to 0 V/K is needed (-0.005 is typical)",
                ))
            }
            None => DEFAULT_VGS_TH_TEMPCO_V_PER_K,
        };
        let igss = match rec.igss_max_a {
            Some(v) => c.within("igss_max_a", v, LEAKAGE_AMPS)?,
            None => DEFAULT_IGSS_A,
        };
        Ok(NmosPart {
            info: PartInfo {
                id: rec.id.clone(),
                description: rec.description.clone(),
                polarity: "nmos",
                package: rec.package.clone(),
                provenance: rec.provenance.clone(),
                tj_max: celsius(tj_max),
                r_th_ja: kelvin_per_watt(rth),
                source,
            },
            vds_max: volts(vds),
            id_max: amps(id_max),
            vgs_max: volts(vgs_max),
            vgs_th_min: volts(th_min),
            vgs_th_max: volts(th_max),
            rds_on,
            rds_tempco: a,
            rds_tempco_assumed: rec.rds_on_tempco_per_k.is_none(),
            th_tempco: cth,
            th_tempco_assumed: rec.vgs_th_tempco_v_per_k.is_none(),
            igss: amps(igss),
            igss_assumed: rec.igss_max_a.is_none(),
            record: rec,
        })
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    const GOOD: &str = r#"{"id": "m", "polarity": "nmos", "package": "SOT-23", "provenance": "test",
        "vds_max_v": 20, "id_max_a": 3, "vgs_max_v": 12, "vgs_th": {"min_v": 0.6, "max_v": 1.4},
        "rds_on_max": [{"vgs_v": 1.8, "ohms": 0.12}, {"vgs_v": 2.5, "ohms": 0.07}, {"vgs_v": 4.5, "ohms": 0.05}],
        "tj_max_c": 150, "r_th_ja_k_per_w": 250}"#;

    fn read(text: &str) -> Result<NmosPart> {
        let v: Value = serde_json::from_str(text).expect("json");
        NmosPart::from_value(&v, "m.json", PartSource::File("m.json".into()))
    }

    #[test]
    fn the_files_md_example_reads_with_the_spec_defaults() {
        let p = read(GOOD).expect("valid");
        assert_eq!(p.rds_tempco, 0.006);
        assert_eq!(p.th_tempco, -0.005);
        assert!(p.igss_assumed && p.rds_on.len() == 3);
    }

    #[test]
    fn impossible_mosfets_are_refused() {
        for (from, to, needle) in [
            (r#""ohms": 0.05"#, r#""ohms": 0.5"#, "rds_on_max[2].ohms"),
            (r#""min_v": 0.6"#, r#""min_v": 2.0"#, "vgs_th.min_v"),
            (r#""vgs_v": 1.8"#, r#""vgs_v": 0.5"#, "rds_on_max[0].vgs_v"),
            (r#""vgs_v": 2.5"#, r#""vgs_v": 1.7"#, "rds_on_max[1].vgs_v"),
        ] {
            let err = read(&GOOD.replace(from, to)).expect_err(needle).to_string();
            assert!(err.contains(needle), "{needle}: {err}");
        }
    }
}
