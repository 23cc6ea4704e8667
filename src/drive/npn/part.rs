//! An NPN part file (files.md): its on-disk record, its validation, and the typed part with the
//! look-ups the engine needs at 25 C (stage-model 3 and 5). Darlington pairs (6b) are NPN parts
//! with `"structure": "darlington"`.

use schemars::JsonSchema;
use serde::{Deserialize, Serialize};
use serde_json::Value;

use crate::error::{from_value, Error, Result};
use crate::fields::Accepts;
use crate::parts::points::{gain, held, resistive};
use crate::parts::{PartCheck, PartInfo, PartSource, TJ_MAX_RANGE_C};
use crate::quantity::limits::{
    show_number, AMPS, GAIN, KELVIN_PER_WATT, LEAKAGE_AMPS, OHMS, SECONDS, VOLTS,
};
use crate::quantity::{
    amps, celsius, kelvin_per_watt, ohms, seconds, volts, Base, Current, Resistance, Time, Voltage,
};

/// Gummel-Poon beta temperature exponent XTB when a part gives none: 1.5
/// [text: Gummel-Poon XTB; typical silicon value from memory] (stage-model 3).
pub const DEFAULT_GAIN_TEMP_EXPONENT: f64 = 1.5;
/// XTB of a Darlington pair when it gives none: 3.0 [text: the product of two gains; memory]
/// (stage-model 6b).
pub const DEFAULT_DARLINGTON_GAIN_TEMP_EXPONENT: f64 = 3.0;
/// ICBO at 25 C when a part gives none: 50 nA [memory] (stage-model 3).
pub const DEFAULT_ICBO_A: f64 = 50e-9;
/// No silicon transistor or Darlington pair saturates above this VCE, V [practice: a Darlington
/// pair's VCE(sat) is a few volts at most; a figure beyond this is a typing error].
pub const VCE_SAT_SANE_MAX_V: f64 = 6.0;
/// No silicon base-emitter path (even of a Darlington pair) needs more than this, V [practice].
pub const VBE_SAT_SANE_MAX_V: f64 = 5.0;

/// The largest gain temperature exponent XTB accepted [practice: 1.5 for one transistor, 3 for a
/// Darlington pair].
pub const MAX_GAIN_TEMP_EXPONENT: f64 = 5.0;

/// The keys of an NPN part file.
pub const KEYS: &[&str] = &[
    "id",
    "description",
    "polarity",
    "package",
    "provenance",
    "structure",
    "vceo_max_v",
    "ic_max_a",
    "gain_min",
    "gain_max",
    "gain_temp_exponent",
    "vce_sat_max",
    "vbe_sat",
    "icbo_max_a",
    "storage_time_s",
    "internal_base_emitter_ohms",
    "tj_max_c",
    "r_th_ja_k_per_w",
];

/// One NPN part file as written on disk. Its JSON Schema (`pinlow schema part`) is derived
/// from it: the doc comments below are the descriptions an editor shows.
#[derive(Clone, Debug, Deserialize, Serialize, JsonSchema)]
#[serde(deny_unknown_fields)]
#[schemars(
    title = "npn part",
    description = "An NPN transistor or Darlington pair (`\"polarity\": \"npn\"`)."
)]
pub struct NpnRecord {
    /// Unique id used by boards and flags (matched without regard to case).
    #[schemars(length(min = 1))]
    pub id: String,
    /// One line for people.
    #[serde(default)]
    pub description: String,
    /// The drive kind: an NPN transistor or Darlington pair.
    #[schemars(extend("const" = super::KIND.name))]
    pub polarity: String,
    /// Package name (`TO-92`).
    #[schemars(length(min = 1))]
    pub package: String,
    /// Where the numbers come from (a datasheet and its revision, a measurement, invented demo data).
    #[schemars(length(min = 1))]
    pub provenance: String,
    /// `single` (default) or `darlington`.
    #[serde(default)]
    #[serde(skip_serializing_if = "Option::is_none")]
    pub structure: Option<Structure>,
    /// Collector-emitter breakdown with the base open (VCEO), V.
    #[schemars(transform = crate::schema::accepts(Accepts::Span(VOLTS)))]
    pub vceo_max_v: f64,
    /// Rated continuous collector current, A.
    #[schemars(transform = crate::schema::accepts(Accepts::Span(AMPS)))]
    pub ic_max_a: f64,
    /// Minimum DC gain at several collector currents, sorted by current.
    #[schemars(length(min = 1))]
    pub gain_min: Vec<GainRecord>,
    /// Maximum DC gain at several collector currents (optional; the yield draws use it), never below the minimum.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    #[schemars(length(min = 1))]
    pub gain_max: Option<Vec<GainRecord>>,
    /// Gummel-Poon XTB: gain grows as (T/298.15 K)^XTB [default: 1.5, a Darlington pair 3].
    #[serde(default, skip_serializing_if = "Option::is_none")]
    #[schemars(transform = crate::schema::between(0.0, MAX_GAIN_TEMP_EXPONENT))]
    pub gain_temp_exponent: Option<f64>,
    /// Maximum VCE(sat) at (IC, IB) points, sorted by current.
    #[schemars(length(min = 1))]
    pub vce_sat_max: Vec<VceSatRecord>,
    /// VBE(sat) minimum and maximum at (IC, IB) points, sorted by current.
    #[schemars(length(min = 1))]
    pub vbe_sat: Vec<VbeSatRecord>,
    /// Collector cut-off current (ICBO) at 25 °C, A [default: 50 nA].
    #[serde(default, skip_serializing_if = "Option::is_none")]
    #[schemars(transform = crate::schema::accepts(Accepts::Span(LEAKAGE_AMPS)))]
    pub icbo_max_a: Option<f64>,
    /// Storage time, s (not used by the model yet).
    #[serde(default, skip_serializing_if = "Option::is_none")]
    #[schemars(transform = crate::schema::accepts(Accepts::Span(SECONDS)))]
    pub storage_time_s: Option<f64>,
    /// The resistor inside a Darlington pair from base to emitter, ohms (nominal); with `"structure": "darlington"` only.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    #[schemars(transform = crate::schema::accepts(Accepts::Span(OHMS)))]
    pub internal_base_emitter_ohms: Option<f64>,
    /// Maximum junction temperature, °C.
    #[schemars(transform = crate::schema::strictly_between(TJ_MAX_RANGE_C.0, TJ_MAX_RANGE_C.1))]
    pub tj_max_c: f64,
    /// Junction-to-ambient thermal resistance (JEDEC JESD51), K/W.
    #[schemars(transform = crate::schema::accepts(Accepts::Span(KELVIN_PER_WATT)))]
    pub r_th_ja_k_per_w: f64,
}

/// Single transistor or Darlington pair.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Deserialize, Serialize, Default, JsonSchema)]
#[serde(rename_all = "lowercase")]
pub enum Structure {
    /// One transistor.
    #[default]
    Single,
    /// Two in a Darlington pair (docs/model.md, the Darlington pair).
    Darlington,
}

/// A gain point.
#[derive(Clone, Debug, Deserialize, Serialize, JsonSchema)]
#[serde(deny_unknown_fields)]
pub struct GainRecord {
    /// Collector current of the point, A.
    #[schemars(transform = crate::schema::accepts(Accepts::Span(AMPS)))]
    pub ic_a: f64,
    /// DC gain (hFE) at that current.
    #[schemars(transform = crate::schema::accepts(Accepts::Span(GAIN)))]
    pub hfe: f64,
}

/// A VCE(sat) point.
#[derive(Clone, Debug, Deserialize, Serialize, JsonSchema)]
#[serde(deny_unknown_fields)]
pub struct VceSatRecord {
    /// Collector current, A.
    #[schemars(transform = crate::schema::accepts(Accepts::Span(AMPS)))]
    pub ic_a: f64,
    /// Base current of the test condition, A, below the collector current.
    #[schemars(transform = crate::schema::accepts(Accepts::Span(AMPS)))]
    pub ib_a: f64,
    /// Maximum VCE(sat), V, at most the part's VCEO.
    #[schemars(transform = crate::schema::between(VOLTS.min, VCE_SAT_SANE_MAX_V))]
    pub v: f64,
}

/// A VBE(sat) point.
#[derive(Clone, Debug, Deserialize, Serialize, JsonSchema)]
#[serde(deny_unknown_fields)]
pub struct VbeSatRecord {
    /// Collector current, A.
    #[schemars(transform = crate::schema::accepts(Accepts::Span(AMPS)))]
    pub ic_a: f64,
    /// Base current of the test condition, A, below the collector current.
    #[schemars(transform = crate::schema::accepts(Accepts::Span(AMPS)))]
    pub ib_a: f64,
    /// Minimum VBE(sat), V, at most the maximum.
    #[schemars(transform = crate::schema::accepts(Accepts::Span(VOLTS)))]
    pub min_v: f64,
    /// Maximum VBE(sat), V, at most the part's VCEO.
    #[schemars(transform = crate::schema::between(VOLTS.min, VBE_SAT_SANE_MAX_V))]
    pub max_v: f64,
}

/// A VCE(sat) maximum at a test condition.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct VceSatPoint {
    /// Collector current.
    pub ic: Current,
    /// Base current of the test condition.
    pub ib: Current,
    /// The maximum VCE(sat).
    pub v: Voltage,
}

/// VBE(sat) limits at a test condition.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct VbeSatPoint {
    /// Collector current.
    pub ic: Current,
    /// Base current of the test condition.
    pub ib: Current,
    /// Minimum VBE(sat).
    pub min: Voltage,
    /// Maximum VBE(sat).
    pub max: Voltage,
}

/// A validated NPN part. Built only by [`NpnPart::from_value`], so every list is non-empty and
/// sorted by current and every figure is positive and plausible.
#[derive(Clone, Debug)]
pub struct NpnPart {
    /// Id, description, package, provenance, source, Tj,max, RthJA.
    pub info: PartInfo,
    /// Single transistor or Darlington pair.
    pub structure: Structure,
    /// VCEO rating.
    pub vceo: Voltage,
    /// Rated collector current.
    pub ic_max: Current,
    /// Minimum gain points at 25 C: (IC in A, hFE).
    pub gain_min: Vec<(f64, f64)>,
    /// Maximum gain points at 25 C, when the file gives them.
    pub gain_max: Option<Vec<(f64, f64)>>,
    /// The gain temperature exponent XTB.
    pub gain_temp_exponent: f64,
    /// True when the file gave no exponent and the default was taken.
    pub gain_temp_exponent_assumed: bool,
    /// VCE(sat) maximum points.
    pub vce_sat_max: Vec<VceSatPoint>,
    /// VBE(sat) points.
    pub vbe_sat: Vec<VbeSatPoint>,
    /// ICBO at 25 C.
    pub icbo_max: Current,
    /// True when the file gave no ICBO and the default was taken.
    pub icbo_assumed: bool,
    /// Storage time, when given.
    pub storage_time: Option<Time>,
    /// The resistor inside a Darlington pair from base to emitter (nominal), when given.
    pub internal_base_emitter: Option<Resistance>,
    /// The record as read (for `parts list --format json`).
    pub record: NpnRecord,
}

impl NpnPart {
    /// Read and validate an NPN part file's value (`file` names it in errors).
    pub fn from_value(value: &Value, file: &str, source: PartSource) -> Result<NpnPart> {
        for key in ["gain_min", "gain_max", "vce_sat_max", "vbe_sat"] {
            crate::shape::objects_in(value, key, file, "", "a point")?;
        }
        let rec: NpnRecord = from_value(file, "", value)?;
        Self::from_record(rec, file, source)
    }

    fn from_record(rec: NpnRecord, file: &str, source: PartSource) -> Result<NpnPart> {
        let c = PartCheck { file };
        c.text("id", &rec.id)?;
        c.no_controls("description", &rec.description)?;
        c.text("package", &rec.package)?;
        c.text("provenance", &rec.provenance)?;
        let structure = rec.structure.unwrap_or_default();
        let vceo = c.within("vceo_max_v", rec.vceo_max_v, VOLTS)?;
        let ic_max = c.within("ic_max_a", rec.ic_max_a, AMPS)?;
        let tj_max = c.tj_max(rec.tj_max_c)?;
        let rth = c.within("r_th_ja_k_per_w", rec.r_th_ja_k_per_w, KELVIN_PER_WATT)?;
        let gain_min = gain_points(&c, &rec.gain_min, "gain_min")?;
        let gain_max = match &rec.gain_max {
            Some(points) => Some(gain_points(&c, points, "gain_max")?),
            None => None,
        };
        if let Some(max) = &gain_max {
            // At the points of the maximum curve, and at the minimum curve's points within its
            // span, the maximum must not run below the minimum.
            for (i, &(ic, _)) in max.iter().enumerate() {
                if gain(max, ic) < gain(&gain_min, ic) {
                    return Err(Error::invalid(
                        c.at(&format!("gain_max[{i}].hfe")),
                        format!(
                            "the maximum gain {} at {} is below the minimum gain {} there",
                            show_number(gain(max, ic)),
                            crate::quantity::format_engineering(ic, "A"),
                            show_number(gain(&gain_min, ic))
                        ),
                    ));
                }
            }
            // Within the span of the maximum points (outside it the maximum is not stated).
            let (lo, hi) = (
                max.first().map(|p| p.0).unwrap_or(0.0),
                max.last().map(|p| p.0).unwrap_or(0.0),
            );
            for (i, &(ic, _)) in gain_min.iter().enumerate() {
                if (lo..=hi).contains(&ic) && gain(max, ic) < gain(&gain_min, ic) {
                    return Err(Error::invalid(
                        c.at(&format!("gain_min[{i}].hfe")),
                        format!(
                            "the minimum gain {} at {} is above the maximum gain {} there",
                            show_number(gain(&gain_min, ic)),
                            crate::quantity::format_engineering(ic, "A"),
                            show_number(gain(max, ic))
                        ),
                    ));
                }
            }
        }
        let default_xtb = match structure {
            Structure::Single => DEFAULT_GAIN_TEMP_EXPONENT,
            Structure::Darlington => DEFAULT_DARLINGTON_GAIN_TEMP_EXPONENT,
        };
        let xtb = match rec.gain_temp_exponent {
            Some(x) if x.is_finite() && (0.0..=MAX_GAIN_TEMP_EXPONENT).contains(&x) => x,
            Some(x) => {
                return Err(Error::range(
                    c.at("gain_temp_exponent"),
                    show_number(x),
                    "a number from 0 to 5 is needed (1.5 is typical of one transistor, 3 of a Darlington pair)",
                ))
            }
            None => default_xtb,
        };
        if rec.vce_sat_max.is_empty() {
            return Err(Error::invalid(
                c.at("vce_sat_max"),
                "needs at least one point",
            ));
        }
        let vce_bound = VCE_SAT_SANE_MAX_V.min(vceo);
        let mut vce_sat_max = Vec::new();
        for (i, p) in rec.vce_sat_max.iter().enumerate() {
            let path = |k: &str| format!("vce_sat_max[{i}].{k}");
            let ic = c.within(&path("ic_a"), p.ic_a, AMPS)?;
            let ib = c.within(&path("ib_a"), p.ib_a, AMPS)?;
            let v = c.within(&path("v"), p.v, VOLTS)?;
            base_below_collector(&c, &path("ib_a"), ib, ic)?;
            if v > vce_bound {
                return Err(Error::range(
                    c.at(&path("v")),
                    show_number(v),
                    format!(
                        "a saturation voltage above {} cannot be right (no transistor saturates above {} V, and this part's VCEO is {} V)",
                        show_number(vce_bound),
                        VCE_SAT_SANE_MAX_V,
                        show_number(vceo)
                    ),
                ));
            }
            vce_sat_max.push(VceSatPoint {
                ic: amps(ic),
                ib: amps(ib),
                v: volts(v),
            });
        }
        c.sorted(
            "vce_sat_max",
            "ic_a",
            rec.vce_sat_max.iter().map(|p| p.ic_a),
        )?;
        if rec.vbe_sat.is_empty() {
            return Err(Error::invalid(c.at("vbe_sat"), "needs at least one point"));
        }
        let vbe_bound = VBE_SAT_SANE_MAX_V.min(vceo);
        let mut vbe_sat = Vec::new();
        for (i, p) in rec.vbe_sat.iter().enumerate() {
            let path = |k: &str| format!("vbe_sat[{i}].{k}");
            let ic = c.within(&path("ic_a"), p.ic_a, AMPS)?;
            let ib = c.within(&path("ib_a"), p.ib_a, AMPS)?;
            let min = c.within(&path("min_v"), p.min_v, VOLTS)?;
            let max = c.within(&path("max_v"), p.max_v, VOLTS)?;
            base_below_collector(&c, &path("ib_a"), ib, ic)?;
            if min > max {
                return Err(Error::invalid(
                    c.at(&path("min_v")),
                    format!(
                        "the minimum {} V is above the maximum {} V",
                        show_number(min),
                        show_number(max)
                    ),
                ));
            }
            if max > vbe_bound {
                return Err(Error::range(
                    c.at(&path("max_v")),
                    show_number(max),
                    format!(
                        "a base-emitter saturation voltage above {} cannot be right (no base-emitter path needs more than {} V, and this part's VCEO is {} V)",
                        show_number(vbe_bound),
                        VBE_SAT_SANE_MAX_V,
                        show_number(vceo)
                    ),
                ));
            }
            vbe_sat.push(VbeSatPoint {
                ic: amps(ic),
                ib: amps(ib),
                min: volts(min),
                max: volts(max),
            });
        }
        c.sorted("vbe_sat", "ic_a", rec.vbe_sat.iter().map(|p| p.ic_a))?;
        let icbo = match rec.icbo_max_a {
            Some(v) => c.within("icbo_max_a", v, LEAKAGE_AMPS)?,
            None => DEFAULT_ICBO_A,
        };
        let storage_time = match rec.storage_time_s {
            Some(v) => Some(seconds(c.within("storage_time_s", v, SECONDS)?)),
            None => None,
        };
        let internal = match rec.internal_base_emitter_ohms {
            Some(_) if structure != Structure::Darlington => {
                return Err(Error::invalid(
                    c.at("internal_base_emitter_ohms"),
                    "is the resistor inside a Darlington pair: give `\"structure\": \"darlington\"` too",
                ))
            }
            Some(v) => Some(ohms(c.within("internal_base_emitter_ohms", v, OHMS)?)),
            None => None,
        };
        Ok(NpnPart {
            info: PartInfo {
                id: rec.id.clone(),
                description: rec.description.clone(),
                polarity: "npn",
                package: rec.package.clone(),
                provenance: rec.provenance.clone(),
                tj_max: celsius(tj_max),
                r_th_ja: kelvin_per_watt(rth),
                source,
            },
            structure,
            vceo: volts(vceo),
            ic_max: amps(ic_max),
            gain_min,
            gain_max,
            gain_temp_exponent: xtb,
            gain_temp_exponent_assumed: rec.gain_temp_exponent.is_none(),
            vce_sat_max,
            vbe_sat,
            icbo_max: amps(icbo),
            icbo_assumed: rec.icbo_max_a.is_none(),
            storage_time,
            internal_base_emitter: internal,
            record: rec,
        })
    }

    /// True for a Darlington pair.
    pub fn is_darlington(&self) -> bool {
        self.structure == Structure::Darlington
    }

    /// Minimum gain at `ic` and 25 C (log-log between points, flat below, 1/IC above).
    pub fn gain_min_at(&self, ic: Current) -> f64 {
        gain(&self.gain_min, ic.base())
    }

    /// Maximum gain at `ic` and 25 C, when the part gives maximum points.
    pub fn gain_max_at(&self, ic: Current) -> Option<f64> {
        self.gain_max.as_deref().map(|p| gain(p, ic.base()))
    }

    /// Maximum VCE(sat) at `ic`: the first value below the first point, linear between points,
    /// through the origin above the last (stage-model 3).
    pub fn vce_sat_max_at(&self, ic: Current) -> Voltage {
        let pts: Vec<(f64, f64)> = self
            .vce_sat_max
            .iter()
            .map(|p| (p.ic.base(), p.v.base()))
            .collect();
        volts(resistive(&pts, ic.base()))
    }

    /// VBE(sat) (minimum, maximum) at `ic` and 25 C: linear in IC between points, held at the
    /// end values outside them (stage-model 5).
    pub fn vbe_sat_at(&self, ic: Current) -> (Voltage, Voltage) {
        let lo: Vec<(f64, f64)> = self
            .vbe_sat
            .iter()
            .map(|p| (p.ic.base(), p.min.base()))
            .collect();
        let hi: Vec<(f64, f64)> = self
            .vbe_sat
            .iter()
            .map(|p| (p.ic.base(), p.max.base()))
            .collect();
        (volts(held(&lo, ic.base())), volts(held(&hi, ic.base())))
    }
}

fn gain_points(c: &PartCheck<'_>, points: &[GainRecord], name: &str) -> Result<Vec<(f64, f64)>> {
    if points.is_empty() {
        return Err(Error::invalid(c.at(name), "needs at least one point"));
    }
    let mut out = Vec::new();
    for (i, p) in points.iter().enumerate() {
        let ic = c.within(&format!("{name}[{i}].ic_a"), p.ic_a, AMPS)?;
        let hfe = c.within(&format!("{name}[{i}].hfe"), p.hfe, GAIN)?;
        out.push((ic, hfe));
    }
    c.sorted(name, "ic_a", points.iter().map(|p| p.ic_a))?;
    Ok(out)
}

/// A saturation test point drives less base than collector current (IC/IB = 10 by datasheet
/// convention; a base current at or above the collector's is a typing error).
fn base_below_collector(c: &PartCheck<'_>, path: &str, ib: f64, ic: f64) -> Result<()> {
    if ib >= ic {
        return Err(Error::invalid(
            c.at(path),
            format!(
                "the base current {} is not below the collector current {} of its point; saturation figures are given at IC/IB of about 10 (250 for a Darlington pair)",
                crate::quantity::format_engineering(ib, "A"),
                crate::quantity::format_engineering(ic, "A")
            ),
        ));
    }
    Ok(())
}

#[cfg(test)]
mod tests {
    use super::*;

    fn read(text: &str) -> Result<NpnPart> {
        let v: Value = serde_json::from_str(text).expect("json");
        NpnPart::from_value(&v, "p.json", PartSource::File("p.json".into()))
    }

    const GOOD: &str = r#"{"id": "x", "polarity": "npn", "package": "TO-92", "provenance": "test",
        "vceo_max_v": 40, "ic_max_a": 0.2,
        "gain_min": [{"ic_a": 0.01, "hfe": 100}], "gain_max": [{"ic_a": 0.01, "hfe": 300}],
        "vce_sat_max": [{"ic_a": 0.01, "ib_a": 0.001, "v": 0.2}],
        "vbe_sat": [{"ic_a": 0.01, "ib_a": 0.001, "min_v": 0.65, "max_v": 0.85}],
        "tj_max_c": 150, "r_th_ja_k_per_w": 200}"#;

    #[test]
    fn a_plausible_part_reads() {
        let p = read(GOOD).expect("valid");
        assert_eq!(p.gain_temp_exponent, 1.5);
        assert!(p.icbo_assumed && !p.is_darlington());
    }

    #[test]
    fn physically_impossible_parts_are_refused() {
        for (from, to, needle) in [
            (
                r#""v": 0.2"#,
                r#""v": 9000"#,
                "vce_sat_max[0].v: 9000 is not allowed",
            ),
            (
                r#""ib_a": 0.001, "v""#,
                r#""ib_a": 0.02, "v""#,
                "vce_sat_max[0].ib_a",
            ),
            (r#""hfe": 300"#, r#""hfe": 50"#, "gain_max[0].hfe"),
            (
                r#""max_v": 0.85"#,
                r#""max_v": 45"#,
                "vbe_sat[0].max_v: 45 is not allowed",
            ),
            (
                r#""id": "x""#,
                "\"id\": \"x\\u001b[2J\"",
                "control character U+001B",
            ),
        ] {
            let err = read(&GOOD.replace(from, to)).expect_err(needle).to_string();
            assert!(err.contains(needle), "{needle}: {err}");
        }
    }

    #[test]
    fn positional_points_are_refused() {
        let text = GOOD.replace(r#"[{"ic_a": 0.01, "hfe": 100}]"#, "[[0.01, 100]]");
        let err = read(&text).expect_err("positional").to_string();
        assert!(
            err.contains("gain_min[0]: a point is written as an object"),
            "{err}"
        );
    }
}
