//! Views of the parts library: `parts list` and `parts show`.

use comfy_table::presets::UTF8_FULL_CONDENSED;
use comfy_table::Table;
use serde_json::json;

use crate::parts::{Library, Part};
use crate::quantity::{format_engineering as fe, Base};
use crate::report::Format;

/// The table of every part (or JSON / Markdown).
pub fn list(lib: &Library, format: Format) -> String {
    let headers = [
        "ID",
        "Polarity",
        "Package",
        "VCEO [V]",
        "IC max [A]",
        "Min gain @ IC",
        "Provenance",
    ];
    let rows: Vec<Vec<String>> = lib
        .iter()
        .map(|p| {
            let best = p
                .gain_min
                .iter()
                .max_by(|a, b| a.hfe.total_cmp(&b.hfe))
                .map(|g| format!("{} @ {}", trim(g.hfe), fe(g.ic.base(), "A")))
                .unwrap_or_else(|| "-".to_string());
            vec![
                p.id.clone(),
                p.polarity.clone(),
                p.package.clone(),
                trim(p.vceo.base()),
                trim(p.ic_max.base()),
                best,
                p.provenance.clone(),
            ]
        })
        .collect();
    match format {
        Format::Json => {
            let items: Vec<_> = lib
                .iter()
                .map(|p| {
                    json!({
                        "id": p.id, "polarity": p.polarity, "package": p.package,
                        "vceo_max_v": p.vceo.base(), "ic_max_a": p.ic_max.base(),
                        "gain_min": p.gain_min.iter().map(|g| json!({"ic_a": g.ic.base(), "hfe": g.hfe})).collect::<Vec<_>>(),
                        "provenance": p.provenance, "source": p.source.to_string(),
                    })
                })
                .collect();
            format!(
                "{}\n",
                serde_json::to_string_pretty(&json!({ "parts": items })).unwrap_or_default()
            )
        }
        Format::Markdown => {
            let mut out = format!(
                "| {} |\n|{}\n",
                headers.join(" | "),
                " --- |".repeat(headers.len())
            );
            for r in rows {
                out.push_str(&format!("| {} |\n", r.join(" | ").replace('\n', " ")));
            }
            out
        }
        Format::Table => {
            let mut t = Table::new();
            t.load_preset(UTF8_FULL_CONDENSED);
            t.force_no_tty();
            t.set_header(headers.to_vec());
            for r in rows {
                t.add_row(r);
            }
            format!("{t}\n")
        }
    }
}

/// Every figure of one part.
pub fn show(p: &Part, format: Format) -> String {
    let mut lines = vec![
        ("id", p.id.clone()),
        ("description", p.description.clone()),
        ("polarity", p.polarity.clone()),
        ("package", p.package.clone()),
        ("provenance", p.provenance.clone()),
        ("source", p.source.to_string()),
        ("VCEO", fe(p.vceo.base(), "V")),
        ("IC max", fe(p.ic_max.base(), "A")),
        ("Tj max", format!("{} °C", trim(p.tj_max.base()))),
        ("RthJA", format!("{} K/W", trim(p.r_th_ja.base()))),
        (
            "ICBO max (25 °C)",
            format!(
                "{}{}",
                fe(p.icbo_max.base(), "A"),
                if p.icbo_assumed { " (assumed)" } else { "" }
            ),
        ),
        (
            "gain temperature exponent",
            format!(
                "{}{}",
                trim(p.gain_temp_exponent),
                if p.gain_temp_exponent_assumed {
                    " (assumed)"
                } else {
                    ""
                }
            ),
        ),
    ];
    for g in &p.gain_min {
        lines.push((
            "hFE min",
            format!("{} at {}", trim(g.hfe), fe(g.ic.base(), "A")),
        ));
    }
    for g in p.gain_max.iter().flatten() {
        lines.push((
            "hFE max",
            format!("{} at {}", trim(g.hfe), fe(g.ic.base(), "A")),
        ));
    }
    for v in &p.vce_sat_max {
        lines.push((
            "VCE(sat) max",
            format!(
                "{} at IC {}, IB {}",
                fe(v.v.base(), "V"),
                fe(v.ic.base(), "A"),
                fe(v.ib.base(), "A")
            ),
        ));
    }
    for v in &p.vbe_sat {
        lines.push((
            "VBE(sat)",
            format!(
                "{} .. {} at IC {}, IB {}",
                fe(v.min.base(), "V"),
                fe(v.max.base(), "V"),
                fe(v.ic.base(), "A"),
                fe(v.ib.base(), "A")
            ),
        ));
    }
    match format {
        Format::Json => {
            let map: Vec<_> = lines
                .iter()
                .map(|(k, v)| json!({"field": k, "value": v}))
                .collect();
            format!(
                "{}\n",
                serde_json::to_string_pretty(&json!({ "id": p.id, "fields": map }))
                    .unwrap_or_default()
            )
        }
        Format::Markdown => {
            let mut out = "| Field | Value |\n| --- | --- |\n".to_string();
            for (k, v) in lines {
                out.push_str(&format!("| {k} | {v} |\n"));
            }
            out
        }
        Format::Table => {
            let mut t = Table::new();
            t.load_preset(UTF8_FULL_CONDENSED);
            t.force_no_tty();
            t.set_header(vec!["Field", "Value"]);
            for (k, v) in lines {
                t.add_row(vec![k.to_string(), v]);
            }
            format!("{t}\n")
        }
    }
}

fn trim(v: f64) -> String {
    crate::report::rows::plain(Some(v), 4)
}
