//! One report value, and its renderers (table, JSON, Markdown). Renderers never compute; they
//! draw a report part by part (head, stages, tail) so that large boards stream. Text from users
//! passes through [`escape`] in every format; the table fits a width ([`wrap`]) when given one.

pub mod escape;
mod json;
mod layout;
mod markdown;
mod model;
pub mod pick;
pub mod rows;
pub mod stream;
mod table;
pub mod wrap;

pub use json::JsonRenderer;
pub use markdown::MarkdownRenderer;
pub use model::{
    num, rounded_need, sig, ChangeReport, CheckReport, ClampReport, ConditionsReport, FigureReport,
    FixReport, NeedReport, NoYield, RemedyReport, ResistorReport, Short, StageReport, Worsened,
    YieldReport, GENERAL_CAUTION, MODEL_VERSION,
};
pub use stream::{render_report, write_report, Head, Renderer, Report, SummaryRow, Tail};
pub use table::TableRenderer;
pub use wrap::output_width;

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

/// A renderer for a format that draws every line whole; `color` only affects tables.
pub fn renderer(format: Format, color: bool) -> Box<dyn Renderer> {
    renderer_with_width(format, color, None)
}

/// A renderer for a format; `color` and `width` (fit to this many columns, `None`: whole
/// lines) only affect tables. JSON and Markdown are never wrapped: they are read by programs
/// and Markdown viewers, which lay text out themselves.
pub fn renderer_with_width(format: Format, color: bool, width: Option<usize>) -> Box<dyn Renderer> {
    match format {
        Format::Table => Box::new(TableRenderer { color, width }),
        Format::Json => Box::new(JsonRenderer::default()),
        Format::Markdown => Box::new(MarkdownRenderer),
    }
}

/// Render a whole in-memory report in a format, every line whole.
pub fn render(report: &Report, format: Format, color: bool) -> String {
    render_with_width(report, format, color, None)
}

/// Render a whole in-memory report in a format, tables fitted to `width` columns when given.
pub fn render_with_width(
    report: &Report,
    format: Format,
    color: bool,
    width: Option<usize>,
) -> String {
    render_report(report, renderer_with_width(format, color, width).as_mut())
}
