//! One report value, and its renderers (table, JSON, Markdown). Renderers never compute.

mod json;
mod markdown;
mod model;
pub mod rows;
mod table;

pub use json::JsonRenderer;
pub use markdown::MarkdownRenderer;
pub use model::{
    sig, ClampReport, Conditions, Report, ResistorReport, StageReport, WorstCaseReport,
    GENERAL_CAUTION, MODEL_VERSION,
};
pub use table::TableRenderer;

/// Something that draws a report.
pub trait Renderer {
    /// The whole report as text.
    fn render(&self, report: &Report) -> String;
}

/// Output formats.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum Format {
    /// Text tables.
    Table,
    /// JSON per files.md.
    Json,
    /// Markdown for reviews.
    Markdown,
}

/// Render in a format; `color` only affects tables.
pub fn render(report: &Report, format: Format, color: bool) -> String {
    match format {
        Format::Table => TableRenderer { color }.render(report),
        Format::Json => JsonRenderer.render(report),
        Format::Markdown => MarkdownRenderer.render(report),
    }
}
