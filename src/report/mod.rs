//! One report value, and its renderers (table, JSON, Markdown). Renderers never compute; they
//! draw a report part by part (head, stages, tail) so that large boards stream.

mod json;
mod markdown;
mod model;
pub mod rows;
pub mod stream;
mod table;

pub use json::JsonRenderer;
pub use markdown::MarkdownRenderer;
pub use model::{
    sig, ClampReport, Conditions, Report, ResistorReport, StageReport, WorstCaseReport,
    GENERAL_CAUTION, MODEL_VERSION,
};
pub use stream::{render_report, write_report, Head, Renderer, SummaryRow, Tail};
pub use table::TableRenderer;

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

/// A renderer for a format; `color` only affects tables.
pub fn renderer(format: Format, color: bool) -> Box<dyn Renderer> {
    match format {
        Format::Table => Box::new(TableRenderer { color }),
        Format::Json => Box::new(JsonRenderer::default()),
        Format::Markdown => Box::new(MarkdownRenderer),
    }
}

/// Render a whole in-memory report in a format.
pub fn render(report: &Report, format: Format, color: bool) -> String {
    render_report(report, renderer(format, color).as_mut())
}
