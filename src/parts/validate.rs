//! Validation of a part record: required text, positive finite figures, points sorted by current,
//! VBE(sat) minimum below its maximum. Every error names the file and the JSON path.

use super::part::{GainPoint, Part, VbeSatPoint, VceSatPoint};
use super::record::{GainRecord, PartRecord};
use super::PartSource;
use crate::error::{Error, Result};
use crate::quantity::limits::{
    show_number, Span, AMPS, GAIN, KELVIN_PER_WATT, LEAKAGE_AMPS, SECONDS, VOLTS,
};
use crate::quantity::{amps, celsius, kelvin_per_watt, seconds, volts};

/// Gummel-Poon beta temperature exponent XTB when a part gives none: 1.5
/// [text: Gummel-Poon XTB; typical silicon value from memory] (stage-model 3).
pub const DEFAULT_GAIN_TEMP_EXPONENT: f64 = 1.5;
/// ICBO at 25 C when a part gives none: 50 nA [memory] (stage-model 3).
pub const DEFAULT_ICBO_A: f64 = 50e-9;

/// Check a record read from `file` and build the typed part.
pub fn part_from_record(rec: &PartRecord, file: &str, source: PartSource) -> Result<Part> {
    let at = |path: &str| format!("{file}: {path}");
    let text = |path: &str, v: &str| -> Result<()> {
        if v.trim().is_empty() {
            return Err(Error::invalid(at(path), "must not be empty"));
        }
        Ok(())
    };
    text("id", &rec.id)?;
    text("provenance", &rec.provenance)?;
    text("package", &rec.package)?;
    if rec.polarity != "npn" {
        return Err(Error::invalid(
            at("polarity"),
            format!(
                "`{}` is not modelled: version 1 handles `npn` low-side switches only",
                rec.polarity
            ),
        ));
    }
    // Every figure must be positive, finite and inside its span (quantity::limits).
    let positive = |path: &str, v: f64, span: Span| -> Result<f64> {
        span.check(v)
            .map_err(|message| Error::invalid(at(path), message))
    };
    let vceo = positive("vceo_max_v", rec.vceo_max_v, VOLTS)?;
    let ic_max = positive("ic_max_a", rec.ic_max_a, AMPS)?;
    let tj_max = rec.tj_max_c;
    if !(tj_max.is_finite() && tj_max > 25.0 && tj_max < 400.0) {
        return Err(Error::invalid(
            at("tj_max_c"),
            format!(
                "{tj_max} is not allowed: a junction limit above 25 C and below 400 C is needed"
            ),
        ));
    }
    let rth = positive("r_th_ja_k_per_w", rec.r_th_ja_k_per_w, KELVIN_PER_WATT)?;
    let gain_min = gain_points(&rec.gain_min, "gain_min", &positive, &at)?;
    let gain_max = match &rec.gain_max {
        Some(points) => {
            let pts = gain_points(points, "gain_max", &positive, &at)?;
            Some(pts)
        }
        None => None,
    };
    let xtb = match rec.gain_temp_exponent {
        Some(x) if x.is_finite() && (0.0..=5.0).contains(&x) => x,
        Some(x) => {
            return Err(Error::invalid(
                at("gain_temp_exponent"),
                format!(
                    "{} is not allowed: a number from 0 to 5 is needed (1.5 is typical)",
                    show_number(x)
                ),
            ))
        }
        None => DEFAULT_GAIN_TEMP_EXPONENT,
    };
    if rec.vce_sat_max.is_empty() {
        return Err(Error::invalid(
            at("vce_sat_max"),
            "needs at least one point",
        ));
    }
    let mut vce_sat_max = Vec::new();
    for (i, p) in rec.vce_sat_max.iter().enumerate() {
        let path = |k: &str| format!("vce_sat_max[{i}].{k}");
        vce_sat_max.push(VceSatPoint {
            ic: amps(positive(&path("ic_a"), p.ic_a, AMPS)?),
            ib: amps(positive(&path("ib_a"), p.ib_a, AMPS)?),
            v: volts(positive(&path("v"), p.v, VOLTS)?),
        });
    }
    sorted(rec.vce_sat_max.iter().map(|p| p.ic_a), "vce_sat_max", &at)?;
    if rec.vbe_sat.is_empty() {
        return Err(Error::invalid(at("vbe_sat"), "needs at least one point"));
    }
    let mut vbe_sat = Vec::new();
    for (i, p) in rec.vbe_sat.iter().enumerate() {
        let path = |k: &str| format!("vbe_sat[{i}].{k}");
        let min = positive(&path("min_v"), p.min_v, VOLTS)?;
        let max = positive(&path("max_v"), p.max_v, VOLTS)?;
        if min > max {
            return Err(Error::invalid(
                at(&path("min_v")),
                format!("minimum {min} V is above the maximum {max} V"),
            ));
        }
        vbe_sat.push(VbeSatPoint {
            ic: amps(positive(&path("ic_a"), p.ic_a, AMPS)?),
            ib: amps(positive(&path("ib_a"), p.ib_a, AMPS)?),
            min: volts(min),
            max: volts(max),
        });
    }
    sorted(rec.vbe_sat.iter().map(|p| p.ic_a), "vbe_sat", &at)?;
    let icbo = match rec.icbo_max_a {
        Some(v) => positive("icbo_max_a", v, LEAKAGE_AMPS)?,
        None => DEFAULT_ICBO_A,
    };
    let storage_time = match rec.storage_time_s {
        Some(v) => Some(seconds(positive("storage_time_s", v, SECONDS)?)),
        None => None,
    };
    Ok(Part {
        id: rec.id.clone(),
        description: rec.description.clone(),
        polarity: rec.polarity.clone(),
        package: rec.package.clone(),
        provenance: rec.provenance.clone(),
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
        tj_max: celsius(tj_max),
        r_th_ja: kelvin_per_watt(rth),
        source,
    })
}

fn gain_points(
    points: &[GainRecord],
    name: &str,
    positive: &dyn Fn(&str, f64, Span) -> Result<f64>,
    at: &dyn Fn(&str) -> String,
) -> Result<Vec<GainPoint>> {
    if points.is_empty() {
        return Err(Error::invalid(at(name), "needs at least one point"));
    }
    let mut out = Vec::new();
    for (i, p) in points.iter().enumerate() {
        out.push(GainPoint {
            ic: amps(positive(&format!("{name}[{i}].ic_a"), p.ic_a, AMPS)?),
            hfe: positive(&format!("{name}[{i}].hfe"), p.hfe, GAIN)?,
        });
    }
    sorted(points.iter().map(|p| p.ic_a), name, at)?;
    Ok(out)
}

/// Points must be sorted by strictly increasing current.
fn sorted(
    currents: impl Iterator<Item = f64>,
    name: &str,
    at: &dyn Fn(&str) -> String,
) -> Result<()> {
    let mut prev: Option<f64> = None;
    for (i, ic) in currents.enumerate() {
        if let Some(p) = prev {
            if ic <= p {
                return Err(Error::invalid(
                    at(&format!("{name}[{i}].ic_a")),
                    format!("points must be sorted by increasing current: {ic} A follows {p} A"),
                ));
            }
        }
        prev = Some(ic);
    }
    Ok(())
}
