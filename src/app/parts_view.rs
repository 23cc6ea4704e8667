//! Views of the parts library: `parts list` and `parts show`.

use comfy_table::presets::UTF8_FULL_CONDENSED;
use comfy_table::Table;
use serde_json::Value;

use crate::drive::Switch;
use crate::parts::Library;
use crate::quantity::Base;
use crate::report::escape::{markdown_text, terminal_text};
use crate::report::Format;

/// The table of every part (or JSON / Markdown).
pub fn list(lib: &Library, format: Format) -> String {
    let headers = [
        "ID",
        "Drive",
        "Package",
        "V rating [V]",
        "I rating [A]",
        "Key figures",
        "Provenance",
    ];
    let rows: Vec<Vec<String>> = lib
        .iter()
        .map(|p| {
            let r = p.ratings();
            let info = p.info();
            vec![
                info.id.clone(),
                info.polarity.to_string(),
                info.package.clone(),
                trim(r.voltage.base()),
                trim(r.current.base()),
                p.summary(),
                info.provenance.clone(),
            ]
        })
        .collect();
    match format {
        Format::Json => {
            let items: Vec<Value> = lib
                .iter()
                .map(|p| {
                    let mut v = p.to_json();
                    if let Value::Object(m) = &mut v {
                        m.insert("source".into(), Value::from(p.info().source.to_string()));
                    }
                    v
                })
                .collect();
            format!(
                "{}\n",
                crate::report::escape::json_pretty(&serde_json::json!({ "parts": items }))
                    .unwrap_or_default()
            )
        }
        Format::Markdown => {
            let mut out = format!(
                "| {} |\n|{}\n",
                headers.join(" | "),
                " --- |".repeat(headers.len())
            );
            for r in rows {
                let cells: Vec<String> = r.iter().map(|c| markdown_text(c)).collect();
                out.push_str(&format!("| {} |\n", cells.join(" | ")));
            }
            out
        }
        Format::Table => {
            let mut t = Table::new();
            t.load_preset(UTF8_FULL_CONDENSED);
            t.force_no_tty();
            t.set_header(headers.to_vec());
            for r in rows {
                t.add_row(r.iter().map(|c| terminal_text(c)).collect::<Vec<_>>());
            }
            format!("{t}\n")
        }
    }
}

/// Every figure of one part.
pub fn show(p: &dyn Switch, format: Format) -> String {
    let info = p.info();
    let mut lines: Vec<(String, String)> = vec![
        ("id".into(), info.id.clone()),
        ("description".into(), info.description.clone()),
        ("drive".into(), info.polarity.to_string()),
        ("package".into(), info.package.clone()),
        ("provenance".into(), info.provenance.clone()),
        ("source".into(), info.source.to_string()),
    ];
    lines.extend(p.show());
    match format {
        Format::Json => {
            let map: Vec<Value> = lines
                .iter()
                .map(|(k, v)| serde_json::json!({"field": k, "value": v}))
                .collect();
            format!(
                "{}\n",
                crate::report::escape::json_pretty(
                    &serde_json::json!({ "id": info.id, "fields": map })
                )
                .unwrap_or_default()
            )
        }
        Format::Markdown => {
            let mut out = "| Field | Value |\n| --- | --- |\n".to_string();
            for (k, v) in lines {
                out.push_str(&format!(
                    "| {} | {} |\n",
                    markdown_text(&k),
                    markdown_text(&v)
                ));
            }
            out
        }
        Format::Table => {
            let mut t = Table::new();
            t.load_preset(UTF8_FULL_CONDENSED);
            t.force_no_tty();
            t.set_header(vec!["Field", "Value"]);
            for (k, v) in lines {
                t.add_row(vec![terminal_text(&k), terminal_text(&v)]);
            }
            format!("{t}\n")
        }
    }
}

fn trim(v: f64) -> String {
    crate::report::rows::plain(Some(v), 4)
}
