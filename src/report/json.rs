//! The JSON renderer: the report types serialised as they are (files.md).

use super::model::Report;
use super::Renderer;

/// Renders a report as pretty-printed JSON.
#[derive(Clone, Copy, Debug, Default)]
pub struct JsonRenderer;

impl Renderer for JsonRenderer {
    fn render(&self, report: &Report) -> String {
        // Serialising plain structs of strings, numbers and options cannot fail; fall back to a
        // JSON error object rather than panic all the same.
        let mut text = serde_json::to_string_pretty(report)
            .unwrap_or_else(|e| format!("{{\"error\": {:?}}}", e.to_string()));
        text.push('\n');
        text
    }
}
